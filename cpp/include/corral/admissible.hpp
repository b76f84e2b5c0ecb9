#pragma once
/// \file admissible.hpp
/// Maximal admissible set of an autonomous linear system x+ = A x under X = {x : G x <= f}:
/// O_∞ = {x : A^k x ∈ X for every k >= 0}, computed as O_t* = ∩_{k=0..t*} {x : G A^k x <= f}
/// (Gilbert & Tan 1991, "Linear systems with state and control constraints: the theory and
/// application of maximal output admissible sets", IEEE TAC 36(9)).
///
/// Conditions for finite determination, each checked and reported (FiniteDetermination):
/// - the part of A observable from G is strictly stable. The unobservable subspace N (the
///   kernel of [G; G A; ...; G A^{n-1}]) does not affect any constraint: the computation runs
///   in coordinates z = Vᵀ x on N's orthogonal complement (V orthonormal), with z+ = Vᵀ A V z,
///   and the result is lifted back, unbounded along N. A spectral radius >= 1 there raises
///   NotFinitelyDeterminedError with the number;
/// - 0 in the interior of X (reported; 0 on the boundary or outside X does not stop the
///   iteration: with 0 outside X and stable dynamics the set comes out empty);
/// - X bounded up to a subspace: every direction d with G d <= 0 has G d = 0 (reported; when
///   it fails the iteration runs and may not converge within max_steps).
///
/// The iteration keeps a frontier of rows G_i A^k that were not redundant; each step maps them
/// by A and tests every new row against the current set with one LP (early stop at its
/// right-hand side), adding it only when it cuts. A row found redundant never needs to be
/// propagated again: if it holds on O_k, its image holds on O_{k+1}. The first step that adds
/// nothing proves O_{t+1} = O_t, so t* = t. A final redundancy pass leaves the irredundant set,
/// and certificates of invariance and admissibility (certificate.hpp) come with it.

#include <corral/certificate.hpp>
#include <corral/detail/validate.hpp>
#include <corral/errors.hpp>
#include <corral/lp/solver.hpp>
#include <corral/options.hpp>
#include <corral/polytope.hpp>
#include <corral/redundancy.hpp>

#include <Eigen/Eigenvalues>
#include <Eigen/QR>

#include <chrono>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

namespace corral {

/// The conditions of finite determination as found (see the file comment).
struct FiniteDetermination {
  double origin_margin = 0.0;               ///< min_i f_i over the unit rows of X (> 0: 0 inside X)
  bool origin_interior = false;             ///< origin_margin > tol * scale
  bool bounded_up_to_subspace = false;      ///< {d : G d <= 0} = {d : G d = 0}
  Index observable_dim = 0;                 ///< dimension of the part of the state seen by G
  double observable_spectral_radius = 0.0;  ///< spectral radius of A on that part
};

/// Options of max_admissible_set(): the common ones plus the step limit.
struct AdmissibleOptions : Options {
  int max_steps = 1000;  ///< steps of the iteration before giving up (converged = false)
};

/// The evidence that comes with a maximal admissible set: invariance (A S ⊆ S) and
/// admissibility (S ⊆ X, with X's rows as given, inputs and mixed rows included for the
/// closed loop), each one Farkas certificate per row (certificate.hpp).
struct AdmissibleCertificate {
  Certificate invariance;     ///< one λ per row of the set: rows F_i A, bounds t_i
  Certificate admissibility;  ///< one λ per row of the (irredundant) constraints
  bool holds = false;         ///< both hold at their tolerance
};

/// Result of max_admissible_set().
struct AdmissibleResult {
  Polytope set;            ///< the maximal admissible set, irredundant (or the last iterate)
  int steps = 0;           ///< determinedness index t* (or the steps done when not converged)
  bool converged = false;  ///< false: max_steps reached; `set` is then an outer bound
  long lp_solves = 0;      ///< LPs solved (conditions, iteration, final redundancy pass)
  long fallbacks = 0;      ///< LP answers re-solved by another backend
  double seconds = 0.0;    ///< wall-clock time
  FiniteDetermination conditions;
  /// Certificates of the converged, non-empty set (empty otherwise: a last iterate is not
  /// invariant, and the empty set needs none).
  AdmissibleCertificate certificate;
  /// min of the certificates' margins (+inf when there is no certificate)
  double worst_margin = std::numeric_limits<double>::infinity();
};

namespace detail {

/// Orthonormal basis (columns) of the row space of [G; G A; ...; G A^{n-1}].
inline Eigen::MatrixXd observable_basis(const Matrix& A, const Matrix& G, double tol) {
  const Index n = A.cols(), m = G.rows();
  Eigen::MatrixXd O(m * n, n);
  Eigen::MatrixXd row_block = G;
  for (Index k = 0; k < n; ++k) {
    O.middleRows(k * m, m) = row_block;
    row_block = row_block * A;
    const double s = row_block.cwiseAbs().maxCoeff();
    if (s > 0.0) row_block /= s;  // scaling each block does not change the row space
  }
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(O.transpose());
  qr.setThreshold(tol);
  const Index r = qr.rank();
  const Eigen::MatrixXd Q = qr.householderQ();
  return Q.leftCols(r);
}

}  // namespace detail

/// Maximal admissible set of x+ = A x in X (see the file comment). A: n x n, n = X.dim().
/// Throws InvalidInputError naming the argument for bad shapes or NaN/inf, and
/// NotFinitelyDeterminedError when the observable part of A is not strictly stable.
inline AdmissibleResult max_admissible_set(const Matrix& A, const Polytope& X,
                                           const AdmissibleOptions& opt = {}) {
  const auto t0 = std::chrono::steady_clock::now();
  const Index n = X.dim();
  detail::require_square(A, n, "A");
  detail::require_finite(A, "A");
  if (opt.max_steps < 1) detail::invalid("max_steps", "must be at least 1");
  const double tol = opt.tolerance();
  AdmissibleResult out;
  auto finish = [&](Polytope P, int steps, bool converged) {
    out.set = std::move(P);
    out.steps = steps;
    out.converged = converged;
    out.seconds = detail::seconds_since(t0);
    return out;
  };
  if (X.is_trivially_empty()) return finish(Polytope::empty(n), 0, true);
  if (X.num_rows() == 0) {  // no constraint: the whole space is admissible
    out.conditions.bounded_up_to_subspace = true;
    return finish(X, 0, true);
  }
  Info red_info;
  Options ropt = opt;
  const Polytope Xr = X.irredundant(ropt, false, &red_info);
  out.lp_solves += red_info.lp_solves;
  out.fallbacks += red_info.fallbacks;
  if (Xr.is_trivially_empty() || Xr.num_rows() == 0) return finish(Xr, 0, true);
  const Matrix& G = Xr.A();
  const Vector& f = Xr.b();
  const double scale = std::max(1.0, f.cwiseAbs().maxCoeff());
  const double abs_tol = tol * scale;

  // Conditions.
  FiniteDetermination& cond = out.conditions;
  cond.origin_margin = f.minCoeff();
  cond.origin_interior = cond.origin_margin > abs_tol;
  Eigen::MatrixXd V = detail::observable_basis(A, G, tol);
  const Index r = V.cols();
  if (r == n) V.setIdentity(n, n);  // all of the state is seen: keep the caller's coordinates
  cond.observable_dim = r;
  if (r == 0) {  // G sees nothing: every x with G x <= f is admissible forever iff 0·x <= f
    cond.bounded_up_to_subspace = true;
    return finish(Xr, 0, true);
  }
  const Eigen::MatrixXd Az = V.transpose() * A * V;
  cond.observable_spectral_radius = Az.eigenvalues().cwiseAbs().maxCoeff();
  if (!(cond.observable_spectral_radius < 1.0))
    throw NotFinitelyDeterminedError(
        "A: the part of A observable from the rows of X has spectral radius " +
        std::to_string(cond.observable_spectral_radius) +
        " >= 1; the maximal admissible set is not finitely determined");
  const Matrix Gz = G * V;  // rows of X in the coordinates z = Vᵀ x
  {
    // Recession = lineality: no d with G d <= 0 has g_i·d < 0, i.e. for each row,
    // max -g_i·d over {G d <= 0, -1 <= d <= 1} is 0.
    Matrix C(Gz.rows() + 2 * r, r);
    Vector c_rhs = Vector::Zero(Gz.rows() + 2 * r);
    C.topRows(Gz.rows()) = Gz;
    C.middleRows(Gz.rows(), r) = Matrix::Identity(r, r);
    C.bottomRows(r) = -Matrix::Identity(r, r);
    c_rhs.tail(2 * r).setOnes();
    auto lp = lp::make_solver(C, c_rhs, Vector::Zero(r), opt.backend);
    cond.bounded_up_to_subspace = true;
    for (Index i = 0; i < Gz.rows() && cond.bounded_up_to_subspace; ++i) {
      const double norm = Gz.row(i).norm();
      if (!(norm > tol)) continue;
      lp->set_objective(-Gz.row(i).transpose() / norm);
      lp::SolveOptions so;
      so.threshold = tol;
      const lp::Result res = lp->solve(so);
      ++out.lp_solves;
      out.fallbacks += res.fallbacks;
      if (res.status == lp::Status::numerical)
        throw SolverError("max_admissible_set: LP failure in the boundedness check");
      if (res.exceeds(tol)) cond.bounded_up_to_subspace = false;
    }
  }

  // The iteration in z.
  auto lp = lp::make_solver(Gz, f, Vector::Zero(r), opt.backend);
  Matrix frontier = Gz;  // rows G_i A^k (in z) still to propagate
  Vector frontier_rhs = f;
  Matrix kept = Gz;  // every row of the current set
  Vector kept_rhs = f;
  int steps_done = 0;
  bool converged = false;
  for (int k = 1; k <= opt.max_steps; ++k) {
    steps_done = k;
    Matrix cand = frontier * Az;
    std::vector<Index> added;  // rows of cand (normalised in place) that cut the set
    for (Index i = 0; i < cand.rows(); ++i) {
      const double norm = cand.row(i).norm();
      const double rhs = frontier_rhs(i);
      if (!(norm > tol * 1e-3)) {  // 0·z <= rhs: holds when rhs >= 0, else nothing does
        if (rhs < -abs_tol) return finish(Polytope::empty(n), k, true);
        continue;
      }
      detail::report_progress(opt.progress, "admissible set", k, opt.max_steps, out.lp_solves);
      cand.row(i) /= norm;
      frontier_rhs(i) = rhs / norm;
      const Vector row = cand.row(i).transpose();
      const double b = frontier_rhs(i);
      lp->set_objective(row);
      lp::SolveOptions so;
      so.threshold = b + abs_tol;
      const lp::Result res = lp->solve(so);
      ++out.lp_solves;
      out.fallbacks += res.fallbacks;
      if (res.status == lp::Status::infeasible) return finish(Polytope::empty(n), k, true);
      if (res.status == lp::Status::numerical)
        throw SolverError("max_admissible_set: LP failure at step " + std::to_string(k));
      if (!res.exceeds(b + abs_tol)) continue;  // redundant: never propagated again
      lp->add_rows(row.transpose(), Vector::Constant(1, b));
      added.push_back(i);
    }
    if (added.empty()) {
      converged = true;
      steps_done = k - 1;
      break;
    }
    Matrix next(static_cast<Index>(added.size()), r);
    Vector next_rhs(next.rows());
    for (Index q = 0; q < next.rows(); ++q) {
      next.row(q) = cand.row(added[static_cast<size_t>(q)]);
      next_rhs(q) = frontier_rhs(added[static_cast<size_t>(q)]);
    }
    kept.conservativeResize(kept.rows() + next.rows(), r);
    kept.bottomRows(next.rows()) = next;
    kept_rhs.conservativeResize(kept_rhs.size() + next_rhs.size());
    kept_rhs.tail(next_rhs.size()) = next_rhs;
    frontier = std::move(next);
    frontier_rhs = std::move(next_rhs);
  }

  // Final redundancy pass (in z, where the set is bounded once converged), then lift back:
  // a row h·z <= b is (h Vᵀ)·x <= b.
  Polytope Sz(kept, kept_rhs);
  Info info2;
  if (converged) {
    Sz = Sz.irredundant(ropt, false, &info2);
    out.lp_solves += info2.lp_solves;
    out.fallbacks += info2.fallbacks;
  }
  if (Sz.is_trivially_empty()) return finish(Polytope::empty(n), steps_done, converged);
  const Matrix Hx = Sz.A() * V.transpose();
  Polytope S(Hx, Sz.b());
  if (converged) {
    AdmissibleCertificate& cert = out.certificate;
    cert.invariance = verify_invariance(A, S, nullptr, ropt).certificate;
    cert.admissibility = certify_rows(S, G, f, ropt);
    cert.holds = cert.invariance.holds && cert.admissibility.holds;
    out.lp_solves += cert.invariance.lp_solves + cert.admissibility.lp_solves;
    out.worst_margin = std::min(cert.invariance.worst_margin, cert.admissibility.worst_margin);
  }
  return finish(std::move(S), steps_done, converged);
}

namespace detail {

/// Checks A (n x n), B (n x m, m >= 1), finite; returns m.
inline Index require_system(const Matrix& A, const Matrix& B) {
  const Index n = A.rows();
  if (n < 1) invalid("A", "must have at least one row");
  require_square(A, n, "A");
  if (B.rows() != n || B.cols() < 1)
    invalid("B", "must have " + std::to_string(n) + " rows and at least one column, got " +
                     std::to_string(B.rows()) + " x " + std::to_string(B.cols()));
  require_finite(A, "A");
  require_finite(B, "B");
  return B.cols();
}

/// Checks the dimension of a set argument.
inline void require_set_dim(const Polytope& S, Index dim, const std::string& name,
                            const std::string& what) {
  if (S.dim() != dim)
    invalid(name, "must have dimension " + std::to_string(dim) + " (" + what + "), got " +
                      std::to_string(S.dim()));
}

/// Checks a gain K of u = -K x: m x n and finite.
inline void require_gain(const Matrix& K, Index m, Index n) {
  if (K.rows() != m || K.cols() != n)
    invalid("K", "must be " + std::to_string(m) + " x " + std::to_string(n) + " (u = -K x), got " +
                     std::to_string(K.rows()) + " x " + std::to_string(K.cols()));
  require_finite(K, "K");
}

/// Limits on (x, u) as rows G (x, u) <= f: x in X, u in U, (x, u) in mixed, in that order.
struct StackedLimits {
  Matrix G;
  Vector f;
};
inline StackedLimits stack_limits(const Polytope& X, const Polytope& U, const Polytope& mixed) {
  const Index n = X.dim(), m = U.dim();
  const Index rows = X.num_rows() + U.num_rows() + mixed.num_rows();
  StackedLimits L{Matrix::Zero(rows, n + m), Vector(rows)};
  Index at = 0;
  L.G.block(at, 0, X.num_rows(), n) = X.A();
  L.f.segment(at, X.num_rows()) = X.b();
  at += X.num_rows();
  L.G.block(at, n, U.num_rows(), m) = U.A();
  L.f.segment(at, U.num_rows()) = U.b();
  at += U.num_rows();
  L.G.middleRows(at, mixed.num_rows()) = mixed.A();
  L.f.segment(at, mixed.num_rows()) = mixed.b();
  return L;
}

}  // namespace detail

/// Maximal admissible set of the closed loop x+ = (A - B K) x under u = -K x, with state
/// constraints X (n-dimensional; empty Polytope(n) rows for none), input constraints U
/// (m-dimensional) and mixed constraints `mixed` ((n + m)-dimensional, rows G x + H u <= f),
/// all of which become rows in x: G x - H K x <= f. A: n x n, B: n x m, K: m x n. An argument
/// given as a Polytope with no rows (Polytope(dim)) imposes nothing. Throws InvalidInputError
/// naming the argument for wrong sizes or NaN/inf; the rest as max_admissible_set().
inline AdmissibleResult closed_loop_admissible_set(const Matrix& A, const Matrix& B,
                                                   const Matrix& K, const Polytope& X,
                                                   const Polytope& U, const Polytope& mixed,
                                                   const AdmissibleOptions& opt = {}) {
  const Index m = detail::require_system(A, B);
  const Index n = A.rows();
  detail::require_gain(K, m, n);
  detail::require_set_dim(X, n, "X", "the state");
  detail::require_set_dim(U, m, "U", "the input");
  detail::require_set_dim(mixed, n + m, "mixed", "(x, u)");
  const detail::StackedLimits L = detail::stack_limits(X, U, mixed);
  const Matrix G = L.G.leftCols(n) - L.G.rightCols(m) * K;  // u = -K x
  const Matrix Acl = A - B * K;
  return max_admissible_set(Acl, Polytope(G, L.f), opt);
}

}  // namespace corral
