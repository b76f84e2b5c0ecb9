"""Tests of what is particular to the default LP backend, ``dense``, from Python: answers that
fail verification are re-solved by another backend and counted, for single LPs and summed over
a polytope routine.

Outside references, named beside each check: scipy.optimize.linprog(method="highs") for LP
values, and the rows scipy's HiGHS finds redundant one LP per row.
"""

from __future__ import annotations

import corral
import numpy as np
import pytest
from scipy.optimize import linprog


@pytest.fixture
def tiny_verify_tolerance():
    """A verification tolerance that answers with rounding errors in them cannot meet."""
    saved = corral.lp_verify_tolerance()
    corral.set_lp_verify_tolerance(1e-300)
    yield
    corral.set_lp_verify_tolerance(saved)


def random_lp(seed: int, m: int = 60, n: int = 4):
    rng = np.random.default_rng(seed)
    A = rng.uniform(-1.0, 1.0, size=(m, n))
    b = rng.uniform(1.0, 2.0, size=m)
    c = rng.uniform(-1.0, 1.0, size=n)
    return c, A, b


def highs_value(c, A, b) -> float:
    res = linprog(-c, A_ub=A, b_ub=b, bounds=[(None, None)] * len(c), method="highs")
    assert res.status == 0
    return -res.fun


def test_default_backend_is_dense_and_verification_tolerance_default():
    assert corral.default_backend() == "dense"
    assert corral.lp_verify_tolerance() == 1e-9  # the documented default


@pytest.mark.parametrize("bad", [0.0, -1e-9, 0.01, float("nan"), float("inf")])
def test_bad_verification_tolerance_is_rejected(bad):
    with pytest.raises(corral.InvalidInputError, match="tol"):
        corral.set_lp_verify_tolerance(bad)
    assert corral.lp_verify_tolerance() == 1e-9


@pytest.mark.parametrize("seed", range(5))
def test_no_fallbacks_at_the_default_tolerance(seed):
    c, A, b = random_lp(seed)
    res = corral.maximize(c, A, b, backend="dense")
    assert res.status == "optimal" and res.backend == "dense" and res.fallbacks == 0
    assert abs(res.value - highs_value(c, A, b)) <= 1e-9 * (1 + abs(res.value))  # HiGHS


@pytest.mark.parametrize("seed", range(5))
def test_failed_verification_is_resolved_and_counted(seed, tiny_verify_tolerance):
    c, A, b = random_lp(seed)
    res = corral.maximize(c, A, b, backend="dense")
    assert res.status == "optimal"
    assert res.fallbacks >= 1 and res.backend in ("glpk", "cdd-exact")
    assert abs(res.value - highs_value(c, A, b)) <= 1e-9 * (1 + abs(res.value))  # HiGHS


def test_fallbacks_are_summed_over_redundancy_removal(tiny_verify_tolerance):
    # The square [-1, 1]^2 and 30 rows u·x <= 1.3 with u on the unit circle: a row with
    # |u_1| + |u_2| > 1.3 cuts off a corner of the square, the others are redundant. The
    # reference is HiGHS, one LP per row.
    angles = np.linspace(0.0, 2.0 * np.pi, 30, endpoint=False) + 0.05
    U = np.column_stack([np.cos(angles), np.sin(angles)])
    A = np.vstack([np.eye(2), -np.eye(2), U])
    b = np.concatenate([np.ones(4), 1.3 * np.ones(30)])
    P = corral.Polytope(A, b)
    rows, info = P.redundant_rows(return_info=True)
    assert info.fallbacks > 0  # every LP answer failed verification at this tolerance
    # HiGHS: row i is redundant iff max a_i·x over the other rows is <= b_i.
    expected = []
    for i in range(len(b)):
        keep = np.arange(len(b)) != i
        res = linprog(-A[i], A_ub=A[keep], b_ub=b[keep], bounds=[(None, None)] * 2, method="highs")
        assert res.status == 0
        if -res.fun <= b[i] + 1e-9:
            expected.append(i)
    assert sorted(int(i) for i in rows) == expected
