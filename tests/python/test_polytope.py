"""Tests of corral.Polytope from Python: construction, queries, redundancy removal, vertices.

Outside references, each named beside the check that uses it:
- scipy.optimize.linprog(method="highs") (HiGHS through scipy): LP values, Chebyshev radii,
  support values, and the one-LP-per-row redundancy test, in ``highs_*`` below;
- scipy.spatial.HalfspaceIntersection (qhull): vertices of full-dimensional bounded sets;
- pycddlib (module ``cdd``, 3.x): vertices by double description and cddlib's own
  canonicalisation (``matrix_canonicalize``: implicit linearities and redundant rows);
- closed forms, worked out in the comments beside them: hypercube (2^n vertices, 2n facets),
  cross-polytope (2n vertices, 2^n facets), simplex (n+1 vertices and facets), the product of
  two simplices and the prism over a polygon (vertex and facet counts of a product: v(P) v(Q)
  and f(P) + f(Q), since the facets of P x Q are F x Q and P x G), cyclic polytopes C(k, d)
  (k vertices; facets counted here by Gale's evenness condition, Ziegler 1995, *Lectures on
  Polytopes*, and for even d also compared with k/(k-d/2) binom(k-d/2, d/2), from memory).
Everything else is checked by the definitions (membership, implication by LP).
All demo data are invented here; random data come from seeded numpy generators.
"""

from __future__ import annotations

import itertools
import math
import re
import subprocess
import sys
from fractions import Fraction

import cdd
import cdd.gmp
import corral
import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog
from scipy.spatial import HalfspaceIntersection

BACKENDS = corral.backends()
FLOAT_BACKENDS = [b for b in BACKENDS if b != "cdd-exact"]

# Matching tolerance for vertices and hyperplanes computed by two different codes (HiGHS and
# qhull work at ~1e-9; the sets here have coordinates of order 1).
VERTEX_ATOL = 1e-7
# Margin by which a facet of a generated random polytope must stick out of the others, and by
# which a redundant row is implied, so that the expected answer is not a matter of tolerance.
MARGIN = 1e-3


# --------------------------------------------------------------------------------------------
# Outside references


def highs_max(c, A, b):
    """(status, value, x) of max c·x s.t. A x <= b, x free.

    reference: scipy.optimize.linprog(method="highs"), which minimises -c·x. Statuses:
    "optimal", "infeasible", "unbounded" (linprog 0, 2, 3; 4 is settled by a feasibility
    solve).
    """
    c = np.asarray(c, dtype=float)
    A = np.asarray(A, dtype=float).reshape(-1, c.size)
    b = np.asarray(b, dtype=float)
    kw = {"bounds": [(None, None)] * c.size, "method": "highs"}
    if A.shape[0] > 0:
        kw.update(A_ub=A, b_ub=b)
    res = linprog(-c, **kw)
    if res.status == 0:
        return "optimal", -res.fun, res.x
    if res.status == 2:
        return "infeasible", -np.inf, None
    if res.status == 3:
        return "unbounded", np.inf, None
    assert res.status == 4, res.message
    feas = linprog(np.zeros(c.size), **kw)
    assert feas.status in (0, 2), feas.message
    return ("infeasible", -np.inf, None) if feas.status == 2 else ("unbounded", np.inf, None)


def highs_support(A, b, d):
    """h(d) = max d·x over {A x <= b}; reference: scipy linprog(method="highs")."""
    return highs_max(d, A, b)[1]


def highs_chebyshev(A, b):
    """(centre, radius) of max r s.t. a_i·x + ||a_i|| r <= b_i.

    reference: scipy linprog(method="highs") on the LP of Boyd & Vandenberghe 2004, §8.5.1.
    """
    A = np.asarray(A, dtype=float)
    n = A.shape[1]
    L = np.hstack([A, np.linalg.norm(A, axis=1)[:, None]])
    c = np.zeros(n + 1)
    c[n] = 1.0
    status, value, x = highs_max(c, L, b)
    assert status == "optimal", status
    return x[:n], value


def highs_bounded(A, b):
    """Whether {A x <= b} (non-empty) is bounded: max ±x_j finite for every j.

    reference: scipy linprog(method="highs").
    """
    n = np.asarray(A).shape[1]
    for j in range(n):
        for s in (1.0, -1.0):
            e = np.zeros(n)
            e[j] = s
            if highs_max(e, A, b)[0] != "optimal":
                return False
    return True


def highs_implied(a, beta, A, b):
    """max a·x - beta over {A x <= b}: <= 0 means a·x <= beta is implied by the rows A, b.

    reference: scipy linprog(method="highs") (the plain one-LP-per-row redundancy test).
    """
    if np.asarray(A).shape[0] == 0:
        return np.inf
    return highs_max(a, A, b)[1] - beta


def qhull_vertices(A, b):
    """Vertices of a bounded full-dimensional {A x <= b}.

    reference: scipy.spatial.HalfspaceIntersection (qhull), given the HiGHS Chebyshev centre
    as its interior point. Halfspaces are rows [A | -b] (A x - b <= 0). Repeated intersection
    points (a vertex on more than n rows) are merged.
    """
    centre, radius = highs_chebyshev(A, b)
    assert radius > 1e-6
    hs = HalfspaceIntersection(np.hstack([A, -np.asarray(b)[:, None]]), centre)
    return unique_rows(hs.intersections, VERTEX_ATOL)


def cdd_matrix(A, b):
    """pycddlib H-matrix of {A x <= b}: rows [b | -A] mean b - A x >= 0."""
    arr = np.hstack([np.asarray(b, dtype=float)[:, None], -np.asarray(A, dtype=float)])
    return cdd.matrix_from_array(arr, rep_type=cdd.RepType.INEQUALITY)


def cdd_vertices(A, b):
    """Vertices of a bounded {A x <= b}; reference: pycddlib (double description, float)."""
    poly = cdd.polyhedron_from_matrix(cdd_matrix(A, b))
    gen = np.array(cdd.copy_generators(poly).array, dtype=float)
    if gen.size == 0:
        return np.zeros((0, np.asarray(A).shape[1]))
    assert np.all(gen[:, 0] == 1.0), "pycddlib found rays: the set is unbounded"
    return gen[:, 1:]


def cdd_canonical(A, b):
    """(kept, linearity) row indices of {A x <= b} after cddlib's canonicalisation.

    reference: pycddlib.matrix_canonicalize. It merges each implicit equality into one
    linearity row: `linearity` are the caller rows cddlib found to be implicit equalities
    (``implicit_linearity_rows``), `kept` the caller rows that survive as inequalities.
    """
    lin = set(cdd.implicit_linearity_rows(cdd_matrix(A, b)))
    mat = cdd_matrix(A, b)
    _, _, newpos = cdd.matrix_canonicalize(mat)
    lin_after = set(mat.lin_set)
    kept = {i for i, p in enumerate(newpos) if p is not None and p not in lin_after}
    return kept, lin


# --------------------------------------------------------------------------------------------
# Helpers


def unique_rows(X, atol):
    """Rows of X with near-repeats (max-norm distance <= atol) removed."""
    out = []
    for x in np.asarray(X, dtype=float):
        if not any(np.max(np.abs(x - y)) <= atol for y in out):
            out.append(x)
    return np.array(out).reshape(-1, np.asarray(X).shape[1])


def assert_same_rows(X, Y, atol=VERTEX_ATOL):
    """X and Y hold the same set of points: no near-repeats in either, same number, and each
    row of one is within atol (max norm) of a row of the other."""
    X = np.asarray(X, dtype=float)
    Y = np.asarray(Y, dtype=float)
    assert unique_rows(X, atol).shape[0] == X.shape[0], "repeated rows in X"
    assert unique_rows(Y, atol).shape[0] == Y.shape[0], "repeated rows in Y"
    assert X.shape == Y.shape, (X.shape, Y.shape)
    if X.shape[0] == 0:
        return
    dist = np.max(np.abs(X[:, None, :] - Y[None, :, :]), axis=2)
    assert np.all(dist.min(axis=1) <= atol), dist.min(axis=1).max()
    assert np.all(dist.min(axis=0) <= atol), dist.min(axis=0).max()


def normalised(A, b):
    """Rows divided by their Euclidean norms (zero rows left out)."""
    A = np.asarray(A, dtype=float)
    b = np.asarray(b, dtype=float)
    s = np.linalg.norm(A, axis=1)
    keep = s > 0
    return A[keep] / s[keep, None], b[keep] / s[keep]


def unit_rows(rng, m, n):
    A = rng.normal(size=(m, n))
    return A / np.linalg.norm(A, axis=1)[:, None]


def random_facets(seed, n, m):
    """A random bounded polytope in R^n all of whose rows are facets, each sticking out of the
    others by more than MARGIN (so the expected redundancy answer is clear), and whose
    vertices are well separated. Facet status is decided with HiGHS (see highs_implied)."""
    rng = np.random.default_rng(seed)
    for _ in range(200):
        A = unit_rows(rng, m, n)
        b = rng.uniform(0.5, 1.5, m)
        if not highs_bounded(A, b):
            continue
        gap = np.array(
            [highs_implied(A[i], b[i], np.delete(A, i, 0), np.delete(b, i)) for i in range(m)]
        )
        if np.any(np.abs(gap) < MARGIN):
            continue
        A, b = A[gap > 0], b[gap > 0]
        V = qhull_vertices(A, b)
        d = np.linalg.norm(V[:, None] - V[None, :], axis=2) + np.eye(len(V))
        if d.min() < 1e-3:
            continue
        return A, b
    raise AssertionError("no suitable random polytope")


def with_redundant_rows(seed, A, b, n_redundant, n_duplicates):
    """Rows of {A x <= b} (all facets) plus redundant rows and scaled duplicates, shuffled.

    Redundant rows: random unit d with offset (1 + δ) h_P(d), δ in [0.001, 0.3] (h_P by HiGHS;
    the random polytopes contain the origin, so h_P(d) > 0 and the row is strictly implied).
    Duplicates: a facet row times a factor in [0.1, 10]. Returns (A, b, group) where
    group[i] = k >= 0 when caller row i is facet k or a duplicate of it, -1 when redundant.
    """
    rng = np.random.default_rng(seed)
    m, n = A.shape
    rows, rhs, group = list(A), list(b), list(range(m))
    for _ in range(n_redundant):
        d = unit_rows(rng, 1, n)[0]
        h = highs_support(A, b, d)
        assert h > 0
        rows.append(d)
        rhs.append((1.0 + rng.uniform(0.001, 0.3)) * h)
        group.append(-1)
    for _ in range(n_duplicates):
        k = int(rng.integers(m))
        s = rng.uniform(0.1, 10.0)
        rows.append(s * A[k])
        rhs.append(s * b[k])
        group.append(k)
    perm = rng.permutation(len(rows))
    return np.array(rows)[perm], np.array(rhs)[perm], np.array(group)[perm]


def assert_one_per_group(kept_rows, group, n_facets):
    """Caller rows kept: exactly one of each facet group, no redundant row."""
    kept_groups = sorted(int(group[i]) for i in kept_rows)
    assert kept_groups == list(range(n_facets)), kept_groups


def assert_irredundant_by_definition(Q, A, b, tol=1e-7):
    """Q is an irredundant description of {A x <= b}: every kept row sticks out of the other
    kept rows, and every caller row is implied by the kept rows.

    reference: scipy linprog(method="highs"), one LP per row.
    """
    QA, Qb = Q.A, Q.b
    for i in range(Q.num_rows):
        others_A, others_b = np.delete(QA, i, 0), np.delete(Qb, i)
        assert highs_implied(QA[i], Qb[i], others_A, others_b) > tol, f"kept row {i} redundant"
    NA, Nb = normalised(A, b)
    for i in range(NA.shape[0]):
        assert highs_implied(NA[i], Nb[i], QA, Qb) <= tol, f"caller row {i} not implied"


def tight_rank(A, b, x, tol=1e-7):
    """Rank of the rows of A that are tight at x."""
    A, b = normalised(A, b)
    tight = np.abs(A @ x - b) <= tol
    return np.linalg.matrix_rank(A[tight], tol=1e-9) if tight.any() else 0


def moment_curve(ts, d):
    """Points (t, t^2, ..., t^d) for each t."""
    return np.array([[t**i for i in range(1, d + 1)] for t in ts], dtype=float)


def gale_facet_count(k, d):
    """Number of facets of the cyclic polytope C(k, d), by Gale's evenness condition (Ziegler
    1995, *Lectures on Polytopes*; statement from memory): a d-subset S of the k points is a
    facet iff every two points not in S are separated by an even number of points of S.
    Counted by enumerating all d-subsets."""
    count = 0
    for S in itertools.combinations(range(k), d):
        inside = set(S)
        outside = [i for i in range(k) if i not in inside]
        if all(
            sum(1 for s in S if i < s < j) % 2 == 0 for i, j in itertools.combinations(outside, 2)
        ):
            count += 1
    return count


# --------------------------------------------------------------------------------------------
# Vertices against qhull and pycddlib


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("n", [2, 3, 4, 5])
def test_vertices_match_qhull_and_cdd(n, seed):
    A, b = random_facets(100 * n + seed, n, 3 * n + 2)
    P = corral.Polytope(A, b)
    ref_qhull = qhull_vertices(A, b)  # reference: scipy HalfspaceIntersection (qhull)
    ref_cdd = cdd_vertices(A, b)  # reference: pycddlib
    assert_same_rows(ref_qhull, ref_cdd)
    for exact in (False, True):
        V = P.vertices(exact=exact)
        assert V.shape[1] == n
        assert_same_rows(V, ref_qhull)
        assert_same_rows(V, ref_cdd)


def test_vertices_as_fractions_are_exact():
    # The triangle x >= 0, y >= 0, 3x + 2y <= 1 (hand-worked vertices (0,0), (1/3,0), (0,1/2)).
    # Stored rows are normalised doubles, so exact vertices are the rationals of those doubles:
    # they agree with 1/3 and 1/2 to rounding, and are Fractions.
    P = corral.Polytope([[-1.0, 0.0], [0.0, -1.0], [3.0, 2.0]], [0.0, 0.0, 1.0])
    F = P.vertices(exact=True, as_fractions=True)
    assert all(isinstance(q, Fraction) for row in F for q in row)
    got = np.array([[float(q) for q in row] for row in F])
    assert_same_rows(got, [[0, 0], [1 / 3, 0], [0, 0.5]], atol=1e-15)
    # Box with exactly representable bounds: exact vertices are exactly the corners.
    F = corral.Polytope.box([0.5, -2.0], [1.0, 4.0]).vertices(exact=True, as_fractions=True)
    assert sorted(tuple(r) for r in F) == sorted(
        (Fraction(x), Fraction(y)) for x in (0.5, 1.0) for y in (-2.0, 4.0)
    )
    with pytest.raises(corral.InvalidInputError, match="as_fractions"):
        P.vertices(as_fractions=True)


# --------------------------------------------------------------------------------------------
# Redundancy removal against pycddlib and HiGHS


def _irredundant_case(n, seed):
    A0, b0 = random_facets(1000 + 10 * n + seed, n, 3 * n + 2)
    A, b, group = with_redundant_rows(seed, A0, b0, n_redundant=4 * n, n_duplicates=n)
    return A0, A, b, group


@pytest.mark.parametrize("n", [2, 3, 4, 5])
@pytest.mark.parametrize("backend", BACKENDS)
def test_irredundant_random_matches_cdd_and_highs(n, backend):
    if backend == "cdd-exact" and n > 3:
        pytest.skip("cdd-exact only on small cases")
    for seed in range(2):
        A0, A, b, group = _irredundant_case(n, seed)
        P = corral.Polytope(A, b)
        Q = P.irredundant(backend=backend)
        assert Q.num_rows == A0.shape[0]
        assert_one_per_group(Q.source_rows, group, A0.shape[0])
        red = P.redundant_rows(backend=backend)
        assert sorted(set(range(len(b))) - set(red.tolist())) == sorted(Q.source_rows)
        # reference: pycddlib matrix_canonicalize keeps one row per facet group as well.
        kept, lin = cdd_canonical(A, b)
        assert not lin
        assert_one_per_group(sorted(kept), group, A0.shape[0])
        # reference: one HiGHS LP per row.
        assert_irredundant_by_definition(Q, A, b)
        # Stored rows are the caller's rows, normalised.
        NA, Nb = normalised(A[Q.source_rows], b[Q.source_rows])
        np.testing.assert_allclose(Q.A, NA, atol=1e-14)
        np.testing.assert_allclose(Q.b, Nb, atol=1e-14)
        assert Q.same_set(P, backend=backend)


@pytest.mark.parametrize("n", [2, 3, 4, 5])
def test_irredundant_exact_matches_cdd(n):
    A0, A, b, group = _irredundant_case(n, 7)
    P = corral.Polytope(A, b)
    Q, info = P.irredundant(exact=True, return_info=True)
    assert info.method == "cdd-exact"
    assert_one_per_group(Q.source_rows, group, A0.shape[0])
    kept, _ = cdd_canonical(A, b)  # reference: pycddlib matrix_canonicalize
    assert_one_per_group(sorted(kept), group, A0.shape[0])
    assert_irredundant_by_definition(Q, A, b)  # reference: HiGHS, one LP per row
    red = P.redundant_rows(exact=True)
    assert sorted(set(range(len(b))) - set(red.tolist())) == sorted(Q.source_rows)


@pytest.mark.parametrize("backend", FLOAT_BACKENDS)
def test_irredundant_many_rows(backend):
    # 400 rows in R^3, most of them redundant: exercises Clarkson's loop with small LPs.
    A0, b0 = random_facets(4242, 3, 12)
    A, b, group = with_redundant_rows(5, A0, b0, n_redundant=380, n_duplicates=8)
    P = corral.Polytope(A, b)
    Q, info = P.irredundant(backend=backend, return_info=True)
    assert_one_per_group(Q.source_rows, group, A0.shape[0])
    assert info.method == "clarkson"
    # The LPs of the output-sensitive method have few rows (facets found so far) compared
    # with the 400 of the input; the bounding-box LPs have all of them.
    assert 0 < info.mean_lp_rows < 0.5 * len(b)


# --------------------------------------------------------------------------------------------
# Chebyshev centres and support values against HiGHS


@pytest.mark.parametrize("n", [2, 3, 4, 5])
@pytest.mark.parametrize("backend", BACKENDS)
def test_chebyshev_and_support_match_highs(n, backend):
    rng = np.random.default_rng(77 + n)
    for seed in range(2):
        A, b = random_facets(500 + 10 * n + seed, n, 3 * n + 2)
        # Unnormalised rows: the library normalises, the reference uses the norms.
        scale = rng.uniform(0.2, 5.0, len(b))
        As, bs = A * scale[:, None], b * scale
        P = corral.Polytope(As, bs)
        ball = P.chebyshev_center(backend=backend)
        _, r_ref = highs_chebyshev(As, bs)  # reference: HiGHS
        assert ball.radius == pytest.approx(r_ref, rel=1e-7, abs=1e-9)
        # The centre is not unique; check the ball is inside by definition.
        assert np.all(A @ ball.center + ball.radius <= b + 1e-9)
        D = rng.normal(size=(6, n))
        h = P.support(D, backend=backend)
        ref = [highs_support(As, bs, d) for d in D]  # reference: HiGHS
        np.testing.assert_allclose(h, ref, rtol=1e-7, atol=1e-9)
        assert P.support(D[0], backend=backend) == pytest.approx(ref[0], rel=1e-7, abs=1e-9)
        lo, hi = P.bounding_box(backend=backend)
        ref_hi = [highs_support(As, bs, e) for e in np.eye(n)]  # reference: HiGHS
        ref_lo = [-highs_support(As, bs, -e) for e in np.eye(n)]
        np.testing.assert_allclose(hi, ref_hi, rtol=1e-7, atol=1e-9)
        np.testing.assert_allclose(lo, ref_lo, rtol=1e-7, atol=1e-9)


@pytest.mark.parametrize("backend", BACKENDS)
def test_chebyshev_closed_forms(backend):
    # Box [0,2] x [0,6]: largest ball radius 1 (half the shortest side), centre x = 1.
    ball = corral.Polytope.box([0, 0], [2, 6]).chebyshev_center(backend=backend)
    assert ball.radius == pytest.approx(1.0, abs=1e-9)
    assert ball.center[0] == pytest.approx(1.0, abs=1e-9)
    assert 1.0 - 1e-9 <= ball.center[1] <= 5.0 + 1e-9
    # Standard simplex in R^n: inradius 1/(n + sqrt(n)), centre r (1, ..., 1) (hand-worked:
    # x_i >= r for all i, and (sum x - 1)/sqrt(n) <= -r with x_i = r gives r (n + sqrt n) = 1).
    for n in (2, 3, 5):
        ball = corral.Polytope.simplex(n).chebyshev_center(backend=backend)
        r = 1.0 / (n + math.sqrt(n))
        assert ball.radius == pytest.approx(r, rel=1e-9)
        np.testing.assert_allclose(ball.center, np.full(n, r), atol=1e-9)
    # A flat set has radius 0 and a centre in the set.
    flat = corral.Polytope.box([0, 1, 0], [1, 1, 1])
    ball = flat.chebyshev_center(backend=backend)
    assert ball.radius == 0.0
    assert flat.contains(ball.center)
    # The strip |x| <= 1 in R^2 is unbounded but has a finite largest ball (radius 1).
    strip = corral.Polytope([[1.0, 0.0], [-1.0, 0.0]], [1.0, 1.0])
    assert strip.chebyshev_center(backend=backend).radius == pytest.approx(1.0)


@pytest.mark.parametrize("backend", BACKENDS)
def test_support_unbounded_and_empty(backend):
    # Halfspace x <= 1: h(e_1) = 1, h(-e_1) = +inf, h(e_2) = +inf.
    H = corral.Polytope([[1.0, 0.0]], [1.0])
    np.testing.assert_array_equal(
        H.support([[1, 0], [-1, 0], [0, 1]], backend=backend), [1.0, np.inf, np.inf]
    )
    # Empty set (x <= -1 and -x <= -1): -inf in every direction.
    E = corral.Polytope([[1.0], [-1.0]], [-1.0, -1.0])
    assert E.support([1.0], backend=backend) == -np.inf
    assert corral.Polytope.empty(3).support(np.eye(3), backend=backend).tolist() == [-np.inf] * 3


# --------------------------------------------------------------------------------------------
# Closed-form families


def _redundant_copies(P, seed, k=5):
    """P's rows plus k strictly redundant rows (offset 1.1 h_P(d), h_P from HiGHS)."""
    rng = np.random.default_rng(seed)
    D = unit_rows(rng, k, P.dim)
    h = np.array([highs_support(P.A, P.b, d) for d in D])
    return np.vstack([P.A, D]), np.r_[P.b, h + 0.1 * np.abs(h) + 0.1]


@pytest.mark.parametrize("n", [1, 2, 3, 4, 5])
def test_hypercube(n):
    # [-1, 1]^n: 2^n vertices (every sign vector), 2n facets.
    P = corral.Polytope.box(-np.ones(n), np.ones(n))
    corners = np.array(list(itertools.product([-1.0, 1.0], repeat=n)))
    assert_same_rows(P.vertices(), corners)
    assert_same_rows(P.vertices(exact=True), corners)
    A, b = _redundant_copies(P, n)
    R = corral.Polytope(A, b)
    for backend in BACKENDS:
        assert R.irredundant(backend=backend).num_rows == 2 * n
    assert R.irredundant(exact=True).num_rows == 2 * n
    H = corral.Polytope.from_vertices(corners)
    assert H.irredundant().num_rows == 2 * n
    assert H.same_set(P)
    assert corral.Polytope.from_vertices(corners, exact=True).same_set(P)


@pytest.mark.parametrize("n", [2, 3, 4, 5])
def test_cross_polytope(n):
    # {x : s·x <= 1 for every sign vector s}: 2^n facets, 2n vertices ±e_i.
    S = np.array(list(itertools.product([-1.0, 1.0], repeat=n)))
    P = corral.Polytope(S, np.ones(len(S)))
    pm = np.vstack([np.eye(n), -np.eye(n)])
    assert_same_rows(P.vertices(), pm)
    assert P.irredundant().num_rows == 2**n
    assert P.irredundant(exact=True).num_rows == 2**n
    H = corral.Polytope.from_vertices(pm)
    assert H.num_rows == 2**n
    assert H.irredundant().num_rows == 2**n
    assert H.same_set(P)


@pytest.mark.parametrize("n", [1, 2, 3, 4, 5])
def test_simplex(n):
    # {x >= 0, sum x <= 1}: n + 1 vertices (0 and e_i), n + 1 facets.
    P = corral.Polytope.simplex(n)
    assert P.num_rows == n + 1
    verts = np.vstack([np.zeros(n), np.eye(n)])
    assert_same_rows(P.vertices(), verts)
    A, b = _redundant_copies(P, 10 + n)
    R = corral.Polytope(A, b)
    for backend in BACKENDS:
        assert R.irredundant(backend=backend).num_rows == n + 1
    H = corral.Polytope.from_vertices(verts)
    assert H.num_rows == n + 1
    assert H.same_set(P)
    assert_same_rows(H.vertices(), verts)


def test_gale_counts_match_the_even_dimension_formula():
    # For even d, C(k, d) has k/(k - d/2) * binom(k - d/2, d/2) facets (Ziegler 1995; the
    # formula from memory); our enumeration must agree before we trust it for odd d.
    for d in (2, 4, 6):
        for k in range(d + 1, 13):
            formula = Fraction(k, k - d // 2) * math.comb(k - d // 2, d // 2)
            assert gale_facet_count(k, d) == formula
    # d = 3: C(k, 3) is simplicial with k vertices, so f = 2k - 4 (Euler's relation).
    for k in range(4, 12):
        assert gale_facet_count(k, 3) == 2 * k - 4


@pytest.mark.parametrize("d,k", [(2, 7), (3, 6), (3, 9), (4, 6), (4, 8), (4, 12)])
def test_cyclic_polytope_float(d, k):
    # Parameters in [-1, 1], at most 4-D and 12 points: where cddlib's floating point is sound.
    ts = np.linspace(-1.0, 1.0, k)
    pts = moment_curve(ts, d)
    P = corral.Polytope.from_vertices(pts)
    facets = gale_facet_count(k, d)
    assert P.num_rows == facets
    for backend in BACKENDS:
        assert P.irredundant(backend=backend).num_rows == facets
    # Every moment-curve point is a vertex (cyclic polytopes are neighbourly).
    assert_same_rows(P.vertices(), pts, atol=1e-6)
    # Round trip through the vertices.
    assert corral.Polytope.from_vertices(P.vertices()).same_set(P)
    # reference: pycddlib's canonicalisation keeps the same number of rows.
    kept, _ = cdd_canonical(P.A, P.b)
    assert len(kept) == facets


@pytest.mark.parametrize("d,k", [(5, 9), (6, 10), (4, 20)])
def test_cyclic_polytope_exact(d, k):
    # Beyond cddlib's floating-point comfort zone: hull and redundancy in exact arithmetic.
    ts = np.linspace(-1.0, 1.0, k)
    pts = moment_curve(ts, d)
    P = corral.Polytope.from_vertices(pts, exact=True)
    facets = gale_facet_count(k, d)
    assert P.num_rows == facets
    assert P.irredundant(exact=True).num_rows == facets
    # Every point is a vertex of the (rounded) H-representation: contained, and the rows
    # tight at it have full rank d.
    assert np.all(P.contains(pts, tol=1e-9))
    for x in pts:
        assert tight_rank(P.A, P.b, x, tol=1e-9) == d


@pytest.mark.parametrize("p,q", [(1, 1), (1, 2), (2, 2), (2, 3)])
def test_product_of_simplices(p, q):
    # Δ_p x Δ_q: (p+1)(q+1) vertices and (p+1) + (q+1) facets (products: v = v_P v_Q,
    # f = f_P + f_Q).
    Sp, Sq = corral.Polytope.simplex(p), corral.Polytope.simplex(q)
    A = np.block([[Sp.A, np.zeros((p + 1, q))], [np.zeros((q + 1, p)), Sq.A]])
    b = np.r_[Sp.b, Sq.b]
    P = corral.Polytope(A, b)
    vp = np.vstack([np.zeros(p), np.eye(p)])
    vq = np.vstack([np.zeros(q), np.eye(q)])
    verts = np.array([np.r_[x, y] for x in vp for y in vq])
    assert_same_rows(P.vertices(), verts)
    assert len(verts) == (p + 1) * (q + 1)
    H = corral.Polytope.from_vertices(verts)
    assert H.irredundant().num_rows == p + q + 2
    assert H.same_set(P)
    A2, b2 = _redundant_copies(P, p * 10 + q)
    for backend in FLOAT_BACKENDS:
        assert corral.Polytope(A2, b2).irredundant(backend=backend).num_rows == p + q + 2


@pytest.mark.parametrize("k", [3, 5, 8])
def test_prism_over_polygon(k):
    # Regular k-gon x [0, 1]: 2k vertices, k + 2 facets.
    th = 2 * np.pi * np.arange(k) / k
    poly = np.c_[np.cos(th), np.sin(th)]
    verts = np.vstack([np.c_[poly, np.zeros(k)], np.c_[poly, np.ones(k)]])
    P = corral.Polytope.from_vertices(verts)
    assert P.irredundant().num_rows == k + 2
    assert_same_rows(P.vertices(), verts)
    assert P.same_set(corral.Polytope.from_vertices(verts, exact=True))


# --------------------------------------------------------------------------------------------
# Degenerate input


@pytest.mark.parametrize("backend", BACKENDS)
def test_duplicate_and_scaled_duplicate_rows(backend):
    # [0,1]^3 with every row given three times: as is, times 2.5, times 0.01.
    B = corral.Polytope.box(np.zeros(3), np.ones(3))
    A = np.vstack([B.A, 2.5 * B.A, 0.01 * B.A])
    b = np.r_[B.b, 2.5 * B.b, 0.01 * B.b]
    P = corral.Polytope(A, b)
    Q = P.irredundant(backend=backend)
    assert Q.num_rows == 6
    # one of each group of three (rows i, i + 6, i + 12)
    assert sorted(s % 6 for s in Q.source_rows) == list(range(6))
    assert len(P.redundant_rows(backend=backend)) == 12
    assert_same_rows(P.vertices(), list(itertools.product([0.0, 1.0], repeat=3)))
    assert Q.same_set(B)
    # A duplicate with a larger offset is the redundant one: keep x <= 1, drop 3x <= 4.
    P2 = corral.Polytope(np.vstack([B.A, [[3.0, 0.0, 0.0]]]), np.r_[B.b, 4.0])
    assert P2.redundant_rows(backend=backend).tolist() == [6]


def _pyramid(k=20):
    """Pyramid over the regular k-gon with apex (0, 0, 1): rows cos θ x + sin θ y + z <= 1
    (all through the apex) and z >= 0; plus k weakly redundant rows through the apex,
    cos φ x + sin φ y + 2 z <= 2 at the half angles (on the pyramid, cos φ x + sin φ y <= 1 - z,
    so the row holds, tight only at the apex)."""
    th = 2 * np.pi * np.arange(k) / k
    phi = th + np.pi / k
    A = np.vstack(
        [
            np.c_[np.cos(th), np.sin(th), np.ones(k)],
            [[0.0, 0.0, -1.0]],
            np.c_[np.cos(phi), np.sin(phi), 2 * np.ones(k)],
        ]
    )
    b = np.r_[np.ones(k), 0.0, 2 * np.ones(k)]
    # Vertices: the base polygon's corners, where rows i-1 and i meet (hand-worked: the
    # corners of {cos θ_i x + sin θ_i y <= 1} are at angles θ_i + π/k, radius 1/cos(π/k)),
    # and the apex.
    R = 1.0 / np.cos(np.pi / k)
    base = np.c_[R * np.cos(phi), R * np.sin(phi), np.zeros(k)]
    return A, b, np.vstack([base, [[0.0, 0.0, 1.0]]])


@pytest.mark.parametrize("backend", BACKENDS)
def test_many_rows_through_one_vertex(backend):
    A, b, verts = _pyramid()
    P = corral.Polytope(A, b)
    Q = P.irredundant(backend=backend)
    assert sorted(Q.source_rows) == list(range(21))
    assert P.redundant_rows(backend=backend).tolist() == list(range(21, 41))
    assert_same_rows(P.vertices(), verts)
    assert_same_rows(Q.vertices(), verts)
    kept, lin = cdd_canonical(A, b)  # reference: pycddlib matrix_canonicalize
    assert sorted(kept) == list(range(21)) and not lin
    assert_same_rows(cdd_vertices(A, b), verts)  # reference: pycddlib
    assert_same_rows(qhull_vertices(A, b), verts)  # reference: qhull


def test_many_rows_through_one_vertex_exact():
    A, b, verts = _pyramid()
    P = corral.Polytope(A, b)
    assert sorted(P.irredundant(exact=True).source_rows) == list(range(21))
    assert_same_rows(P.vertices(exact=True), verts)


def test_from_vertices_repeated_and_face_points():
    # Unit square corners, each repeated, plus points on edges, on a corner and inside.
    corners = np.array([[0, 0], [1, 0], [1, 1], [0, 1]], dtype=float)
    extra = np.array([[0.5, 0], [1, 0.3], [0.5, 0.5], [0, 0.999], [1, 1], [0.25, 0.75]])
    V = np.vstack([corners, corners, extra])
    for exact in (False, True):
        P = corral.Polytope.from_vertices(V, exact=exact)
        assert P.irredundant().num_rows == 4
        assert_same_rows(P.vertices(), corners)
        assert P.same_set(corral.Polytope.box([0, 0], [1, 1]))
    # In R^3: the unit cube's corners, each three times, plus face centres and the centre.
    cube = np.array(list(itertools.product([0.0, 1.0], repeat=3)))
    faces = np.vstack([np.eye(3) * 0 + 0.5 - 0.5 * np.eye(3), 0.5 + 0.5 * np.eye(3)])
    P = corral.Polytope.from_vertices(np.vstack([cube, cube, cube, faces, [[0.5] * 3]]))
    assert P.irredundant().num_rows == 6
    assert_same_rows(P.vertices(), cube)


@pytest.mark.parametrize("backend", BACKENDS)
def test_flat_box(backend):
    # [0,1] x {2} x [0,1] in R^3, with redundant rows added: x + z <= 5, y <= 3, and the
    # equality rows again scaled (3y <= 6, -2y <= -4), and x <= 2.
    B = corral.Polytope.box([0, 2, 0], [1, 2, 1])
    A = np.vstack([B.A, [[1, 0, 1], [0, 1, 0], [0, 3, 0], [0, -2, 0], [1, 0, 0]]])
    b = np.r_[B.b, 5, 3, 6, -4, 2]
    P = corral.Polytope(A, b)
    E, e, rows = P.affine_hull(backend=backend)
    assert E.shape == (1, 3)  # one equality: dimension 2
    np.testing.assert_allclose(np.abs(E[0]), [0, 1, 0], atol=1e-12)
    np.testing.assert_allclose(E @ [0.3, 2, 0.7], e, atol=1e-12)
    # Stored rows tight on the whole set: y <= 2, -y <= -2 and their scaled copies.
    assert sorted(rows.tolist()) == [1, 4, 8, 9]
    Q = P.irredundant(backend=backend)
    # The equality rows are kept (one copy each) and the redundant rows dropped.
    assert sorted(Q.source_rows) == [0, 1, 2, 3, 4, 5]
    assert P.redundant_rows(backend=backend).tolist() == [6, 7, 8, 9, 10]
    # reference: pycddlib finds the same implicit equalities and keeps the same inequalities.
    kept, lin = cdd_canonical(A, b)
    assert lin == {1, 4, 8, 9}
    assert kept == {0, 2, 3, 5}
    square = [[x, 2.0, z] for x in (0.0, 1.0) for z in (0.0, 1.0)]
    assert_same_rows(P.vertices(), square)
    assert_same_rows(Q.vertices(exact=True), square)
    assert Q.same_set(P, backend=backend)
    assert not P.is_empty(backend=backend)


def _tilted_triangle():
    """A triangle in a plane of R^3 in general position, given by an equality pair and its
    three edge rows (in-plane outward normals), plus: the edge-0 row tilted out of the plane
    by adding 0.7 times the plane row (the same halfplane inside the plane), twice edge 0,
    a loosened edge 0, a strictly redundant row, and the plane rows scaled by 4."""
    rng = np.random.default_rng(3)
    Qr, _ = np.linalg.qr(rng.normal(size=(3, 3)))
    V = np.array([[0, 0], [1, 0], [0, 1]], dtype=float) @ Qr[:, :2].T + [0.3, -0.2, 0.5]
    nrm = Qr[:, 2]
    beta = nrm @ V[0]
    rows, rhs = [nrm, -nrm], [beta, -beta]
    for i in range(3):
        p, q, r = V[i], V[(i + 1) % 3], V[(i + 2) % 3]
        out = np.cross(q - p, nrm)
        out = -out if out @ (r - p) > 0 else out
        rows.append(out)
        rhs.append(out @ p)
    a0, c0 = rows[2], rhs[2]
    d = np.array([0.3, -0.5, 0.8])
    rows += [a0 + 0.7 * nrm, 2 * a0, a0, d, 4 * nrm, -4 * nrm]
    rhs += [c0 + 0.7 * beta, 2 * c0, c0 + 0.1, np.max(V @ d) + 0.05, 4 * beta, -4 * beta]
    return np.array(rows), np.array(rhs), V


@pytest.mark.parametrize("backend", BACKENDS)
def test_flat_triangle_in_hyperplane(backend):
    A, b, V = _tilted_triangle()
    P = corral.Polytope(A, b)
    E, e, rows = P.affine_hull(backend=backend)
    assert E.shape == (1, 3)
    np.testing.assert_allclose(E @ V.T, np.tile(e[:, None], 3), atol=1e-9)
    assert sorted(rows.tolist()) == [0, 1, 9, 10]
    for exact in (False, True):
        Q = P.irredundant(backend=backend, exact=exact)
        src = sorted(Q.source_rows)
        # One copy of each plane row, the other two edges, and one of the two descriptions of
        # edge 0 inside the plane (row 2 or its tilted copy 5); everything else dropped.
        assert len(set(src) & {0, 9}) == 1 and len(set(src) & {1, 10}) == 1
        assert {3, 4} <= set(src)
        assert len(set(src) & {2, 5}) == 1
        assert not set(src) & {6, 7, 8}
        assert len(src) == 5
        assert Q.same_set(P, backend=backend)
    kept, lin = cdd_canonical(A, b)  # reference: pycddlib matrix_canonicalize
    assert lin == {0, 1, 9, 10}
    assert len(kept) == 3 and {3, 4} <= kept and len(kept & {2, 5}) == 1
    assert_same_rows(P.vertices(), V)
    assert_same_rows(P.vertices(exact=True), V)
    assert_same_rows(cdd_vertices(A, b), V)  # reference: pycddlib


def test_flat_simplex_from_vertices():
    # The standard 2-simplex {x >= 0, sum x = 1} in R^3 from its vertices, repeated, plus an
    # inside point and an edge point whose coordinates sum to 1 exactly in binary (1/3 would
    # not: in exact arithmetic its double lies off the plane and the hull is a thin
    # tetrahedron). The hull comes with its equality as a pair of opposite rows.
    V = np.eye(3)
    extra = [[0.25, 0.25, 0.5], [0.5, 0.0, 0.5]]
    for exact in (False, True):
        P = corral.Polytope.from_vertices(np.vstack([V, V, extra]), exact=exact)
        E, e, rows = P.affine_hull()
        assert E.shape == (1, 3)
        np.testing.assert_allclose(np.abs(E[0]), np.full(3, 1 / math.sqrt(3)), atol=1e-12)
        assert len(rows) == 2
        assert P.irredundant().num_rows == 5  # 2 equality rows + 3 edges
        assert_same_rows(P.vertices(), V)
        S = corral.Polytope(
            np.vstack([-np.eye(3), np.ones((1, 3)), -np.ones((1, 3))]), [0, 0, 0, 1, -1]
        )
        assert P.same_set(S)


@pytest.mark.parametrize("backend", BACKENDS)
def test_single_point(backend):
    P = corral.Polytope.box([1, 2, 3], [1, 2, 3])
    E, e, rows = P.affine_hull(backend=backend)
    assert E.shape == (3, 3)
    np.testing.assert_allclose(np.linalg.solve(E, e), [1, 2, 3], atol=1e-12)
    assert P.irredundant(backend=backend).num_rows == 6
    A = np.vstack([P.A, [[1, 1, 1]]])
    b = np.r_[P.b, 7.0]  # 1 + 2 + 3 = 6 < 7: redundant
    assert corral.Polytope(A, b).redundant_rows(backend=backend).tolist() == [6]
    assert_same_rows(P.vertices(), [[1, 2, 3]])
    assert P.chebyshev_center(backend=backend).radius == 0.0


@pytest.mark.parametrize("backend", BACKENDS)
def test_implicit_equalities_without_pairs(backend):
    # -z <= 0, z - x <= 0, z + x <= 0 force z = 0 and x = 0 (z <= -|x| and z >= 0) though no
    # two rows are opposite; -1 <= y <= 1; x + y + z <= 5 is redundant. The set is the
    # segment {(0, y, 0) : |y| <= 1}. Removing any of the first three rows makes the set
    # 2- or 3-dimensional, so all three stay.
    A = np.array([[0, 0, -1], [-1, 0, 1], [1, 0, 1], [0, 1, 0], [0, -1, 0], [1, 1, 1]], float)
    b = np.array([0, 0, 0, 1, 1, 5], float)
    P = corral.Polytope(A, b)
    E, e, rows = P.affine_hull(backend=backend)
    assert E.shape == (2, 3)
    np.testing.assert_allclose(E @ [0, 0.3, 0], e, atol=1e-12)
    np.testing.assert_allclose(E[:, 1], 0, atol=1e-12)
    assert sorted(rows.tolist()) == [0, 1, 2]
    assert P.redundant_rows(backend=backend).tolist() == [5]
    assert_same_rows(P.vertices(), [[0, 1, 0], [0, -1, 0]])
    kept, lin = cdd_canonical(A, b)  # reference: pycddlib
    assert lin == {0, 1, 2} and kept == {3, 4}
    # The same in R^2 closed to a point: x >= 0, y >= 0, x + y <= 0 is {0}; x <= 1 redundant.
    Q = corral.Polytope([[-1.0, 0.0], [0.0, -1.0], [1.0, 1.0], [1.0, 0.0]], [0, 0, 0, 1.0])
    assert Q.affine_hull(backend=backend)[0].shape == (2, 2)
    assert Q.redundant_rows(backend=backend).tolist() == [3]
    assert_same_rows(Q.vertices(), [[0, 0]])


@pytest.mark.parametrize("backend", BACKENDS)
def test_irredundant_unbounded_sets(backend):
    # Strip |x| <= 1 with x <= 2, 2x <= 3 (redundant) and x + 0.001 y <= 5 (not implied: y
    # is free).
    S = corral.Polytope([[1.0, 0], [-1, 0], [1, 0], [2, 0], [1, 0.001]], [1.0, 1, 2, 3, 5])
    assert S.redundant_rows(backend=backend).tolist() == [2, 3]
    # 0 <= x <= 1, y >= 0, x + y >= 1: y >= 0 follows (y >= 1 - x >= 0); x + 2y >= 0.5,
    # 2x <= 3 and x + y >= 2/3 are implied as well.
    A = np.array([[-1, 0], [0, -1], [-1, -1], [-1, -2], [1, 0], [2, 0], [-3, -3]], float)
    b = np.array([0, 0, -1, -0.5, 1, 3, -2], float)
    U = corral.Polytope(A, b)
    assert U.redundant_rows(backend=backend).tolist() == [1, 3, 5, 6]
    kept, _ = cdd_canonical(A, b)  # reference: pycddlib
    assert kept == {0, 2, 4}
    assert_irredundant_by_definition(U.irredundant(backend=backend), A, b)
    # The cone x, y, z >= 0 with the implied x + y + z >= 0 and x + y >= 0.
    C = corral.Polytope(np.vstack([-np.eye(3), [[-1, -1, -1], [-1, -1, 0]]]), np.zeros(5))
    assert C.redundant_rows(backend=backend).tolist() == [3, 4]
    # A halfplane given three times.
    H = corral.Polytope([[1.0, 1.0], [2.0, 2.0], [1.0, 1.0]], [1.0, 3.0, 1.0])
    assert H.redundant_rows(backend=backend).tolist() == [1, 2]


# Integer data found by a random search against pycddlib: flat unbounded sets in which
# several rows become parallel inside the affine hull.
PARALLEL_IN_HULL = {
    # Rows 5, 6 (identical) and 8 give -2x + 2y - z = 2. On that plane z = -2x + 2y - 2, so
    # row 1 reads -x + y <= 2/3 and row 0 reads -x + y <= 1: row 0 is redundant (by 1/3).
    # Irredundant: 1, 5, 7, 8 (row 6 duplicates 5; rows 2, 3, 4 are implied).
    "non-minimal": (
        [
            [-2, 2, 0],
            [-2, 2, 2],
            [1, 1, -1],
            [0, 2, 0],
            [2, 0, -1],
            [-2, 2, -1],
            [-2, 2, -1],
            [0, 2, -2],
            [2, -2, 1],
        ],
        [2, 0, 0, 1, 0, 2, 2, 0, -2],
        [1, 5, 7, 8],
    ),
    # Rows 2 and 4 give 2x + y - z = -2, so z = 2x + y + 2. Then row 0 reads x <= 0, row 1
    # x <= -4 and row 3 x <= -1: only row 1 is needed. Keeping row 0 instead gives a larger
    # set.
    "wrong set": (
        [[2, 0, 0], [-1, -1, 1], [2, 1, -1], [-2, -2, 2], [-2, -1, 1]],
        [0, -2, -2, 2, 2],
        [1, 2, 4],
    ),
}
# Once wrong on the cdd-exact backend: rows that become parallel inside the affine hull
# differ only by rounding after the projection, and are now de-duplicated there.


@pytest.mark.parametrize("case", sorted(PARALLEL_IN_HULL))
@pytest.mark.parametrize("backend", BACKENDS)
def test_flat_unbounded_rows_parallel_in_the_hull(case, backend):
    A, b, expected = PARALLEL_IN_HULL[case]
    A, b = np.array(A, dtype=float), np.array(b, dtype=float)
    kept, lin = cdd_canonical(A, b)  # reference: pycddlib
    P = corral.Polytope(A, b)
    hull = sorted(P.affine_hull(backend=backend)[2].tolist())
    assert hull == sorted(lin)
    Q = P.irredundant(backend=backend)
    assert Q.same_set(P)
    assert sorted(Q.source_rows) == expected
    assert set(expected) - set(hull) == kept


def test_flat_unbounded_rows_parallel_in_the_hull_exact():
    for A, b, expected in PARALLEL_IN_HULL.values():
        P = corral.Polytope(np.array(A, dtype=float), np.array(b, dtype=float))
        assert sorted(P.irredundant(exact=True).source_rows) == expected


# Once crashed the interpreter (a read past the end of A with 0 rows left in the hull).
# Flat sets every row of which is an implicit equality or parallel to the hull. The script
# runs in a child process, since the failure is a crash of the interpreter.
FLAT_NO_INEQUALITY = {
    # the line x = 1 in R^2
    "line": ([[1.0, 0.0], [-1.0, 0.0]], [1.0, -1.0], [0, 1]),
    # the plane 2x + y = 2 in R^3, with a zero row and the parallel, redundant 2x + y <= 5
    "plane": (
        [[-2.0, -1.0, 0.0], [0.0, 0.0, 0.0], [2.0, 1.0, 0.0], [2.0, 1.0, 0.0]],
        [-2.0, 0.0, 2.0, 5.0],
        [0, 2],
    ),
}


@pytest.mark.parametrize("case", sorted(FLAT_NO_INEQUALITY))
@pytest.mark.parametrize("backend", BACKENDS)
def test_flat_set_without_inequalities(case, backend):
    A, b, expected = FLAT_NO_INEQUALITY[case]
    script = (
        f"import corral; P = corral.Polytope({A!r}, {b!r}); "
        f"print(sorted(P.irredundant(backend={backend!r}).source_rows))"
    )
    run = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=60)
    assert run.returncode == 0, run.stderr[-500:]
    assert run.stdout.strip() == str(expected)


def test_flat_set_without_inequalities_exact():
    for A, b, expected in FLAT_NO_INEQUALITY.values():
        P = corral.Polytope(A, b)
        assert sorted(P.irredundant(exact=True).source_rows) == expected


@pytest.mark.parametrize("backend", BACKENDS)
def test_irredundant_far_from_the_origin_and_badly_scaled(backend):
    # The random polytopes above contain 0; here the same kind of set is shifted far away
    # and its rows are scaled by factors 1e-6 .. 1e6. The answer must not change.
    n = 3
    A0, b0 = random_facets(2024, n, 11)
    A, b, group = with_redundant_rows(3, A0, b0, n_redundant=12, n_duplicates=3)
    shift = np.array([100.0, -250.0, 40.0])
    s = 10.0 ** np.random.default_rng(8).uniform(-6, 6, len(b))
    As, bs = A * s[:, None], (b + A @ shift) * s
    P = corral.Polytope(As, bs)
    Q = P.irredundant(backend=backend)
    assert_one_per_group(Q.source_rows, group, A0.shape[0])
    assert_same_rows(P.vertices(), qhull_vertices(A0, b0) + shift, atol=1e-6)
    ball = P.chebyshev_center(backend=backend)
    assert ball.radius == pytest.approx(highs_chebyshev(A0, b0)[1], rel=1e-7)


# --------------------------------------------------------------------------------------------
# Queries


def test_contains_single_batch_and_tolerance():
    P = corral.Polytope.box([0, 0], [1, 1])
    assert P.contains([0.5, 0.5]) is True
    assert P.contains(np.array([1.0, 1.0])) is True  # boundary
    assert P.contains([1.5, 0.5]) is False
    # Default tolerance 1e-9 relative to max |b| = 1.
    assert P.contains([1 + 1e-12, 0.5])
    assert not P.contains([1 + 1e-6, 0.5])
    assert P.contains([1 + 1e-6, 0.5], tol=1e-5)
    X = np.array([[0.5, 0.5], [2, 0], [1 + 1e-6, 0], [0, -1e-12]])
    got = P.contains(X)
    assert isinstance(got, np.ndarray) and got.dtype == bool and got.shape == (4,)
    assert got.tolist() == [True, False, False, True]
    assert P.contains(X, tol=1e-5).tolist() == [True, False, True, True]
    assert P.contains(np.zeros((0, 2))).shape == (0,)
    # Tolerance is relative to the set's scale: [0, 1000]^2 allows 1e-6 absolute slack.
    big = corral.Polytope.box([0, 0], [1000, 1000])
    assert big.contains([1000 + 1e-7, 0])
    assert not big.contains([1000 + 1e-5, 0])


@pytest.mark.parametrize("backend", BACKENDS)
def test_is_empty(backend):
    assert not corral.Polytope.box([0, 0], [1, 1]).is_empty(backend=backend)
    assert corral.Polytope.empty(2).is_empty(backend=backend)
    # Contradictory rows: x <= -1 and -x <= -1 (x >= 1).
    P = corral.Polytope([[1.0, 0.0], [-1.0, 0.0], [0.0, 1.0]], [-1.0, -1.0, 1.0])
    assert P.is_empty(backend=backend)
    # A zero row with b < 0 (0·x <= -2) makes any set empty, stored in the canonical form.
    Z = corral.Polytope([[1.0, 0.0], [0.0, 0.0], [0.0, 1.0]], [1.0, -2.0, 1.0])
    assert Z.is_empty(backend=backend)
    assert Z.num_rows == 1 and not np.any(Z.A) and Z.b[0] < 0
    # A zero row with b >= 0 is dropped; the rest decides.
    assert not corral.Polytope([[0.0, 0.0], [1.0, 0.0]], [0.0, 1.0]).is_empty(backend=backend)
    # Single points and other flat sets are not empty; slightly separated halfspaces are.
    assert not corral.Polytope.box([1, 1], [1, 1]).is_empty(backend=backend)
    assert corral.Polytope([[1.0], [-1.0]], [1.0, -1.001]).is_empty(backend=backend)
    # Whole space (no rows).
    assert not corral.Polytope(np.zeros((0, 2)), np.zeros(0)).is_empty(backend=backend)


@pytest.mark.parametrize("backend", BACKENDS)
def test_is_bounded(backend):
    halfspace = corral.Polytope([[1.0, 1.0]], [1.0])
    strip = corral.Polytope([[1.0, 0.0], [-1.0, 0.0]], [1.0, 1.0])
    cone = corral.Polytope([[-1.0, 0.0], [0.0, -1.0]], [0.0, 0.0])  # the positive quadrant
    whole = corral.Polytope(np.zeros((0, 3)), np.zeros(0))
    for P in (halfspace, strip, cone, whole):
        assert not P.is_bounded(backend=backend)
    assert corral.Polytope.box([-1, -2], [3, 4]).is_bounded(backend=backend)
    assert corral.Polytope.simplex(4).is_bounded(backend=backend)
    # A cone pointed the other way, cut by one row: bounded (x, y >= 0, x + y <= 1).
    assert corral.Polytope([[-1.0, 0.0], [0.0, -1.0], [1.0, 1.0]], [0, 0, 1]).is_bounded(
        backend=backend
    )
    # Convention: the empty set is bounded.
    assert corral.Polytope.empty(2).is_bounded(backend=backend)
    assert corral.Polytope([[1.0], [-1.0]], [-1.0, -1.0]).is_bounded(backend=backend)


@pytest.mark.parametrize("backend", BACKENDS)
def test_bounding_box(backend):
    lo, hi = [-np.inf, 0.0, -3.0], [1.0, np.inf, 5.0]
    B = corral.Polytope.box(lo, hi)
    assert B.num_rows == 4  # infinite bounds add no row
    got_lo, got_hi = B.bounding_box(backend=backend)
    np.testing.assert_array_equal(got_lo, lo)
    np.testing.assert_array_equal(got_hi, hi)
    # Simplex: [0, 1]^n.
    lo, hi = corral.Polytope.simplex(3).bounding_box(backend=backend)
    np.testing.assert_allclose(lo, 0, atol=1e-12)
    np.testing.assert_allclose(hi, 1, atol=1e-12)
    # The halfplane x + y <= 1 has no finite bound.
    lo, hi = corral.Polytope([[1.0, 1.0]], [1.0]).bounding_box(backend=backend)
    assert np.all(np.isneginf(lo)) and np.all(np.isposinf(hi))
    # Triangle with vertices (0,0), (2,0), (0,3) (hand-worked box [0,2] x [0,3]).
    T = corral.Polytope.from_vertices([[0, 0], [2, 0], [0, 3]])
    lo, hi = T.bounding_box(backend=backend)
    np.testing.assert_allclose(lo, [0, 0], atol=1e-12)
    np.testing.assert_allclose(hi, [2, 3], atol=1e-12)


def test_box_with_infinite_bounds_in_every_coordinate():
    B = corral.Polytope.box([-np.inf, -np.inf], [np.inf, np.inf])
    assert B.num_rows == 0 and not B.is_bounded() and B.contains([1e300, -1e300])
    half = corral.Polytope.box([-np.inf, 0.0], [np.inf, np.inf])
    assert half.num_rows == 1 and half.contains([-1e9, 0]) and not half.contains([0, -1])


def test_intersect_and_operator():
    square = corral.Polytope.box([0, 0], [1, 1])
    tri = corral.Polytope.simplex(2)
    for X in (square.intersect(tri), square & tri):
        assert X.num_rows == square.num_rows + tri.num_rows
        assert X.same_set(tri)
        assert X.irredundant().num_rows == 3
    # Source rows of Q are offset by P's caller row count (P has a dropped zero row).
    P = corral.Polytope([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]], [1.0, 1.0, 1.0])
    X = P & tri
    assert X.source_rows == [1, 2, 3, 4, 5]
    assert X.redundant_rows().tolist() == [0, 1, 2]  # zero row, x <= 1, y <= 1
    # Disjoint: the result is empty (set-valued operations return an empty Polytope).
    far = corral.Polytope.box([5, 5], [6, 6])
    assert (square & far).is_empty()
    assert (square & corral.Polytope.empty(2)).is_empty()
    shifted = corral.Polytope.box([0.5, 0.5], [2, 2])
    assert_same_rows((square & shifted).vertices(), [[0.5, 0.5], [1, 0.5], [0.5, 1], [1, 1]])
    with pytest.raises(corral.InvalidInputError, match="Q"):
        square & corral.Polytope.simplex(3)


def test_affine_image_rotation_and_shift():
    rng = np.random.default_rng(11)
    A, b = random_facets(999, 3, 10)
    P = corral.Polytope(A, b)
    Qr, _ = np.linalg.qr(rng.normal(size=(3, 3)))
    M = Qr @ np.diag([1.0, 2.0, 0.5])
    t = np.array([3.0, -1.0, 0.25])
    img = P.affine_image(M, t)
    assert img.source_rows == P.source_rows
    assert_same_rows(img.vertices(), P.vertices() @ M.T + t, atol=1e-9)
    # Without t: a pure linear map.
    assert_same_rows(P.affine_image(M).vertices(), P.vertices() @ M.T, atol=1e-9)
    # 2-D rotation by 30 degrees of the unit square, shifted by (2, -1).
    th = np.pi / 6
    R = np.array([[np.cos(th), -np.sin(th)], [np.sin(th), np.cos(th)]])
    sq = corral.Polytope.box([0, 0], [1, 1])
    corners = np.array([[0, 0], [1, 0], [0, 1], [1, 1]], dtype=float)
    assert_same_rows(sq.affine_image(R, [2, -1]).vertices(), corners @ R.T + [2, -1])


def test_affine_image_bad_maps():
    sq = corral.Polytope.box([0, 0], [1, 1])
    with pytest.raises(corral.InvalidInputError, match="^M: .*singular"):
        sq.affine_image(np.array([[1.0, 2.0], [2.0, 4.0]]))
    with pytest.raises(corral.InvalidInputError, match="^M: "):
        sq.affine_image(np.zeros((2, 2)))
    with pytest.raises(corral.InvalidInputError, match="^M: "):
        sq.affine_image(np.eye(3))
    with pytest.raises(corral.InvalidInputError, match="^M: "):
        sq.affine_image(np.array([[1.0, np.nan], [0.0, 1.0]]))
    with pytest.raises(corral.InvalidInputError, match="^t: "):
        sq.affine_image(np.eye(2), [1.0, 2.0, 3.0])
    with pytest.raises(corral.InvalidInputError, match="^t: "):
        sq.affine_image(np.eye(2), [np.inf, 0.0])


@pytest.mark.parametrize("shape", [(3, 3), (3, 2), (3, 5)])
def test_preimage_by_definition(shape):
    # x is in the preimage iff M x + t is in P: checked on random samples, away from the
    # boundary (|margin| > 1e-6) so that the answer does not hinge on tolerances.
    rng = np.random.default_rng(sum(shape))
    A, b = random_facets(31 + shape[1], 3, 10)
    P = corral.Polytope(A, b)
    M = rng.normal(size=shape) / math.sqrt(shape[1])
    t = rng.normal(size=3) * 0.2
    pre = P.preimage(M, t)
    assert pre.dim == shape[1]
    X = rng.uniform(-2, 2, size=(2000, shape[1]))
    Y = X @ M.T + t
    margin = np.max(A @ Y.T - b[:, None], axis=0)
    clear = np.abs(margin) > 1e-6
    inside = margin <= 0
    assert inside[clear].any() and (~inside[clear]).any()
    np.testing.assert_array_equal(pre.contains(X[clear]), inside[clear])
    np.testing.assert_array_equal(pre.contains(X[clear]), P.contains(Y[clear]))
    if shape[0] == shape[1]:
        # For an invertible map the preimage's vertices are M^{-1}(v - t).
        Minv = np.linalg.inv(M)
        assert_same_rows(pre.vertices(), (P.vertices() - t) @ Minv.T, atol=1e-8)


def test_preimage_degenerate_maps():
    sq = corral.Polytope.box([0, 0], [1, 1])
    # A zero map: {x : t in P} is everything when t in P, empty otherwise.
    assert not sq.preimage(np.zeros((2, 1)), [0.5, 0.5]).is_empty()
    assert sq.preimage(np.zeros((2, 1)), [0.5, 0.5]).contains([1e6])
    assert sq.preimage(np.zeros((2, 1)), [5.0, 0.5]).is_empty()
    # Preimage of the empty set is empty in the new dimension.
    E = corral.Polytope.empty(2).preimage(np.ones((2, 4)))
    assert E.dim == 4 and E.is_empty()
    # A rank-1 map onto the diagonal: {x : 0 <= x1 + x2 <= 1}, a strip (unbounded).
    strip = sq.preimage(np.array([[1.0, 1.0], [1.0, 1.0]]))
    assert not strip.is_bounded()
    assert strip.contains([5.0, -4.5]) and not strip.contains([1.0, 1.0])
    with pytest.raises(corral.InvalidInputError, match="^M: "):
        sq.preimage(np.ones((3, 2)))
    with pytest.raises(corral.InvalidInputError, match="^t: "):
        sq.preimage(np.eye(2), [0.0])


@pytest.mark.parametrize("backend", BACKENDS)
def test_is_subset_and_same_set(backend):
    inner = corral.Polytope.box([0.2, 0.2], [0.8, 0.8])
    outer = corral.Polytope.box([0, 0], [1, 1])
    assert inner.is_subset(outer, backend=backend)
    assert not outer.is_subset(inner, backend=backend)
    # Touching from inside still a subset; sticking out by 1e-3 is not.
    assert corral.Polytope.box([0, 0], [1, 0.5]).is_subset(outer, backend=backend)
    assert not corral.Polytope.box([0, 0], [1.001, 0.5]).is_subset(outer, backend=backend)
    empty = corral.Polytope.empty(2)
    assert empty.is_subset(inner, backend=backend)
    assert not inner.is_subset(empty, backend=backend)
    contra = corral.Polytope([[1.0, 0.0], [-1.0, 0.0]], [-1.0, -1.0])
    assert contra.is_subset(inner, backend=backend) and contra.same_set(empty, backend=backend)
    # An unbounded set is a subset of the whole space and of nothing bounded.
    half = corral.Polytope([[1.0, 0.0]], [0.0])
    assert half.is_subset(corral.Polytope(np.zeros((0, 2)), np.zeros(0)), backend=backend)
    assert not half.is_subset(outer, backend=backend)
    # Same set with another description: the square as the hull of its corners (with an
    # inside point), and with a redundant row.
    hull = corral.Polytope.from_vertices([[0, 0], [1, 0], [0, 1], [1, 1], [0.5, 0.5]])
    assert hull.same_set(outer, backend=backend)
    red = corral.Polytope(np.vstack([outer.A, [[1.0, 1.0]]]), np.r_[outer.b, 2.0])
    assert red.same_set(outer, backend=backend)
    assert not inner.same_set(outer, backend=backend)
    with pytest.raises(corral.InvalidInputError, match="^Q: "):
        inner.is_subset(corral.Polytope.simplex(3), backend=backend)


# --------------------------------------------------------------------------------------------
# Source rows and caller row indices


def test_source_rows_refer_to_caller_rows():
    # Caller rows: 0 zero row (b = 1, dropped), 1 x <= 1, 2 zero row (b = 0, dropped),
    # 3 y <= 1, 4 -x <= 0, 5 -y <= 0, 6 x + y <= 3 (redundant), 7 2x <= 2 (duplicate of 1).
    A = np.array([[0, 0], [1, 0], [0, 0], [0, 1], [-1, 0], [0, -1], [1, 1], [2, 0]], float)
    b = np.array([1, 1, 0, 1, 0, 0, 3, 2], float)
    P = corral.Polytope(A, b)
    assert P.source_rows == [1, 3, 4, 5, 6, 7]
    assert P.num_rows == 6
    np.testing.assert_allclose(P.A[4], [1 / math.sqrt(2)] * 2)
    np.testing.assert_allclose(P.b[4], 3 / math.sqrt(2))
    for backend in BACKENDS:
        red = P.redundant_rows(backend=backend)
        assert red.dtype == np.int64
        # zero rows count as redundant; one of the duplicates 1 / 7 is dropped
        assert set(red.tolist()) in ({0, 2, 6, 7}, {0, 1, 2, 6})
        Q = P.irredundant(backend=backend)
        assert sorted(set(range(8)) - set(Q.source_rows)) == sorted(red.tolist())
    red_exact = P.redundant_rows(exact=True)
    assert set(red_exact.tolist()) in ({0, 2, 6, 7}, {0, 1, 2, 6})
    # Set operations keep the caller's indices.
    assert P.affine_image(2 * np.eye(2)).source_rows == P.source_rows
    assert P.preimage(np.ones((2, 3))).source_rows == P.source_rows
    assert P.irredundant().preimage(np.eye(2)).redundant_rows().tolist() == sorted(red.tolist())
    # Rows created by the library have source -1.
    assert corral.Polytope.empty(2).source_rows == [-1]


def test_redundant_rows_of_an_empty_set():
    # An empty set: every caller row is reported redundant (the result is the canonical
    # empty set, which keeps none of them).
    P = corral.Polytope([[1.0, 0.0], [-1.0, 0.0], [0.0, 1.0]], [-1.0, -1.0, 1.0])
    for backend in BACKENDS:
        Q = P.irredundant(backend=backend)
        assert Q.is_empty() and Q.num_rows == 1
        assert P.redundant_rows(backend=backend).tolist() == [0, 1, 2]
    assert P.irredundant(exact=True).is_empty()
    assert P.redundant_rows(exact=True).tolist() == [0, 1, 2]


# --------------------------------------------------------------------------------------------
# return_info and progress


def test_return_info():
    A0, b0 = random_facets(4343, 3, 12)
    A, b, _ = with_redundant_rows(9, A0, b0, n_redundant=200, n_duplicates=3)
    P = corral.Polytope(A, b)
    for backend in FLOAT_BACKENDS:
        Q, info = P.irredundant(backend=backend, return_info=True)
        assert isinstance(info, corral.Info)
        assert info.lp_solves > 0
        assert 1 <= info.mean_lp_rows <= len(b) + 1
        assert info.method == "clarkson"
        assert info.seconds >= 0 and info.fallbacks >= 0
        rows, info2 = P.redundant_rows(backend=backend, return_info=True)
        assert info2.lp_solves > 0 and info2.method == "clarkson"
        assert len(rows) == len(b) - Q.num_rows
    _, info = P.irredundant(exact=True, return_info=True)
    assert info.method == "cdd-exact"


def test_return_info_exact_counts_lps():
    P = corral.Polytope(*_redundant_copies(corral.Polytope.box([0, 0], [1, 1]), 3))
    _, info = P.irredundant(exact=True, return_info=True)
    assert info.lp_solves > 0


def test_progress_callback_and_cancel():
    A0, b0 = random_facets(4444, 3, 12)
    A, b, _ = with_redundant_rows(10, A0, b0, n_redundant=300, n_duplicates=0)
    P = corral.Polytope(A, b)
    reports = []

    def record(p):
        reports.append(dict(p))
        return True

    Q = P.irredundant(progress=record)
    assert reports, "progress was never called"
    assert all(r["stage"] == "redundancy" for r in reports)
    assert all(0 <= r["done"] <= r["total"] for r in reports)
    done = [r["done"] for r in reports]
    assert done == sorted(done) and reports[-1]["done"] == reports[-1]["total"]
    assert Q.same_set(P)
    # A callback returning None counts as "go on".
    P.redundant_rows(progress=lambda p: None)
    # Returning False cancels.
    with pytest.raises(corral.CancelledError):
        P.irredundant(progress=lambda p: False)
    with pytest.raises(corral.CancelledError):
        P.redundant_rows(progress=lambda p: False)
    # Even a small problem reports at least once, so it can be cancelled too.
    with pytest.raises(corral.CancelledError):
        corral.Polytope.box([0, 0], [1, 1]).irredundant(progress=lambda p: False)
    # An exception raised in the callback propagates unchanged.

    def boom(p):
        raise KeyError("from the callback")

    with pytest.raises(KeyError, match="from the callback"):
        P.irredundant(progress=boom)
    with pytest.raises(corral.InvalidInputError, match="^progress: "):
        P.irredundant(progress=42)


# --------------------------------------------------------------------------------------------
# Property-based set identities


@st.composite
def small_polytopes(draw, n=None):
    """A bounded polytope with small integer data: rows in [-3, 3]^n, b in [1, 4], inside the
    box [-3, 3]^n (so bounded and containing 0). Integer data give many degenerate vertices."""
    n = n if n is not None else draw(st.integers(2, 3))
    m = draw(st.integers(1, 7))
    A = np.array(
        draw(
            st.lists(st.lists(st.integers(-3, 3), min_size=n, max_size=n), min_size=m, max_size=m)
        ),
        dtype=float,
    )
    b = np.array(draw(st.lists(st.integers(1, 4), min_size=m, max_size=m)), dtype=float)
    A = np.vstack([A, np.eye(n), -np.eye(n)])
    b = np.r_[b, np.full(2 * n, 3.0)]
    return corral.Polytope(A, b)


PROPERTY = settings(
    max_examples=25,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.too_slow],
)


@PROPERTY
@given(P=small_polytopes(), backend=st.sampled_from(BACKENDS))
def test_property_irredundant_same_set(P, backend):
    Q = P.irredundant(backend=backend)
    assert Q.same_set(P)
    assert Q.num_rows <= P.num_rows
    assert set(Q.source_rows) <= set(P.source_rows)


@PROPERTY
@given(data=st.data())
def test_property_intersection_is_subset(data):
    n = data.draw(st.integers(2, 3))
    P = data.draw(small_polytopes(n))
    Q = data.draw(small_polytopes(n))
    shift = np.array(data.draw(st.lists(st.integers(-4, 4), min_size=n, max_size=n)), float)
    Q = Q.affine_image(np.eye(n), shift)  # may or may not meet P
    X = P & Q
    assert X.is_subset(P) and X.is_subset(Q)
    # Points of X are in both; vertices of P inside Q are in X.
    if not X.is_empty():
        assert np.all(P.contains(X.vertices(), tol=1e-7))
        assert np.all(Q.contains(X.vertices(), tol=1e-7))
    VP = P.vertices()
    np.testing.assert_array_equal(X.contains(VP), Q.contains(VP))


@PROPERTY
@given(P=small_polytopes(n=3), seed=st.integers(0, 2**32 - 1))
def test_property_affine_image_then_preimage(P, seed):
    rng = np.random.default_rng(seed)
    Qr, _ = np.linalg.qr(rng.normal(size=(3, 3)))
    M = Qr @ np.diag(rng.uniform(0.5, 2.0, 3))
    t = rng.normal(size=3)
    back = P.affine_image(M, t).preimage(M, t)
    assert back.same_set(P)


@PROPERTY
@given(P=small_polytopes())
def test_property_from_vertices_round_trip(P):
    V = P.vertices()
    R = corral.Polytope.from_vertices(V)
    assert R.same_set(P)
    assert_same_rows(R.vertices(), V, atol=1e-9)


def cdd_exact_canonical(A, b):
    """(kept, linearity) as cdd_canonical, but in exact rationals.

    reference: pycddlib's GMP variant (cdd.gmp.matrix_canonicalize, implicit_linearity_rows)
    on the exact values of the (integer) data.
    """

    def matrix():
        arr = [[Fraction(float(bi))] + [Fraction(float(-a)) for a in row] for row, bi in zip(A, b)]
        return cdd.gmp.matrix_from_array(arr, rep_type=cdd.RepType.INEQUALITY)

    lin = set(cdd.gmp.implicit_linearity_rows(matrix()))
    mat = matrix()
    _, _, newpos = cdd.gmp.matrix_canonicalize(mat)
    lin_after = set(mat.lin_set)
    kept = {i for i, p in enumerate(newpos) if p is not None and p not in lin_after}
    return kept, lin


@st.composite
def integer_sets(draw):
    """Any set with small integer data: may be unbounded, flat, a point or empty. An equality
    pair is added half of the time."""
    n = draw(st.integers(1, 3))
    m = draw(st.integers(1, 7))
    A = np.array(
        draw(
            st.lists(st.lists(st.integers(-2, 2), min_size=n, max_size=n), min_size=m, max_size=m)
        ),
        dtype=float,
    )
    b = np.array(draw(st.lists(st.integers(-2, 2), min_size=m, max_size=m)), dtype=float)
    if draw(st.booleans()):
        k = draw(st.integers(0, m - 1))
        A, b = np.vstack([A, -A[k]]), np.r_[b, -b[k]]
    return A, b


@settings(
    max_examples=60,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(data=integer_sets(), backend=st.sampled_from(BACKENDS))
def test_property_irredundant_matches_exact_cdd_on_integer_sets(data, backend):
    A, b = data
    P = corral.Polytope(A, b)
    empty = highs_max(np.zeros(A.shape[1]), A, b)[0] == "infeasible"  # reference: HiGHS
    assert P.is_empty(backend=backend) == empty
    if not empty:
        # Flat sets with no row outside the affine hull crash the library (see
        # test_flat_set_without_inequalities); leave them to that test.
        _, lin = cdd_exact_canonical(A, b)
        L = A[sorted(lin)]
        rank = np.linalg.matrix_rank(L) if lin else 0
        outside = [
            i
            for i in range(len(b))
            if np.any(A[i]) and i not in lin and np.linalg.matrix_rank(np.vstack([L, A[i]])) > rank
        ]
        assume(not (lin and rank < A.shape[1] and not outside))
    Q = P.irredundant(backend=backend)
    if empty:
        assert Q.is_empty()
        # Emptiness shown by LP: every caller row is reported redundant. A zero row with
        # b < 0 (the canonical empty form) is the one row kept, the others are redundant.
        witness = set(P.source_rows) - {-1} if P.num_rows == 1 and not np.any(P.A) else set()
        expected = sorted(set(range(len(b))) - witness)
        assert P.redundant_rows(backend=backend).tolist() == expected
        return
    assert Q.same_set(P)
    kept, lin = cdd_exact_canonical(A, b)  # reference: pycddlib in exact rationals
    zero = {i for i in range(len(b)) if not np.any(A[i])}
    hull_rows = {P.source_rows[i] for i in P.affine_hull(backend=backend)[2]}
    assert hull_rows == lin - zero
    # Inequalities kept: as many as cddlib keeps (which of two duplicates may differ).
    assert len(set(Q.source_rows) - hull_rows) == len(kept)


# --------------------------------------------------------------------------------------------
# Bad input


def _raises(exc, argument, f, *args, **kwargs):
    """f(*args, **kwargs) raises exc with a message starting with '<argument>: '."""
    with pytest.raises(exc, match="^" + re.escape(argument) + ": "):
        f(*args, **kwargs)


def test_bad_constructor_input():
    _raises(corral.InvalidInputError, "A", corral.Polytope, [[np.nan, 0.0]], [1.0])
    _raises(corral.InvalidInputError, "A", corral.Polytope, [[np.inf, 0.0]], [1.0])
    _raises(corral.InvalidInputError, "b", corral.Polytope, [[1.0, 0.0]], [np.nan])
    _raises(corral.InvalidInputError, "b", corral.Polytope, [[1.0, 0.0]], [-np.inf])
    _raises(corral.InvalidInputError, "b", corral.Polytope, [[1.0, 0.0]], [1.0, 2.0])
    _raises(corral.InvalidInputError, "A", corral.Polytope, [1.0, 0.0], [1.0])
    _raises(corral.InvalidInputError, "b", corral.Polytope, [[1.0, 0.0]], [[1.0]])
    _raises(corral.InvalidInputError, "A", corral.Polytope, np.zeros((1, 0)), [1.0])
    _raises(corral.InvalidInputError, "A", corral.Polytope, "not numbers", [1.0])
    # InvalidInputError is also a ValueError.
    with pytest.raises(ValueError):
        corral.Polytope([[np.nan]], [1.0])


def test_bad_box_and_family_input():
    _raises(corral.InvalidInputError, "lower", corral.Polytope.box, [0, 2], [1, 1])
    _raises(corral.InvalidInputError, "lower", corral.Polytope.box, [np.nan, 0], [1, 1])
    _raises(corral.InvalidInputError, "upper", corral.Polytope.box, [0, 0], [1, np.nan])
    _raises(corral.InvalidInputError, "lower", corral.Polytope.box, [np.inf, 0], [np.inf, 1])
    _raises(corral.InvalidInputError, "upper", corral.Polytope.box, [0, -np.inf], [1, -np.inf])
    _raises(corral.InvalidInputError, "upper", corral.Polytope.box, [0, 0], [1, 1, 1])
    _raises(corral.InvalidInputError, "lower", corral.Polytope.box, [], [])
    _raises(corral.InvalidInputError, "n", corral.Polytope.simplex, 0)
    _raises(corral.InvalidInputError, "n", corral.Polytope.empty, 0)
    _raises(corral.InvalidInputError, "V", corral.Polytope.from_vertices, [[0.0, np.nan]])
    _raises(corral.InvalidInputError, "V", corral.Polytope.from_vertices, [0.0, 1.0])
    _raises(corral.InvalidInputError, "V", corral.Polytope.from_vertices, np.zeros((2, 0)))


def test_bad_query_input():
    sq = corral.Polytope.box([0, 0], [1, 1])
    _raises(corral.InvalidInputError, "x", sq.contains, [0.5])
    _raises(corral.InvalidInputError, "x", sq.contains, [0.5, 0.5, 0.5])
    _raises(corral.InvalidInputError, "x", sq.contains, [np.nan, 0.5])
    _raises(corral.InvalidInputError, "x", sq.contains, np.zeros((2, 2, 2)))
    for tol in (-1.0, 0.5, np.nan, "abc"):
        _raises(corral.InvalidInputError, "tol", sq.contains, [0.5, 0.5], tol=tol)
        _raises(corral.InvalidInputError, "tol", sq.contains, np.zeros((3, 2)), tol=tol)
    _raises(corral.InvalidInputError, "directions", sq.support, [1.0, 0.0, 0.0])
    _raises(corral.InvalidInputError, "directions", sq.support, np.ones((2, 3)))
    _raises(corral.InvalidInputError, "directions", sq.support, [np.nan, 0.0])
    _raises(corral.InvalidInputError, "directions", sq.support, np.zeros((2, 2, 2)))


def test_bad_batch_contains_names_x():
    sq = corral.Polytope.box([0, 0], [1, 1])
    _raises(corral.InvalidInputError, "x", sq.contains, np.zeros((2, 3)))


def test_empty_and_unbounded_sets_to_point_queries():
    for E in (corral.Polytope.empty(2), corral.Polytope([[1.0, 0.0], [-1.0, 0.0]], [-1.0, -1.0])):
        _raises(corral.InvalidInputError, "polytope", E.chebyshev_center)
        _raises(corral.InvalidInputError, "polytope", E.bounding_box)
        _raises(corral.InvalidInputError, "polytope", E.affine_hull)
        assert E.vertices().shape == (0, 2)
    for U in (
        corral.Polytope([[1.0, 0.0]], [1.0]),
        corral.Polytope([[-1.0, 0.0], [0.0, -1.0]], [0.0, 0.0]),
        corral.Polytope(np.zeros((0, 2)), np.zeros(0)),
    ):
        _raises(corral.UnboundedSetError, "polytope", U.vertices)
        _raises(corral.UnboundedSetError, "polytope", U.vertices, exact=True)
    _raises(
        corral.UnboundedSetError, "polytope", corral.Polytope([[1.0, 0.0]], [1.0]).chebyshev_center
    )


LP_CALLS = [
    ("is_empty", ()),
    ("is_bounded", ()),
    ("chebyshev_center", ()),
    ("support", ([1.0, 0.0],)),
    ("bounding_box", ()),
    ("irredundant", ()),
    ("redundant_rows", ()),
    ("affine_hull", ()),
    ("is_subset", (corral.Polytope.box([0, 0], [2, 2]),)),
    ("same_set", (corral.Polytope.box([0, 0], [2, 2]),)),
]


@pytest.mark.parametrize("name,args", LP_CALLS, ids=[c[0] for c in LP_CALLS])
def test_unknown_backend_and_bad_tol(name, args):
    sq = corral.Polytope.box([0, 0], [1, 1])
    f = getattr(sq, name)
    _raises(corral.InvalidInputError, "backend", f, *args, backend="no-such-backend")
    _raises(corral.InvalidInputError, "backend", f, *args, backend=3)
    for tol in (-1e-9, 0.0, 0.5, np.nan, np.inf, "1e-9"):
        _raises(corral.InvalidInputError, "tol", f, *args, tol=tol)
    # A valid tolerance is accepted on every backend.
    for backend in BACKENDS:
        f(*args, backend=backend, tol=1e-8)
