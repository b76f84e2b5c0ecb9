"""Tests of Polytope.project (Fourier–Motzkin and the vertex route).

Outside references, named beside each check:
- scipy.spatial.ConvexHull (qhull) of the projected vertices; the vertices themselves come
  from pycddlib (cdd.polyhedron_from_matrix, double description);
- closed forms: the projection of a box is the box of the kept coordinates; of the
  cross-polytope {Σ|x_i| <= 1}, the cross-polytope in the kept coordinates (2^k facets); of
  the simplex {x >= 0, Σ x_i <= 1}, the simplex in the kept coordinates (k + 1 facets);
- the definition checked with scipy's HiGHS: y is in the projection iff {w : (y, w) in P} is
  non-empty (one LP).
"""

from __future__ import annotations

import itertools

import cdd
import corral
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog
from scipy.spatial import ConvexHull

METHODS = ("fourier-motzkin", "vertices", "auto")


def cdd_vertices(P):
    """Vertices of a bounded polytope (reference: pycddlib, double description)."""
    mat = cdd.matrix_from_array(np.hstack([P.b[:, None], -P.A]), rep_type=cdd.RepType.INEQUALITY)
    gen = np.array(cdd.copy_generators(cdd.polyhedron_from_matrix(mat)).array)
    assert np.all(gen[:, 0] == 1.0), "unbounded"
    return gen[:, 1:]


def hull_facets(points):
    """Distinct facet hyperplanes (unit normal, offset) of the convex hull of the points
    (reference: scipy ConvexHull, whose simplicial facets are merged here by rounding)."""
    h = ConvexHull(points)
    eq = h.equations / np.linalg.norm(h.equations[:, :-1], axis=1)[:, None]
    return np.unique(np.round(eq, 7), axis=0)


def same_as_hull(Q, points, tol=1e-6):
    """Q equals conv(points): every point in Q, every vertex of Q in the hull, and the same
    number of facets."""
    facets = hull_facets(points)
    assert Q.num_rows == len(facets)
    assert np.all(Q.contains(points, tol=tol))
    for v in cdd_vertices(Q):
        assert np.all(facets[:, :-1] @ v + facets[:, -1] <= tol)


def in_projection_by_lp(P, dims, y):
    """Definition: y is in proj(P) iff some w completes (y, w) in P (scipy HiGHS)."""
    n = P.dim
    rest = [i for i in range(n) if i not in dims]
    A_y, A_w = P.A[:, dims], P.A[:, rest]
    res = linprog(
        np.zeros(len(rest)),
        A_ub=A_w,
        b_ub=P.b - A_y @ y,
        bounds=[(None, None)] * len(rest),
        method="highs",
    )
    return res.status == 0


def random_polytope(rng, n, m):
    A = rng.normal(size=(m, n))
    A /= np.linalg.norm(A, axis=1)[:, None]
    return corral.Polytope(A, rng.uniform(0.5, 1.5, m))


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize(
    "n,m,dims", [(3, 20, [0, 2]), (4, 30, [3, 1]), (5, 40, [0, 1, 2]), (6, 40, [5, 0])]
)
def test_random_polytopes_match_convex_hull(method, n, m, dims):
    rng = np.random.default_rng(n * 100 + m)
    P = random_polytope(rng, n, m)
    Q, info = P.project(dims, method, return_info=True)
    assert Q.dim == len(dims)
    assert info.method in ("fourier-motzkin", "vertices")
    if method != "auto":
        assert info.method == method
    V = cdd_vertices(P)  # reference: pycddlib
    same_as_hull(Q, V[:, dims])  # reference: scipy ConvexHull of the projected vertices
    # Definition, at random points near the projection's boundary (scipy HiGHS).
    lo, hi = V[:, dims].min(0), V[:, dims].max(0)
    for y in rng.uniform(lo - 0.1, hi + 0.1, size=(30, len(dims))):
        s = Q.b - Q.A @ y
        if np.abs(s).min() > 1e-6:  # skip points on the boundary
            assert bool(Q.contains(y)) == in_projection_by_lp(P, dims, y)


@pytest.mark.parametrize("method", METHODS)
def test_closed_forms(method):
    # Box [-1, 2]^5 -> the box of the kept coordinates, in the order given.
    lo, hi = -np.arange(1, 6.0), np.arange(2, 7.0)
    Q = corral.Polytope.box(lo, hi).project([4, 1], method)
    assert Q.num_rows == 4
    assert Q.same_set(corral.Polytope.box(lo[[4, 1]], hi[[4, 1]]))
    # Cross-polytope in 5-D -> cross-polytope in 3-D (2^3 facets).
    rows = np.array(list(itertools.product([-1.0, 1.0], repeat=5)))
    X = corral.Polytope(rows, np.ones(32))
    Q = X.project([0, 2, 4], method)
    assert Q.num_rows == 8
    cross3 = corral.Polytope(np.array(list(itertools.product([-1.0, 1.0], repeat=3))), np.ones(8))
    assert Q.same_set(cross3)
    # Simplex {x >= 0, Σ x <= 1} in 5-D -> the simplex in 2-D (3 facets).
    Q = corral.Polytope.simplex(5).project([1, 3], method)
    assert Q.num_rows == 3
    assert Q.same_set(corral.Polytope.simplex(2))


def test_unbounded_lower_dimensional_and_empty():
    # A slab |x1 + x2| <= 1 times |x3| <= 1: onto x1 it is the whole line (no rows); onto
    # (x1, x3) the strip |x3| <= 1.
    A = np.array([[1.0, 1, 0], [-1, -1, 0], [0, 0, 1], [0, 0, -1]])
    P = corral.Polytope(A, np.ones(4))
    assert P.project([0]).num_rows == 0
    Q, info = P.project([0, 2], return_info=True)
    assert info.method == "fourier-motzkin"
    assert Q.same_set(corral.Polytope(np.array([[0.0, 1], [0, -1]]), np.ones(2)))
    with pytest.raises(corral.UnboundedSetError):
        P.project([0, 2], "vertices")
    # A segment from (0, 0, 0) to (1, 2, 3) (equalities as row pairs) -> onto (x2, x3): the
    # segment from (0, 0) to (2, 3).
    S = corral.Polytope.from_vertices(np.array([[0.0, 0, 0], [1, 2, 3]]))
    for method in ("fourier-motzkin", "vertices"):
        T = S.project([1, 2], method)
        assert np.all(T.contains(np.array([[0.0, 0], [2, 3], [1, 1.5]]), tol=1e-9))
        assert not np.any(T.contains(np.array([[1.0, 1.0], [2.1, 3.15], [-0.1, -0.15]])))
    # Empty.
    E = corral.Polytope(np.array([[1.0, 0], [-1, 0]]), np.array([-1.0, -1.0]))
    assert E.project([1]).is_empty()


def test_nearly_opposite_rows():
    """Rows a and -a(1 + 2^-50): their Fourier–Motzkin combination cancels to rounding level
    and must not become a row of noise with a huge right-hand side (which once made every
    later tolerance huge and left thousands of rows). A thin, skewed set in 4-D as in a
    controller's feasible region (reference: scipy ConvexHull of pycddlib's vertices)."""
    rng = np.random.default_rng(21)
    a = rng.normal(size=(12, 4)) * np.array([20.0, 1.0, 0.1, 1.0])
    A = np.vstack([a, -a * (1 + 2.0**-50)])
    P = corral.Polytope(A, np.ones(24))
    for dims in ([0, 1], [1, 3], [2]):
        Q = P.project(dims, "fourier-motzkin")
        V = cdd_vertices(P)[:, dims]
        if len(dims) == 1:
            lo, hi = V.min(), V.max()
            assert Q.num_rows == 2
            assert np.allclose(sorted(Q.b / np.abs(Q.A[:, 0])), sorted([hi, -lo]), rtol=1e-7)
        else:
            same_as_hull(Q, V)
        assert np.abs(Q.b).max() < 1e3


@settings(max_examples=25, deadline=None)
@given(
    st.integers(min_value=3, max_value=5),
    st.integers(min_value=0, max_value=10**6),
)
def test_property_fourier_motzkin_equals_hull_of_projected_points(n, seed):
    """Random point clouds: the H-representation of their hull projected by Fourier–Motzkin
    equals the ConvexHull of the projected points (reference: scipy ConvexHull)."""
    rng = np.random.default_rng(seed)
    pts = rng.normal(size=(n + 8, n))
    P = corral.Polytope.from_vertices(pts)
    dims = sorted(rng.choice(n, size=2, replace=False).tolist())
    Q = P.project(dims, "fourier-motzkin")
    same_as_hull(Q, pts[:, dims])


def test_progress_and_bad_input():
    P = corral.Polytope.box(-np.ones(5), np.ones(5))
    seen = []

    def progress(p):
        seen.append(p["stage"])
        return p["stage"] != "projection"

    with pytest.raises(corral.CancelledError):
        P.project([0, 1], "fourier-motzkin", progress=progress)
    assert "projection" in seen
    for dims, what in (
        ([5], "out of range"),
        ([0, 0], "repeated"),
        ([], "at least one"),
        ([-1], "out of range"),
    ):
        with pytest.raises(corral.InvalidInputError, match=what):
            P.project(dims)
    with pytest.raises(corral.InvalidInputError, match="dims"):
        P.project([0.5, 1.0])
    with pytest.raises(corral.InvalidInputError, match="method"):
        P.project([0], "shadow")
