"""Tests of vertex and facet enumeration: the qhull path (validated floating point), the
cddlib paths, the fallback, and which path answered (``return_info=True``).

Outside references, each named beside the check that uses it:
- scipy.spatial.HalfspaceIntersection and scipy.spatial.ConvexHull (qhull through scipy),
  given an interior point from scipy.optimize.linprog(method="highs");
- pycddlib (module ``cdd`` in double, ``cdd.gmp`` in rationals, 3.x): double description;
- closed forms, worked out in the comments beside them: hypercube (2^n vertices, 2n facets),
  cross-polytope (2n vertices, 2^n facets), simplex (n + 1 of each), the product of two
  simplices (v(P) v(Q) vertices, f(P) + f(Q) facets), and cyclic polytopes C(k, d) with
  facets counted here by Gale's evenness condition (Ziegler 1995, *Lectures on Polytopes*,
  Thm 0.7; statement from memory).
All data are generated here from seeded numpy generators or closed forms.
"""

from __future__ import annotations

import itertools
import math
from fractions import Fraction

import cdd
import cdd.gmp
import corral
import numpy as np
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog
from scipy.spatial import ConvexHull, HalfspaceIntersection, cKDTree

# Matching tolerance for points and hyperplanes computed by two different codes (coordinates
# of order 1).
ATOL = 1e-7


# --------------------------------------------------------------------------------------------
# Outside references


def chebyshev_centre(A, b):
    """(centre, radius) of {A x <= b} (unit rows); reference: scipy linprog(method="highs")
    on max r s.t. a_i·x + r <= b_i (Boyd & Vandenberghe 2004, §8.5.1)."""
    m, n = A.shape
    res = linprog(
        np.r_[np.zeros(n), -1.0],
        A_ub=np.hstack([A, np.ones((m, 1))]),
        b_ub=b,
        bounds=[(None, None)] * (n + 1),
        method="highs",
    )
    assert res.status == 0
    return res.x[:n], res.x[n]


def scipy_vertices(A, b):
    """Vertices of a bounded full-dimensional {A x <= b}; reference: scipy
    HalfspaceIntersection (qhull) at the HiGHS Chebyshev centre; repeats merged."""
    centre, radius = chebyshev_centre(A, b)
    assert radius > 1e-6
    hs = HalfspaceIntersection(np.hstack([A, -b[:, None]]), centre)
    return unique_rows(hs.intersections)


def scipy_facets(V):
    """Facets [a | b] (unit a, a·x <= b) of conv(V); reference: scipy ConvexHull (qhull,
    triangulated output: coplanar simplices give equal equations, merged here)."""
    hull = ConvexHull(V)
    eq = hull.equations  # normal·x + offset <= 0, unit normals
    return unique_rows(np.hstack([eq[:, :-1], -eq[:, -1:]]))


def cdd_vertices(A, b):
    """Vertices of a bounded {A x <= b}; reference: pycddlib (double description, double)."""
    mat = cdd.matrix_from_array(np.hstack([b[:, None], -A]), rep_type=cdd.RepType.INEQUALITY)
    gen = np.array(cdd.copy_generators(cdd.polyhedron_from_matrix(mat)).array, dtype=float)
    assert np.all(gen[:, 0] == 1.0), "pycddlib found rays"
    return gen[:, 1:]


def cdd_facets(V, exact=False):
    """Facets [a | b] (unit a) of a full-dimensional conv(V); reference: pycddlib (double
    description; exact: cdd.gmp in rationals)."""
    if exact:
        rows = [[Fraction(1)] + [Fraction(x) for x in v] for v in V]
        mat = cdd.gmp.matrix_from_array(rows, rep_type=cdd.RepType.GENERATOR)
        H = cdd.gmp.copy_inequalities(cdd.gmp.polyhedron_from_matrix(mat))
    else:
        arr = np.hstack([np.ones((len(V), 1)), V])
        mat = cdd.matrix_from_array(arr, rep_type=cdd.RepType.GENERATOR)
        H = cdd.copy_inequalities(cdd.polyhedron_from_matrix(mat))
    assert not H.lin_set, "pycddlib found equalities: the hull is not full-dimensional"
    arr = np.array([[float(x) for x in row] for row in H.array])  # b - A x >= 0
    return normalised_rows(-arr[:, 1:], arr[:, 0])


def gale_facet_count(k, d):
    """Facets of C(k, d) by Gale's evenness condition (Ziegler 1995, Thm 0.7, from memory): a
    d-subset S of the k points on the moment curve is a facet iff every two points not in S
    are separated by an even number of points of S (consecutive non-members suffice).

    The subsets are counted by scanning the points in order with the state (points of S so
    far, a non-member seen yet, parity of the members since the last non-member); the count
    is checked against enumerating every subset in test_gale_count_by_scan_matches_enumeration.
    """
    # states[(j, seen, odd)] = number of prefixes
    states = {(0, False, False): 1}
    for _ in range(k):
        nxt = {}
        for (j, seen, odd), c in states.items():
            if j < d:  # the point is in S
                key = (j + 1, seen, not odd)
                nxt[key] = nxt.get(key, 0) + c
            if not (seen and odd):  # the point is not in S: the run before it must be even
                key = (j, True, False)
                nxt[key] = nxt.get(key, 0) + c
        states = nxt
    return sum(c for (j, _, _), c in states.items() if j == d)


def gale_facet_count_by_enumeration(k, d):
    """The same count by testing every d-subset (small k only)."""
    count = 0
    for S in itertools.combinations(range(k), d):
        inside = set(S)
        out = [i for i in range(k) if i not in inside]
        if all(sum(1 for s in S if i < s < j) % 2 == 0 for i, j in zip(out, out[1:])):
            count += 1
    return count


# --------------------------------------------------------------------------------------------
# Helpers


def unique_rows(X, atol=ATOL):
    """Rows of X with near-repeats (max-norm distance <= atol) removed: of each close pair
    (found by scipy's cKDTree in the max norm) the later row goes."""
    X = np.asarray(X, dtype=float).reshape(len(X), -1)
    drop = {j for _, j in cKDTree(X).query_pairs(atol, p=np.inf)} if len(X) else set()
    return X[[i for i in range(len(X)) if i not in drop]]


def assert_same_rows(X, Y, atol=ATOL):
    """X and Y hold the same set of points: no near-repeats, same number, each row of one
    within atol (max norm) of a row of the other."""
    X = np.asarray(X, dtype=float)
    Y = np.asarray(Y, dtype=float)
    assert unique_rows(X, atol).shape[0] == X.shape[0], "repeated rows in X"
    assert unique_rows(Y, atol).shape[0] == Y.shape[0], "repeated rows in Y"
    assert X.shape == Y.shape, (X.shape, Y.shape)
    if len(X) == 0:
        return
    d_xy, _ = cKDTree(Y).query(X, p=np.inf)
    d_yx, _ = cKDTree(X).query(Y, p=np.inf)
    assert np.all(d_xy <= atol), d_xy.max()
    assert np.all(d_yx <= atol), d_yx.max()


def normalised_rows(A, b):
    """[a | b] / |a| for each row."""
    A = np.asarray(A, dtype=float)
    s = np.linalg.norm(A, axis=1)
    return np.hstack([A / s[:, None], (np.asarray(b, dtype=float) / s)[:, None]])


def facet_rows(P):
    """The stored rows [a | b] of a Polytope (unit rows)."""
    return np.hstack([P.A, P.b[:, None]])


def random_polytope(rng, n, m):
    """Random unit rows with offsets in [0.5, 1.5] (the origin inside), bounded and with
    well-separated vertices (pycddlib's vertices at distance > 1e-4 from each other)."""
    for _ in range(100):
        A = rng.normal(size=(m, n))
        A /= np.linalg.norm(A, axis=1)[:, None]
        b = rng.uniform(0.5, 1.5, m)
        mat = cdd.matrix_from_array(np.hstack([b[:, None], -A]), rep_type=cdd.RepType.INEQUALITY)
        gen = np.array(cdd.copy_generators(cdd.polyhedron_from_matrix(mat)).array)
        if np.any(gen[:, 0] != 1.0):
            continue  # unbounded
        V = gen[:, 1:]
        d = np.linalg.norm(V[:, None] - V[None, :], axis=2) + np.eye(len(V))
        if d.min() > 1e-4:
            return A, b
    raise AssertionError("no suitable random polytope")


def moment_curve(ts, d):
    """Points (t, t^2, ..., t^d) for each t."""
    return np.array([[float(t) ** i for i in range(1, d + 1)] for t in ts])


def product_of_simplices(p, q):
    vp = np.vstack([np.zeros(p), np.eye(p)])
    vq = np.vstack([np.zeros(q), np.eye(q)])
    return np.array([np.r_[x, y] for x in vp for y in vq])


# --------------------------------------------------------------------------------------------
# Random polytopes: qhull path, cddlib path, scipy and pycddlib agree


@pytest.mark.parametrize("n", [2, 3, 4, 5, 6])
def test_random_vertices_match_scipy_and_pycddlib(n):
    rng = np.random.default_rng(100 + n)
    A, b = random_polytope(rng, n, 6 * n)
    P = corral.Polytope(A, b)
    V, info = P.vertices(return_info=True)
    assert info.method == "qhull" and info.fallbacks == 0
    assert_same_rows(V, scipy_vertices(A, b))  # reference: scipy HalfspaceIntersection
    assert_same_rows(V, cdd_vertices(A, b))  # reference: pycddlib
    if n <= 4:
        Ve, info = P.vertices(exact=True, return_info=True)
        assert info.method == "cdd-exact"
        assert_same_rows(V, Ve)


@pytest.mark.parametrize("n", [2, 3, 4, 5, 6])
def test_random_hull_matches_scipy_and_pycddlib(n):
    rng = np.random.default_rng(200 + n)
    X = rng.normal(size=(12 * n, n))
    X = np.vstack([X, 0.1 * rng.normal(size=(5, n))])  # points well inside
    P, info = corral.Polytope.from_vertices(X, return_info=True)
    assert info.method == "qhull" and info.fallbacks == 0
    rows = facet_rows(P)
    assert_same_rows(rows, scipy_facets(X))  # reference: scipy ConvexHull
    assert_same_rows(rows, cdd_facets(X))  # reference: pycddlib
    # The round trip: the hull's vertices are the extreme input points (scipy's vertices).
    assert_same_rows(P.vertices(), X[ConvexHull(X).vertices])


# --------------------------------------------------------------------------------------------
# Closed-form families, degenerate in many ways, on the qhull path


def _families(n):
    """(name, vertices, facet count) of closed-form families in R^n."""
    cube = np.array(list(itertools.product([-1.0, 1.0], repeat=n)))
    cross = np.vstack([np.eye(n), -np.eye(n)])
    simplex = np.vstack([np.zeros(n), np.eye(n)])
    out = [
        ("hypercube", cube, 2 * n),  # 2^n vertices, 2n facets
        ("cross-polytope", cross, 2**n),  # 2n vertices, 2^n facets
        ("simplex", simplex, n + 1),  # n + 1 vertices and facets
    ]
    if n >= 2:
        p = n // 2
        # Δ_p x Δ_q: (p+1)(q+1) vertices, (p+1) + (q+1) facets.
        out.append(("product of simplices", product_of_simplices(p, n - p), n + 2))
    return out


@pytest.mark.parametrize("n", [2, 3, 4, 5, 6])
def test_closed_forms_take_the_qhull_path(n):
    for name, V, facets in _families(n):
        P, info = corral.Polytope.from_vertices(V, return_info=True)
        assert info.method == "qhull", name
        assert P.num_rows == facets, name
        assert_same_rows(facet_rows(P), scipy_facets(V))  # reference: scipy ConvexHull
        assert_same_rows(facet_rows(P), cdd_facets(V, exact=True))  # reference: pycddlib gmp
        W, info = P.vertices(return_info=True)
        assert info.method == "qhull", name
        assert_same_rows(W, V)  # closed form: each vertex once
        assert_same_rows(W, scipy_vertices(P.A, P.b))  # reference: scipy


def test_face_points_and_repeats_keep_the_qhull_path():
    # The 4-cube's corners twice, its centre, its facet centres ±e_i and edge midpoints: the
    # hull is still the cube (8 facets, 16 vertices).
    n = 4
    cube = np.array(list(itertools.product([-1.0, 1.0], repeat=n)))
    mids = []
    for c in cube:
        for j in range(n):
            m = c.copy()
            m[j] = 0.0
            mids.append(m)
    V = np.vstack([cube, cube, np.zeros((1, n)), np.eye(n), -np.eye(n), mids])
    P, info = corral.Polytope.from_vertices(V, return_info=True)
    assert info.method == "qhull"
    assert P.num_rows == 2 * n
    assert_same_rows(facet_rows(P), cdd_facets(V))  # reference: pycddlib
    # The box with each row given twice (once scaled by 3) and a weakly redundant row
    # x_1 + x_2 <= 2 through a 2-face: the same 16 vertices, each once.
    B = corral.Polytope.box(-np.ones(n), np.ones(n))
    A = np.vstack([B.A, 3 * B.A, [[1, 1, 0, 0]]])
    b = np.r_[B.b, 3 * B.b, 2.0]
    W, info = corral.Polytope(A, b).vertices(return_info=True)
    assert info.method == "qhull"
    assert_same_rows(W, cube)
    H = normalised_rows(A, b)
    assert_same_rows(W, scipy_vertices(H[:, :n], H[:, n]))  # reference: scipy


# --------------------------------------------------------------------------------------------
# Badly scaled cyclic polytopes: Gale's evenness condition through validation and fallback


def test_gale_count_by_scan_matches_enumeration():
    for d in (2, 3, 4, 5, 6):
        for k in range(d + 1, 13):
            assert gale_facet_count(k, d) == gale_facet_count_by_enumeration(k, d)
    # For even d, C(k, d) has k/(k - d/2) binom(k - d/2, d/2) facets (Ziegler 1995, from
    # memory); C(30, 6): 30/27 * binom(27, 3) = 3250.
    for d in (2, 4, 6):
        for k in range(d + 1, 40):
            h = d // 2
            assert gale_facet_count(k, d) == Fraction(k, k - h) * math.comb(k - h, h)
    assert gale_facet_count(30, 6) == 3250


@pytest.mark.parametrize(
    "d,k,path",
    [(5, 16, "qhull"), (5, 30, "qhull"), (6, 20, "qhull"), (6, 30, "qhull"), (6, 38, "cdd-exact")],
)
def test_cyclic_polytopes_integer_parameters(d, k, path):
    # t = 1..k: coordinates up to k^d (6e8 for k = 30, d = 6). C(30, 6) has 3250 facets; up to
    # there qhull's answer validates; C(38, 6) fails validation (with qhull 2020.2 at the
    # default tolerance: points lie within it of facets they are not on) and exact cddlib
    # answers instead.
    pts = moment_curve(range(1, k + 1), d)
    P, info = corral.Polytope.from_vertices(pts, return_info=True)
    assert P.num_rows == gale_facet_count(k, d)  # closed form: Gale's evenness condition
    assert info.method == path
    assert info.fallbacks == (1 if path == "cdd-exact" else 0)
    # Each input point satisfies every row, relative to the size of its coordinates.
    scale = np.abs(pts).max(axis=0)
    slack = P.b[None, :] - pts @ P.A.T
    assert np.all(slack >= -1e-9 * np.abs(P.A) @ scale)


def test_cyclic_polytope_matches_pycddlib_exact():
    # C(12, 6): 112 facets (Gale); pycddlib in rationals gives the same hyperplanes.
    pts = moment_curve(range(1, 13), 6)
    P, info = corral.Polytope.from_vertices(pts, return_info=True)
    assert info.method == "qhull"
    assert P.num_rows == gale_facet_count(12, 6) == 112
    assert_same_rows(facet_rows(P), cdd_facets(pts, exact=True), atol=1e-9)  # pycddlib gmp
    # and back: the vertices of those facets are the 12 points (cyclic polytopes are
    # neighbourly), compared relative to each coordinate's size.
    W = P.vertices()
    scale = np.abs(pts).max(axis=0)
    assert_same_rows(W / scale, pts / scale)


# --------------------------------------------------------------------------------------------
# Unbounded sets, other paths, bad input


UNBOUNDED = {
    "strip": ([[1.0, 0.0], [-1.0, 0.0]], [1.0, 1.0]),
    "slanted strip": ([[-1.0, 0.0], [0.0, -1.0], [1.0, -1.0], [-1.0, 1.0]], [0.0, 0.0, 1.0, 1.0]),
    "orthant": (-np.eye(3), np.zeros(3)),
    "prism along z": (
        [[1.0, 0, 0], [-1, 0, 0], [0, 1, 0], [0, -1, 0], [1, 1, 0]],
        [1.0, 1, 1, 1, 3],
    ),
    "half-infinite prism": ([[1.0, 0, 0], [0, 1, 0], [-1, -1, 0], [0, 0, -1]], [1.0, 1, 1, 0]),
    "half-line": ([[1.0]], [2.0]),
    "whole space": (np.zeros((0, 2)), np.zeros(0)),
}


@pytest.mark.parametrize("name", list(UNBOUNDED))
def test_unbounded_sets_raise_on_every_path(name):
    A, b = UNBOUNDED[name]
    P = corral.Polytope(np.asarray(A, dtype=float), np.asarray(b, dtype=float))
    # reference: by construction each set contains a half-line (named above); pycddlib agrees
    # where it has rows.
    if P.num_rows:
        mat = cdd.matrix_from_array(
            np.hstack([P.b[:, None], -P.A]), rep_type=cdd.RepType.INEQUALITY
        )
        gen = cdd.copy_generators(cdd.polyhedron_from_matrix(mat))
        assert gen.lin_set or any(row[0] == 0 for row in gen.array)
    for kwargs in ({}, {"exact": True}, {"exact": True, "as_fractions": True}):
        with pytest.raises(corral.UnboundedSetError):
            P.vertices(**kwargs)


def test_return_info_names_the_path():
    # Full-dimensional: qhull; exact: cdd-exact; lower-dimensional and 1-D: cdd (double).
    _, info = corral.Polytope.box([0, 0], [1, 2]).vertices(return_info=True)
    assert (info.method, info.fallbacks, info.lp_solves) == ("qhull", 0, 1)
    assert info.seconds >= 0.0
    _, info = corral.Polytope.box([0, 0], [1, 2]).vertices(exact=True, return_info=True)
    assert info.method == "cdd-exact"
    F, info = corral.Polytope.box([0, 0], [1, 2]).vertices(
        exact=True, as_fractions=True, return_info=True
    )
    assert info.method == "cdd-exact" and len(F) == 4
    flat = corral.Polytope.box([0, 2, 0], [1, 2, 1])  # a square in the plane y = 2
    V, info = flat.vertices(return_info=True)
    assert info.method == "cdd"
    assert_same_rows(V, [[x, 2.0, z] for x in (0.0, 1.0) for z in (0.0, 1.0)])
    V, info = corral.Polytope.box([-1.0], [3.0]).vertices(return_info=True)
    assert info.method == "cdd"
    assert_same_rows(V, [[-1.0], [3.0]])
    P, info = corral.Polytope.from_vertices([[0.0], [2.0], [0.5]], return_info=True)
    assert info.method == "cdd" and P.num_rows == 2
    # Points on the plane x + y + z = 1 (exact in binary): cddlib, equality as a row pair.
    S = [[1.0, 0, 0], [0, 1.0, 0], [0, 0, 1.0], [0.25, 0.25, 0.5]]
    P, info = corral.Polytope.from_vertices(S, return_info=True)
    assert info.method == "cdd"
    assert P.affine_hull()[0].shape == (1, 3)
    P, info = corral.Polytope.from_vertices(S[:3] + [[0, 0, 0]], exact=True, return_info=True)
    assert info.method == "cdd-exact" and P.num_rows == 4
    assert isinstance(info, corral.Info)
    # Without return_info: the plain results.
    assert isinstance(corral.Polytope.from_vertices(S), corral.Polytope)
    assert corral.Polytope.box([0, 0], [1, 1]).vertices().shape == (4, 2)


def test_bad_and_tiny_input():
    with pytest.raises(corral.InvalidInputError, match="V"):
        corral.Polytope.from_vertices([[0.0, 0.0], [1.0, np.nan], [0.0, 1.0]])
    with pytest.raises(ValueError, match="inf"):
        corral.Polytope.from_vertices([[0.0, 0.0], [np.inf, 0.0], [0.0, 1.0]])
    # Fewer points than a full-dimensional hull needs, and one point repeated: cddlib.
    P, info = corral.Polytope.from_vertices([[0.0, 0, 0], [1, 2, 3]], return_info=True)
    assert info.method == "cdd"
    assert_same_rows(P.vertices(), [[0.0, 0, 0], [1, 2, 3]])
    P, info = corral.Polytope.from_vertices(np.full((6, 2), 0.5), return_info=True)
    assert info.method == "cdd"
    assert_same_rows(P.vertices(), [[0.5, 0.5]])
    # No points: the empty set; an empty set has no vertices.
    P, info = corral.Polytope.from_vertices(np.zeros((0, 3)), return_info=True)
    assert P.is_empty() and info.method == ""
    E = corral.Polytope([[1.0, 0], [-1.0, 0]], [-1.0, -2.0])  # x <= -1 and x >= 2
    V, info = E.vertices(return_info=True)
    assert V.shape == (0, 2) and info.method == "cdd"


# --------------------------------------------------------------------------------------------
# Property-based round trips (hypothesis): the two enumerations invert each other; the facets
# agree with scipy's qhull (reference: scipy.spatial.ConvexHull) and their number with exact
# cddlib (reference: corral's cdd-exact path, double description in GMP rationals).


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
# Found by this property: qhull's default options raise a "large increase in max_outside"
# precision error on the polar of this simplicial polytope; the second option set takes it.
@example(n=5, extra=25, seed=306, lattice=False)
@given(
    n=st.integers(2, 5),
    extra=st.integers(0, 25),
    seed=st.integers(0, 2**32 - 1),
    lattice=st.booleans(),
)
def test_round_trip_property(n, extra, seed, lattice):
    rng = np.random.default_rng(seed)
    k = n + 1 + extra
    # Points in general position, or on a small integer lattice (many points on each facet,
    # repeats, vertices in more than n facets).
    X = rng.integers(-2, 3, size=(k, n)).astype(float) if lattice else rng.normal(size=(k, n))
    if np.linalg.matrix_rank(X[1:] - X[0]) < n:
        return  # a flat cloud: not the full-dimensional case this property is about
    P, info = corral.Polytope.from_vertices(X, return_info=True)
    assert info.method in ("qhull", "cdd-exact")
    # Every point satisfies every facet (definition of the hull), relative to the data's size.
    assert np.all(X @ P.A.T <= P.b + 1e-9 * (1 + np.abs(X).max()))
    # The facets are scipy's (unique facet hyperplanes of its triangulated hull).
    assert_same_rows(facet_rows(P), scipy_facets(X), atol=1e-7)
    # Back to vertices: each one of the points, and the facet count matches exact cddlib.
    V, vinfo = P.vertices(return_info=True)
    assert vinfo.method in ("qhull", "cdd-exact")
    d = np.abs(V[:, None, :] - X[None, :, :]).max(axis=2).min(axis=1)
    assert d.max() <= 1e-7  # every vertex is one of the points
    exact = corral.Polytope.from_vertices(X, exact=True)
    assert exact.num_rows == P.num_rows
    # The hull of the vertices is the same set (one LP per row each way).
    assert corral.Polytope.from_vertices(V).same_set(P)
