"""corral: polytopes and invariant sets for constrained control.

The compiled core lives in ``corral._core``; this package re-exports its public names and adds
the conveniences that belong in Python.
"""

from __future__ import annotations

from ._core import (
    AdmissibleCertificate,
    AdmissibleResult,
    CancelledError,
    Certificate,
    ControllableResult,
    CorralError,
    DualModeRegion,
    FiniteDetermination,
    InvalidInputError,
    InvarianceReport,
    LPResult,
    LqrResult,
    NotFinitelyDeterminedError,
    Polytope,
    SolverError,
    UnboundedSetError,
    __version__,
    _set_default_backend,
    _set_default_tol,
    backend_capabilities,
    backends,
    closed_loop_admissible_set,
    controllable_set,
    default_backend,
    default_tol,
    dual_mode_region,
    lp_verify_tolerance,
    lqr,
    max_admissible_set,
    maximize,
    set_lp_verify_tolerance,
    verify_invariance,
)
from ._design import pre_set
from ._polytope import ChebyshevBall, Info

__all__ = [
    "AdmissibleCertificate",
    "AdmissibleResult",
    "CancelledError",
    "Certificate",
    "ChebyshevBall",
    "ControllableResult",
    "CorralError",
    "DualModeRegion",
    "FiniteDetermination",
    "Info",
    "InvalidInputError",
    "InvarianceReport",
    "LPResult",
    "LqrResult",
    "NotFinitelyDeterminedError",
    "Polytope",
    "SolverError",
    "UnboundedSetError",
    "__version__",
    "backend_capabilities",
    "backends",
    "closed_loop_admissible_set",
    "controllable_set",
    "default_backend",
    "default_tol",
    "dual_mode_region",
    "lp_verify_tolerance",
    "lqr",
    "max_admissible_set",
    "maximize",
    "pre_set",
    "set_defaults",
    "set_lp_verify_tolerance",
    "verify_invariance",
]


def set_defaults(backend: str | None = None, tol: float | None = None) -> None:
    """Set process-wide defaults used when a call gives none.

    backend: name of an LP backend listed by :func:`backends`.
    tol: relative tolerance, a finite number in (0, 0.1).
    Arguments left as None keep their current value. Bad values raise InvalidInputError.
    """
    # Validate both before changing either: a failing call changes nothing.
    if backend is not None:
        if not isinstance(backend, str):
            raise InvalidInputError("backend: must be a string naming a backend")
        backend_capabilities(backend)  # raises InvalidInputError for an unknown name
    value = None
    if tol is not None:
        try:
            value = float(tol)
        except (TypeError, ValueError):
            raise InvalidInputError("tol: must be a number") from None
        if not (0.0 < value < 0.1):
            raise InvalidInputError("tol: must be a finite number in (0, 0.1)")
    if backend is not None:
        _set_default_backend(backend)
    if value is not None:
        _set_default_tol(value)
