"""Independent reference implementations shared by the Python tests, written on scipy's HiGHS
(scipy.optimize.linprog) and numpy only, never on corral: tests compare corral's answers with
these. Test systems are generated here from the caller's seeded numpy generator."""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import linprog


def hi_max(c, A, b):
    """max c·x over A x <= b with HiGHS: (value, status) with status 'optimal'/'unbounded'."""
    res = linprog(-c, A_ub=A, b_ub=b, bounds=[(None, None)] * len(c), method="highs")
    if res.status == 3:
        return math.inf, "unbounded"
    assert res.status == 0, res.message
    return -res.fun, "optimal"


def contained(P_A, P_b, Q_A, Q_b, tol=1e-7):
    """{P} ⊆ {Q}: one LP per row of Q (reference: scipy HiGHS)."""
    scale = max(1.0, np.abs(Q_b).max())
    return all(hi_max(q, P_A, P_b)[0] <= qb + tol * scale for q, qb in zip(Q_A, Q_b))


def reference_admissible(A, G, f, max_steps=400, tol=1e-9):
    """Independent loop (reference: scipy HiGHS): rows G A^k for k = 0, 1, ... until every row
    of the next step is implied by the current ones; returns (t*, rows, rhs), no removal."""
    rows, rhs = [G], [f]
    Ak = np.eye(A.shape[0])
    scale = max(1.0, np.abs(f).max())
    for t in range(max_steps):
        Ak = Ak @ A
        cand = G @ Ak
        H, h = np.vstack(rows), np.concatenate(rhs)
        if all(hi_max(c, H, h)[0] <= fi + tol * scale for c, fi in zip(cand, f)):
            return t, H, h
        rows.append(cand)
        rhs.append(f)
    raise AssertionError("the reference loop did not converge")


def random_stable(rng, n, radius_range=(0.9, 0.99)):
    """A = Q D Qᵀ: Q random orthogonal, D block diagonal with 2x2 rotations by angles in
    [0.2, 0.8] scaled by radii in radius_range (a 1x1 block when n is odd)."""
    D = np.zeros((n, n))
    i = 0
    while i < n:
        r = rng.uniform(*radius_range)
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
