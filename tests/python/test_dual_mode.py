"""Tests of corral.pre_set, corral.controllable_set and corral.dual_mode_region.

Outside references, named beside each check:
- scipy's HiGHS (scipy.optimize.linprog): membership by definition (is there an input, or an
  input sequence, that does it: one LP), an independent maximal-admissible-set loop on the
  augmented system with its own convergence, and the feasibility LP of the online QP;
- scipy.spatial.ConvexHull of projected vertices (vertices from pycddlib, double
  description) for the projection of the augmented set;
- scipy.linalg.solve_discrete_are (P of the LQR gain) and solve_discrete_lyapunov (the cost
  of a general gain) for the QP cost matrices; the closed form H = blockdiag(R + Bᵀ P B),
  H_xc = 0 for the LQR gain (Kouvaritakis & Cannon 2016, ch. 2; from memory);
- closed-loop simulation for recursive feasibility.
Plants are invented here: seeded random systems and a small double integrator.
"""

from __future__ import annotations

import math

import cdd
import corral
import numpy as np
import pytest
import scipy.linalg
from reference import contained, reference_admissible
from scipy.optimize import linprog
from scipy.spatial import ConvexHull


def lp_feasible(A_ub, b_ub, nvar):
    res = linprog(
        np.zeros(nvar), A_ub=A_ub, b_ub=b_ub, bounds=[(None, None)] * nvar, method="highs"
    )
    return res.status == 0, res.x


def double_integrator():
    """An invented cart on a track, sampled at 0.2 s: position and speed, force input."""
    h = 0.2
    A = np.array([[1.0, h], [0.0, 1.0]])
    B = np.array([[0.5 * h * h], [h]])
    X = corral.Polytope.box([-4.0, -1.5], [4.0, 1.5])
    U = corral.Polytope.box([-1.0], [1.0])
    return A, B, X, U


def random_plant(rng, n, m):
    A = rng.normal(size=(n, n)) / math.sqrt(n) * 1.1
    B = rng.normal(size=(n, m))
    X = corral.Polytope.box(-np.ones(n), np.ones(n))
    U = corral.Polytope.box(-np.ones(m), np.ones(m))
    return A, B, X, U


def test_pre_set_by_definition():
    rng = np.random.default_rng(3)
    A, B, X, U = random_plant(rng, 3, 2)
    C = corral.Polytope.box(-0.5 * np.ones(3), 0.5 * np.ones(3))
    P, info = corral.pre_set(A, B, C, U, return_info=True)
    assert info.method in ("fourier-motzkin", "vertices") and info.lp_solves > 0
    # x in Pre(C) iff some u in U has A x + B u in C (one LP, scipy HiGHS).
    lift_A = np.vstack([C.A @ B, U.A])
    for x in rng.uniform(-1.5, 1.5, size=(80, 3)):
        b = np.concatenate([C.b - C.A @ A @ x, U.b])
        s = P.b - P.A @ x
        if np.abs(s).min() > 1e-6:
            assert bool(P.contains(x)) == lp_feasible(lift_A, b, 2)[0]
    # With a mixed limit x_1 + u_1 <= 0.2 the pre-set shrinks accordingly (same reference).
    mixed = corral.Polytope(np.array([[1.0, 0, 0, 1, 0]]), np.array([0.2]))
    Pm = corral.pre_set(A, B, C, U, mixed=mixed)
    lift_m = np.vstack([lift_A, [[1.0, 0.0]]])
    for x in rng.uniform(-1.5, 1.5, size=(80, 3)):
        b = np.concatenate([C.b - C.A @ A @ x, U.b, [0.2 - x[0]]])
        s = Pm.b - Pm.A @ x
        if np.abs(s).min() > 1e-6:
            assert bool(Pm.contains(x)) == lp_feasible(lift_m, b, 2)[0]


def test_controllable_set_by_definition_and_nesting():
    A, B, X, U = double_integrator()
    K = corral.lqr(A, B, np.eye(2), np.eye(1)).K
    T = corral.closed_loop_admissible_set(A, B, K, X, U).set
    r = corral.controllable_set(A, B, X, U, T, 4)
    assert r.steps == 4 and len(r.sets) == 5 and r.certificate is None
    # T is control invariant, so the i-step sets grow: K_i ⊆ K_{i+1} (scipy HiGHS).
    for a, b in zip(r.sets, r.sets[1:]):
        assert contained(a.A, a.b, b.A, b.b)
    # Definition: x in K_4 iff inputs u_0..u_3 in U keep x_0..x_3 in X and put x_4 in T
    # (one LP in the 4 inputs, scipy HiGHS).
    N, n = 4, 2
    rng = np.random.default_rng(5)
    for x in rng.uniform([-5, -2], [5, 2], size=(60, 2)):
        rows, rhs = [], []
        for k in range(N + 1):
            Ak = np.linalg.matrix_power(A, k)
            Mk = np.zeros((n, N))
            for j in range(k):
                Mk[:, j : j + 1] = np.linalg.matrix_power(A, k - 1 - j) @ B
            S = X if k < N else T
            rows.append(S.A @ Mk)
            rhs.append(S.b - S.A @ Ak @ x)
            if k < N:
                E = np.zeros((1, N))
                E[0, k] = 1
                rows.append(U.A @ E)
                rhs.append(U.b)
        s = r.set.b - r.set.A @ x
        if np.abs(s).min() > 1e-6:
            assert (
                bool(r.set.contains(x)) == lp_feasible(np.vstack(rows), np.concatenate(rhs), N)[0]
            )


@pytest.mark.parametrize("N", [1, 3])
def test_augmented_set_matches_independent_loop_and_projection(N):
    A, B, X, U = double_integrator()
    Q, R = np.diag([1.0, 0.1]), np.array([[0.5]])
    K = corral.lqr(A, B, Q, R).K
    reg = corral.dual_mode_region(A, B, K, X, U, N, Q=Q, R=R)
    n, m = 2, 1
    assert reg.converged and reg.horizon == N
    # The prediction system and its limits, built here from the definition.
    Psi = np.zeros((n + N * m, n + N * m))
    Psi[:n, :n] = A - B @ K
    Psi[:n, n : n + m] = B
    for k in range(N - 1):
        Psi[n + k * m : n + (k + 1) * m, n + (k + 1) * m : n + (k + 2) * m] = np.eye(m)
    np.testing.assert_allclose(reg.dynamics, Psi, atol=1e-15)
    E = np.zeros((m, N * m))
    E[:, :m] = np.eye(m)
    G = np.vstack([np.hstack([X.A, np.zeros((len(X.b), N * m))]), np.hstack([-U.A @ K, U.A @ E])])
    f = np.concatenate([X.b, U.b])
    t_ref, H, h = reference_admissible(Psi, G, f)  # reference: HiGHS loop, own convergence
    S = reg.augmented
    assert reg.steps == t_ref
    assert contained(S.A, S.b, H, h) and contained(H, h, S.A, S.b)
    np.testing.assert_allclose(np.hstack([reg.F_x, reg.F_c]), S.A)
    np.testing.assert_allclose(reg.t, S.b)
    # state_region = projection of the augmented set (reference: ConvexHull of the projected
    # vertices; vertices from pycddlib).
    mat = cdd.matrix_from_array(np.hstack([S.b[:, None], -S.A]), rep_type=cdd.RepType.INEQUALITY)
    V = np.array(cdd.copy_generators(cdd.polyhedron_from_matrix(mat)).array)[:, 1 : 1 + n]
    hull = ConvexHull(V)
    region = reg.state_region
    assert np.all(region.contains(V[hull.vertices], tol=1e-7))
    for v in region.vertices():
        assert np.all(hull.equations[:, :-1] @ v + hull.equations[:, -1] <= 1e-7)
    # The terminal set is inside the region, and the certificate of the augmented set holds.
    assert region.is_subset(reg.terminal_set) is False or N == 0
    assert reg.terminal_set.is_subset(region)
    assert reg.certificate.holds


def simulate_shifted(A, B, K, reg, x, steps):
    """Recursive feasibility: c from the QP's constraints at x (one LP, scipy HiGHS), then
    u = -K x + c_0, x+ = A x + B u, c shifted forward with a zero appended; returns the
    states and inputs, asserting the QP constraints stay satisfied."""
    m = B.shape[1]
    ok, c = lp_feasible(reg.F_c, reg.t - reg.F_x @ x, reg.F_c.shape[1])
    assert ok
    xs, us = [x], []
    scale = max(1.0, np.abs(reg.t).max())
    for _ in range(steps):
        u = -K @ x + c[:m]
        x = A @ x + B @ u
        c = np.concatenate([c[m:], np.zeros(m)])
        assert np.all(reg.F_x @ x + reg.F_c @ c <= reg.t + 1e-7 * scale)
        xs.append(x)
        us.append(u)
    return np.array(xs), np.array(us)


def test_recursive_feasibility_and_outside_states():
    rng = np.random.default_rng(11)
    A, B, X, U = random_plant(rng, 4, 2)
    K = corral.lqr(A, B, np.eye(4), np.eye(2)).K
    mixed = corral.Polytope(np.array([[1.0, 0, 0, 0, 1, 0]]), np.array([0.8]))  # x_1 + u_1
    reg = corral.dual_mode_region(A, B, K, X, U, 3, mixed=mixed)
    region = reg.state_region
    V = region.vertices()
    c0 = region.chebyshev_center().center
    for w in rng.dirichlet(np.ones(len(V)), size=15):
        x0 = 0.3 * c0 + 0.7 * (w @ V)  # inside the region
        xs, us = simulate_shifted(A, B, K, reg, x0, 60)
        tol = 1e-7
        assert np.all(X.A @ xs.T <= X.b[:, None] + tol)
        assert np.all(U.A @ us.T <= U.b[:, None] + tol)
        assert np.all(xs[:-1, 0] + us[:, 0] <= 0.8 + tol)
    # Just outside each facet of the region, the QP constraints are infeasible (HiGHS).
    V = region.vertices()
    for a in region.A:
        # a boundary point on that facet: the vertex maximising a·x over the region
        xb = V[np.argmax(V @ a)]
        x_out = xb + 1e-3 * a
        ok, _ = lp_feasible(reg.F_c, reg.t - reg.F_x @ x_out, reg.F_c.shape[1])
        assert not ok


def test_horizons_nest_and_cost_matrices():
    A, B, X, U = double_integrator()
    Q, R = np.diag([2.0, 0.5]), np.array([[0.3]])
    g = corral.lqr(A, B, Q, R)
    regions = [corral.dual_mode_region(A, B, g.K, X, U, N, Q=Q, R=R) for N in range(1, 6)]
    for a, b in zip(regions, regions[1:]):  # nested (scipy HiGHS containment)
        sa, sb = a.state_region, b.state_region
        assert contained(sa.A, sa.b, sb.A, sb.b)
    # LQR gain: H = blockdiag(R + Bᵀ P B), H_xc = 0, with P from scipy's solve_discrete_are.
    P = scipy.linalg.solve_discrete_are(A, B, Q, R)
    blk = R + B.T @ P @ B
    for reg in regions:
        N = reg.horizon
        np.testing.assert_allclose(reg.H, np.kron(np.eye(N), blk), rtol=1e-8, atol=1e-9)
        np.testing.assert_allclose(reg.H_xc, 0.0, atol=1e-8)
    # Another gain: the cost matrix of z from scipy's solve_discrete_lyapunov.
    K2 = np.array([[0.8, 1.2]])
    reg = corral.dual_mode_region(A, B, K2, X, U, 2, Q=Q, R=R)
    Psi = reg.dynamics
    n, N, m = 2, 2, 1
    Chat = np.zeros((n + m, n + N * m))
    Chat[:n, :n] = np.eye(n)
    Chat[n:, :n] = -K2
    Chat[n:, n : n + m] = np.eye(m)
    D = scipy.linalg.block_diag(Q, R)
    W = scipy.linalg.solve_discrete_lyapunov(Psi.T, Chat.T @ D @ Chat)
    np.testing.assert_allclose(reg.H, W[n:, n:], rtol=1e-8)
    np.testing.assert_allclose(reg.H_xc, W[:n, n:], rtol=1e-8, atol=1e-10)
    assert np.abs(reg.H_xc).max() > 1e-3  # not the LQR gain: a cross term
    # Without Q, R: no cost.
    reg = corral.dual_mode_region(A, B, g.K, X, U, 2)
    assert reg.H is None and reg.H_xc is None


def test_progress_cancels():
    A, B, X, U = double_integrator()
    K = corral.lqr(A, B, np.eye(2), np.eye(1)).K
    stages = set()

    def stop_at(stage):
        def progress(p):
            stages.add(p["stage"])
            return p["stage"] != stage

        return progress

    T = corral.closed_loop_admissible_set(A, B, K, X, U).set
    with pytest.raises(corral.CancelledError):
        corral.controllable_set(A, B, X, U, T, 3, progress=stop_at("controllable set"))
    with pytest.raises(corral.CancelledError):
        corral.dual_mode_region(A, B, K, X, U, 3, progress=stop_at("projection"))
    with pytest.raises(corral.CancelledError):
        corral.pre_set(A, B, T, U, progress=stop_at("projection"))
    assert {"controllable set", "projection"} <= stages


def test_bad_input():
    A, B, X, U = double_integrator()
    K = corral.lqr(A, B, np.eye(2), np.eye(1)).K
    with pytest.raises(corral.InvalidInputError, match="horizon"):
        corral.dual_mode_region(A, B, K, X, U, 0)
    with pytest.raises(corral.InvalidInputError, match="K"):
        corral.dual_mode_region(A, B, np.ones((2, 2)), X, U, 2)
    with pytest.raises(corral.InvalidInputError, match="Q"):
        corral.dual_mode_region(A, B, K, X, U, 2, Q=-np.eye(2), R=np.eye(1))
    with pytest.raises(corral.InvalidInputError, match="R"):
        corral.dual_mode_region(A, B, K, X, U, 2, Q=np.eye(2), R=np.zeros((1, 1)))
    with pytest.raises(corral.InvalidInputError, match="R"):
        corral.dual_mode_region(A, B, K, X, U, 2, Q=np.eye(2))
    with pytest.raises(corral.InvalidInputError, match="Q"):
        corral.dual_mode_region(A, B, K, X, U, 2, Q=np.ones((2, 3)), R=np.eye(1))
    with pytest.raises(corral.InvalidInputError, match="mixed"):
        corral.dual_mode_region(A, B, K, X, U, 2, mixed=corral.Polytope.box([-1], [1]))
    with pytest.raises(corral.InvalidInputError, match="U"):
        corral.pre_set(A, B, X, corral.Polytope.box([-1, -1], [1, 1]))
    with pytest.raises(corral.InvalidInputError, match="steps"):
        corral.controllable_set(A, B, X, U, X, -1)
    with pytest.raises(corral.InvalidInputError, match="target"):
        corral.controllable_set(A, B, X, U, None, 2)
    # An unstable closed loop cannot be finitely determined.
    with pytest.raises(corral.NotFinitelyDeterminedError):
        corral.dual_mode_region(A, B, np.zeros((1, 2)), X, U, 2)
