"""Tests of the LP layer from Python: corral.maximize on every backend.

Outside reference: scipy.optimize.linprog(method="highs") (HiGHS through scipy), called by
``highs()`` below. Optimal values and statuses are compared with it; the answers themselves are
checked by KKT conditions computed here with numpy (primal feasibility, λ >= 0, Aᵀλ = c,
complementary slackness, bᵀλ = value). Optimisers and dual vectors are never compared with the
reference's: degenerate LPs have many of both. Values worked out by hand say so.
"""

from __future__ import annotations

import concurrent.futures
import functools

import corral
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog

BACKENDS = corral.backends()
INITIAL_DEFAULT = corral.default_backend()
CAPABILITY_KEYS = {"duals", "ray", "ray_index", "farkas", "early_stop", "warm_start", "exact"}

# Relative tolerance of value comparisons with HiGHS (its own feasibility tolerances are 1e-7).
VALUE_RTOL = 1e-7
# Relative tolerance of the KKT checks on corral's answers.
KKT_TOL = 1e-9


# --------------------------------------------------------------------------------------------
# Reference and checks


def highs(c, A, b):
    """HiGHS's verdict and optimal value for max c·x s.t. A x <= b, x free.

    reference: scipy.optimize.linprog(method="highs"), which minimises, so it gets -c.
    linprog status 0 = optimal, 2 = infeasible, 3 = unbounded; status 4 ("unbounded or
    infeasible") is settled by a second HiGHS solve with a zero objective.
    """
    c = np.asarray(c, dtype=float)
    A = np.asarray(A, dtype=float)
    b = np.asarray(b, dtype=float)
    n = c.size
    kw = {"bounds": [(None, None)] * n, "method": "highs"}
    if A.shape[0] > 0:
        kw.update(A_ub=A, b_ub=b)
    res = linprog(-c, **kw)
    if res.status == 0:
        return "optimal", -res.fun
    if res.status == 2:
        return "infeasible", None
    if res.status == 3:
        return "unbounded", None
    assert res.status == 4, res.message
    feas = linprog(np.zeros(n), **kw)
    assert feas.status in (0, 2), feas.message
    return ("infeasible" if feas.status == 2 else "unbounded"), None


def assert_kkt(c, A, b, res, backend, tol=KKT_TOL):
    """Checks an optimal answer by its optimality conditions, computed here with numpy.

    Every tolerance is relative to the magnitudes that enter the sum, so it is unchanged when a
    row is multiplied by a positive factor (λ_i then shrinks by the same factor).
    """
    c = np.asarray(c, dtype=float)
    A = np.asarray(A, dtype=float).reshape(-1, c.size)
    b = np.asarray(b, dtype=float)
    m, n = A.shape
    assert res.status == "optimal"
    x = res.x
    assert x is not None and x.shape == (n,)
    row_scale = np.abs(b) + np.abs(A) @ np.abs(x)
    slack = b - A @ x
    # Primal feasibility.
    assert np.all(-slack <= tol * row_scale), f"max violation {np.max(-slack, initial=0)}"
    # The value is c·x.
    assert abs(c @ x - res.value) <= tol * (1.0 + np.abs(c) @ np.abs(x))
    if not corral.backend_capabilities(backend)["duals"]:
        assert res.duals is None
        return
    lam = res.duals if res.duals is not None else np.zeros(0)
    assert lam.shape == (m,), "a backend with duals gives one per row"
    lam_scale = np.abs(lam) * row_scale  # |λ_i| (|b_i| + |a_i|·|x|): invariant under row scaling
    total = lam_scale.sum()
    # Dual feasibility λ >= 0, measured by what each λ_i contributes.
    assert np.all(lam * row_scale >= -tol * (total + 1.0)), f"negative dual: {lam.min()}"
    # Stationarity Aᵀλ = c.
    resid = A.T @ lam - c
    assert np.all(
        np.abs(resid) <= tol * (1.0 + np.abs(c) + np.abs(A.T) @ np.abs(lam))
    ), f"A^T lambda - c = {resid}"
    # Complementary slackness λ_i (b_i - a_i·x) = 0.
    assert np.all(lam * slack <= tol * (lam_scale + total + 1.0)), "complementary slackness"
    # Strong duality bᵀλ = value (follows from the two above; checked on its own).
    assert abs(b @ lam - res.value) <= tol * (1.0 + abs(res.value) + np.abs(b) @ np.abs(lam))


def assert_matches_highs(c, A, b, backend, res=None, rtol=VALUE_RTOL):
    """Solves on `backend` (unless given the result) and compares with HiGHS."""
    if res is None:
        res = corral.maximize(c, A, b, backend=backend)
    assert res.backend == backend
    status, value = highs(c, A, b)
    assert res.status == status
    if status == "optimal":
        assert abs(res.value - value) <= rtol * max(1.0, abs(value)), (res.value, value)
        assert_kkt(c, A, b, res, backend)
    else:
        assert res.x is None and res.duals is None
        assert np.isnan(res.value)
        if status == "unbounded" and res.ray is not None:
            # A d <= 0 and c·d > 0.
            d = res.ray
            assert np.all(np.asarray(A).reshape(-1, d.size) @ d <= 1e-12 * np.linalg.norm(d))
            assert np.asarray(c) @ d > 0
        if status == "infeasible" and res.farkas is not None:
            # y >= 0, Aᵀy = 0, bᵀy < 0 (Farkas' lemma).
            y = res.farkas
            assert np.all(y >= 0)
            assert np.allclose(np.asarray(A).T @ y, 0.0, atol=1e-9 * np.abs(y).max())
            assert np.asarray(b) @ y < 0
    return res


# --------------------------------------------------------------------------------------------
# Random LPs


def random_bounded_lp(rng, m, n):
    """m random rows with offsets from a point x0, and a box around x0: feasible and bounded."""
    x0 = rng.uniform(-1.0, 1.0, n)
    A = rng.normal(size=(m, n))
    b = A @ x0 + rng.uniform(0.1, 1.0, m)
    lo = x0 - rng.uniform(1.0, 3.0, n)
    hi = x0 + rng.uniform(1.0, 3.0, n)
    A = np.vstack([A, np.eye(n), -np.eye(n)])
    b = np.concatenate([b, hi, -lo])
    c = rng.normal(size=n)
    return c, A, b


def random_mixed_lp(rng, m, n):
    """Random rows with offsets that may be negative: HiGHS decides feasibility and boundedness."""
    A = rng.normal(size=(m, n))
    b = rng.normal(loc=0.3, scale=1.0, size=m)
    c = rng.normal(size=n)
    return c, A, b


SIZES = [(5, 2), (20, 3), (40, 5), (100, 8), (150, 12)]


@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("m,n", SIZES)
def test_random_bounded(backend, m, n):
    rng = np.random.default_rng(1000 + 31 * m + n)
    for _ in range(3):
        c, A, b = random_bounded_lp(rng, m, n)
        assert_matches_highs(c, A, b, backend)


@pytest.mark.parametrize("backend", BACKENDS)
def test_random_statuses_match_highs(backend):
    rng = np.random.default_rng(77)
    seen = set()
    for k in range(40):
        n = 2 + k % 4
        m = rng.integers(1, 3 * n + 2)
        c, A, b = random_mixed_lp(rng, m, n)
        res = assert_matches_highs(c, A, b, backend)
        seen.add(res.status)
    # The seed gives every outcome, or this test checks less than it says.
    assert seen == {"optimal", "infeasible", "unbounded"}


@pytest.mark.parametrize("backend", BACKENDS)
def test_box_by_hand(backend):
    # max c·x over lower <= x <= upper puts x_j at the bound c_j points to (by hand):
    # c = (1, -2, 0.5), lower = (-1, -2, 0.5), upper = (2, 1, 3): 2 + 4 + 1.5 = 7.5.
    lower = np.array([-1.0, -2.0, 0.5])
    upper = np.array([2.0, 1.0, 3.0])
    A = np.vstack([np.eye(3), -np.eye(3)])
    b = np.concatenate([upper, -lower])
    res = assert_matches_highs([1.0, -2.0, 0.5], A, b, backend)
    assert res.value == pytest.approx(7.5, rel=1e-12)


@pytest.mark.parametrize("backend", BACKENDS)
def test_simplex_by_hand(backend):
    # {x >= 0, Σ x <= 1} in R^5: max c·x = max(0, max_j c_j) (by hand: the vertices are 0, e_j).
    n = 5
    A = np.vstack([-np.eye(n), np.ones((1, n))])
    b = np.concatenate([np.zeros(n), [1.0]])
    for c, expected in [
        ([1.0, 2.0, 3.0, 4.0, 5.0], 5.0),
        ([-1.0, -2.0, -0.5, -3.0, -1.0], 0.0),
        ([2.0, 2.0, 2.0, -1.0, 0.0], 2.0),  # a face of optima
    ]:
        res = assert_matches_highs(c, A, b, backend)
        assert res.value == pytest.approx(expected, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("backend", BACKENDS)
def test_degenerate_vertex(backend):
    # 40 random rows all tight at v (b = A v), and c = Aᵀw with w >= 0 (a third of w zero).
    # Weak duality c·x = wᵀA x <= wᵀb = c·v, so by hand v is optimal and the value is c·v. The
    # duals are far from unique (any λ >= 0 with Aᵀλ = c): only their properties are checked.
    # The rows are flipped so that a·d > 0 for one direction d: then v - t d is feasible for
    # large t, and the set stays non-empty when b = A v is rounded. (With normals that
    # positively span R^n the set would be the single point v, and rounding b can make it empty
    # in exact arithmetic: cdd-exact then rightly says "infeasible" where HiGHS's tolerances
    # say "optimal".)
    rng = np.random.default_rng(5)
    for n in (3, 5, 8):
        v = rng.uniform(-2.0, 2.0, n)
        d = rng.normal(size=n)
        A = rng.normal(size=(40, n))
        A *= np.where(A @ d < 0, -1.0, 1.0)[:, None]
        b = A @ v
        w = rng.uniform(0.0, 1.0, 40) * (rng.uniform(size=40) > 1 / 3)
        c = A.T @ w
        res = assert_matches_highs(c, A, b, backend)
        assert res.value == pytest.approx(c @ v, rel=1e-9, abs=1e-9)
        # The same vertex inside a box: 40 + 2n rows, some of the box rows slack.
        Ab = np.vstack([A, np.eye(n), -np.eye(n)])
        bb = np.concatenate([b, v + 1.0, -(v - 1.0)])
        res = assert_matches_highs(c, Ab, bb, backend)
        assert res.value == pytest.approx(c @ v, rel=1e-9, abs=1e-9)


SINGLE_POINTS = [
    # rows x_j <= v_j and a·x >= a·v with a > 0: exactly the point v (by hand: the first rows
    # give a·x <= a·v, so every row is an equality). Small integers: exact in double.
    ([1, 1], [2, 5]),
    ([1, 1], [3, 4]),
    ([1, 2], [1, 1]),
    ([3, 5], [2, 4]),
    ([2, 3, 5], [1, 2, 3]),
]


@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("a,v", SINGLE_POINTS)
def test_single_point_from_integer_data(backend, a, v):
    a = np.array(a, dtype=float)
    v = np.array(v, dtype=float)
    n = v.size
    A = np.vstack([np.eye(n), -a])
    b = np.concatenate([v, [-(a @ v)]])
    assert np.all(A @ v <= b)  # exact: integers
    for c in (np.ones(n), -np.ones(n), np.zeros(n)):
        res = assert_matches_highs(c, A, b, backend)
        assert res.value == pytest.approx(c @ v, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("backend", BACKENDS)
def test_duplicate_and_parallel_rows(backend):
    rng = np.random.default_rng(9)
    for _ in range(3):
        c, A, b = random_bounded_lp(rng, 15, 4)
        status, value = highs(c, A, b)
        assert status == "optimal"
        idx = rng.integers(0, A.shape[0], 10)
        scale = rng.choice([1.0, 1e-3, 7.0, 1e3], 10)[:, None]
        # Exact duplicates, positive multiples (the same half-spaces), and parallel looser rows.
        A2 = np.vstack([A, A[idx], scale * A[idx], A[idx]])
        b2 = np.concatenate([b, b[idx], scale[:, 0] * b[idx], b[idx] + 1.0])
        res = assert_matches_highs(c, A2, b2, backend)
        assert res.value == pytest.approx(value, rel=VALUE_RTOL)  # the set is unchanged


@pytest.mark.parametrize("backend", BACKENDS)
def test_badly_scaled_rows(backend):
    # Multiplying rows by positive factors from 1e-6 to 1e6 leaves the set, hence the optimal
    # value, unchanged. The reference value is HiGHS's on the unscaled data.
    rng = np.random.default_rng(13)
    for m, n in [(20, 3), (60, 6)]:
        c, A, b = random_bounded_lp(rng, m, n)
        status, value = highs(c, A, b)
        assert status == "optimal"
        f = 10.0 ** rng.uniform(-6.0, 6.0, A.shape[0])
        f[:2] = [1e-6, 1e6]
        As, bs = f[:, None] * A, f * b
        res = corral.maximize(c, As, bs, backend=backend)
        assert res.status == "optimal"
        assert res.value == pytest.approx(value, rel=VALUE_RTOL)
        assert_kkt(c, As, bs, res, backend)


@pytest.mark.parametrize("backend", BACKENDS)
def test_infeasible(backend):
    rng = np.random.default_rng(21)
    for n in (1, 3, 6):
        c, A, b = random_bounded_lp(rng, 10, n)
        a = rng.normal(size=n)
        # a·x <= -1 and a·x >= 1: empty (by hand), whatever the other rows.
        A2 = np.vstack([A, a, -a])
        b2 = np.concatenate([b, [-1.0, -1.0]])
        res = assert_matches_highs(c, A2, b2, backend)
        assert res.status == "infeasible"
    # Empty and with a direction of unbounded objective: still infeasible.
    res = assert_matches_highs([0.0, 1.0], [[1.0, 0.0], [-1.0, 0.0]], [-1.0, 0.0], backend)
    assert res.status == "infeasible"


@pytest.mark.parametrize("backend", BACKENDS)
def test_unbounded(backend):
    rng = np.random.default_rng(33)
    caps = corral.backend_capabilities(backend)
    for n in (2, 4, 7):
        # Every row has a·d <= 0 for d = e_1 and c·d = 1 > 0: unbounded by construction.
        A = rng.normal(size=(3 * n, n))
        A[:, 0] = -np.abs(A[:, 0])
        b = rng.uniform(0.5, 1.0, 3 * n)
        c = rng.normal(size=n)
        c[0] = 1.0 + np.abs(c[1:]).sum()
        res = assert_matches_highs(c, A, b, backend)
        assert res.status == "unbounded"
        if caps["ray_index"]:
            # GLPK's report: a variable index, rows first then columns.
            assert res.unbounded_index is not None
            assert 0 <= res.unbounded_index < A.shape[0] + n
        else:
            assert res.unbounded_index is None
    # No rows at all: c != 0 is unbounded, c = 0 optimal with value 0 (by hand).
    res = assert_matches_highs([1.0, 0.0], np.zeros((0, 2)), np.zeros(0), backend)
    assert res.status == "unbounded"
    res = assert_matches_highs([0.0, 0.0], np.zeros((0, 2)), np.zeros(0), backend)
    assert res.value == 0.0


@pytest.mark.parametrize("backend", BACKENDS)
def test_zero_rows(backend):
    # Zero rows with b >= 0 say nothing; one with b < 0 empties the set, certificate e_i.
    A = np.array([[1.0, 0.0], [0.0, 0.0], [0.0, 1.0], [-1.0, -1.0], [0.0, 0.0]])
    b = np.array([1.0, 0.0, 2.0, 5.0, 3.0])
    res = assert_matches_highs([1.0, 1.0], A, b, backend)
    assert res.value == pytest.approx(3.0, rel=1e-12)  # by hand: x = (1, 2)
    b[4] = -1.0
    res = assert_matches_highs([1.0, 1.0], A, b, backend)
    assert res.status == "infeasible"
    assert res.farkas is not None
    np.testing.assert_array_equal(res.farkas, [0.0, 0.0, 0.0, 0.0, 1.0])


@pytest.mark.parametrize("backend", BACKENDS)
def test_threshold(backend):
    rng = np.random.default_rng(41)
    for _ in range(5):
        c, A, b = random_bounded_lp(rng, 30, 4)
        status, value = highs(c, A, b)
        for t in (value - 0.5, value - 1e-6, value + 1e-6, value + 0.5):
            res = corral.maximize(c, A, b, backend=backend, threshold=t)
            assert res.status in ("optimal", "stopped")
            exceeded = res.status == "stopped" or res.value > t
            assert exceeded == (value > t), (t, value, res)
            if res.status == "stopped":
                assert res.value > t
                assert np.all(A @ res.x <= b + 1e-9 * (np.abs(b) + np.abs(A) @ np.abs(res.x)))


@pytest.mark.parametrize("backend", BACKENDS)
def test_input_conversions(backend):
    # Lists, integer and float32 arrays, Fortran order and strided views are the same LP.
    rng = np.random.default_rng(3)
    c, A, b = random_bounded_lp(rng, 12, 3)
    ref = corral.maximize(c, A, b, backend=backend)
    big = np.zeros((2 * A.shape[0], 2 * A.shape[1]))
    big[::2, ::2] = A
    for cc, AA, bb in [
        (list(c), A.tolist(), list(b)),
        (c, np.asfortranarray(A), b),
        (c, big[::2, ::2], np.repeat(b, 2)[::2]),
    ]:
        res = corral.maximize(cc, AA, bb, backend=backend)
        assert res.status == ref.status
        assert res.value == ref.value
    # Integer data: max x_1 + x_2 over x_1 <= 2, x_2 <= 3 is 5 (by hand).
    ia = np.array([[1, 0], [0, 1]], dtype=np.int64)
    res = corral.maximize(np.array([1, 1], dtype=np.int32), ia, np.array([2, 3]), backend=backend)
    assert res.value == pytest.approx(5.0, rel=1e-12)
    res = corral.maximize(np.float32([1, 1]), ia.astype(np.float32), [2, 3], backend=backend)
    assert res.value == pytest.approx(5.0, rel=1e-12)


# --------------------------------------------------------------------------------------------
# Tall, degenerate, duplicate, badly scaled and rank-deficient LPs of every status
#
# Every case is compared with HiGHS (scipy.optimize.linprog(method="highs"), through highs()
# above); its verdicts are computed once per case and shared by every backend. The cases are
# built so that no tolerance decides them: integer data wherever a tie is structural (rows
# through one vertex, repeated columns), exact multiples for parallel rows (an inexact multiple
# tilts a row by an ulp, and in exact arithmetic two such rows meet far away), and wide margins
# where a set is made empty.


def expect_highs(c, A, b, backend, ref, *, allow_fallbacks=False):
    """Solves on `backend` and compares with HiGHS's verdict `ref` = highs(c, A, b).

    Beyond assert_matches_highs: a backend whose capabilities promise rays or Farkas
    certificates must give them; a re-solve by another backend (Result.fallbacks) is a failure
    unless `allow_fallbacks`; certificates are checked with per-row scaled tolerances, so that
    badly scaled rows are judged fairly.
    """
    c = np.asarray(c, dtype=float)
    A = np.asarray(A, dtype=float).reshape(-1, c.size)
    b = np.asarray(b, dtype=float)
    status, value = ref
    res = corral.maximize(c, A, b, backend=backend)
    if allow_fallbacks:
        assert res.fallbacks >= 0
    else:
        assert res.fallbacks == 0, f"{res.fallbacks} fallback(s), answered by {res.backend}"
        assert res.backend == backend
    own = res.fallbacks == 0
    caps = corral.backend_capabilities(res.backend)
    assert res.status == status, (res.status, status)  # HiGHS's verdict
    row_norm = np.linalg.norm(A, axis=1)
    if status == "optimal":
        # HiGHS's optimal value.
        assert abs(res.value - value) <= VALUE_RTOL * max(1.0, abs(value)), (res.value, value)
        assert_kkt(c, A, b, res, res.backend)
    elif status == "unbounded":
        assert res.x is None and res.duals is None
        if own and caps["ray"]:
            assert res.ray is not None, "the backend promises rays"
        if res.ray is not None:
            d = res.ray
            # A d <= 0 (per row, relative to |a_i| |d|) and c·d > 0.
            assert np.all(A @ d <= 1e-9 * row_norm * np.linalg.norm(d))
            assert c @ d > 0
    else:
        assert res.x is None and res.duals is None
        if own and caps["farkas"]:
            assert res.farkas is not None, "the backend promises Farkas certificates"
        if res.farkas is not None:
            y = res.farkas
            # y >= 0, Aᵀy = 0, bᵀy < 0 (Farkas' lemma), tolerances relative to Σ y_i |a_i|.
            assert np.all(y >= -1e-12 * np.abs(y).max())
            assert np.all(np.abs(A.T @ y) <= 1e-9 * (np.abs(y) @ row_norm))
            assert b @ y < 0
    return res


def on_grid(a):
    """a rounded to multiples of 2^-20: then 3 a, 5 a, 1000 a, 0.75 a are exact in double."""
    return np.round(np.asarray(a) * 2.0**20) / 2.0**20


def min_over(a, A, b):
    """HiGHS's minimum of a·x over {A x <= b}, or None when it is not attained."""
    res = linprog(a, A_ub=A, b_ub=b, bounds=[(None, None)] * a.size, method="highs")
    return res.fun if res.status == 0 else None


def make_empty(rng, A, b):
    """Appends a row a·x <= min a·x - margin (the minimum from HiGHS): an empty set, whatever
    the tolerances, since the margin is at least 5% of |a| + |min|."""
    while True:
        a = on_grid(rng.normal(size=A.shape[1]))
        lo = min_over(a, A, b)
        if lo is not None:
            margin = rng.uniform(0.05, 1.0) * (np.linalg.norm(a) + abs(lo))
            return np.vstack([A, a]), np.append(b, lo - margin)


def tall_lp(rng, m, n, kind):
    """A random tall LP of one kind:

    - "interior": 0 strictly inside (b_i >= 0.2 |a_i|);
    - "offset":   a point x0 with |x0| >= 3 inside (with margins), 0 outside;
    - "ray":      as offset, rows flipped so that a·d <= 0 for a direction d, and c·d > 0:
                  unbounded by construction (x0 + t d stays feasible);
    - "empty":    as offset, plus a row that empties the set (make_empty).
    Rows have entries on a 2^-20 grid (on_grid), so that their multiples below are exact.
    """
    A = on_grid(rng.normal(size=(m, n)))
    c = rng.normal(size=n)
    if kind == "interior":
        return c, A, rng.uniform(0.2, 1.5, m) * np.linalg.norm(A, axis=1)
    x0 = rng.uniform(-5.0, 5.0, n)
    x0 = on_grid(x0 * max(1.0, 3.0 / np.linalg.norm(x0)))
    if kind == "ray":
        d = rng.normal(size=n)
        A *= np.where(A @ d > 0, -1.0, 1.0)[:, None]
        x0 *= -1.0 if x0 @ d < 0 else 1.0  # so that the row -x0·x <= ... below keeps d too
        c = c - (c @ d) / (d @ d) * d + rng.uniform(0.1, 1.0) * d / np.linalg.norm(d)
    b = A @ x0 + rng.uniform(0.05, 1.0, m) * np.linalg.norm(A, axis=1)
    # A row x0 satisfies and 0 does not: -x0·x <= -|x0|^2 / 2.
    A = np.vstack([A, -x0])
    b = np.append(b, -0.5 * (x0 @ x0))
    if kind == "empty":
        A, b = make_empty(rng, A, b)
    return c, A, b


TALL_SIZES = [(30, 3), (80, 6), (200, 10), (300, 12)]
TALL_KINDS = ["interior", "offset", "ray", "empty"]


@functools.cache
def tall_cases():
    """(kind, c, A, b, HiGHS verdict) for each size and kind, four LPs each."""
    rng = np.random.default_rng(4711)
    cases = []
    for m, n in TALL_SIZES:
        for kind in TALL_KINDS:
            for _ in range(4):
                c, A, b = tall_lp(rng, m, n, kind)
                cases.append((kind, c, A, b, highs(c, A, b)))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_tall_lps_of_every_status(backend):
    seen = set()
    for kind, c, A, b, ref in tall_cases():
        res = expect_highs(c, A, b, backend, ref)
        seen.add(res.status)
        # What the construction says, beside HiGHS.
        if kind == "ray":
            assert ref[0] == "unbounded"
        if kind == "empty":
            assert ref[0] == "infeasible"
        if kind in ("interior", "offset"):
            assert ref[0] != "infeasible"
    assert seen == {"optimal", "infeasible", "unbounded"}


@functools.cache
def degenerate_cases():
    """Integer LPs with many rows through one integer vertex v (b = A v exactly).

    Rows a_i through v (30 to 200 of them, some repeated exactly or doubled), rows with slack,
    and sometimes a box around v; the rows through v make v a single point of their own set or
    the apex of a pointed cone. The objective is c = Σ w_i a_i over rows through v with integer
    w_i >= 0 (then v is optimal with value c·v, by weak duality: c·x = Σ w_i a_i·x <=
    Σ w_i b_i = c·v), or a random integer vector (HiGHS decides).
    """
    rng = np.random.default_rng(8)
    cases = []
    for n, tight, boxed, cone in [
        (2, 30, False, False),
        (3, 40, True, True),
        (6, 60, False, True),
        (6, 60, True, True),
        (10, 90, True, False),
        (12, 50, False, True),
        (4, 200, False, False),
        (8, 150, True, True),
        (12, 120, True, True),
    ]:
        v = rng.integers(-5, 6, n).astype(float)  # mostly far from 0: 0 is often outside
        T = rng.integers(-4, 5, (tight, n)).astype(float)
        T = T[np.abs(T).sum(axis=1) > 0]
        if cone:
            # Rows with a·d > 0 flipped: v + t d stays feasible, and the rows through v make a
            # pointed cone with apex v (otherwise their normals span R^n positively and the set
            # is the single point v).
            d = rng.integers(-2, 3, n)
            d[0] = d[0] or 1
            T *= np.where(T @ d > 0, -1.0, 1.0)[:, None]
        reps = rng.integers(0, T.shape[0], T.shape[0] // 4)
        T = np.vstack([T, T[reps], 2.0 * T[reps[: len(reps) // 2]]])
        S = rng.integers(-4, 5, (40, n)).astype(float)
        S = S[np.abs(S).sum(axis=1) > 0]
        A = np.vstack([T, S])
        b = np.concatenate([T @ v, S @ v + rng.integers(1, 7, S.shape[0])])
        if boxed:
            A = np.vstack([A, np.eye(n), -np.eye(n)])
            b = np.concatenate([b, v + rng.integers(1, 4, n), -v + rng.integers(1, 4, n)])
        for k in range(3):
            if k < 2:
                w = rng.integers(0, 3, T.shape[0]) * (rng.uniform(size=T.shape[0]) < 0.3)
                w[rng.integers(0, T.shape[0])] += 1
                c = T.T @ w
                known = c @ v  # by construction (weak duality), exact in double
            else:
                c = rng.integers(-3, 4, n).astype(float)
                known = None
            cases.append((c, A, b, highs(c, A, b), known))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_degenerate_integer_lps(backend):
    for c, A, b, ref, known in degenerate_cases():
        res = expect_highs(c, A, b, backend, ref)
        if known is not None:
            # HiGHS finds the value by construction, and so does the backend.
            assert ref[0] == "optimal"
            assert ref[1] == pytest.approx(known, rel=1e-9, abs=1e-9)
            assert res.value == pytest.approx(known, rel=1e-9, abs=1e-9)


def with_parallel_rows(rng, A, b, bounded_side):
    """A, b with exact duplicates, exact positive multiples (3, 5, 1000, 0.75, 2^-10: exact on
    rows with entries on a 2^-20 grid), looser parallel rows, and, when a point x0 of the set
    is given as `bounded_side`, opposite rows -a·x <= -a·x0 + slack that make slabs (the set
    then still holds x0)."""
    m = A.shape[0]
    idx = rng.integers(0, m, m // 2)
    s = rng.choice([3.0, 5.0, 1000.0, 0.75, 2.0**-10], idx.size)
    extra_A = [A[idx], s[:, None] * A[idx], A[idx]]
    extra_b = [b[idx], s * b[idx], b[idx] + rng.uniform(0.01, 1.0, idx.size)]
    if bounded_side is not None:
        extra_A.append(-A[idx])
        extra_b.append(-(A[idx] @ bounded_side) + rng.uniform(0.5, 2.0, idx.size))
    return np.vstack([A, *extra_A]), np.concatenate([b, *extra_b])


@functools.cache
def parallel_cases():
    """Tall LPs of every status with duplicate and parallel rows added."""
    rng = np.random.default_rng(99)
    cases = []
    for m, n in [(30, 3), (120, 8), (160, 11)]:
        for kind in TALL_KINDS:
            c, A, b = tall_lp(rng, m, n, kind)
            # Opposite rows only where they cannot change the verdict: "interior" holds 0.
            A2, b2 = with_parallel_rows(rng, A, b, np.zeros(n) if kind == "interior" else None)
            cases.append((kind, c, A2, b2, highs(c, A2, b2), highs(c, A, b)))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_duplicate_and_parallel_rows_every_status(backend):
    seen = set()
    for kind, c, A, b, ref, ref_plain in parallel_cases():
        res = expect_highs(c, A, b, backend, ref)
        seen.add(res.status)
        if kind != "interior":  # the same set: HiGHS's verdict must not change
            assert ref[0] == ref_plain[0]
            if ref[0] == "optimal":
                assert ref[1] == pytest.approx(ref_plain[1], rel=VALUE_RTOL)
    assert seen == {"optimal", "infeasible", "unbounded"}


@functools.cache
def scaled_cases():
    """Tall LPs of every status with every row times 10^u, u uniform in [-6, 6] (the same set).
    The reference is HiGHS on the unscaled rows."""
    rng = np.random.default_rng(123)
    cases = []
    for m, n in [(40, 4), (150, 9), (300, 12)]:
        for kind in TALL_KINDS:
            for _ in range(2):
                c, A, b = tall_lp(rng, m, n, kind)
                f = 10.0 ** rng.uniform(-6.0, 6.0, A.shape[0])
                f[:2] = [1e-6, 1e6]
                cases.append((c, f[:, None] * A, f * b, highs(c, A, b)))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_badly_scaled_rows_every_status(backend):
    # Re-solves by another backend are allowed here (these rows are badly scaled on purpose);
    # the answer must still be HiGHS's.
    seen = set()
    for c, A, b, ref in scaled_cases():
        seen.add(expect_highs(c, A, b, backend, ref, allow_fallbacks=True).status)
    assert seen == {"optimal", "infeasible", "unbounded"}


@functools.cache
def repeated_column_cases():
    """Rank-deficient A from an integer A0 (m x k): A = [A0, A0[:, j], -A0[:, jn], 0]. For
    x = (y, s, t, z), A x = A0 y' with y' = y + s e_j - t e_jn, so the lineality space (A d = 0)
    has dimension 3. With c = (c0, c0_j, -c0_jn, 0) also c·x = c0·y', and the LP has the value
    of the reduced LP max c0·y' s.t. A0 y' <= b, which HiGHS gives on its own (by hand). Adding
    1 to the copy's cost, -2 to the negated copy's, or 0.5 to the zero column's makes c·d != 0
    for d = e_s - e_j, e_t + e_jn or e_z: a feasible LP is then unbounded along ±d (by hand)."""
    rng = np.random.default_rng(31)
    cases = []
    for m, k in [(12, 2), (40, 4), (100, 7), (250, 9)]:
        for feasible_origin in (True, False):
            A0 = rng.integers(-5, 6, (m, k)).astype(float)
            y0 = np.zeros(k) if feasible_origin else rng.integers(-4, 5, k).astype(float)
            b = A0 @ y0 + rng.integers(1, 8, m)
            j, jn = rng.integers(0, k, 2)
            A = np.hstack([A0, A0[:, [j]], -A0[:, [jn]], np.zeros((m, 1))])
            c0 = rng.integers(-3, 4, k).astype(float)
            reduced = highs(c0, A0, b)
            c = np.concatenate([c0, [c0[j], -c0[jn], 0.0]])
            cases.append((c, A, b, highs(c, A, b), reduced))
            for extra in ([1.0, 0.0, 0.0], [0.0, -2.0, 0.0], [0.0, 0.0, 0.5]):
                cu = c + np.concatenate([np.zeros(k), extra])
                cases.append((cu, A, b, highs(cu, A, b), ("unbounded", None)))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_lineality_space_repeated_columns(backend):
    for c, A, b, ref, by_reduction in repeated_column_cases():
        res = expect_highs(c, A, b, backend, ref)
        # HiGHS on the full LP agrees with HiGHS on the reduced one (or with the ray by hand).
        assert ref[0] == by_reduction[0]
        if ref[0] == "optimal":
            assert ref[1] == pytest.approx(by_reduction[1], rel=VALUE_RTOL, abs=VALUE_RTOL)
            assert res.value == pytest.approx(by_reduction[1], rel=VALUE_RTOL, abs=VALUE_RTOL)


@functools.cache
def subspace_cases():
    """Rows only in a 2-D subspace of R^5: A = B P with integer B (m x 2) and P (2 x 5) of rank
    2, so A x depends on P x only and the lineality space has dimension 3. With c = Pᵀw the
    value is that of the 2-D LP max w·y s.t. B y <= b (HiGHS); with c = Pᵀw + e (e outside the
    row space of P) a feasible LP is unbounded along the part of e orthogonal to that row space
    (by hand). Also an empty one: rows u·y <= -1 and -u·y <= -1 in y = P x."""
    rng = np.random.default_rng(57)
    cases = []
    for m in (8, 30, 120, 300):
        while True:
            P = rng.integers(-3, 4, (2, 5)).astype(float)
            if np.linalg.matrix_rank(P) == 2:
                break
        B = rng.integers(-4, 5, (m, 2)).astype(float)
        B = B[np.abs(B).sum(axis=1) > 0]
        y0 = rng.integers(-3, 4, 2).astype(float)
        b = B @ y0 + rng.integers(1, 6, B.shape[0])
        A = B @ P  # exact: small integers
        for _ in range(3):
            w = rng.integers(-3, 4, 2).astype(float)
            c = P.T @ w
            cases.append((c, A, b, highs(c, A, b), highs(w, B, b)))
        for e in np.eye(5)[:2]:
            if np.linalg.matrix_rank(np.vstack([P, e])) == 3:
                cu = P.T @ rng.integers(-3, 4, 2) + e
                cases.append((cu, A, b, highs(cu, A, b), ("unbounded", None)))
        u = rng.integers(1, 4, 2).astype(float)
        Ae = np.vstack([A, u @ P, -u @ P])
        be = np.append(b, [-1.0, -1.0])  # u·y <= -1 and u·y >= 1: empty (by hand)
        c = P.T @ rng.integers(-3, 4, 2)
        cases.append((c, Ae, be, highs(c, Ae, be), ("infeasible", None)))
    return cases


@pytest.mark.parametrize("backend", BACKENDS)
def test_lineality_space_rows_in_a_plane(backend):
    seen = set()
    for c, A, b, ref, by_hand in subspace_cases():
        res = expect_highs(c, A, b, backend, ref)
        seen.add(res.status)
        # HiGHS on the 5-D LP agrees with HiGHS on the 2-D one (or with the verdict by hand).
        assert ref[0] == by_hand[0]
        if ref[0] == "optimal":
            assert ref[1] == pytest.approx(by_hand[1], rel=VALUE_RTOL, abs=VALUE_RTOL)
    assert seen == {"optimal", "infeasible", "unbounded"}


# --------------------------------------------------------------------------------------------
# Property: random small LPs agree with HiGHS


@st.composite
def small_lps(draw):
    n = draw(st.integers(1, 4))
    m = draw(st.integers(0, 8))
    entry = st.integers(-4, 4).map(float)
    A = np.array(draw(st.lists(st.lists(entry, min_size=n, max_size=n), min_size=m, max_size=m)))
    A = A.reshape(m, n)
    b = np.array(draw(st.lists(st.integers(-3, 6).map(float), min_size=m, max_size=m)))
    c = np.array(draw(st.lists(entry, min_size=n, max_size=n)))
    return c, A, b


@pytest.mark.parametrize("backend", BACKENDS)
@settings(deadline=None, max_examples=25, derandomize=True)
@given(lp=small_lps())
def test_property_small_lps_match_highs(backend, lp):
    c, A, b = lp
    assert_matches_highs(c, A, b, backend)


# --------------------------------------------------------------------------------------------
# Threads


def test_threads_give_serial_answers():
    # 40 LPs (30 bounded 60x5, 5 infeasible, 5 unbounded) on every backend, all submitted at
    # once to 4 threads: the bindings release the GIL, so solves of different backends overlap.
    rng = np.random.default_rng(2024)
    lps = []
    for k in range(40):
        c, A, b = random_bounded_lp(rng, 50, 5)
        if k % 8 == 3:  # x_1 <= -10 and x_1 >= 10: empty
            A = np.vstack([A, np.eye(5)[0], -np.eye(5)[0]])
            b = np.concatenate([b, [-10.0, -10.0]])
        elif k % 8 == 5:  # only the first 4 random rows: unbounded for a random c
            A, b = A[:4], b[:4]
        lps.append((c, A, b))
    serial = {
        (be, i): corral.maximize(*lp, backend=be) for be in BACKENDS for i, lp in enumerate(lps)
    }
    statuses = {r.status for r in serial.values()}
    assert statuses == {"optimal", "infeasible", "unbounded"}
    with concurrent.futures.ThreadPoolExecutor(4) as pool:
        futures = {
            (be, i, rep): pool.submit(corral.maximize, *lp, backend=be)
            for rep in range(2)
            for i, lp in enumerate(lps)
            for be in BACKENDS
        }
        got = {key: f.result() for key, f in futures.items()}
    for (be, i, _), r in got.items():
        s = serial[(be, i)]
        assert r.backend == be
        assert r.status == s.status, (be, i)
        if s.status == "optimal":
            # Same data, same deterministic code: the same double.
            assert r.value == s.value, (be, i)
            np.testing.assert_array_equal(r.x, s.x)
    # The serial answers are right too: HiGHS agrees on the first ten.
    for i in range(10):
        status, value = highs(*lps[i])
        for be in BACKENDS:
            assert serial[(be, i)].status == status
            if status == "optimal":
                assert serial[(be, i)].value == pytest.approx(value, rel=VALUE_RTOL)


# --------------------------------------------------------------------------------------------
# Bad input

A_OK = np.array([[1.0, 0.0], [0.0, 1.0], [-1.0, -1.0]])
B_OK = np.array([1.0, 1.0, 1.0])
C_OK = np.array([1.0, 1.0])
NAN = float("nan")
INF = float("inf")

BAD_INPUTS = [
    # (argument named in the message, c, A, b)
    ("c", [NAN, 1.0], A_OK, B_OK),
    ("c", [1.0, INF], A_OK, B_OK),
    ("A", C_OK, [[1.0, 0.0], [0.0, NAN], [-1.0, -1.0]], B_OK),
    ("A", C_OK, [[1.0, 0.0], [0.0, -INF], [-1.0, -1.0]], B_OK),
    ("b", C_OK, A_OK, [1.0, INF, 1.0]),
    ("b", C_OK, A_OK, [1.0, 1.0, NAN]),
    ("b", C_OK, A_OK, [1.0, 1.0]),  # length differs from A's rows
    ("c", [1.0, 1.0, 1.0], A_OK, B_OK),  # length differs from A's columns
    ("c", [[1.0, 1.0]], A_OK, B_OK),  # 2-D c
    ("c", np.ones((2, 1)), A_OK, B_OK),  # 2-D c
    ("b", C_OK, A_OK, B_OK[:, None]),  # 2-D b
    ("A", C_OK, [1.0, 0.0, 0.0], B_OK),  # 1-D A
    ("A", C_OK, np.ones((1, 3, 2)), B_OK),  # 3-D A
    ("A", [], np.zeros((3, 0)), B_OK),  # no columns
    ("c", ["a", "b"], A_OK, B_OK),  # not numbers
    ("c", {"x": 1}, A_OK, B_OK),
    ("A", C_OK, "matrix", B_OK),
    ("A", C_OK, [[1.0, 0.0], [0.0, 1.0], [-1.0]], B_OK),  # ragged
    ("b", C_OK, A_OK, [object(), 1.0, 1.0]),
    ("c", [1 + 2j, 1.0], A_OK, B_OK),  # complex is not real
]


@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("argument,c,A,b", BAD_INPUTS)
def test_bad_input(backend, argument, c, A, b):
    with pytest.raises(corral.InvalidInputError, match=f"^{argument}:") as info:
        corral.maximize(c, A, b, backend=backend)
    assert isinstance(info.value, ValueError)
    assert isinstance(info.value, corral.CorralError)


def test_bad_backend_and_threshold():
    with pytest.raises(corral.InvalidInputError, match="^backend:.*nope") as info:
        corral.maximize(C_OK, A_OK, B_OK, backend="nope")
    assert isinstance(info.value, ValueError)
    with pytest.raises(corral.InvalidInputError, match="^backend:"):
        corral.backend_capabilities("GLPK")
    with pytest.raises(corral.InvalidInputError, match="^threshold:"):
        corral.maximize(C_OK, A_OK, B_OK, threshold=NAN)


# --------------------------------------------------------------------------------------------
# Defaults and capabilities


@pytest.fixture
def restore_defaults():
    backend, tol = corral.default_backend(), corral.default_tol()
    yield
    corral.set_defaults(backend=backend, tol=tol)


def test_set_defaults_rejects_bad_values(restore_defaults):
    backend, tol = corral.default_backend(), corral.default_tol()
    with pytest.raises(corral.InvalidInputError, match="^backend:"):
        corral.set_defaults(backend="nope")
    with pytest.raises(corral.InvalidInputError, match="^backend:"):
        corral.set_defaults(backend=3)
    for bad in (-1, 0.0, NAN, INF, 0.1, "x"):
        with pytest.raises(corral.InvalidInputError, match="^tol:") as info:
            corral.set_defaults(tol=bad)
        assert isinstance(info.value, ValueError)
    assert corral.default_backend() == backend
    assert corral.default_tol() == tol


def test_set_defaults_is_all_or_nothing(restore_defaults):
    # A call that raises leaves every default as it was, including the valid argument.
    backend = corral.default_backend()
    other = next(be for be in BACKENDS if be != backend)
    with pytest.raises(corral.InvalidInputError, match="^tol:"):
        corral.set_defaults(backend=other, tol=-1)
    assert corral.default_backend() == backend


@pytest.mark.parametrize("backend", BACKENDS)
def test_set_defaults_backend_is_used(restore_defaults, backend):
    corral.set_defaults(backend=backend)
    assert corral.default_backend() == backend
    res = corral.maximize([1.0], [[2.0]], [3.0])
    assert res.backend == backend
    assert res.value == pytest.approx(1.5)  # by hand: 2 x <= 3


def test_set_defaults_tol(restore_defaults):
    corral.set_defaults(tol=1e-7)
    assert corral.default_tol() == 1e-7
    corral.set_defaults()  # nothing given: nothing changes
    assert corral.default_tol() == 1e-7


def test_set_defaults_cdd_then_restored(restore_defaults):
    corral.set_defaults(backend="cdd")
    assert corral.maximize([1.0], [[1.0]], [1.0]).backend == "cdd"


def test_default_backend_restored_by_fixture():
    # Runs after the tests above (pytest keeps file order): the fixture put the default back.
    assert corral.default_backend() == INITIAL_DEFAULT
    assert corral.maximize([1.0], [[1.0]], [1.0]).backend == INITIAL_DEFAULT


@pytest.mark.parametrize("backend", BACKENDS)
def test_backend_capabilities(backend):
    caps = corral.backend_capabilities(backend)
    assert isinstance(caps, dict)
    assert set(caps) == CAPABILITY_KEYS
    assert all(isinstance(v, bool) for v in caps.values())
    if backend == "glpk":
        assert caps["ray_index"] is True
    if backend == "cdd-exact":
        assert caps["exact"] is True
    # What a solve returns agrees with what the capabilities say.
    res = corral.maximize([1.0, 1.0], A_OK, B_OK, backend=backend)
    assert (res.duals is not None) == caps["duals"]
    unb = corral.maximize([1.0, 1.0], -np.eye(2), np.zeros(2), backend=backend)
    assert unb.status == "unbounded"
    assert (unb.unbounded_index is not None) == caps["ray_index"]
    if not caps["ray"]:
        assert unb.ray is None


def test_backends_listed():
    assert {"glpk", "cdd", "cdd-exact"} <= set(BACKENDS)
    assert corral.default_backend() in BACKENDS
