"""Python conveniences on the design routines: return_info handling."""

from __future__ import annotations

from ._core import _pre_set
from ._polytope import _info


def pre_set(
    A, B, C, U=None, *, mixed=None, backend=None, tol=None, progress=None, return_info=False
):
    """Pre(C) = {x : A x + B u in C for some u in U with (x, u) in mixed}, irredundant: the
    projection onto x of the set in (x, u). U and mixed (a Polytope in (x, u)) may be None (no
    limit). With return_info=True also an Info (LPs, time, projection method)."""
    P, info = _pre_set(A, B, C, U, mixed=mixed, backend=backend, tol=tol, progress=progress)
    return (P, _info(info)) if return_info else P
