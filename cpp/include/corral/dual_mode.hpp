#pragma once
/// \file dual_mode.hpp
/// The feasible region of dual-mode predictive control and its online QP.
///
/// Predictions u_k = -K x_k + c_k for k < N and u_k = -K x_k after (Kouvaritakis & Cannon
/// 2016, Model Predictive Control: Classical, Robust and Stochastic, ch. 2) make an autonomous
/// system in z = [x; c_0; ...; c_{N-1}]:
///   z+ = Ψ z,  Ψ = [Φ  B E; 0  M],  Φ = A - B K,  E = [I_m 0 ... 0],  M the block shift
///   (c_k <- c_{k+1}, c_{N-1} <- 0),
/// with the state, input (u = -K x + E c) and mixed limits as rows in z. Its maximal admissible
/// set (admissible.hpp) is the set of (x, c) whose predicted trajectory keeps every limit
/// forever: the online QP's constraints F_x x + F_c c <= t. Its projection on x, the region of
/// states where the controller is feasible, equals the N-step controllable set to the closed
/// loop's maximal admissible set and is computed that way (controllable.hpp).
///
/// Cost: J = Σ_k x_kᵀ Q x_k + u_kᵀ R u_k along the prediction equals zᵀ W z with
/// W = Ψᵀ W Ψ + Ĉᵀ diag(Q, R) Ĉ, Ĉ z = (x, u) (a Stein equation, solved by doubling:
/// W <- W + Ψᵀ W Ψ, Ψ <- Ψ², Smith 1968). So J = cᵀ H c + 2 xᵀ H_xc c + (a term in x alone)
/// with H = W_cc, H_xc = W_xc. For the LQR gain of (Q, R), H is block diagonal with blocks
/// R + Bᵀ P B and H_xc = 0 (the same book, ch. 2).

#include <corral/admissible.hpp>
#include <corral/controllable.hpp>

#include <Eigen/Eigenvalues>

#include <chrono>
#include <string>

namespace corral {

/// Result of dual_mode_region().
struct DualModeRegion {
  Polytope augmented;              ///< maximal admissible set in (x, c), irredundant
  Matrix F_x;                      ///< QP constraints F_x x + F_c c <= t: the rows of `augmented`
  Matrix F_c;                      ///<   split into their x and c columns
  Vector t;                        ///<   and right-hand sides
  bool has_cost = false;           ///< Q and R were given: H and H_xc are set
  Matrix H;                        ///< QP cost cᵀ H c + 2 xᵀ H_xc c (N m x N m)
  Matrix H_xc;                     ///< (n x N m)
  Matrix dynamics;                 ///< Ψ, the prediction dynamics in z
  Polytope state_region;           ///< states where the QP is feasible (N-step controllable set)
  Polytope terminal_set;           ///< the closed loop's maximal admissible set (u = -K x)
  int horizon = 0;                 ///< N
  int steps = 0;                   ///< determinedness index of the augmented set
  bool converged = false;          ///< the augmented set converged (else an outer bound)
  long lp_solves = 0;              ///< every LP of the call
  long fallbacks = 0;              ///< LP answers re-solved by another backend
  double seconds = 0.0;            ///< wall-clock time
  FiniteDetermination conditions;  ///< of the augmented system
  AdmissibleCertificate certificate;  ///< invariance under Ψ and admissibility in (x, c)
};

namespace detail {

/// Checks a symmetric weight: square of size k, finite, symmetric, and positive semidefinite
/// (definite when `definite`), at a relative tolerance.
inline void require_weight(const Matrix& W, Index k, const std::string& name, bool definite) {
  require_square(W, k, name);
  require_finite(W, name);
  const double scale = std::max(1.0, W.cwiseAbs().maxCoeff());
  if ((W - W.transpose()).cwiseAbs().maxCoeff() > 1e-10 * scale) invalid(name, "must be symmetric");
  const Eigen::SelfAdjointEigenSolver<Matrix> es(0.5 * (W + W.transpose()));
  const double low = es.eigenvalues().minCoeff();
  if (definite && !(low > 1e-12 * scale))
    invalid(name, "must be positive definite (smallest eigenvalue " + std::to_string(low) + ")");
  if (!definite && low < -1e-10 * scale)
    invalid(name,
            "must be positive semidefinite (smallest eigenvalue " + std::to_string(low) + ")");
}

/// W = Σ_k (Ψ^k)ᵀ S Ψ^k for a strictly stable Ψ, by doubling (Smith 1968). Throws
/// InvalidInputError naming K when the sum does not converge (A - B K not strictly stable).
inline Matrix stein_sum(Matrix Psi, const Matrix& S) {
  Matrix W = S;
  bool done = false;
  for (int it = 0; it < 64 && !done; ++it) {
    const Matrix next = W + Psi.transpose() * W * Psi;
    Psi = Psi * Psi;
    const double change = (next - W).cwiseAbs().maxCoeff();
    W = next;
    if (!W.allFinite()) break;
    done = Psi.cwiseAbs().maxCoeff() == 0.0 ||
           (change <= 1e-15 * std::max(1.0, W.cwiseAbs().maxCoeff()) &&
            Psi.cwiseAbs().maxCoeff() < 1e-12);
  }
  if (!done) invalid("K", "the predicted cost does not converge: A - B K is not strictly stable");
  return 0.5 * (W + W.transpose());
}

}  // namespace detail

/// The dual-mode region for x+ = A x + B u, u = -K x + c_k (k < N = horizon), limits X, U and
/// `mixed` (dimension n + m; no rows: none). `Q`, `R` (both or neither, nullptr: no cost):
/// state and input weights for H and H_xc. `opt.max_steps` bounds the augmented iteration.
/// Throws InvalidInputError naming the argument (horizon < 1, shapes, K, Q, R), and what
/// max_admissible_set throws (NotFinitelyDeterminedError when A - B K is not strictly stable).
inline DualModeRegion dual_mode_region(const Matrix& A, const Matrix& B, const Matrix& K,
                                       const Polytope& X, const Polytope& U, int horizon,
                                       const Matrix* Q, const Matrix* R, const Polytope& mixed,
                                       const AdmissibleOptions& opt = {}) {
  const auto t0 = std::chrono::steady_clock::now();
  const Index m = detail::require_system(A, B);
  const Index n = A.rows();
  if (horizon < 1) detail::invalid("horizon", "must be >= 1, got " + std::to_string(horizon));
  detail::require_gain(K, m, n);
  detail::require_set_dim(X, n, "X", "the state");
  detail::require_set_dim(U, m, "U", "the input");
  detail::require_set_dim(mixed, n + m, "mixed", "(x, u)");
  if ((Q == nullptr) != (R == nullptr))
    detail::invalid(Q ? "R" : "Q", "must be given together with " + std::string(Q ? "Q" : "R"));
  if (Q) {
    detail::require_weight(*Q, n, "Q", false);
    detail::require_weight(*R, m, "R", true);
  }
  const Index N = horizon, nz = n + N * m;
  const Matrix Phi = A - B * K;
  Matrix Psi = Matrix::Zero(nz, nz);
  Psi.topLeftCorner(n, n) = Phi;
  Psi.block(0, n, n, m) = B;
  for (Index k = 0; k + 1 < N; ++k) Psi.block(n + k * m, n + (k + 1) * m, m, m).setIdentity();
  // Ĉ z = (x, u) with u = -K x + c_0; the limits in z are those on (x, u) composed with Ĉ.
  Matrix Chat = Matrix::Zero(n + m, nz);
  Chat.topLeftCorner(n, n).setIdentity();
  Chat.block(n, 0, m, n) = -K;
  Chat.block(n, n, m, m).setIdentity();
  const detail::StackedLimits L = detail::stack_limits(X, U, mixed);
  const Matrix G = L.G * Chat;

  DualModeRegion out;
  out.horizon = horizon;
  out.dynamics = Psi;
  AdmissibleResult aug = max_admissible_set(Psi, Polytope(G, L.f), opt);
  out.augmented = aug.set;
  out.steps = aug.steps;
  out.converged = aug.converged;
  out.conditions = aug.conditions;
  out.certificate = aug.certificate;
  out.lp_solves = aug.lp_solves;
  out.fallbacks = aug.fallbacks;
  out.F_x = aug.set.A().leftCols(n);
  out.F_c = aug.set.A().rightCols(N * m);
  out.t = aug.set.b();

  AdmissibleResult term = closed_loop_admissible_set(A, B, K, X, U, mixed, opt);
  out.terminal_set = term.set;
  out.lp_solves += term.lp_solves;
  out.fallbacks += term.fallbacks;
  ControllableResult reach = controllable_set(A, B, X, U, term.set, horizon, mixed, opt);
  out.state_region = reach.set;
  out.lp_solves += reach.lp_solves;
  out.fallbacks += reach.fallbacks;

  if (Q) {
    // S = Ĉᵀ diag(Q, R) Ĉ.
    Matrix D = Matrix::Zero(n + m, n + m);
    D.topLeftCorner(n, n) = *Q;
    D.bottomRightCorner(m, m) = *R;
    const Matrix W = detail::stein_sum(Psi, Chat.transpose() * D * Chat);
    out.has_cost = true;
    out.H = W.bottomRightCorner(N * m, N * m);
    out.H_xc = W.topRightCorner(n, N * m);
  }
  out.seconds = detail::seconds_since(t0);
  return out;
}

}  // namespace corral
