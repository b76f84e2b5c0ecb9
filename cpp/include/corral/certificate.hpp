#pragma once
/// \file certificate.hpp
/// Farkas certificates for linear containments over S = {x : F x <= t} (non-empty): a row
/// c·x <= d holds on S exactly when some λ >= 0 has λᵀ F = c and λᵀ t <= d (Farkas' lemma;
/// the λ of a basic LP solution has at most n non-zero entries and is stored sparsely).
/// - invariance of S under x+ = A x: the rows F_i A with bounds t_i (A S ⊆ S);
/// - admissibility: the rows of X with their bounds (S ⊆ X).
/// Each λ comes from the duals of one LP, max c·x over S (Boyd & Vandenberghe 2004, §5.8).
/// A certificate is checked without LPs: λ >= 0, the residual |λᵀ F - c| and the margin
/// d - λᵀ t. `holds` is judged at tolerance tol * max(1, max |t|, max |d|) on both the residual
/// (relative to |c| + Σ λ_i) and the margin; the worst margin is reported beside it. Rows of
/// these sets are often exactly tight under A, so a margin of the order of 1e-16 is normal.

#include <corral/detail/exact.hpp>
#include <corral/detail/validate.hpp>
#include <corral/errors.hpp>
#include <corral/lp/solver.hpp>
#include <corral/options.hpp>
#include <corral/polytope.hpp>

#include <cmath>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace corral {

/// One certified row c·x <= d: λ on the rows `rows` of S (indices into S's stored rows).
struct RowCertificate {
  std::vector<Index> rows;      ///< support of λ
  std::vector<double> weights;  ///< λ on those rows (>= 0)
  double bound = 0.0;           ///< λᵀ t, the certified upper bound of c·x on S
  double margin = 0.0;          ///< d - λᵀ t (>= 0 up to rounding when the row holds)
  double residual = 0.0;        ///< max |λᵀ F - c|
};

/// Certificates of a family of rows (invariance or admissibility), one per row.
struct Certificate {
  std::vector<RowCertificate> rows;
  double worst_margin = std::numeric_limits<double>::infinity();  ///< min margin
  Index worst_row = -1;                                           ///< row of the worst margin
  double max_residual = 0.0;                                      ///< max residual over the rows
  bool holds = false;                                             ///< judged at `tolerance`
  double tolerance = 0.0;  ///< absolute tolerance used for `holds`
  long lp_solves = 0;      ///< LPs solved to build it (0 when only checked)
};

namespace detail {

/// Checks the λ of each row against S, C, d and fills margins, residuals and holds.
inline void check_certificate(const Polytope& S, const Matrix& C, const Vector& d, double tol,
                              Certificate& cert) {
  const Matrix& F = S.A();
  const Vector& t = S.b();
  double scale = 1.0;
  if (t.size()) scale = std::max(scale, t.cwiseAbs().maxCoeff());
  if (d.size()) scale = std::max(scale, d.cwiseAbs().maxCoeff());
  cert.tolerance = tol * scale;
  cert.worst_margin = std::numeric_limits<double>::infinity();
  cert.worst_row = -1;
  cert.max_residual = 0.0;
  bool ok = static_cast<Index>(cert.rows.size()) == C.rows();
  for (Index j = 0; j < C.rows() && ok; ++j) {
    RowCertificate& rc = cert.rows[static_cast<size_t>(j)];
    if (rc.rows.size() != rc.weights.size()) {
      ok = false;
      break;
    }
    Eigen::RowVectorXd combo = Eigen::RowVectorXd::Zero(F.cols());
    double bound = 0.0, weight = 0.0;
    for (size_t q = 0; q < rc.rows.size(); ++q) {
      const Index i = rc.rows[q];
      const double w = rc.weights[q];
      if (i < 0 || i >= F.rows() || !(w >= 0.0) || !std::isfinite(w)) {
        ok = false;
        break;
      }
      combo += w * F.row(i);
      bound += w * t(i);
      weight += w;
    }
    if (!ok) break;
    rc.bound = bound;
    rc.margin = d(j) - bound;
    rc.residual = (combo - C.row(j)).cwiseAbs().maxCoeff();
    cert.max_residual = std::max(cert.max_residual, rc.residual);
    if (rc.margin < cert.worst_margin) {
      cert.worst_margin = rc.margin;
      cert.worst_row = j;
    }
    const double res_tol = tol * (C.row(j).cwiseAbs().maxCoeff() + weight + 1.0);
    if (rc.residual > res_tol || rc.margin < -cert.tolerance) ok = false;
  }
  cert.holds = ok;
}

}  // namespace detail

/// Certificates that every row c_j·x <= d_j (rows of C, entries of d) holds on the non-empty
/// S, one LP each on S (opt.backend). A row whose LP is unbounded or infeasible gets an
/// empty certificate and makes `holds` false.
inline Certificate certify_rows(const Polytope& S, const Matrix& C, const Vector& d,
                                const Options& opt = {}) {
  if (C.cols() != S.dim())
    detail::invalid("C", "must have " + std::to_string(S.dim()) + " columns");
  if (d.size() != C.rows()) detail::invalid("d", "must have one entry per row of C");
  Certificate cert;
  cert.rows.resize(static_cast<size_t>(C.rows()));
  bool all_found = true;
  if (C.rows() > 0 && S.num_rows() > 0) {
    auto lp = lp::make_solver(S.A(), S.b(), Vector::Zero(S.dim()), opt.backend);
    for (Index j = 0; j < C.rows(); ++j) {
      detail::report_progress(opt.progress, "certificate", j, C.rows(), cert.lp_solves);
      lp->set_objective(C.row(j).transpose());
      const lp::Result r = lp->solve();
      ++cert.lp_solves;
      RowCertificate& rc = cert.rows[static_cast<size_t>(j)];
      if (r.status != lp::Status::optimal || !r.has_duals()) {
        all_found = false;
        continue;
      }
      for (Index i = 0; i < r.duals.size(); ++i)
        if (r.duals(i) > 0.0) {
          rc.rows.push_back(i);
          rc.weights.push_back(r.duals(i));
        }
    }
  } else if (C.rows() > 0) {
    all_found = false;  // S has no rows: only 0 <= d rows could be certified; not handled
  }
  detail::check_certificate(S, C, d, opt.tolerance(), cert);
  cert.holds = cert.holds && all_found;
  return cert;
}

/// Report of verify_invariance(): the certificate of A S ⊆ S and its verdict.
struct InvarianceReport {
  /// Every row holds within the tolerance: with `exact`, judged on the exact worst margin
  /// (>= -tolerance); otherwise on the floating-point certificate (residual and margin).
  bool holds = false;
  double worst_margin = 0.0;  ///< min over rows of t_i - max{F_i A x : x in S} (a double)
  Index worst_row = -1;       ///< row of S with the worst margin (-1 when none)
  double tolerance = 0.0;     ///< absolute tolerance of `holds`: tol * max(1, max |t|)
  Certificate certificate;    ///< one λ per row of S (floating point)
  /// Exact check (exact=true): the doubles of A and S taken at their exact values.
  bool exact = false;
  /// The exact worst margin; empty unless `exact` and the margin is finite (an unbounded row
  /// gives -inf, an empty S +inf, both in worst_margin).
  std::optional<Rational> worst_margin_exact;
  /// `exact` and every margin >= 0 exactly: A S ⊆ S with no tolerance at all.
  bool holds_exactly = false;
  long exact_lps = 0;  ///< rows whose exact margin needed a rational LP (exact only)
};

/// Checks A S ⊆ S for S = {F x <= t}: with `certificate` given, only checks it (no LP);
/// otherwise computes one (one LP per row). An empty S is invariant (holds, margin +inf).
///
/// With `exact`, the worst margin is also computed exactly in rationals (detail/exact.hpp:
/// exact solves on each row's support, signs of the multipliers, the smallest bound confirmed
/// by an exact vertex, cddlib's rational LP where a support fails); `holds` is then judged on
/// that exact margin, and `holds_exactly` says whether it is >= 0 with no tolerance. Rows of
/// admissible sets are often exactly tight under A, so an exact margin of the order of 1e-16
/// (either sign) is normal: it is reported as it is, never rounded to zero. Exact checks cost
/// one exact solve of at most n x n per row plus an LP for the worst row; a single rational LP
/// cannot be interrupted.
/// Throws InvalidInputError naming the argument for a wrong size of A or a certificate of
/// the wrong length.
inline InvarianceReport verify_invariance(const Matrix& A, const Polytope& S,
                                          const Certificate* certificate = nullptr,
                                          const Options& opt = {}, bool exact = false) {
  const Index n = S.dim();
  detail::require_square(A, n, "A");
  detail::require_finite(A, "A");
  InvarianceReport rep;
  rep.exact = exact;
  if (S.is_trivially_empty()) {
    rep.holds = true;
    rep.holds_exactly = exact;
    rep.worst_margin = std::numeric_limits<double>::infinity();
    return rep;
  }
  const Matrix C = S.A() * A;
  if (certificate != nullptr) {
    if (static_cast<Index>(certificate->rows.size()) != S.num_rows())
      detail::invalid("certificate",
                      "must have one entry per row of S (" + std::to_string(S.num_rows()) + ")");
    rep.certificate = *certificate;
    rep.certificate.lp_solves = 0;
    detail::check_certificate(S, C, S.b(), opt.tolerance(), rep.certificate);
  } else {
    rep.certificate = certify_rows(S, C, S.b(), opt);
  }
  rep.holds = rep.certificate.holds;
  rep.worst_margin = rep.certificate.worst_margin;
  rep.worst_row = rep.certificate.worst_row;
  rep.tolerance = rep.certificate.tolerance;
  if (!exact) return rep;

  std::vector<std::vector<Index>> supports;
  supports.reserve(rep.certificate.rows.size());
  for (const RowCertificate& rc : rep.certificate.rows) supports.push_back(rc.rows);
  const detail::ExactWorstMargin w =
      detail::exact_worst_margin(S.A(), S.b(), S.A(), &A, S.b(), supports, -rep.tolerance, opt);
  rep.exact_lps = w.exact_lps;
  rep.worst_row = w.row;
  using St = detail::ExactWorstMargin::Status;
  switch (w.status) {
    case St::optimal:
      rep.worst_margin_exact = w.margin;
      rep.worst_margin = w.margin.value;
      break;
    case St::unbounded: rep.worst_margin = -std::numeric_limits<double>::infinity(); break;
    case St::empty:
    case St::no_rows: rep.worst_margin = std::numeric_limits<double>::infinity(); break;
  }
  rep.holds_exactly = w.nonnegative;
  rep.holds = w.meets_threshold;
  return rep;
}

}  // namespace corral
