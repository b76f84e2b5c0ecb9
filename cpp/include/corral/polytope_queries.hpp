#pragma once
/// \file polytope_queries.hpp
/// LP-based queries and set operations of Polytope (included by polytope.hpp).
/// Methods: Chebyshev centre, support function, containment and emptiness by LPs
/// (Boyd & Vandenberghe 2004, *Convex Optimization*, §8.5).

#include <corral/polytope.hpp>

#include <Eigen/LU>
#include <Eigen/SVD>

namespace corral {

namespace detail {

/// Solves and turns a numerical failure into SolverError naming the backend and the task.
inline lp::Result solve_or_throw(lp::Solver& solver, const char* task,
                                 const lp::SolveOptions& options = {}) {
  lp::Result r = solver.solve(options);
  if (r.status == lp::Status::numerical)
    throw SolverError(std::string(solver.backend()) + ": numerical failure in " + task);
  return r;
}

/// The Chebyshev LP in (x, r): a_i·x + ‖a_i‖ r <= b_i, and r <= cap when cap is finite.
inline std::unique_ptr<lp::Solver> chebyshev_solver(const Matrix& A, const Vector& b, double cap,
                                                    const std::string& backend) {
  const Index m = A.rows(), n = A.cols();
  const bool capped = std::isfinite(cap);
  Matrix L(m + (capped ? 1 : 0), n + 1);
  Vector u(L.rows());
  L.topLeftCorner(m, n) = A;
  L.col(n).head(m) = A.rowwise().norm();
  u.head(m) = b;
  if (capped) {
    L.row(m).setZero();
    L(m, n) = 1.0;
    u(m) = cap;
  }
  Vector c = Vector::Zero(n + 1);
  c(n) = 1.0;
  return lp::make_solver(L, u, c, backend);
}

}  // namespace detail

inline ChebyshevBall Polytope::chebyshev_center(const Options& opt) const {
  if (is_trivially_empty()) detail::invalid("polytope", "the set is empty; it has no centre");
  auto solver =
      detail::chebyshev_solver(A_, b_, std::numeric_limits<double>::infinity(), opt.backend);
  const lp::Result r = detail::solve_or_throw(*solver, "the Chebyshev centre");
  if (r.status == lp::Status::unbounded)
    throw UnboundedSetError("polytope: contains balls of any radius; no Chebyshev centre");
  if (r.status != lp::Status::optimal)
    throw SolverError("chebyshev_center: unexpected LP status " +
                      std::string(lp::to_string(r.status)));
  const double radius = r.x(dim());
  const double t = opt.tolerance() * scale();
  if (radius < -t) detail::invalid("polytope", "the set is empty; it has no centre");
  return ChebyshevBall{r.x.head(dim()), std::max(radius, 0.0) > t ? radius : 0.0};
}

inline bool Polytope::is_empty(const Options& opt) const {
  if (is_trivially_empty()) return true;
  if (num_rows() == 0) return false;
  auto solver = detail::chebyshev_solver(A_, b_, scale(), opt.backend);
  const lp::Result r = detail::solve_or_throw(*solver, "the emptiness test");
  if (r.status != lp::Status::optimal)
    throw SolverError("is_empty: unexpected LP status " + std::string(lp::to_string(r.status)));
  return r.x(dim()) < -opt.tolerance() * scale();
}

inline Vector Polytope::support_many(const Matrix& D, const Options& opt) const {
  if (D.cols() != dim())
    detail::invalid("directions", "have " + std::to_string(D.cols()) + " columns, expected " +
                                      std::to_string(dim()));
  detail::require_finite(D, "directions");
  Vector h(D.rows());
  const double inf = std::numeric_limits<double>::infinity();
  if (is_trivially_empty()) return Vector::Constant(D.rows(), -inf);
  auto solver = lp::make_solver(A_, b_, Vector(), opt.backend);
  for (Index k = 0; k < D.rows(); ++k) {
    solver->set_objective(D.row(k).transpose());
    const lp::Result r = detail::solve_or_throw(*solver, "the support function");
    if (r.status == lp::Status::infeasible) return Vector::Constant(D.rows(), -inf);
    h(k) = r.status == lp::Status::unbounded ? inf : r.value;
  }
  return h;
}

inline double Polytope::support(const Vector& d, const Options& opt) const {
  detail::require_length(d, dim(), "direction", "one entry per dimension of the set");
  return support_many(d.transpose(), opt)(0);
}

inline bool Polytope::is_bounded(const Options& opt) const {
  if (is_trivially_empty()) return true;
  const Index n = dim();
  Matrix D = Matrix::Identity(n + 1, n);
  D.row(n).setConstant(-1.0);
  const Vector h = support_many(D, opt);
  if (std::isinf(h(0)) && h(0) < 0) return true;  // empty
  return h.allFinite();
}

inline std::pair<Vector, Vector> Polytope::bounding_box(const Options& opt) const {
  const Index n = dim();
  Matrix D(2 * n, n);
  D.topRows(n) = Matrix::Identity(n, n);
  D.bottomRows(n) = -Matrix::Identity(n, n);
  const Vector h = support_many(D, opt);
  if (std::isinf(h(0)) && h(0) < 0) detail::invalid("polytope", "the set is empty; no box");
  return {-h.tail(n), h.head(n)};
}

inline bool Polytope::is_subset(const Polytope& Q, const Options& opt) const {
  if (Q.dim() != dim())
    detail::invalid(
        "Q", "has dimension " + std::to_string(Q.dim()) + ", expected " + std::to_string(dim()));
  if (is_trivially_empty()) return true;
  if (Q.num_rows() == 0) return true;
  const Vector h = support_many(Q.A(), opt);
  if (std::isinf(h(0)) && h(0) < 0) return true;  // P is empty
  const double t = opt.tolerance() * std::max(scale(), Q.scale());
  for (Index i = 0; i < Q.num_rows(); ++i)
    if (!(h(i) <= Q.b()(i) + t)) return false;
  return true;
}

inline Polytope Polytope::intersect(const Polytope& Q) const {
  if (Q.dim() != dim())
    detail::invalid(
        "Q", "has dimension " + std::to_string(Q.dim()) + ", expected " + std::to_string(dim()));
  Matrix A(num_rows() + Q.num_rows(), dim());
  Vector b(A.rows());
  A << A_, Q.A();
  b << b_, Q.b();
  std::vector<Index> src = source_;
  for (Index s : Q.source_rows()) src.push_back(s < 0 ? s : s + caller_row_count());
  return with_sources(A, b, src, caller_row_count() + Q.caller_row_count());
}

inline Polytope Polytope::affine_image(const Matrix& M, const Vector& t) const {
  if (M.rows() != dim() || M.cols() != dim())
    detail::invalid("M", "must be square of size " + std::to_string(dim()) + ", got " +
                             std::to_string(M.rows()) + "x" + std::to_string(M.cols()));
  detail::require_finite(M, "M");
  Vector shift = t.size() == 0 ? Vector::Zero(dim()) : t;
  detail::require_length(shift, dim(), "t", "one entry per dimension");
  detail::require_finite(shift, "t");
  Eigen::FullPivLU<Eigen::MatrixXd> lu(M.transpose());
  if (!lu.isInvertible())
    detail::invalid("M", "is singular (numerical rank " + std::to_string(lu.rank()) + " of " +
                             std::to_string(dim()) + "); only invertible maps are supported");
  // y = M x + t  <=>  x = M^{-1}(y - t):  A M^{-1} y <= b + A M^{-1} t.
  const Matrix AMi = lu.solve(Eigen::MatrixXd(A_.transpose())).transpose();
  const Vector bb = b_ + AMi * shift;
  return with_sources(AMi, bb, source_, caller_row_count());
}

inline Polytope Polytope::preimage(const Matrix& M, const Vector& t) const {
  if (M.rows() != dim() || M.cols() < 1)
    detail::invalid("M", "must have " + std::to_string(dim()) +
                             " rows and at least one column, got " + std::to_string(M.rows()) +
                             "x" + std::to_string(M.cols()));
  detail::require_finite(M, "M");
  Vector shift = t.size() == 0 ? Vector::Zero(dim()) : t;
  detail::require_length(shift, dim(), "t", "one entry per dimension of the set");
  detail::require_finite(shift, "t");
  if (is_trivially_empty()) return empty(M.cols());
  const Matrix AM = A_ * M;
  const Vector bb = b_ - A_ * shift;
  return with_sources(AM, bb, source_, caller_row_count());
}

inline AffineHull Polytope::affine_hull(const Options& opt) const {
  AffineHull out;
  const Index n = dim(), m = num_rows();
  const double tol = opt.tolerance();
  const double t = tol * scale();
  if (is_trivially_empty()) detail::invalid("polytope", "the set is empty; it has no hull");
  out.E.resize(0, n);
  out.e.resize(0);
  if (m == 0) return out;
  // Rows in E hold with equality everywhere; the others get the slack r. While the best r is
  // 0, the rows of R with positive duals are implicit equalities (for feasible x,
  // Σ λ_i (b_i - a_i·x) = 0 with every term >= 0), so they move to E.
  std::vector<bool> in_e(static_cast<size_t>(m), false);
  Vector x;
  for (Index round = 0; round <= m; ++round) {
    Matrix L(m + 1, n + 1);
    Vector u(m + 1);
    L.topLeftCorner(m, n) = A_;
    for (Index i = 0; i < m; ++i) L(i, n) = in_e[static_cast<size_t>(i)] ? 0.0 : 1.0;
    u.head(m) = b_;
    L.row(m).setZero();
    L(m, n) = 1.0;
    u(m) = scale();
    Vector c = Vector::Zero(n + 1);
    c(n) = 1.0;
    auto solver = lp::make_solver(L, u, c, opt.backend);
    const lp::Result r = detail::solve_or_throw(*solver, "the affine hull");
    if (r.status != lp::Status::optimal)
      throw SolverError("affine_hull: unexpected LP status " +
                        std::string(lp::to_string(r.status)));
    x = r.x.head(n);
    const double radius = r.x(n);
    if (radius < -t) detail::invalid("polytope", "the set is empty; it has no hull");
    if (radius > t) break;
    bool moved = false;
    if (r.has_duals()) {
      const double ymax = r.duals.head(m).cwiseAbs().maxCoeff();
      for (Index i = 0; i < m; ++i)
        if (!in_e[static_cast<size_t>(i)] && r.duals(i) > std::sqrt(tol) * ymax) {
          in_e[static_cast<size_t>(i)] = true;
          moved = true;
        }
    }
    if (!moved) {  // no usable duals: take the rows tight at x
      for (Index i = 0; i < m; ++i)
        if (!in_e[static_cast<size_t>(i)] && b_(i) - A_.row(i).dot(x) <= t) {
          in_e[static_cast<size_t>(i)] = true;
          moved = true;
        }
    }
    if (!moved) break;
  }
  std::vector<Index> rows;
  for (Index i = 0; i < m; ++i)
    if (in_e[static_cast<size_t>(i)]) rows.push_back(i);
  out.rows = rows;
  if (rows.empty()) return out;
  Eigen::MatrixXd AE(static_cast<Index>(rows.size()), n);
  for (size_t k = 0; k < rows.size(); ++k) AE.row(static_cast<Index>(k)) = A_.row(rows[k]);
  Eigen::JacobiSVD<Eigen::MatrixXd> svd(AE, Eigen::ComputeFullV);
  const Vector sv = svd.singularValues();
  Index rank = 0;
  for (Index k = 0; k < sv.size(); ++k)
    if (sv(k) > std::sqrt(tol) * std::max(1.0, sv(0))) ++rank;
  out.E = svd.matrixV().leftCols(rank).transpose();
  out.e = out.E * x;
  return out;
}

}  // namespace corral
