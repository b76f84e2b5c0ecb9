#pragma once
/// \file enumeration.hpp
/// Vertex and facet enumeration (included by polytope.hpp).
///
/// Methods: quickhull (Barber, Dobkin & Huhdanpaa 1996) through qhull's reentrant library for
/// full-dimensional bounded sets in floating point; double description (Motzkin et al. 1953;
/// Fukuda & Prodon 1996) through cddlib, in double for what qhull does not take (sets of lower
/// dimension, n = 1) and in GMP rationals for exact=true and as the fallback.
///
/// The qhull path, for n >= 2:
/// - from_vertices(V): centre the points at their mean and divide each coordinate by its
///   largest deviation (the preconditioning affine map); a cloud whose width across its
///   least-squares hyperplane is at most tol in these coordinates is of lower dimension and
///   goes to cddlib. Otherwise qhull computes the hull, every facet is recomputed from the
///   original (preconditioned) points and validated (detail/hull_check.hpp), and mapped back.
/// - vertices(): the Chebyshev centre x0 is the interior point (radius <= tol * scale(): empty
///   or of lower dimension, cddlib). A vertex of {y : a_i·y <= s_i}, y = x - x0, s_i = b_i -
///   a_i·x0 > 0, is a facet of the hull of the polar points a_i / s_i, and the rows tight at
///   it are the polar points on that facet (polarity). qhull computes that hull (the polar
///   points centred and scaled per coordinate), every vertex is recomputed from its tight rows
///   by least squares and validated: each vertex satisfies every row, lies on rows of rank n,
///   and every edge has exactly two end vertices.
/// - Validation tolerance: Options::tolerance() (default 1e-9) as a distance in the
///   preconditioned coordinates: for from_vertices the centred points scaled to extent 1 per
///   coordinate; for vertices() the coordinates y = x - x0 multiplied per coordinate by the
///   polar points' extent (which makes the polar points of extent 1), and the tolerance
///   multiplied by the largest |vertex| in those coordinates.
/// - A qhull error or a failed check sends the call to the next of qhull's option sets
///   (detail::qhull_option_ladder: the defaults, "C-0 Q12", "C-0 Q12 Q14"), and when every one
///   fails, to exact cddlib (Info::method "cdd-exact", Info::fallbacks counts it). In vertices()
///   the exact vertices of the rows as given are then reduced at tolerance (vertices_at_tolerance):
///   rounded rows through a vertex in more than n facets do not meet in one point in exact
///   arithmetic, and their exact vertices include clusters and points on edges at rounding
///   distance. vertices(exact=true) and vertices_exact() return them unreduced.
/// - Unbounded sets raise UnboundedSetError in vertices() on every path.
///
/// Cost: qhull is output-sensitive (O(k log k) for n <= 3 on well-spread input, growing with
/// the number of facets above), validation O(m·v·n) for m rows and v vertices; cddlib is
/// output-sensitive at best, exponential in the dimension at worst. A single qhull or cddlib
/// call cannot be interrupted.

#include <corral/detail/cdd.hpp>
#include <corral/detail/hull_check.hpp>
#include <corral/detail/qhull.hpp>
#include <corral/polytope.hpp>
#include <corral/polytope_queries.hpp>

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <chrono>
#include <string>
#include <vector>

namespace corral {

namespace detail {

inline CddGenerators bounded_generators(const Polytope& P, bool exact, bool rationals) {
  if (P.num_rows() == 0)
    throw UnboundedSetError("polytope: has no rows (the whole space); no vertices");
  CddGenerators g = cdd_generators(P.A(), P.b(), exact, rationals);
  if (g.has_lines || g.rays.rows() > 0)
    throw UnboundedSetError("polytope: is unbounded (" + std::to_string(g.rays.rows()) +
                            " extreme rays or lines); vertices need a bounded set");
  return g;
}

/// The vertices, at tolerance, of {x : A x <= b} (unit rows) from its exact vertices V: a
/// point of V is kept when the rows within tol * scale of tight there have rank n (relative
/// pivot threshold tol), and points within tol * scale of a kept one (max norm) are merged
/// into it; scale = max(1, max |b_i|). Why: rows rounded to doubles that should meet in one
/// vertex (a vertex in more than n facets) generally do not meet in exact arithmetic, so the
/// exact vertices of the rounded rows include clusters of points within rounding of one
/// another and points in the middle of edges and faces (at rounding distance from them), a
/// list that can be hundreds of times longer than the polytope's vertices. At the points
/// dropped the tight rows span fewer than n directions, so they are not vertices at
/// tolerance; the ones merged are the same vertex at tolerance.
inline Matrix vertices_at_tolerance(const Matrix& A, const Vector& b, const Matrix& V, double tol) {
  const Index k = V.rows(), n = V.cols();
  if (k == 0) return V;
  const double scale = std::max(1.0, b.cwiseAbs().maxCoeff());
  const double t = tol * scale;
  std::vector<Index> kept;
  std::vector<Index> tight;
  for (Index p = 0; p < k; ++p) {
    const Vector slack = b - A * V.row(p).transpose();
    tight.clear();
    for (Index i = 0; i < A.rows(); ++i)
      if (slack(i) <= t) tight.push_back(i);
    if (static_cast<Index>(tight.size()) >= n && hull_check::rank_of(A, tight, tol) == n)
      kept.push_back(p);
  }
  // Merge: sweep in the order of the first coordinate; a point joins the first kept point
  // within t of it.
  std::sort(kept.begin(), kept.end(), [&](Index x, Index y) { return V(x, 0) < V(y, 0); });
  std::vector<Index> out;
  size_t window = 0;  // first index in `out` whose first coordinate may still be within t
  for (Index p : kept) {
    while (window < out.size() && V(out[window], 0) < V(p, 0) - t) ++window;
    bool merged = false;
    for (size_t q = window; q < out.size() && !merged; ++q)
      merged = (V.row(out[q]) - V.row(p)).cwiseAbs().maxCoeff() <= t;
    if (!merged) out.push_back(p);
  }
  std::sort(out.begin(), out.end());
  Matrix W(static_cast<Index>(out.size()), n);
  for (size_t j = 0; j < out.size(); ++j) W.row(static_cast<Index>(j)) = V.row(out[j]);
  return W;
}

/// Outcome of a floating-point enumeration through qhull.
struct QhullEnumeration {
  enum class Outcome { ok, lower_dimensional, failed };
  Outcome outcome = Outcome::failed;
  std::string failure;  ///< qhull's error text or the check that failed
  Matrix A;             ///< facets (from_vertices) ...
  Vector b;
  Matrix V;  ///< ... or vertices (vertices())
};

/// Facets of conv(rows of V) through qhull, validated (n >= 2, V finite). See the file comment.
inline QhullEnumeration qhull_facets(const Matrix& V, double tol,
                                     const std::string& options = qhull_default_options()) {
  QhullEnumeration out;
  const Index k = V.rows(), n = V.cols();
  if (k < n + 1) {
    out.outcome = QhullEnumeration::Outcome::lower_dimensional;
    return out;
  }
  // Preconditioning: centre at the mean, scale every coordinate to extent 1.
  const Eigen::RowVectorXd c = V.colwise().mean();
  Matrix W = V.rowwise() - c;
  const Eigen::RowVectorXd sigma = W.cwiseAbs().colwise().maxCoeff();
  if (!(sigma.minCoeff() > 0.0)) {
    out.outcome = QhullEnumeration::Outcome::lower_dimensional;
    return out;
  }
  W = W.array().rowwise() / sigma.array();
  // Width across the least-squares hyperplane (normal: the eigenvector of the smallest
  // eigenvalue of W^T W).
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(Eigen::MatrixXd(W.transpose() * W));
  const Vector normal = eig.eigenvectors().col(0);
  const Vector along = W * normal;
  if (along.maxCoeff() - along.minCoeff() <= tol) {
    out.outcome = QhullEnumeration::Outcome::lower_dimensional;
    return out;
  }
  const QhullRun run = qhull_hull(W, options);
  if (!run.ok) {
    out.failure = run.message;
    return out;
  }
  const PolarCheck chk = polar_vertices(W, Vector::Ones(k), run, PolarMode::facets, tol);
  if (!chk.ok) {
    out.failure = chk.failure;
    return out;
  }
  // Facet y·w <= 1 in the working coordinates; its offset is the largest value over the
  // points on it, so that every input point satisfies the row as computed. Mapped back with
  // w = (x - c) / sigma: (y / sigma)·x <= beta + (y / sigma)·c.
  const Index F = chk.objects.rows();
  out.A.resize(F, n);
  out.b.resize(F);
  for (Index g = 0; g < F; ++g) {
    const Vector y = chk.objects.row(g).transpose();
    double beta = -std::numeric_limits<double>::infinity();
    for (Index p : chk.tight[static_cast<size_t>(g)]) beta = std::max(beta, W.row(p).dot(y));
    const Eigen::RowVectorXd a = y.transpose().array() / sigma.array();
    out.A.row(g) = a;
    out.b(g) = beta + a.dot(c);
  }
  out.outcome = QhullEnumeration::Outcome::ok;
  return out;
}

/// Vertices of the full-dimensional {x : A x <= b} (unit rows) through qhull, validated, with
/// x0 strictly inside. See the file comment.
inline QhullEnumeration qhull_vertices(const Matrix& A, const Vector& b, const Vector& x0,
                                       double tol,
                                       const std::string& options = qhull_default_options()) {
  QhullEnumeration out;
  const Vector s = b - A * x0;
  if (!(s.minCoeff() > 0.0)) {
    out.failure = "the interior point is not strictly inside every row";
    return out;
  }
  // Polar points a_i / s_i, centred and scaled per coordinate for qhull (an affine map does
  // not change which points form a facet).
  Matrix D = A.array().colwise() / s.array();
  const Eigen::RowVectorXd mu = D.colwise().mean();
  D.rowwise() -= mu;
  const Eigen::RowVectorXd sigma = D.cwiseAbs().colwise().maxCoeff();
  if (!(sigma.minCoeff() > 0.0)) {
    out.failure = "the rows do not span R^n (the set is unbounded)";
    return out;
  }
  D = D.array().rowwise() / sigma.array();
  const QhullRun run = qhull_hull(D, options);
  if (!run.ok) {
    out.failure = run.message;
    return out;
  }
  // The same per-coordinate scaling, seen from the primal side: with z = y * sigma the polar
  // points become (a_i / sigma) / s_i, of extent 1 per coordinate. Vertices are recomputed
  // and validated in z, with the rows a_i / sigma normalised again.
  Matrix Az = A.array().rowwise() / sigma.array();
  Vector sz = s;
  for (Index i = 0; i < Az.rows(); ++i) {
    const double nr = Az.row(i).norm();
    Az.row(i) /= nr;
    sz(i) /= nr;
  }
  const PolarCheck chk = polar_vertices(Az, sz, run, PolarMode::vertices, tol);
  if (!chk.ok) {
    out.failure = chk.failure;
    return out;
  }
  out.V = (chk.objects.array().rowwise() / sigma.array()).matrix();
  out.V.rowwise() += x0.transpose();
  out.outcome = QhullEnumeration::Outcome::ok;
  return out;
}

}  // namespace detail

inline Matrix Polytope::vertices(bool exact, Info* info) const {
  const auto t0 = std::chrono::steady_clock::now();
  Info inf;
  auto finish = [&](Matrix V, const char* method) {
    inf.method = method;
    inf.seconds = detail::seconds_since(t0);
    if (info) *info = inf;
    return V;
  };
  if (is_trivially_empty()) return finish(Matrix(0, dim()), "");
  if (exact) return finish(detail::bounded_generators(*this, true, false).points, "cdd-exact");
  if (num_rows() == 0)
    throw UnboundedSetError("polytope: has no rows (the whole space); no vertices");
  const Index n = dim();
  if (n == 1) return finish(detail::bounded_generators(*this, false, false).points, "cdd");
  // Interior point: the Chebyshev centre (Boyd & Vandenberghe 2004, §8.5.1).
  const Options opt;
  auto solver =
      detail::chebyshev_solver(A_, b_, std::numeric_limits<double>::infinity(), opt.backend);
  const lp::Result r = detail::solve_or_throw(*solver, "the Chebyshev centre");
  inf.count_lp(static_cast<long>(num_rows()), r.fallbacks);
  if (r.status == lp::Status::unbounded)
    throw UnboundedSetError("polytope: contains balls of any radius; vertices need a bounded set");
  if (r.status != lp::Status::optimal)
    throw SolverError("vertices: unexpected LP status " + std::string(lp::to_string(r.status)) +
                      " of the Chebyshev centre");
  if (!(r.x(n) > opt.tolerance() * scale()))  // empty or of lower dimension
    return finish(detail::bounded_generators(*this, false, false).points, "cdd");
  if (num_rows() < n + 1)
    throw UnboundedSetError("polytope: " + std::to_string(num_rows()) + " rows cannot bound a " +
                            "full-dimensional set in R^" + std::to_string(n));
  std::string failures;
  for (const std::string& options : detail::qhull_option_ladder()) {
    const detail::QhullEnumeration q =
        detail::qhull_vertices(A_, b_, r.x.head(n), opt.tolerance(), options);
    if (q.outcome == detail::QhullEnumeration::Outcome::ok) return finish(q.V, "qhull");
    failures += (failures.empty() ? "" : "; ") + ("[" + options + "] " + q.failure);
  }
  // qhull failed or its answer did not validate: an unbounded set is one reason.
  if (!is_bounded(opt))
    throw UnboundedSetError("polytope: is unbounded; vertices need a bounded set");
  for (Index j = 0; j <= n; ++j) inf.count_lp(static_cast<long>(num_rows()));
  ++inf.fallbacks;
  try {
    const Matrix exact_vertices = detail::bounded_generators(*this, true, false).points;
    return finish(detail::vertices_at_tolerance(A_, b_, exact_vertices, opt.tolerance()),
                  "cdd-exact");
  } catch (const SolverError& e) {
    throw SolverError(std::string(e.what()) + " (after qhull: " + failures + ")");
  }
}

inline RationalMatrix Polytope::vertices_exact(Info* info) const {
  const auto t0 = std::chrono::steady_clock::now();
  RationalMatrix out;
  out.cols = dim();
  if (!is_trivially_empty()) out = detail::bounded_generators(*this, true, true).exact_points;
  if (info) {
    *info = Info{};
    info->method = is_trivially_empty() ? "" : "cdd-exact";
    info->seconds = detail::seconds_since(t0);
  }
  return out;
}

inline Polytope Polytope::from_vertices(const Matrix& V, bool exact, Info* info) {
  const auto t0 = std::chrono::steady_clock::now();
  if (V.cols() < 1) detail::invalid("V", "must have at least one column");
  detail::require_finite(V, "V");
  const Index n = V.cols();
  Info inf;
  auto finish = [&](Polytope P, const char* method) {
    inf.method = method;
    inf.seconds = detail::seconds_since(t0);
    if (info) *info = inf;
    return P;
  };
  if (V.rows() == 0) return finish(empty(n), "");
  auto cdd = [&](bool in_exact) {
    const detail::CddHull h = detail::cdd_hull(V, in_exact);
    Index m = 0;
    for (bool e : h.equality) m += e ? 2 : 1;
    Matrix A(m, n);
    Vector b(m);
    Index k = 0;
    for (Index i = 0; i < h.A.rows(); ++i) {
      A.row(k) = h.A.row(i);
      b(k++) = h.b(i);
      if (h.equality[static_cast<size_t>(i)]) {  // an equality: both directions
        A.row(k) = -h.A.row(i);
        b(k++) = -h.b(i);
      }
    }
    return Polytope(A, b);
  };
  if (exact) return finish(cdd(true), "cdd-exact");
  if (n == 1) return finish(cdd(false), "cdd");
  std::string failures;
  for (const std::string& options : detail::qhull_option_ladder()) {
    const detail::QhullEnumeration q = detail::qhull_facets(V, Options{}.tolerance(), options);
    if (q.outcome == detail::QhullEnumeration::Outcome::ok)
      return finish(Polytope(q.A, q.b), "qhull");
    if (q.outcome == detail::QhullEnumeration::Outcome::lower_dimensional)
      return finish(cdd(false), "cdd");
    failures += (failures.empty() ? "" : "; ") + ("[" + options + "] " + q.failure);
  }
  ++inf.fallbacks;
  try {
    return finish(cdd(true), "cdd-exact");
  } catch (const SolverError& e) {
    throw SolverError(std::string(e.what()) + " (after qhull: " + failures + ")");
  }
}

}  // namespace corral
