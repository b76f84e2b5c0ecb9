"""Type stubs of the compiled core corral._core."""

from fractions import Fraction
from typing import Any, Callable, Literal

import numpy as np
import numpy.typing as npt

from ._polytope import ChebyshevBall, Info

__version__: str

class CorralError(Exception): ...
class InvalidInputError(CorralError, ValueError): ...
class UnboundedSetError(CorralError): ...
class NotFinitelyDeterminedError(CorralError): ...
class SolverError(CorralError): ...

class LPResult:
    @property
    def status(self) -> Literal["optimal", "infeasible", "unbounded", "stopped", "numerical"]: ...
    @property
    def x(self) -> npt.NDArray[np.float64] | None: ...
    @property
    def value(self) -> float: ...
    @property
    def duals(self) -> npt.NDArray[np.float64] | None: ...
    @property
    def ray(self) -> npt.NDArray[np.float64] | None: ...
    @property
    def farkas(self) -> npt.NDArray[np.float64] | None: ...
    @property
    def unbounded_index(self) -> int | None: ...
    @property
    def backend(self) -> str: ...
    @property
    def iterations(self) -> int: ...
    @property
    def fallbacks(self) -> int: ...

def maximize(
    c: npt.ArrayLike,
    A: npt.ArrayLike,
    b: npt.ArrayLike,
    *,
    backend: str | None = None,
    threshold: float | None = None,
) -> LPResult: ...
def backends() -> list[str]: ...
def lp_verify_tolerance() -> float: ...
def set_lp_verify_tolerance(tol: float) -> None: ...
def default_backend() -> str: ...
def default_tol() -> float: ...
def backend_capabilities(backend: str) -> dict[str, bool]: ...
def _set_default_backend(name: str) -> None: ...
def _set_default_tol(tol: float) -> None: ...

class CancelledError(CorralError): ...

class FiniteDetermination:
    origin_margin: float
    origin_interior: bool
    bounded_up_to_subspace: bool
    observable_dim: int
    observable_spectral_radius: float

class Certificate:
    @property
    def rows(self) -> list[tuple[npt.NDArray[np.int64], npt.NDArray[np.float64]]]: ...
    @property
    def margins(self) -> npt.NDArray[np.float64]: ...
    worst_margin: float
    worst_row: int
    max_residual: float
    holds: bool
    tolerance: float
    lp_solves: int

class AdmissibleCertificate:
    invariance: Certificate
    admissibility: Certificate
    holds: bool

class InvarianceReport:
    holds: bool
    worst_margin: float
    worst_row: int
    tolerance: float
    certificate: Certificate
    exact: bool
    worst_margin_exact: Fraction | None
    holds_exactly: bool
    exact_lps: int

def verify_invariance(
    A: npt.ArrayLike,
    S: Polytope,
    *,
    certificate: Certificate | None = None,
    exact: bool = False,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> InvarianceReport: ...

class AdmissibleResult:
    set: Polytope
    steps: int
    converged: bool
    lp_solves: int
    fallbacks: int
    seconds: float
    conditions: FiniteDetermination
    certificate: AdmissibleCertificate
    worst_margin: float

def max_admissible_set(
    A: npt.ArrayLike,
    X: Polytope,
    *,
    max_steps: int = 1000,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> AdmissibleResult: ...
def closed_loop_admissible_set(
    A: npt.ArrayLike,
    B: npt.ArrayLike,
    K: npt.ArrayLike,
    X: Polytope | None = None,
    U: Polytope | None = None,
    *,
    mixed: Polytope | None = None,
    max_steps: int = 1000,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> AdmissibleResult: ...

class ControllableResult:
    set: Polytope
    sets: list[Polytope]
    steps: int
    lp_solves: int
    fallbacks: int
    seconds: float
    certificate: None

def controllable_set(
    A: npt.ArrayLike,
    B: npt.ArrayLike,
    X: Polytope | None,
    U: Polytope | None,
    target: Polytope,
    steps: int,
    *,
    mixed: Polytope | None = None,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> ControllableResult: ...
def _pre_set(
    A: npt.ArrayLike,
    B: npt.ArrayLike,
    C: Polytope,
    U: Polytope | None = None,
    *,
    mixed: Polytope | None = None,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> tuple[Polytope, dict[str, Any]]: ...

class DualModeRegion:
    augmented: Polytope
    F_x: npt.NDArray[np.float64]
    F_c: npt.NDArray[np.float64]
    t: npt.NDArray[np.float64]
    H: npt.NDArray[np.float64] | None
    H_xc: npt.NDArray[np.float64] | None
    dynamics: npt.NDArray[np.float64]
    state_region: Polytope
    terminal_set: Polytope
    horizon: int
    steps: int
    converged: bool
    lp_solves: int
    fallbacks: int
    seconds: float
    conditions: FiniteDetermination
    certificate: AdmissibleCertificate

def dual_mode_region(
    A: npt.ArrayLike,
    B: npt.ArrayLike,
    K: npt.ArrayLike,
    X: Polytope | None,
    U: Polytope | None,
    horizon: int,
    *,
    Q: npt.ArrayLike | None = None,
    R: npt.ArrayLike | None = None,
    mixed: Polytope | None = None,
    max_steps: int = 1000,
    backend: str | None = None,
    tol: float | None = None,
    progress: Callable[[dict[str, Any]], bool | None] | None = None,
) -> DualModeRegion: ...

class LqrResult:
    @property
    def K(self) -> npt.NDArray[np.float64]: ...
    @property
    def P(self) -> npt.NDArray[np.float64]: ...
    spectral_radius: float
    residual: float
    steps: int

def lqr(
    A: npt.ArrayLike,
    B: npt.ArrayLike,
    Q: npt.ArrayLike,
    R: npt.ArrayLike,
    *,
    tol: float | None = None,
    max_steps: int = 100,
) -> LqrResult: ...

class Polytope:
    def __init__(self, A: npt.ArrayLike, b: npt.ArrayLike) -> None: ...
    @staticmethod
    def box(lower: npt.ArrayLike, upper: npt.ArrayLike) -> Polytope: ...
    @staticmethod
    def simplex(n: int) -> Polytope: ...
    @staticmethod
    def empty(n: int) -> Polytope: ...
    @staticmethod
    def from_vertices(
        V: npt.ArrayLike, *, exact: bool = False, return_info: bool = False
    ) -> Polytope | tuple[Polytope, Info]: ...
    @property
    def A(self) -> npt.NDArray[np.float64]: ...
    @property
    def b(self) -> npt.NDArray[np.float64]: ...
    @property
    def dim(self) -> int: ...
    @property
    def num_rows(self) -> int: ...
    @property
    def source_rows(self) -> list[int]: ...
    def contains(
        self, x: npt.ArrayLike, tol: float | None = None
    ) -> bool | npt.NDArray[np.bool_]: ...
    def is_empty(self, *, backend: str | None = None, tol: float | None = None) -> bool: ...
    def is_bounded(self, *, backend: str | None = None, tol: float | None = None) -> bool: ...
    def chebyshev_center(
        self, *, backend: str | None = None, tol: float | None = None
    ) -> ChebyshevBall: ...
    def support(
        self, directions: npt.ArrayLike, *, backend: str | None = None, tol: float | None = None
    ) -> float | npt.NDArray[np.float64]: ...
    def bounding_box(
        self, *, backend: str | None = None, tol: float | None = None
    ) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]: ...
    def is_subset(
        self, Q: Polytope, *, backend: str | None = None, tol: float | None = None
    ) -> bool: ...
    def same_set(
        self, Q: Polytope, *, backend: str | None = None, tol: float | None = None
    ) -> bool: ...
    def intersect(self, Q: Polytope) -> Polytope: ...
    def __and__(self, Q: Polytope) -> Polytope: ...
    def affine_image(self, M: npt.ArrayLike, t: npt.ArrayLike | None = None) -> Polytope: ...
    def preimage(self, M: npt.ArrayLike, t: npt.ArrayLike | None = None) -> Polytope: ...
    def irredundant(
        self,
        *,
        backend: str | None = None,
        tol: float | None = None,
        exact: bool = False,
        progress: Callable[[dict[str, Any]], bool | None] | None = None,
        return_info: bool = False,
    ) -> Polytope | tuple[Polytope, Info]: ...
    def redundant_rows(
        self,
        *,
        backend: str | None = None,
        tol: float | None = None,
        exact: bool = False,
        progress: Callable[[dict[str, Any]], bool | None] | None = None,
        return_info: bool = False,
    ) -> npt.NDArray[np.int64] | tuple[npt.NDArray[np.int64], Info]: ...
    def project(
        self,
        dims: Any,
        method: Literal["auto", "fourier-motzkin", "vertices"] = "auto",
        *,
        backend: str | None = None,
        tol: float | None = None,
        progress: Callable[[dict[str, Any]], bool | None] | None = None,
        return_info: bool = False,
    ) -> Polytope | tuple[Polytope, Info]: ...
    def affine_hull(
        self, *, backend: str | None = None, tol: float | None = None
    ) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64], npt.NDArray[np.int64]]: ...
    def vertices(
        self, exact: bool = False, as_fractions: bool = False, *, return_info: bool = False
    ) -> Any: ...
