"""Python conveniences on the compiled Polytope: argument handling, result objects, repr."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ._core import InvalidInputError, Polytope


@dataclass(frozen=True)
class ChebyshevBall:
    """The largest ball inside a set: ``center`` and ``radius``."""

    center: np.ndarray
    radius: float


@dataclass(frozen=True)
class Info:
    """Work a routine did: LPs solved, their mean size, time, fallbacks, method."""

    lp_solves: int
    mean_lp_rows: float
    seconds: float
    fallbacks: int
    method: str


def _info(d: dict[str, Any]) -> Info:
    return Info(**d)


def _contains(self: Polytope, x, tol: float | None = None):
    """Whether x is in the set (within tol * scale). A 1-D array of length dim is one point
    (returns bool); a 2-D (k, dim) array is k points (returns a bool array)."""
    arr = np.asarray(x, dtype=float)
    if arr.ndim == 1:
        return self._contains_point(arr, tol)
    if arr.ndim == 2:
        return np.array(self._contains_points(arr, tol), dtype=bool)
    raise InvalidInputError(f"x: must be 1-D (one point) or 2-D (k points), got {arr.ndim}-D")


def _chebyshev_center(self: Polytope, *, backend=None, tol=None) -> ChebyshevBall:
    """Centre and radius of the largest ball in the set (one LP). Raises InvalidInputError
    for an empty set and UnboundedSetError when balls of any radius fit."""
    c, r = self._chebyshev_center(backend=backend, tol=tol)
    return ChebyshevBall(np.asarray(c), float(r))


def _support(self: Polytope, directions, *, backend=None, tol=None):
    """Support function h(d) = max d·x: a float for one direction (1-D), an array for a
    (k, dim) array of directions. +inf where unbounded, -inf for the empty set."""
    arr = np.asarray(directions, dtype=float)
    if arr.ndim == 1:
        return float(self._support(arr[None, :], backend=backend, tol=tol)[0])
    if arr.ndim == 2:
        return np.asarray(self._support(arr, backend=backend, tol=tol))
    raise InvalidInputError(f"directions: must be 1-D or 2-D, got {arr.ndim}-D")


def _irredundant(
    self: Polytope, *, backend=None, tol=None, exact=False, progress=None, return_info=False
):
    """The same set without redundant rows (Clarkson's output-sensitive method after cheap
    filters; exact=True: cddlib in GMP rationals). With return_info=True also an Info."""
    P, info = self._irredundant(backend=backend, tol=tol, exact=exact, progress=progress)
    return (P, _info(info)) if return_info else P


def _redundant_rows(
    self: Polytope, *, backend=None, tol=None, exact=False, progress=None, return_info=False
):
    """Indices of the caller's rows that are redundant (zero rows dropped on construction
    included). With return_info=True also an Info."""
    rows, info = self._redundant_rows(backend=backend, tol=tol, exact=exact, progress=progress)
    rows = np.asarray(rows, dtype=np.int64)
    return (rows, _info(info)) if return_info else rows


def _affine_hull(self: Polytope, *, backend=None, tol=None):
    """(E, e, rows): the affine hull {x : E x = e} with orthonormal E (0 rows when the set is
    full-dimensional), and the stored rows that hold with equality on the whole set."""
    E, e, rows = self._affine_hull(backend=backend, tol=tol)
    return np.asarray(E), np.asarray(e), np.asarray(rows, dtype=np.int64)


def _vertices(
    self: Polytope, exact: bool = False, as_fractions: bool = False, *, return_info: bool = False
):
    """Vertices, each once, one per row (in no particular order).

    A full-dimensional set in floating point: qhull (quickhull) on the polar of the set about
    its Chebyshev centre, every vertex recomputed and validated (a second qhull run with other
    options when that fails), exact cddlib when validation fails again, its vertices then
    reduced at the tolerance (rounded rows through a vertex in more than n facets do not meet
    in one point exactly); sets of lower dimension and 1-D sets: cddlib in double;
    exact=True: cddlib in GMP rationals, the exact vertices of the rows as given.
    as_fractions=True (needs exact=True) returns lists of fractions.Fraction.
    Raises UnboundedSetError for an unbounded set; an empty set gives a (0, dim) array. With
    return_info=True also an Info whose ``method`` is "qhull", "cdd" or "cdd-exact" (empty
    for the canonical empty set) and whose ``fallbacks`` counts answers redone exactly.
    """
    if as_fractions:
        if not exact:
            raise InvalidInputError("as_fractions: needs exact=True")
        F, info = self._vertices_exact()
        return (F, _info(info)) if return_info else F
    V, info = self._vertices(bool(exact))
    V = np.asarray(V)
    return (V, _info(info)) if return_info else V


def _from_vertices(V, *, exact: bool = False, return_info: bool = False):
    """The convex hull of the rows of V (k points in R^n) as its facets, each once.

    A full-dimensional hull in floating point (n >= 2): qhull, every facet recomputed from
    the points and validated, exact cddlib when validation fails; hulls of lower dimension
    and n = 1: cddlib in double, with the hull's equalities as pairs of opposite rows;
    exact=True: cddlib in GMP rationals. Repeated points and points inside are allowed. With
    return_info=True also an Info (``method``: "qhull", "cdd" or "cdd-exact"; empty for no
    points).
    """
    P, info = Polytope._from_vertices(V, exact=bool(exact))
    return (P, _info(info)) if return_info else P


def _project(
    self: Polytope,
    dims,
    method: str = "auto",
    *,
    backend=None,
    tol=None,
    progress=None,
    return_info: bool = False,
):
    """Projection onto the coordinates ``dims`` (kept in that order): {y : (y, w) in the set}.
    method: "fourier-motzkin" (elimination with redundancy removal after each coordinate),
    "vertices" (hull of the projected vertices; bounded sets) or "auto". Irredundant. With
    return_info=True also an Info whose ``method`` says which was used."""
    idx = np.asarray(dims)
    if idx.ndim != 1 or (idx.size and not np.issubdtype(idx.dtype, np.integer)):
        raise InvalidInputError("dims: must be a 1-D sequence of integer coordinates")
    P, info = self._project(
        [int(i) for i in idx], method, backend=backend, tol=tol, progress=progress
    )
    return (P, _info(info)) if return_info else P


def _repr(self: Polytope) -> str:
    if self.num_rows == 1 and self.b[0] < 0 and not np.any(self.A):
        return f"Polytope(dim={self.dim}, empty)"
    return f"Polytope(dim={self.dim}, rows={self.num_rows})"


Polytope.contains = _contains
Polytope.chebyshev_center = _chebyshev_center
Polytope.support = _support
Polytope.irredundant = _irredundant
Polytope.redundant_rows = _redundant_rows
Polytope.affine_hull = _affine_hull
Polytope.vertices = _vertices
Polytope.from_vertices = staticmethod(_from_vertices)
Polytope.project = _project
Polytope.__repr__ = _repr
