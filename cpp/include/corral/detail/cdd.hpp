#pragma once
/// \file detail/cdd.hpp
/// Entry points into cddlib (compiled in cpp/src/cdd/cdd_polytope.cpp; no cddlib type appears
/// here). Every call takes the cddlib mutex. Exact variants work in GMP rationals on the exact
/// values of the given doubles.

#include <corral/rational.hpp>
#include <corral/types.hpp>

#include <vector>

namespace corral::detail {

/// Generators of {x : A x <= b} by double description (Motzkin et al. 1953; Fukuda & Prodon
/// 1996). rays include both directions of every line. An empty set gives no points.
struct CddGenerators {
  Matrix points;
  Matrix rays;
  bool has_lines = false;
  RationalMatrix exact_points;  ///< filled when rationals were asked for
};
CddGenerators cdd_generators(const Matrix& A, const Vector& b, bool exact, bool rationals);

/// Facets of the convex hull of the rows of V: rows [A | b] of A x <= b; equality[i] marks
/// rows of the affine hull (A_i x = b_i).
struct CddHull {
  Matrix A;
  Vector b;
  std::vector<bool> equality;
};
CddHull cdd_hull(const Matrix& V, bool exact);

/// Row indices into A: implicit equalities, and redundant rows among the others.
struct CddCanonical {
  std::vector<Index> redundant;
  std::vector<Index> equalities;
};
/// Implicit equalities, then one redundancy LP per other row (cddlib's LP routines).
CddCanonical cdd_redundancy(const Matrix& A, const Vector& b, bool exact);
/// cddlib's own canonicalisation (a baseline for benchmarks): rows it removes or merges are
/// `redundant` (a row merged into an equality counts there too).
CddCanonical cdd_canonicalize(const Matrix& A, const Vector& b, bool exact);

/// cddlib's floating-point redundancy test by ray shooting (a baseline for benchmarks).
std::vector<Index> cdd_redundant_rows_via_shooting(const Matrix& A, const Vector& b);

}  // namespace corral::detail
