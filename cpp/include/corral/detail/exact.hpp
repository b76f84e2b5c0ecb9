#pragma once
/// \file detail/exact.hpp
/// Exact (GMP rational) worst margin of a family of rows over a polytope, compiled in
/// cpp/src/exact/exact_margins.cpp; no GMP type appears here.
///
/// For S = {x : F x <= t} and rows c_j·x <= d_j with c_j = G_j A (the product formed exactly)
/// or c_j = G_j (A null), the margin of row j is d_j - max{c_j·x : x in S}. Every double is
/// taken at its exact value; floating point only suggests where to look. Per row:
/// - support: a floating-point LP gives an optimiser and duals λ on a support P. The exact
///   c_j - λᵀ F_P (of the order of rounding, invisible to that LP) decides which vertex of the
///   optimal face {F_P x = t_P} is optimal, so it is maximised over that face by a second
///   floating-point LP. The n rows nearest to tight there (independent) are the start basis;
/// - exact solve: a simplex method in GMP integers and rationals from that basis: the vertex
///   is solved exactly (fraction-free elimination, Bareiss 1968) and checked feasible for
///   every row; multipliers are solved exactly and their signs decide optimality; Bland's
///   rule (1977) on both choices, so it cannot cycle. Started at the right vertex it pivots
///   rarely (none on the random admissible sets we measured, n = 2..24);
/// - bounds: where the start is singular or infeasible, an exact LP (cddlib, GMP, exact
///   objective) over a relaxation of S (the nearly tight rows, more while unbounded) bounds the
///   margin from below. The smallest bound is then checked: rows its optimiser violates join
///   the relaxation until it is exact. Every other margin is at least its bound, so the
///   minimum is the exact worst margin.

#include <corral/options.hpp>
#include <corral/rational.hpp>
#include <corral/types.hpp>

#include <vector>

namespace corral::detail {

/// Outcome of exact_worst_margin().
struct ExactWorstMargin {
  /// optimal: `margin` is the exact minimum margin, attained at `row`;
  /// unbounded: some c_j·x is unbounded above on S (`row`), the margin is -inf;
  /// empty: S is empty, every margin is +inf; no_rows: there were no rows to check.
  enum class Status { optimal, unbounded, empty, no_rows } status = Status::no_rows;
  Rational margin;               ///< the exact worst margin when status is optimal
  Index row = -1;                ///< row of the worst margin
  long exact_lps = 0;            ///< rows settled by an exact LP
  long exact_solves = 0;         ///< rows solved by the exact simplex
  long pivots = 0;               ///< exact simplex pivots
  long primal_checks = 0;        ///< exact primal points formed to confirm a bound
  bool nonnegative = false;      ///< every margin >= 0 exactly
  bool meets_threshold = false;  ///< every margin >= `threshold` exactly
};

/// Exact worst margin of the rows (G, d) (c_j = G_j A when A is given) over S = {F x <= t}.
/// `supports[j]` lists candidate support rows for row j (may be empty or wrong: the exact LP
/// then decides). `threshold` is compared exactly with the worst margin. `opt.progress` is called
/// once per row (stage "exact"); returning false throws CancelledError. `opt.backend` solves the
/// floating-point LP that suggests a vertex.
ExactWorstMargin exact_worst_margin(const Matrix& F, const Vector& t, const Matrix& G,
                                    const Matrix* A, const Vector& d,
                                    const std::vector<std::vector<Index>>& supports,
                                    double threshold, const Options& opt);

}  // namespace corral::detail
