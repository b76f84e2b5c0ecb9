"""Maximal admissible sets: corral against the loop a user writes with scipy.

Question: how long does corral.max_admissible_set take on random strictly stable systems of
growing size, and how does that compare with the straightforward loop on scipy's HiGHS — one
linprog call per new row G A^k over all rows so far, no redundancy removal while iterating,
one redundancy pass at the end — run in the same process on the same systems (with a time cap
per run)?

Systems: A = Q D Qᵀ, Q a random orthogonal matrix, D block diagonal with 2x2 rotations by
angles uniform in [0.2, 0.8] scaled by radii uniform in [0.95, 0.99] (a 1x1 block of the same
radius range when n is odd); X = [-1, 1]^n. A second family closes a random plant with two
inputs under its LQR gain (Q = I, R = I) with box states [-1, 1]^n and inputs [-1, 1]^2.
Targets (reported, never asserted): >= 50x the scipy loop at n = 12; n = 32 within 60 s.
Also reported: the time of verify_invariance on the result in floating point and with
exact=True (rational worst margin), for n up to --exact-up-to.

Usage: python3 benchmarks/bench_admissible.py [--n 2,4,8,12,16,24,32] [--seed S] [--cap SECONDS]
"""

from __future__ import annotations

import argparse
import math
import os
import time

import corral
import numpy as np
import scipy
from bench_common import run_capped, write_results
from scipy.optimize import linprog


def random_stable(rng, n):
    D = np.zeros((n, n))
    i = 0
    while i < n:
        r = rng.uniform(0.95, 0.99)
        if i + 1 < n:
            th = rng.uniform(0.2, 0.8)
            D[i : i + 2, i : i + 2] = r * np.array(
                [[math.cos(th), -math.sin(th)], [math.sin(th), math.cos(th)]]
            )
            i += 2
        else:
            D[i, i] = r
            i += 1
    Q, _ = np.linalg.qr(rng.normal(size=(n, n)))
    return Q @ D @ Q.T


def scipy_loop(A, G, f, queue, max_steps=5000):
    """The baseline (scipy HiGHS): rows G A^k added one step at a time, each new row tested by
    one LP over all rows so far; at the end one redundancy pass (one LP per row, the row
    relaxed by 1)."""
    t0 = time.perf_counter()
    rows, rhs = [G], [f]
    Ak = np.eye(A.shape[0])
    lps = 0
    scale = max(1.0, np.abs(f).max())
    t_star = -1
    for t in range(max_steps):
        t_star = t
        Ak = Ak @ A
        cand = G @ Ak
        H, h = np.vstack(rows), np.concatenate(rhs)
        new = []
        for c, fi in zip(cand, f):
            res = linprog(-c, A_ub=H, b_ub=h, bounds=[(None, None)] * len(c), method="highs")
            lps += 1
            if res.status == 3 or -res.fun > fi + 1e-9 * scale:
                new.append(True)
            else:
                new.append(False)
        if not any(new):
            break
        rows.append(cand)
        rhs.append(f)
    H, h = np.vstack(rows), np.concatenate(rhs)
    keep = np.ones(len(h), dtype=bool)
    for i in range(len(h)):
        hb = h.copy()
        hb[i] += 1.0
        mask = keep.copy()
        res = linprog(
            -H[i], A_ub=H[mask], b_ub=hb[mask], bounds=[(None, None)] * H.shape[1], method="highs"
        )
        lps += 1
        if res.status == 0 and -res.fun <= h[i] + 1e-9 * scale:
            keep[i] = False
    queue.put((time.perf_counter() - t0, t_star, int(keep.sum()), lps))


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--n", default="2,4,8,12,16,24,32")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--cap", type=float, default=300.0, help="seconds per scipy run")
    ap.add_argument(
        "--baseline-up-to", type=int, default=16, help="largest n at which the scipy loop runs"
    )
    ap.add_argument("--exact-up-to", type=int, default=24, help="largest n for the exact re-check")
    ap.add_argument(
        "--out", default=os.path.join(os.path.dirname(__file__), "results", "admissible.json")
    )
    args = ap.parse_args()
    ns = [int(x) for x in args.n.split(",")]
    print(
        f"corral {corral.__version__}, scipy {scipy.__version__}, seed {args.seed}, "
        f"cap {args.cap:.0f} s per scipy run, default LP backend {corral.default_backend()}"
    )
    out = []
    for family in ("autonomous", "closed loop (LQR, 2 inputs)"):
        print(f"\n{family}")
        print(
            f"{'n':>3} {'t*':>5} {'rows':>6} {'LPs':>7} {'fb':>3} {'corral s':>9} "
            f"{'scipy s':>9} {'scipy t*':>8} {'rows':>5} {'ratio':>8} {'verify s':>9} "
            f"{'exact s':>8} {'exact margin':>13}"
        )
        for n in ns:
            rng = np.random.default_rng(args.seed * 1000 + n)
            X = corral.Polytope.box(-np.ones(n), np.ones(n))
            if family == "autonomous":
                A = random_stable(rng, n)
                t0 = time.perf_counter()
                r = corral.max_admissible_set(A, X)
                G, f, Acl = X.A, X.b, A
            else:
                m = 2
                A = rng.normal(size=(n, n)) / math.sqrt(n) * 1.1
                B = rng.normal(size=(n, m))
                K = corral.lqr(A, B, np.eye(n), np.eye(m)).K
                U = corral.Polytope.box(-np.ones(m), np.ones(m))
                t0 = time.perf_counter()
                r = corral.closed_loop_admissible_set(A, B, K, X, U)
                G = np.vstack([X.A, -U.A @ K])
                f = np.concatenate([X.b, U.b])
                Acl = A - B @ K
            sec = time.perf_counter() - t0
            base = None
            if n <= args.baseline_up_to:
                base = run_capped(scipy_loop, (Acl, G, f), args.cap)
            if base is None:
                b_txt = f"{'>cap' if n <= args.baseline_up_to else 'not run':>9} {'':>8} {'':>5}"
                ratio = (
                    f"{'>' + format(args.cap / sec, '.0f'):>8}"
                    if n <= args.baseline_up_to
                    else f"{'':>8}"
                )
            else:
                b_txt = f"{base[0]:9.2f} {base[1]:>8} {base[2]:>5}"
                ratio = f"{base[0] / sec:8.1f}"
            t0 = time.perf_counter()
            corral.verify_invariance(Acl, r.set)
            v_sec = time.perf_counter() - t0
            ex_sec, ex_margin = None, None
            if n <= args.exact_up_to:
                t0 = time.perf_counter()
                ex = corral.verify_invariance(Acl, r.set, exact=True)
                ex_sec = time.perf_counter() - t0
                ex_margin = float(ex.worst_margin_exact)
            ex_txt = (
                f"{ex_sec:8.2f} {ex_margin:13.2e}" if ex_sec is not None else f"{'':>8} {'':>13}"
            )
            print(
                f"{n:>3} {r.steps:>5} {r.set.num_rows:>6} {r.lp_solves:>7} {r.fallbacks:>3} "
                f"{sec:9.3f} {b_txt} {ratio} {v_sec:9.3f} {ex_txt}"
                + ("" if r.converged else "  NOT CONVERGED")
            )
            out.append(
                dict(
                    family=family,
                    n=n,
                    steps=r.steps,
                    rows=r.set.num_rows,
                    lp_solves=r.lp_solves,
                    fallbacks=r.fallbacks,
                    seconds=sec,
                    converged=r.converged,
                    certificate_holds=r.certificate.holds,
                    worst_margin=r.worst_margin,
                    verify_seconds=v_sec,
                    exact_verify_seconds=ex_sec,
                    exact_worst_margin=ex_margin,
                    scipy=None
                    if base is None
                    else dict(seconds=base[0], steps=base[1], rows=base[2], lps=base[3]),
                )
            )
    write_results(args.out, "admissible", seed=args.seed, cap=args.cap, cases=out)


if __name__ == "__main__":
    main()
