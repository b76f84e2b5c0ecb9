#pragma once
/// \file lqr.hpp
/// Discrete-time linear-quadratic regulator: the stabilising solution P of the discrete
/// algebraic Riccati equation
///
///     P = Aᵀ P A - Aᵀ P B (R + Bᵀ P B)⁻¹ Bᵀ P A + Q
///
/// and the gain K = (R + Bᵀ P B)⁻¹ Bᵀ P A of the law u = -K x, which minimises
/// Σ xᵀ Q x + uᵀ R u along x+ = A x + B u.
///
/// Method: the structure-preserving doubling algorithm (Chu, Fan, Lin & Wang 2004, "Structure-
/// preserving algorithms for periodic discrete-time algebraic Riccati equations", Int. J.
/// Control 77(8)): with G = B R⁻¹ Bᵀ and A₀ = A, G₀ = G, H₀ = Q,
///
///     W = I + G_k H_k,
///     A_{k+1} = A_k W⁻¹ A_k,   G_{k+1} = G_k + A_k W⁻¹ G_k A_kᵀ,
///     H_{k+1} = H_k + A_kᵀ H_k W⁻¹ A_k,
///
/// and H_k → P quadratically when (A, B) is stabilisable and (A, Q) is detectable (every
/// mode of A on or outside the unit circle is seen by Q). Without detectability the iteration
/// can settle on a solution that does not stabilise (Q = 0 with an unstable A gives P = 0);
/// that is reported, not returned. Each step doubles the horizon of the finite-horizon problem, so
/// a few tens of steps reach any horizon. The answer is then checked: P symmetric and finite, the
/// Riccati residual small relative to |P|, and A - B K strictly stable; otherwise the pair is
/// reported as not stabilisable (or the weights as unsuitable). Cost: O(n³) per step.

#include <corral/detail/validate.hpp>
#include <corral/errors.hpp>
#include <corral/types.hpp>

#include <Eigen/Eigenvalues>
#include <Eigen/LU>

#include <cmath>
#include <limits>
#include <string>

namespace corral {

/// Result of lqr(): u = -K x.
struct LqrResult {
  Matrix K;                      ///< m x n gain, u = -K x
  Matrix P;                      ///< n x n stabilising solution of the Riccati equation
  double spectral_radius = 0.0;  ///< of the closed loop A - B K (< 1)
  double residual = 0.0;         ///< max-abs Riccati residual divided by max(1, max |P|)
  int steps = 0;                 ///< doubling steps taken
};

/// Options of lqr().
struct LqrOptions {
  double tol = 1e-12;   ///< stop when |H_{k+1} - H_k| <= tol * max(1, |H_{k+1}|) (max-abs)
  int max_steps = 100;  ///< doubling steps before giving up (each doubles the horizon)
};

namespace detail {
inline void require_symmetric(const Matrix& M, const char* name) {
  const double scale = std::max(1.0, M.cwiseAbs().maxCoeff());
  if ((M - M.transpose()).cwiseAbs().maxCoeff() > 1e-10 * scale) invalid(name, "must be symmetric");
}
}  // namespace detail

/// Discrete-time LQR (see the file comment). A: n x n; B: n x m; Q: n x n symmetric positive
/// semidefinite; R: m x m symmetric positive definite. Throws InvalidInputError naming the
/// argument for wrong shapes, NaN/inf, asymmetric or indefinite weights, and when the
/// stabilising solution is not found ("A, B: ...", with the reason: no convergence, the
/// closed-loop spectral radius, or the residual): (A, B) not stabilisable, or (A, Q) not
/// detectable.
inline LqrResult lqr(const Matrix& A, const Matrix& B, const Matrix& Q, const Matrix& R,
                     const LqrOptions& opt = {}) {
  const Index n = A.rows();
  if (n < 1) detail::invalid("A", "must have at least one row");
  detail::require_square(A, n, "A");
  if (B.rows() != n || B.cols() < 1)
    detail::invalid("B", "must have " + std::to_string(n) + " rows and at least one column, got " +
                             std::to_string(B.rows()) + " x " + std::to_string(B.cols()));
  const Index m = B.cols();
  detail::require_square(Q, n, "Q");
  detail::require_square(R, m, "R");
  detail::require_finite(A, "A");
  detail::require_finite(B, "B");
  detail::require_finite(Q, "Q");
  detail::require_finite(R, "R");
  detail::require_symmetric(Q, "Q");
  detail::require_symmetric(R, "R");
  const Eigen::MatrixXd Qs = 0.5 * (Q + Q.transpose()), Rs = 0.5 * (R + R.transpose());
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eq(Qs), er(Rs);
  const double qscale = std::max(1.0, Qs.cwiseAbs().maxCoeff());
  if (eq.eigenvalues().minCoeff() < -1e-10 * qscale)
    detail::invalid("Q", "must be positive semidefinite (smallest eigenvalue " +
                             std::to_string(eq.eigenvalues().minCoeff()) + ")");
  if (!(er.eigenvalues().minCoeff() > 1e-12 * std::max(1.0, Rs.cwiseAbs().maxCoeff())))
    detail::invalid("R", "must be positive definite (smallest eigenvalue " +
                             std::to_string(er.eigenvalues().minCoeff()) + ")");
  if (!(opt.tol > 0.0 && opt.tol < 1e-2)) detail::invalid("tol", "must be in (0, 0.01)");
  if (opt.max_steps < 1) detail::invalid("max_steps", "must be at least 1");

  const Eigen::MatrixXd Ad = A, Bd = B;
  const Eigen::MatrixXd I = Eigen::MatrixXd::Identity(n, n);
  Eigen::MatrixXd Ak = Ad, Gk = Bd * Rs.ldlt().solve(Bd.transpose()), Hk = Qs;
  Gk = 0.5 * (Gk + Gk.transpose());
  LqrResult out;
  bool converged = false;
  for (int step = 1; step <= opt.max_steps; ++step) {
    const Eigen::PartialPivLU<Eigen::MatrixXd> W(I + Gk * Hk);
    const Eigen::MatrixXd WA = W.solve(Ak);              // W⁻¹ A_k
    const Eigen::MatrixXd WG = W.solve(Gk);              // W⁻¹ G_k
    Eigen::MatrixXd Hn = Hk + Ak.transpose() * Hk * WA;  // H_k + A_kᵀ H_k W⁻¹ A_k
    Eigen::MatrixXd Gn = Gk + Ak * WG * Ak.transpose();  // G_k + A_k W⁻¹ G_k A_kᵀ
    Eigen::MatrixXd An = Ak * WA;                        // A_k W⁻¹ A_k
    Hn = 0.5 * (Hn + Hn.transpose());
    Gn = 0.5 * (Gn + Gn.transpose());
    out.steps = step;
    if (!Hn.allFinite() || !Gn.allFinite() || !An.allFinite()) break;
    const double change = (Hn - Hk).cwiseAbs().maxCoeff();
    Ak = std::move(An);
    Gk = std::move(Gn);
    Hk = std::move(Hn);
    if (change <= opt.tol * std::max(1.0, Hk.cwiseAbs().maxCoeff())) {
      converged = true;
      break;
    }
  }
  auto not_stabilisable = [&](const std::string& why) {
    detail::invalid("A, B",
                    "no stabilising solution of the Riccati equation (" + why +
                        "): (A, B) is not stabilisable, or (A, Q) is not detectable (a mode "
                        "of A on or outside the unit circle that Q does not see)");
  };
  if (!converged || !Hk.allFinite())
    not_stabilisable("the doubling iteration did not converge in " + std::to_string(out.steps) +
                     " steps");

  const Eigen::MatrixXd P = Hk;
  const Eigen::MatrixXd S = Rs + Bd.transpose() * P * Bd;
  const Eigen::MatrixXd K = S.ldlt().solve(Bd.transpose() * P * Ad);
  const Eigen::MatrixXd res = Ad.transpose() * P * Ad - Ad.transpose() * P * Bd * K + Qs - P;
  out.residual = res.cwiseAbs().maxCoeff() / std::max(1.0, P.cwiseAbs().maxCoeff());
  const Eigen::MatrixXd Acl = Ad - Bd * K;
  out.spectral_radius = Acl.eigenvalues().cwiseAbs().maxCoeff();
  if (!(out.spectral_radius < 1.0))
    not_stabilisable("closed-loop spectral radius " + std::to_string(out.spectral_radius));
  if (!(out.residual <= 1e-6)) not_stabilisable("Riccati residual " + std::to_string(out.residual));
  out.P = P;
  out.K = K;
  return out;
}

}  // namespace corral
