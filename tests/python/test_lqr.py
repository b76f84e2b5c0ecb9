"""Tests of corral.lqr against scipy.linalg.solve_discrete_are (outside reference) and the
scalar closed form worked out from the Riccati equation."""

from __future__ import annotations

import math

import corral
import numpy as np
import pytest
import scipy.linalg


def scipy_lqr(A, B, Q, R):
    """Reference: scipy.linalg.solve_discrete_are, then K = (R + B'PB)^-1 B'PA."""
    P = scipy.linalg.solve_discrete_are(A, B, Q, R)
    K = np.linalg.solve(R + B.T @ P @ B, B.T @ P @ A)
    return K, P


def test_scalar_closed_form():
    # x+ = a x + b u, cost q x^2 + r u^2. The Riccati equation p = a^2 p - a^2 b^2 p^2 /
    # (r + b^2 p) + q, multiplied out: b^2 p^2 + (r (1 - a^2) - q b^2) p - q r = 0; the
    # stabilising solution is the positive root, and k = a b p / (r + b^2 p).
    for a, b, q, r in [(1.2, 1.0, 1.0, 1.0), (0.5, 2.0, 3.0, 0.1), (-1.5, 0.3, 0.2, 4.0)]:
        c = r * (1 - a * a) - q * b * b
        p = (-c + math.sqrt(c * c + 4 * b * b * q * r)) / (2 * b * b)
        k = a * b * p / (r + b * b * p)
        res = corral.lqr([[a]], [[b]], [[q]], [[r]])
        assert res.P[0, 0] == pytest.approx(p, rel=1e-10)
        assert res.K[0, 0] == pytest.approx(k, rel=1e-10)
        assert abs(a - b * k) < 1 and res.spectral_radius == pytest.approx(abs(a - b * k))


@pytest.mark.parametrize("n,m", [(2, 1), (4, 2), (8, 3), (16, 4), (30, 5)])
def test_random_systems_match_scipy(n, m):
    rng = np.random.default_rng(10 * n + m)
    for _ in range(3):
        A = rng.normal(size=(n, n)) / math.sqrt(n) * 1.3  # typically some unstable modes
        B = rng.normal(size=(n, m))
        L = rng.normal(size=(n, n))
        Q = L @ L.T / n + 0.1 * np.eye(n)
        M = rng.normal(size=(m, m))
        R = M @ M.T + 0.5 * np.eye(m)
        res = corral.lqr(A, B, Q, R)
        K, P = scipy_lqr(A, B, Q, R)  # reference: scipy.linalg.solve_discrete_are
        scale = max(1.0, np.abs(P).max())
        assert np.abs(res.P - P).max() <= 1e-8 * scale
        assert np.abs(res.K - K).max() <= 1e-8 * max(1.0, np.abs(K).max())
        rho = np.abs(np.linalg.eigvals(A - B @ res.K)).max()
        assert rho < 1 and res.spectral_radius == pytest.approx(rho, rel=1e-9)
        assert res.residual < 1e-10


def test_lightly_damped_and_semidefinite_q():
    # A lightly damped oscillator pair, Q on the position outputs only (detectable).
    w, rho = 0.3, 0.999
    R2 = rho * np.array([[math.cos(w), -math.sin(w)], [math.sin(w), math.cos(w)]])
    A = scipy.linalg.block_diag(R2, R2)
    B = np.array([[0.0], [1.0], [0.0], [0.5]])
    C = np.array([[1.0, 0, 0, 0], [0, 0, 1.0, 0]])
    Q = C.T @ C
    R = np.array([[0.01]])
    res = corral.lqr(A, B, Q, R)
    K, P = scipy_lqr(A, B, Q, R)  # reference: scipy.linalg.solve_discrete_are
    assert np.allclose(res.P, P, rtol=1e-8, atol=1e-8 * np.abs(P).max())
    assert np.allclose(res.K, K, rtol=1e-8, atol=1e-8)


def test_not_stabilisable_raises():
    # An unstable mode (eigenvalue 1.5) that the input cannot reach.
    A = np.diag([1.5, 0.5])
    B = np.array([[0.0], [1.0]])
    with pytest.raises(corral.InvalidInputError, match="A, B"):
        corral.lqr(A, B, np.eye(2), np.eye(1))
    # Q = 0 with an unstable A: the doubling settles on P = 0, which does not stabilise;
    # reported as not detectable rather than returned.
    with pytest.raises(corral.InvalidInputError, match="detectable"):
        corral.lqr(np.diag([1.5, 0.5]), np.eye(2), np.zeros((2, 2)), np.eye(2))


def test_bad_input_names_the_argument():
    A, B, Q, R = np.eye(2), np.ones((2, 1)), np.eye(2), np.eye(1)
    cases = [
        ((np.ones((2, 3)), B, Q, R), "A"),
        ((A, np.ones((3, 1)), Q, R), "B"),
        ((A, B, np.eye(3), R), "Q"),
        ((A, B, Q, np.eye(2)), "R"),
        ((A, B, np.array([[1.0, 2.0], [0.0, 1.0]]), R), "Q"),  # not symmetric
        ((A, B, -np.eye(2), R), "Q"),  # not positive semidefinite
        ((A, B, Q, np.zeros((1, 1))), "R"),  # not positive definite
        ((np.array([[np.nan, 0], [0, 1]]), B, Q, R), "A"),
        ((A, B, Q, [[np.inf]]), "R"),
        ((A, "x", Q, R), "B"),
    ]
    for args, name in cases:
        with pytest.raises(corral.InvalidInputError, match=f"^{name}:"):
            corral.lqr(*args)
    with pytest.raises(corral.InvalidInputError, match="max_steps"):
        corral.lqr(A, B, Q, R, max_steps=0)
