"""Dual-mode regions, and the projection routines against each other.

Questions:
1. How large are the dual-mode sets (rows of the augmented set in (x, c) and of the state
   region) and how long do they take, for n = 2..8 states, m = 1..3 inputs, horizons 1..10?
2. Where does each projection route win: Fourier–Motzkin (corral), the vertex route (corral:
   qhull vertices, then the hull of their projections), and the same vertex route written
   in Python with scipy (HalfspaceIntersection for the vertices, then ConvexHull of the
   projected points: the baseline, given the interior point, run in the same process)?
3. For the state region: N pre-set steps (m variables eliminated per step, how corral computes
   it) against one projection of the augmented set (N m variables at once).

Plants: A Gaussian / √n × 1.1, B Gaussian, X = [-1, 1]^n, U = [-1, 1]^m, LQR gain for Q = I,
R = I (fixed seeds). Polytopes for question 2: random unit normals with right-hand sides in
[0.5, 1.5], projected onto their first k coordinates. Times are the fastest of --repeat runs;
each case runs in a forked child capped at --cap seconds.

Usage: python3 benchmarks/bench_dual_mode.py [--n 2,4,6,8] [--m 1,2,3] [--N 1,2,5,10]
                                             [--seed S] [--cap SECONDS] [--repeat R]
"""

from __future__ import annotations

import argparse
import math
import os
import time

import corral
import numpy as np
from bench_common import run_capped, write_results
from scipy.spatial import ConvexHull, HalfspaceIntersection


def plant(n, m, seed):
    rng = np.random.default_rng(seed * 1000 + 10 * n + m)
    A = rng.normal(size=(n, n)) / math.sqrt(n) * 1.1
    B = rng.normal(size=(n, m))
    K = corral.lqr(A, B, np.eye(n), np.eye(m)).K
    X = corral.Polytope.box(-np.ones(n), np.ones(n))
    U = corral.Polytope.box(-np.ones(m), np.ones(m))
    return A, B, K, X, U


def fastest(f, repeat):
    best, out = math.inf, None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = f()
        best = min(best, time.perf_counter() - t0)
    return best, out


def region_case(n, m, N, seed, queue):
    A, B, K, X, U = plant(n, m, seed)
    t0 = time.perf_counter()
    reg = corral.dual_mode_region(A, B, K, X, U, N)
    sec = time.perf_counter() - t0
    queue.put(
        dict(
            aug_rows=reg.augmented.num_rows,
            region_rows=reg.state_region.num_rows,
            steps=reg.steps,
            lps=reg.lp_solves,
            seconds=sec,
            converged=reg.converged,
        )
    )


def scipy_projection(P, dims):
    """Baseline: vertices by scipy's HalfspaceIntersection (interior point given), then
    ConvexHull of their projections; returns the number of facets (merged by rounding)."""
    c = P.chebyshev_center().center
    hs = HalfspaceIntersection(np.hstack([P.A, -P.b[:, None]]), c)
    W = hs.intersections[:, dims]
    h = ConvexHull(W)
    eq = h.equations / np.linalg.norm(h.equations[:, :-1], axis=1)[:, None]
    return len(np.unique(np.round(eq, 7), axis=0))


def projection_case(P, dims, repeat, queue):
    row = {}
    for method in ("fourier-motzkin", "vertices"):
        sec, Q = fastest(lambda method=method: P.project(dims, method), repeat)
        row[method] = dict(seconds=sec, rows=Q.num_rows)
    sec, rows = fastest(lambda: scipy_projection(P, dims), repeat)
    row["scipy"] = dict(seconds=sec, rows=rows)
    queue.put(row)


def fm_augmented_case(n, m, N, seed, queue):
    A, B, K, X, U = plant(n, m, seed)
    reg = corral.dual_mode_region(A, B, K, X, U, N)
    t0 = time.perf_counter()
    corral.controllable_set(A, B, X, U, reg.terminal_set, N)
    pre_sec = time.perf_counter() - t0
    t0 = time.perf_counter()
    Q = reg.augmented.project(list(range(n)), "fourier-motzkin")
    fm_sec = time.perf_counter() - t0
    queue.put(
        dict(
            pre_seconds=pre_sec,
            fm_seconds=fm_sec,
            rows=Q.num_rows,
            region_rows=reg.state_region.num_rows,
        )
    )


def fmt(x, cap):
    return f"{'>' + format(cap, '.0f'):>8}" if x is None else f"{x:8.3f}"


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--n", default="2,4,6,8")
    ap.add_argument("--m", default="1,2,3")
    ap.add_argument("--N", default="1,2,5,10")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--cap", type=float, default=60.0)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument(
        "--out", default=os.path.join(os.path.dirname(__file__), "results", "dual_mode.json")
    )
    args = ap.parse_args()
    ns = [int(v) for v in args.n.split(",")]
    ms = [int(v) for v in args.m.split(",")]
    Ns = [int(v) for v in args.N.split(",")]
    print(f"corral {corral.__version__}, seed {args.seed}, cap {args.cap:.0f} s per case")

    print("\n1. dual-mode regions (seconds of the whole call)")
    print(
        f"{'n':>3} {'m':>3} {'N':>3} {'t*':>4} {'QP rows':>8} {'region':>7} {'LPs':>8} "
        f"{'seconds':>8}"
    )
    regions = []
    for n in ns:
        for m in ms:
            if m > n:
                continue
            for N in Ns:
                r = run_capped(region_case, (n, m, N, args.seed), args.cap)
                if r is None:
                    print(
                        f"{n:>3} {m:>3} {N:>3} {'':>4} {'':>8} {'':>7} {'':>8} "
                        f"{fmt(None, args.cap)}"
                    )
                else:
                    print(
                        f"{n:>3} {m:>3} {N:>3} {r['steps']:>4} {r['aug_rows']:>8} "
                        f"{r['region_rows']:>7} {r['lps']:>8} {r['seconds']:8.3f}"
                    )
                regions.append(dict(n=n, m=m, N=N, result=r))

    print("\n2. projection of random polytopes onto their first k coordinates")
    print("   ratio = scipy's time / corral's (above 1: corral faster)")
    print(
        f"{'n':>3} {'rows':>5} {'k':>3} {'FM s':>8} {'vert s':>8} {'scipy s':>8} "
        f"{'facets':>7} {'FM x':>7} {'vert x':>7}"
    )
    projections = []
    rng = np.random.default_rng(args.seed)
    for n, rows, k in [
        (3, 50, 2),
        (4, 50, 2),
        (4, 200, 2),
        (5, 50, 2),
        (5, 100, 3),
        (6, 50, 2),
        (6, 50, 4),
        (8, 40, 2),
        (8, 40, 6),
    ]:
        Aq = rng.normal(size=(rows, n))
        Aq /= np.linalg.norm(Aq, axis=1)[:, None]
        P = corral.Polytope(Aq, rng.uniform(0.5, 1.5, rows))
        r = run_capped(projection_case, (P, list(range(k)), args.repeat), args.cap)
        if r is None:
            print(f"{n:>3} {rows:>5} {k:>3} {'capped':>8}")
        else:
            fm, vt, sp = r["fourier-motzkin"], r["vertices"], r["scipy"]
            print(
                f"{n:>3} {rows:>5} {k:>3} {fm['seconds']:8.4f} {vt['seconds']:8.4f} "
                f"{sp['seconds']:8.4f} {fm['rows']:>7} {sp['seconds'] / fm['seconds']:7.2f} "
                f"{sp['seconds'] / vt['seconds']:7.2f}"
                + ("" if fm["rows"] == vt["rows"] == sp["rows"] else "  FACET COUNTS DIFFER")
            )
        projections.append(dict(n=n, rows=rows, k=k, result=r))

    print("\n3. state region: N pre-set steps against one projection of the augmented set")
    print(f"{'n':>3} {'m':>3} {'N':>3} {'pre-sets s':>11} {'one FM s':>9} {'rows':>5}")
    routes = []
    for n, m, N in [(2, 1, 5), (4, 1, 5), (4, 2, 5), (4, 1, 10), (6, 2, 5)]:
        r = run_capped(fm_augmented_case, (n, m, N, args.seed), args.cap)
        if r is None:
            print(f"{n:>3} {m:>3} {N:>3} {'':>11} {'>cap':>9}")
        else:
            print(
                f"{n:>3} {m:>3} {N:>3} {r['pre_seconds']:11.3f} {r['fm_seconds']:9.3f} "
                f"{r['rows']:>5}" + ("" if r["rows"] == r["region_rows"] else "  ROWS DIFFER")
            )
        routes.append(dict(n=n, m=m, N=N, result=r))
    write_results(
        args.out,
        "dual_mode",
        seed=args.seed,
        cap=args.cap,
        regions=regions,
        projections=projections,
        routes=routes,
    )


if __name__ == "__main__":
    main()
