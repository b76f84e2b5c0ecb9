#pragma once
/// \file projection.hpp
/// Projection of P = {x : A x <= b} onto some of its coordinates:
/// proj(P) = {y : (y, w) in P for some w}, y the kept coordinates in the order given.
///
/// Methods:
/// - "fourier-motzkin": Fourier–Motzkin elimination (Fourier 1827; Motzkin 1936), one
///   coordinate at a time, the one whose elimination makes the fewest new rows first
///   (|pos| * |neg| - |pos| - |neg|, common practice); after each elimination the rows are
///   normalised and the redundant ones removed (remove_redundancy, LPs), which keeps the
///   intermediate sets small. Works for unbounded and lower-dimensional sets.
/// - "vertices": the vertices of P (qhull or cddlib, enumeration.hpp), their kept
///   coordinates, and the facets of their convex hull (from_vertices). Bounded sets only
///   (UnboundedSetError otherwise).
/// - "auto": "vertices" when P is bounded, has dimension n <= 8, at most 10 n irredundant rows
///   and at least 3 coordinates are eliminated; "fourier-motzkin" otherwise. Measured in
///   benchmarks/bench_dual_mode.py: on random polytopes the vertex route wins once several
///   coordinates go (8-D, 40 rows onto 2-D: 0.017 s against 7 s), while the lifted sets of
///   pre-sets (many rows, one or two inputs eliminated) have so many vertices that
///   Fourier–Motzkin wins by far (7-D, 110 rows, one input: 0.012 s against 8 s).
/// The result is irredundant. An empty P gives the empty set.

#include <corral/enumeration.hpp>
#include <corral/polytope.hpp>
#include <corral/polytope_queries.hpp>
#include <corral/redundancy.hpp>

#include <chrono>
#include <string>
#include <vector>

namespace corral {

namespace detail {

/// Checks `dims` against dimension n: in range, no repeats, at least one.
inline void require_dims(const std::vector<Index>& dims, Index n) {
  if (dims.empty()) invalid("dims", "must name at least one coordinate to keep");
  std::vector<bool> seen(static_cast<size_t>(n), false);
  for (Index d : dims) {
    if (d < 0 || d >= n)
      invalid("dims", "coordinate " + std::to_string(d) + " is out of range [0, " +
                          std::to_string(n) + ")");
    if (seen[static_cast<size_t>(d)])
      invalid("dims", "coordinate " + std::to_string(d) + " is repeated");
    seen[static_cast<size_t>(d)] = true;
  }
}

/// One Fourier–Motzkin step on {x : A x <= b}: eliminates column k (the column is removed).
/// Rows with a zero coefficient stay; every pair of a positive and a negative coefficient
/// gives |a_qk| row_p + a_pk row_q. A combination that cancels to rounding level (norm below
/// 1e-10 of the norms combined: nearly opposite rows) is 0·x <= β: dropped when β >= 0 (to
/// rounding), kept
/// as a zero row (an empty set) otherwise. Kept, it would be normalised to a row of noise with
/// a huge right-hand side, which inflates the set's scale and with it every tolerance.
inline void fourier_motzkin_step(Matrix& A, Vector& b, Index k) {
  const Index m = A.rows(), n = A.cols();
  std::vector<Index> pos, neg, zero;
  for (Index i = 0; i < m; ++i) {
    const double a = A(i, k);
    (a > 0.0 ? pos : a < 0.0 ? neg : zero).push_back(i);
  }
  const Index rows = static_cast<Index>(zero.size() + pos.size() * neg.size());
  Matrix out(rows, n - 1);
  Vector ob(rows);
  auto drop_column = [&](const Eigen::RowVectorXd& r, Index at) {
    out.row(at).head(k) = r.head(k);
    out.row(at).tail(n - 1 - k) = r.tail(n - 1 - k);
  };
  Index at = 0;
  for (Index i : zero) {
    drop_column(A.row(i), at);
    ob(at++) = b(i);
  }
  for (Index p : pos)
    for (Index q : neg) {
      const double wp = -A(q, k), wq = A(p, k);
      Eigen::RowVectorXd row = wp * A.row(p) + wq * A.row(q);
      row(k) = 0.0;
      const double rhs = wp * b(p) + wq * b(q);
      const double size = wp * A.row(p).norm() + wq * A.row(q).norm();
      if (row.norm() <= 1e-10 * size) {
        if (rhs >= -1e-10 * (wp * std::abs(b(p)) + wq * std::abs(b(q)))) continue;
        row.setZero();
      }
      drop_column(row, at);
      ob(at++) = rhs;
    }
  out.conservativeResize(at, n - 1);
  ob.conservativeResize(at);
  A = std::move(out);
  b = std::move(ob);
}

/// Rows created by eliminating column k of A.
inline double fourier_motzkin_growth(const Matrix& A, Index k) {
  double p = 0, q = 0;
  for (Index i = 0; i < A.rows(); ++i) {
    if (A(i, k) > 0.0) ++p;
    if (A(i, k) < 0.0) ++q;
  }
  return p * q - p - q;
}

}  // namespace detail

/// Projection onto the coordinates `dims` (kept in that order) by `method` ("auto",
/// "fourier-motzkin" or "vertices"; see the file comment). `opt.progress` is called per
/// eliminated coordinate (stage "projection") and inside the redundancy passes. With `info`,
/// reports LPs, time and the method used. Throws InvalidInputError for bad dims or method,
/// UnboundedSetError for "vertices" on an unbounded set.
inline Polytope project(const Polytope& P, const std::vector<Index>& dims,
                        const std::string& method = "auto", const Options& opt = {},
                        Info* info = nullptr) {
  const auto t0 = std::chrono::steady_clock::now();
  const Index n = P.dim();
  detail::require_dims(dims, n);
  if (method != "auto" && method != "fourier-motzkin" && method != "vertices")
    detail::invalid(
        "method", "must be \"auto\", \"fourier-motzkin\" or \"vertices\", got \"" + method + "\"");
  const Index k = static_cast<Index>(dims.size());
  Info work;
  auto finish = [&](Polytope out, const char* used) {
    work.seconds = detail::seconds_since(t0);
    work.method = used;
    if (info) *info = work;
    return out;
  };
  if (P.is_trivially_empty()) return finish(Polytope::empty(k), "none");
  // Reduce P first: fewer rows to pair, and emptiness decided.
  RedundancyResult first = remove_redundancy(P, opt);
  work.add(first.info);
  if (first.empty) return finish(Polytope::empty(k), "none");
  const Polytope& R = first.set;

  bool use_vertices = method == "vertices";
  if (method == "auto" && n <= 8 && n - k >= 3 && R.num_rows() <= 10 * n) {
    const bool bounded = R.is_bounded(opt);
    work.lp_solves += n + 1;  // is_bounded: n + 1 support LPs (a simplex of directions)
    use_vertices = bounded;
  }
  if (use_vertices) {
    Info vi;
    const Matrix V = R.vertices(false, &vi);  // UnboundedSetError when unbounded
    work.add(vi);
    Matrix W(V.rows(), k);
    for (Index j = 0; j < k; ++j) W.col(j) = V.col(dims[static_cast<size_t>(j)]);
    Info hi;
    Polytope out = Polytope::from_vertices(W, false, &hi);
    work.add(hi);
    return finish(out, "vertices");
  }

  // Fourier–Motzkin on the columns (kept first, in order; eliminated after).
  Matrix A(R.num_rows(), n);
  std::vector<bool> kept(static_cast<size_t>(n), false);
  for (Index j = 0; j < k; ++j) {
    A.col(j) = R.A().col(dims[static_cast<size_t>(j)]);
    kept[static_cast<size_t>(dims[static_cast<size_t>(j)])] = true;
  }
  Index at = k;
  for (Index c = 0; c < n; ++c)
    if (!kept[static_cast<size_t>(c)]) A.col(at++) = R.A().col(c);
  Vector b = R.b();
  for (Index done = 0; done < n - k; ++done) {
    detail::report_progress(opt.progress, "projection", done, n - k, work.lp_solves);
    Index best = k;
    double growth = detail::fourier_motzkin_growth(A, k);
    for (Index c = k + 1; c < A.cols(); ++c) {
      const double g = detail::fourier_motzkin_growth(A, c);
      if (g < growth) {
        growth = g;
        best = c;
      }
    }
    detail::fourier_motzkin_step(A, b, best);
    RedundancyResult step = remove_redundancy(Polytope(A, b), opt);
    work.add(step.info);
    if (step.empty) return finish(Polytope::empty(k), "fourier-motzkin");
    A = step.set.A();
    b = step.set.b();
  }
  return finish(Polytope(A, b), "fourier-motzkin");
}

inline Polytope Polytope::project(const std::vector<Index>& dims, const std::string& method,
                                  const Options& opt, Info* info) const {
  return corral::project(*this, dims, method, opt, info);
}

}  // namespace corral
