#pragma once
/// \file detail/qhull.hpp
/// Entry point into qhull's reentrant library (compiled in cpp/src/qhull/qhull_hull.cpp; no
/// qhull type appears here): the convex hull of a point cloud by quickhull (Barber, Dobkin &
/// Huhdanpaa 1996). Only the combinatorics are returned, as point indices (facets and their
/// ridges); callers recompute every hyperplane from their own data and validate the result
/// (detail/hull_check.hpp). The configuration and the reasons for it are in the source file's
/// header comment.

#include <corral/types.hpp>

#include <string>
#include <vector>

namespace corral::detail {

/// Outcome of one qhull run on k points in R^n.
struct QhullRun {
  bool ok = false;      ///< qhull finished and its facets were read
  int exit_code = 0;    ///< qhull's exit code (0 on success; 1 input, 2 singular, 3 precision...)
  std::string message;  ///< qhull's first error line when !ok
  /// Facet f has the vertices facet_points[facet_start[f] .. facet_start[f + 1]) (row indices
  /// of the input): n of them for a simplicial facet, more for a facet qhull merged.
  std::vector<int> facet_start;
  std::vector<int> facet_points;
  /// Ridge entry r bounds facet ridge_owner[r] and has the n - 1 vertices ridge_points[r (n -
  /// 1) ..]. Every ridge is listed once by each of the two facets it separates; a merged facet
  /// lists its ridges as simplices, so several may separate the same two facets.
  std::vector<int> ridge_owner;
  std::vector<int> ridge_points;
  long merged_facets = 0;  ///< facets that qhull formed by merging

  Index num_facets() const {
    return facet_start.empty() ? 0 : static_cast<Index>(facet_start.size()) - 1;
  }
};

/// The options corral runs qhull with (after the mandatory "qhull " prefix): none, that is
/// qhull's defaults (see the source file).
const char* qhull_default_options();

/// The option sets tried in turn when a run fails or its answer does not validate: the
/// defaults first, then "C-0 Q12" (allows merges that qhull itself judges wide), then
/// "C-0 Q12 Q14" (also merges pinched vertices); the reasons and measurements are in the
/// source file.
const std::vector<std::string>& qhull_option_ladder();

/// Hull of the rows of `points` (k x n, n >= 2, finite; not checked here beyond n >= 2 and
/// k >= n + 1, which give exit code 1). qhull's messages go to a stream in memory, never to the
/// terminal; every qhull error is returned, never thrown, and qhull's setjmp/longjmp stays
/// inside one C-style frame of the wrapper. Thread-safe (one qhull instance per call).
/// `options`: qhull flags without the "qhull " prefix.
QhullRun qhull_hull(const Matrix& points, const std::string& options = qhull_default_options());

}  // namespace corral::detail
