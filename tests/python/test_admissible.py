"""Tests of corral.max_admissible_set and corral.closed_loop_admissible_set.

Outside references, named beside each check:
- an independent loop written here on scipy's HiGHS (scipy.optimize.linprog): it adds the rows
  G A^k one step at a time, with no redundancy removal, and stops at its own first t with
  O_{t+1} = O_t; pycddlib (cdd.matrix_canonicalize, double description) removes the redundant
  rows of its answer;
- the definition checked directly: maximality by simulation from just outside each facet, and
  invariance at the vertices;
- scipy.linalg.solve_discrete_are for the LQR gain of the closed-loop family.
Systems are generated here from seeded numpy generators.
"""

from __future__ import annotations

import math
import time

import cdd
import corral
import numpy as np
import pytest
import scipy.linalg
from reference import contained, random_stable, reference_admissible


def cdd_irredundant_count(H, h):
    """Number of irredundant rows of {H x <= h}; reference: pycddlib canonicalisation."""
    mat = cdd.matrix_from_array(np.hstack([h[:, None], -H]), rep_type=cdd.RepType.INEQUALITY)
    cdd.matrix_canonicalize(mat)
    return len(mat.array)


def check_certificates(A, S, X_A, X_b, result):
    """The certificates of `result`, checked here with numpy from their definition (Farkas):
    for each row, lam >= 0 with lam F = c (F_i A for invariance, the rows of X for
    admissibility) and lam t <= d, up to rounding."""
    F, t = S.A, S.b
    scale = max(1.0, np.abs(t).max(), np.abs(X_b).max())
    for cert, C, d in (
        (result.certificate.invariance, F @ A, t),
        (result.certificate.admissibility, X_A, X_b),
    ):
        assert cert.holds and len(cert.rows) == len(C)
        for (idx, lam), c, dj in zip(cert.rows, C, d):
            assert np.all(lam >= 0) and len(idx) <= F.shape[1] + 1
            assert np.abs(lam @ F[idx] - c).max() <= 1e-9 * (1 + lam.sum())
            assert lam @ t[idx] <= dj + 1e-9 * scale
    assert result.worst_margin >= -1e-9 * scale


@pytest.mark.parametrize(
    "n,radii,seed",
    [(2, (0.9, 0.99), 1), (3, (0.8, 0.95), 2), (4, (0.9, 0.99), 3), (5, (0.7, 0.9), 4)],
)
def test_matches_independent_loop(n, radii, seed):
    rng = np.random.default_rng(seed)
    A = random_stable(rng, n, radii)
    X = corral.Polytope.box(-np.ones(n), np.ones(n))
    r = corral.max_admissible_set(A, X)
    assert r.converged
    t_ref, H, h = reference_admissible(A, X.A, X.b)  # reference: HiGHS loop, own convergence
    assert r.steps == t_ref
    assert contained(r.set.A, r.set.b, H, h) and contained(H, h, r.set.A, r.set.b)
    assert r.set.num_rows == cdd_irredundant_count(H, h)  # reference: pycddlib
    X_irr = X.irredundant()
    check_certificates(A, r.set, X_irr.A, X_irr.b, r)  # definition checked directly
    # The constraint set itself is not invariant when t* > 0 (its own certificate fails).
    if r.steps > 0:
        rep = corral.verify_invariance(A, X)
        assert not rep.holds and rep.worst_margin < 0
    # A stored certificate re-checks without LPs.
    again = corral.verify_invariance(A, r.set, certificate=r.certificate.invariance)
    assert again.holds and again.certificate.lp_solves == 0
    # Exact margins (compared with pycddlib's rational LP in test_exact_margins.py) are
    # within rounding of zero, and judged to hold.
    ex = corral.verify_invariance(A, r.set, certificate=r.certificate.invariance, exact=True)
    assert ex.holds and abs(ex.worst_margin_exact) < 1e-12
    assert r.conditions.observable_spectral_radius == pytest.approx(
        np.abs(np.linalg.eigvals(A)).max()
    )


def test_maximality_and_invariance_by_simulation():
    # From just outside each facet the trajectory leaves X within t* steps; from every vertex
    # it stays in the set (definition of the maximal admissible set).
    rng = np.random.default_rng(7)
    n = 3
    A = random_stable(rng, n, (0.9, 0.97))
    lo, hi = -np.array([1.0, 2.0, 0.5]), np.array([2.0, 1.0, 1.5])
    X = corral.Polytope.box(lo, hi)
    r = corral.max_admissible_set(A, X)
    S = r.set
    c = S.chebyshev_center().center
    for a, b in zip(S.A, S.b):
        x = c + (b - a @ c + 1e-6) * a  # just outside this facet, near its middle
        left = False
        for _ in range(r.steps + 1):
            left = left or not X.contains(x)
            x = A @ x
        assert left
    for v in S.vertices():
        assert S.contains(A @ v, tol=1e-9)
        x = v
        for _ in range(300):
            assert X.contains(x, tol=1e-9)
            x = A @ x


def test_closed_loop_lqr_family():
    # Random 4-state plant, 2 inputs, LQR gain for Q = I, R = I (reference gain: scipy's
    # solve_discrete_are); box states and inputs. Checked against the independent loop on the
    # stacked constraints [X; -U K] with A - B K.
    rng = np.random.default_rng(11)
    n, m = 4, 2
    A = rng.normal(size=(n, n)) / 2.0
    B = rng.normal(size=(n, m))
    P = scipy.linalg.solve_discrete_are(A, B, np.eye(n), np.eye(m))
    K = np.linalg.solve(np.eye(m) + B.T @ P @ B, B.T @ P @ A)
    assert np.allclose(corral.lqr(A, B, np.eye(n), np.eye(m)).K, K, atol=1e-8)
    X = corral.Polytope.box(-5 * np.ones(n), 5 * np.ones(n))
    U = corral.Polytope.box(-np.ones(m), np.ones(m))
    r = corral.closed_loop_admissible_set(A, B, K, X, U)
    assert r.converged
    G = np.vstack([X.A, -U.A @ K])
    f = np.concatenate([X.b, U.b])
    t_ref, H, h = reference_admissible(A - B @ K, G, f)
    assert r.steps == t_ref
    assert contained(r.set.A, r.set.b, H, h) and contained(H, h, r.set.A, r.set.b)
    # Certificates: invariance under A - B K, admissibility against every stacked limit
    # (states and inputs), checked from the definition. The routine's admissibility rows are
    # the irredundant stacked rows; certify all of G here by the same Farkas test with LPs.
    assert r.certificate.holds and r.worst_margin >= -1e-9 * 5
    rep = corral.verify_invariance(A - B @ K, r.set)
    assert rep.holds
    assert contained(r.set.A, r.set.b, G, f)  # S ⊆ X and -K S ⊆ U, one HiGHS LP per row


def test_conditions_and_errors():
    X = corral.Polytope.box([-1.0, -1.0], [1.0, 1.0])
    with pytest.raises(corral.NotFinitelyDeterminedError, match="spectral radius"):
        corral.max_admissible_set(np.diag([1.0, 0.5]), X)
    with pytest.raises(corral.InvalidInputError, match="^A:"):
        corral.max_admissible_set(np.eye(3), X)
    with pytest.raises(corral.InvalidInputError, match="^A:"):
        corral.max_admissible_set([[np.nan, 0], [0, 0.5]], X)
    with pytest.raises(corral.InvalidInputError, match="^X:"):
        corral.max_admissible_set(np.eye(2) * 0.5, [[1, 0]])
    with pytest.raises(corral.InvalidInputError, match="^K:"):
        corral.closed_loop_admissible_set(np.eye(2), np.ones((2, 1)), np.ones((2, 2)), X)
    with pytest.raises(corral.InvalidInputError, match="^max_steps:"):
        corral.max_admissible_set(np.eye(2) * 0.5, X, max_steps=0)
    # 0 outside X with stable dynamics: empty. Unobservable unstable direction: X itself.
    r = corral.max_admissible_set(np.eye(2) * 0.5, corral.Polytope.box([1.0, 1.0], [2.0, 2.0]))
    assert r.converged and r.set.is_empty() and not r.conditions.origin_interior
    strip = corral.Polytope([[1.0, 0.0], [-1.0, 0.0]], [1.0, 1.0])
    r = corral.max_admissible_set(np.diag([0.5, 3.0]), strip)
    assert r.set.same_set(strip) and r.conditions.observable_dim == 1
    # A strip in x1 seen through a coupled, observable A: bounded up to a subspace (the strip's
    # recession directions are its lineality), and the set becomes bounded.
    A = np.array([[0.5, 1.0], [0.0, 0.5]])
    r = corral.max_admissible_set(A, strip)
    assert r.converged and r.conditions.bounded_up_to_subspace and r.set.is_bounded()
    t_ref, H, h = reference_admissible(A, strip.A, strip.b)  # reference: HiGHS loop
    assert r.steps == t_ref
    assert contained(r.set.A, r.set.b, H, h) and contained(H, h, r.set.A, r.set.b)
    # A half-plane x1 <= 1: a recession direction (-1, 0) that is not a lineality direction.
    # The condition is reported as failing; the iteration runs to max_steps.
    half = corral.Polytope([[1.0, 0.0]], [1.0])
    r = corral.max_admissible_set(A, half, max_steps=20)
    assert not r.conditions.bounded_up_to_subspace


def test_max_steps_and_progress():
    A = 0.99 * np.array([[math.cos(0.05), -math.sin(0.05)], [math.sin(0.05), math.cos(0.05)]])
    X = corral.Polytope.box([-1.0, -1.0], [1.0, 1.0])
    r = corral.max_admissible_set(A, X, max_steps=2)
    assert not r.converged and r.steps == 2
    full = corral.max_admissible_set(A, X)
    assert full.converged and full.steps > 2
    assert full.set.is_subset(r.set)  # the last iterate is an outer bound
    seen = []
    corral.max_admissible_set(A, X, progress=lambda p: seen.append(dict(p)) is None)
    steps_seen = [p["done"] for p in seen if p["stage"] == "admissible set"]
    assert steps_seen and max(steps_seen) == full.steps + 1  # the step that added nothing
    assert {p["stage"] for p in seen} >= {"admissible set", "certificate"}
    with pytest.raises(corral.CancelledError):
        corral.max_admissible_set(A, X, progress=lambda p: False)


def test_ctrl_c_stops_between_lp_solves():
    # SIGINT from a timer while a long computation runs with the GIL released: the routine
    # stops between LP solves with KeyboardInterrupt, and the process stays usable. The system
    # takes several seconds uninterrupted (n = 28, radii near 1: t* in the tens, thousands of
    # LPs); the timer fires after 0.3 s and is cancelled if the call ends first, so no signal
    # can arrive after the test.
    import signal
    import threading

    rng = np.random.default_rng(5)
    A = random_stable(rng, 28, (0.97, 0.99))
    X = corral.Polytope.box(-np.ones(28), np.ones(28))
    timer = threading.Timer(0.3, lambda: signal.raise_signal(signal.SIGINT))
    t0 = time.perf_counter()
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            corral.max_admissible_set(A, X)
    finally:
        timer.cancel()
        timer.join()
    assert time.perf_counter() - t0 < 5.0
    r = corral.max_admissible_set(0.5 * np.eye(2), corral.Polytope.box([-1, -1], [1, 1]))
    assert r.converged
