#pragma once
/// \file polytope.hpp
/// `Polytope`: a convex polyhedron in H-representation {x : A x <= b}.
///
/// Storage:
/// - rows are normalised to unit Euclidean norm on construction, in the order given;
/// - a zero row is dropped when b >= 0; when b < 0 the set is empty and is stored in the
///   canonical empty form: one zero row with right-hand side -1;
/// - source_rows()[k] is the caller's row index of stored row k (-1 for rows the library made).
/// - A set of lower dimension is stored like any other: each implicit equality is kept as the
///   inequality rows that force it (for instance a·x <= β and -a·x <= -β). irredundant() keeps
///   those rows (after removing duplicates) and removes the rows that are redundant inside the
///   affine hull; affine_hull() returns the hull as orthonormal equations.
///
/// Tolerances are relative: a query at tolerance tol allows an absolute slack of tol * scale(),
/// where scale() = max |b_i| (1 when every b_i is 0).

#include <corral/detail/validate.hpp>
#include <corral/lp/solver.hpp>
#include <corral/options.hpp>
#include <corral/rational.hpp>
#include <corral/types.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

namespace corral {

class Polytope;

/// A point inside a set and the radius of the largest ball around it (Chebyshev centre).
struct ChebyshevBall {
  Vector center;
  double radius = 0.0;
};

/// Result of redundancy removal: the irredundant set and what was removed.
struct RedundancyResult;

/// Implicit equalities of a set: {x : E x = e} is its affine hull (E orthonormal rows).
struct AffineHull {
  Matrix E;                 ///< orthonormal rows; 0 rows when the set is full-dimensional
  Vector e;                 ///< right-hand sides
  std::vector<Index> rows;  ///< stored rows that hold with equality on the whole set
};

class Polytope {
 public:
  /// The whole space R^n (no rows).
  explicit Polytope(Index n = 1) : A_(0, n), b_(0) {
    if (n < 1) detail::invalid("n", "the dimension must be at least 1");
  }

  /// {x : A x <= b}. Throws InvalidInputError for NaN / inf, mismatched shapes or 0 columns.
  Polytope(const Matrix& A, const Vector& b) {
    if (A.cols() < 1) detail::invalid("A", "must have at least one column");
    detail::require_length(b, A.rows(), "b", "one entry per row of A");
    detail::require_finite(A, "A");
    detail::require_finite(b, "b");
    init(A, b, nullptr);
  }

  /// {x : A x <= b} whose row i came from caller row sources[i] (no validation beyond shapes;
  /// used by routines that build sets from already validated data).
  static Polytope with_sources(const Matrix& A, const Vector& b, const std::vector<Index>& sources,
                               Index caller_rows) {
    Polytope P(A.cols() > 0 ? A.cols() : 1);
    P.init(A, b, &sources);
    P.caller_rows_ = caller_rows;
    return P;
  }

  /// {x : lower <= x <= upper}; an infinite bound adds no row. lower may not be +inf, upper
  /// may not be -inf, and lower <= upper entry by entry.
  static Polytope box(const Vector& lower, const Vector& upper) {
    if (lower.size() < 1) detail::invalid("lower", "must have at least one entry");
    detail::require_length(upper, lower.size(), "upper", "one entry per entry of lower");
    const Index n = lower.size();
    Matrix A(2 * n, n);
    Vector b(2 * n);
    Index k = 0;
    A.setZero();
    for (Index j = 0; j < n; ++j) {
      if (std::isnan(lower(j))) detail::invalid("lower", "NaN at entry " + std::to_string(j));
      if (std::isnan(upper(j))) detail::invalid("upper", "NaN at entry " + std::to_string(j));
      if (lower(j) == std::numeric_limits<double>::infinity())
        detail::invalid("lower", "+inf at entry " + std::to_string(j));
      if (upper(j) == -std::numeric_limits<double>::infinity())
        detail::invalid("upper", "-inf at entry " + std::to_string(j));
      if (lower(j) > upper(j))
        detail::invalid("lower", "entry " + std::to_string(j) + " (" + std::to_string(lower(j)) +
                                     ") is above upper (" + std::to_string(upper(j)) + ")");
    }
    for (Index j = 0; j < n; ++j)
      if (std::isfinite(upper(j))) {
        A(k, j) = 1.0;
        b(k++) = upper(j);
      }
    for (Index j = 0; j < n; ++j)
      if (std::isfinite(lower(j))) {
        A(k, j) = -1.0;
        b(k++) = -lower(j);
      }
    Polytope P(A.topRows(k), b.head(k));
    return P;
  }

  /// The standard simplex {x >= 0, sum x <= 1} in R^n.
  static Polytope simplex(Index n) {
    if (n < 1) detail::invalid("n", "must be at least 1");
    Matrix A = Matrix::Zero(n + 1, n);
    Vector b = Vector::Zero(n + 1);
    for (Index j = 0; j < n; ++j) A(j, j) = -1.0;
    A.row(n).setOnes();
    b(n) = 1.0;
    return Polytope(A, b);
  }

  /// The empty set in R^n (canonical form: one row 0·x <= -1).
  static Polytope empty(Index n) {
    if (n < 1) detail::invalid("n", "must be at least 1");
    Polytope P(n);
    P.A_ = Matrix::Zero(1, n);
    P.caller_rows_ = 0;
    P.b_ = Vector::Constant(1, -1.0);
    P.source_.assign(1, -1);
    return P;
  }

  /// Convex hull of the rows of V (k points in R^n) as its facets, each once (irredundant).
  /// A full-dimensional hull in floating point (n >= 2) comes from qhull (quickhull, Barber,
  /// Dobkin & Huhdanpaa 1996), validated, with exact cddlib as the fallback; a hull of lower
  /// dimension, n = 1 and exact=true (GMP rationals) use double description through cddlib
  /// and store the hull's equalities as pairs of opposite rows (see enumeration.hpp).
  /// Repeated points and points inside the hull are allowed. info (may be null) receives
  /// method ("qhull", "cdd", "cdd-exact"; empty for no points), fallbacks and seconds.
  static Polytope from_vertices(const Matrix& V, bool exact = false, Info* info = nullptr);

  // --- data -------------------------------------------------------------------------------
  const Matrix& A() const { return A_; }
  const Vector& b() const { return b_; }
  Index dim() const { return A_.cols(); }
  Index num_rows() const { return A_.rows(); }
  /// Caller's row index of each stored row (-1 for rows the library made).
  const std::vector<Index>& source_rows() const { return source_; }
  /// max |b_i|, or 1 when all are 0: the scale relative tolerances refer to.
  double scale() const {
    const double s = b_.size() > 0 ? b_.cwiseAbs().maxCoeff() : 0.0;
    return s > 0.0 ? s : 1.0;
  }
  /// True when stored in the canonical empty form (found empty without an LP).
  bool is_trivially_empty() const { return A_.rows() == 1 && b_(0) < 0 && A_.row(0).isZero(0.0); }

  // --- queries (one LP or none) -------------------------------------------------------------
  /// Whether x (length dim()) satisfies every row within tol * scale().
  bool contains(const Vector& x, double tol = 0.0) const {
    detail::require_length(x, dim(), "x", "one entry per dimension of the set");
    detail::require_finite(x, "x");
    const double t = (tol > 0 ? tol : default_tol()) * scale();
    for (Index i = 0; i < A_.rows(); ++i)
      if (A_.row(i).dot(x) - b_(i) > t) return false;
    return true;
  }

  /// contains() for each row of X (k points); returns k booleans.
  std::vector<bool> contains_points(const Matrix& X, double tol = 0.0) const {
    if (X.cols() != dim())
      detail::invalid(
          "x", "has " + std::to_string(X.cols()) + " columns, expected " + std::to_string(dim()));
    detail::require_finite(X, "x");
    const double t = (tol > 0 ? tol : default_tol()) * scale();
    std::vector<bool> out(static_cast<size_t>(X.rows()));
    for (Index k = 0; k < X.rows(); ++k) {
      bool in = true;
      for (Index i = 0; i < A_.rows() && in; ++i) in = A_.row(i).dot(X.row(k)) - b_(i) <= t;
      out[static_cast<size_t>(k)] = in;
    }
    return out;
  }

  /// Chebyshev centre (Boyd & Vandenberghe 2004, §8.5.1): max r s.t. a_i·x + r <= b_i (rows
  /// have unit norm). Throws InvalidInputError if the set is empty and UnboundedSetError if the
  /// ball is unbounded. A set of lower dimension gives radius 0 and a point of the set.
  ChebyshevBall chebyshev_center(const Options& opt = {}) const;

  /// Whether the set is empty (one LP: the capped Chebyshev LP).
  bool is_empty(const Options& opt = {}) const;

  /// Whether the set is bounded (the empty set is). n+1 LPs over the set, directions
  /// e_1..e_n and -(e_1+...+e_n), which span R^n positively.
  bool is_bounded(const Options& opt = {}) const;

  /// Support function h(d) = max d·x over the set: +inf if unbounded, -inf if empty.
  double support(const Vector& d, const Options& opt = {}) const;

  /// Support function for each row of D (k directions); one incremental LP per direction.
  Vector support_many(const Matrix& D, const Options& opt = {}) const;

  /// Smallest box containing the set: (lower, upper), with ±inf where unbounded. Throws
  /// InvalidInputError if the set is empty.
  std::pair<Vector, Vector> bounding_box(const Options& opt = {}) const;

  /// P ⊆ Q, one LP per row of Q (Boyd & Vandenberghe 2004). The empty set is a subset of all.
  bool is_subset(const Polytope& Q, const Options& opt = {}) const;

  /// P ⊆ Q and Q ⊆ P.
  bool same_set(const Polytope& Q, const Options& opt = {}) const {
    return is_subset(Q, opt) && Q.is_subset(*this, opt);
  }

  // --- set operations ----------------------------------------------------------------------
  /// P ∩ Q: the rows of both (source rows of Q are offset by P's caller row count).
  Polytope intersect(const Polytope& Q) const;

  /// {M x + t : x ∈ P} for an invertible square M. Throws InvalidInputError if M is singular.
  Polytope affine_image(const Matrix& M, const Vector& t = Vector()) const;

  /// {x : M x + t ∈ P} for any M with dim() rows.
  Polytope preimage(const Matrix& M, const Vector& t = Vector()) const;

  // --- redundancy, hull, enumeration ---------------------------------------------------------
  /// The same set without redundant rows (see redundancy.hpp). exact: cddlib in GMP rationals.
  Polytope irredundant(const Options& opt = {}, bool exact = false, Info* info = nullptr) const;

  /// Caller's row indices of the redundant rows (see redundancy.hpp).
  std::vector<Index> redundant_rows(const Options& opt = {}, bool exact = false,
                                    Info* info = nullptr) const;

  /// Implicit equalities: rows tight on the whole set, and the affine hull as
  /// orthonormal equations. Throws InvalidInputError if the set is empty.
  AffineHull affine_hull(const Options& opt = {}) const;

  /// Vertices, each once, one per row. A full-dimensional set in floating point (n >= 2):
  /// qhull on the polar of the set about its Chebyshev centre, validated, with exact cddlib as
  /// the fallback; sets of lower dimension and n = 1: double description through cddlib in
  /// double; exact=true: cddlib in GMP rationals (see enumeration.hpp). Throws
  /// UnboundedSetError if the set is unbounded; an empty set gives 0 rows. info (may be null)
  /// receives method ("qhull", "cdd", "cdd-exact"; empty for the canonical empty set),
  /// fallbacks (answers redone by exact cddlib, plus LP re-solves), LP counts and seconds.
  Matrix vertices(bool exact = false, Info* info = nullptr) const;

  /// Vertices in exact rationals (cddlib, GMP). Throws UnboundedSetError if unbounded.
  /// info (may be null) receives method "cdd-exact" and seconds.
  RationalMatrix vertices_exact(Info* info = nullptr) const;

  /// Projection onto the coordinates `dims`, kept in that order (projection.hpp).
  Polytope project(const std::vector<Index>& dims, const std::string& method = "auto",
                   const Options& opt = {}, Info* info = nullptr) const;

  /// Builds a polytope from already normalised rows and their sources (no re-normalisation).
  static Polytope from_normalized(Matrix A, Vector b, std::vector<Index> source,
                                  Index caller_rows = -1) {
    Polytope P(A.cols() > 0 ? A.cols() : 1);
    P.A_ = std::move(A);
    P.b_ = std::move(b);
    P.source_ = std::move(source);
    P.caller_rows_ = caller_rows >= 0 ? caller_rows : P.A_.rows();
    return P;
  }

  /// Number of caller rows this set was built from (source rows range over [0, count)).
  Index caller_row_count() const { return caller_rows_; }

 private:
  void init(const Matrix& A, const Vector& b, const std::vector<Index>* sources) {
    const Index m = A.rows(), n = A.cols();
    caller_rows_ = m;
    A_.resize(m, n);
    b_.resize(m);
    source_.clear();
    Index k = 0;
    for (Index i = 0; i < m; ++i) {
      const double s = A.row(i).stableNorm();
      const Index src = sources ? (*sources)[static_cast<size_t>(i)] : i;
      if (!(s > 0.0)) {
        if (b(i) >= 0.0) continue;  // 0·x <= b with b >= 0: always true, dropped
        A_ = Matrix::Zero(1, n);    // 0·x <= b with b < 0: the set is empty
        b_ = Vector::Constant(1, -1.0);
        source_.assign(1, src);
        return;
      }
      A_.row(k) = A.row(i) / s;
      b_(k) = b(i) / s;
      source_.push_back(src);
      ++k;
    }
    A_.conservativeResize(k, n);
    b_.conservativeResize(k);
  }

  Matrix A_;
  Vector b_;
  std::vector<Index> source_;
  Index caller_rows_ = 0;
};

/// P ∩ Q.
inline Polytope operator&(const Polytope& P, const Polytope& Q) { return P.intersect(Q); }

}  // namespace corral

#include <corral/enumeration.hpp>
#include <corral/polytope_queries.hpp>
#include <corral/redundancy.hpp>
