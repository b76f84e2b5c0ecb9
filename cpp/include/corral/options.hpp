#pragma once
/// \file options.hpp
/// Per-call options, progress reports and work reports shared by the routines of corral.

#include <corral/defaults.hpp>

#include <chrono>
#include <functional>
#include <string>

namespace corral {

/// What a long routine reports to its progress callback.
struct Progress {
  std::string stage;   ///< e.g. "redundancy", "implicit equalities"
  long done = 0;       ///< rows (or steps) decided so far
  long total = 0;      ///< rows (or steps) to decide
  long lp_solves = 0;  ///< LPs solved so far
};

/// Progress callback: return false to cancel (the routine then throws CancelledError).
using ProgressCallback = std::function<bool(const Progress&)>;

/// Options every routine takes. Zero / empty fields mean "use the process default".
struct Options {
  /// LP backend name (see lp::backends()); empty: lp::default_backend().
  std::string backend;
  /// Relative tolerance: absolute slack = tol * the set's scale (max |b_i|); 0: default_tol().
  double tol = 0.0;
  /// Called between LP solves; may be empty.
  ProgressCallback progress;

  double tolerance() const { return tol > 0.0 ? tol : default_tol(); }
};

/// Work done by a routine, returned on request (return_info).
struct Info {
  long lp_solves = 0;       ///< LPs solved
  double mean_lp_rows = 0;  ///< mean number of rows per LP
  double seconds = 0;       ///< wall-clock time
  long fallbacks = 0;       ///< answers re-solved by another backend after failing verification
  std::string method;       ///< which method produced the result

  /// Records one LP of `rows` rows whose answer took `fallback_solves` re-solves.
  void count_lp(long rows, int fallback_solves = 0) {
    fallbacks += fallback_solves;
    mean_lp_rows = (mean_lp_rows * static_cast<double>(lp_solves) + static_cast<double>(rows)) /
                   static_cast<double>(lp_solves + 1);
    ++lp_solves;
  }

  /// Adds the LPs and fallbacks of a part of the work (its time and method stay out).
  void add(const Info& part) {
    const double rows = mean_lp_rows * static_cast<double>(lp_solves) +
                        part.mean_lp_rows * static_cast<double>(part.lp_solves);
    lp_solves += part.lp_solves;
    fallbacks += part.fallbacks;
    mean_lp_rows = lp_solves ? rows / static_cast<double>(lp_solves) : 0.0;
  }
};

namespace detail {
/// Wall-clock seconds since t0 (for Info::seconds and the results' `seconds`).
inline double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}
}  // namespace detail

/// Thrown when a progress callback returns false.
class CancelledError : public CorralError {
 public:
  CancelledError() : CorralError("cancelled by the progress callback") {}
};

namespace detail {
/// Calls `progress` (when set) with one report; throws CancelledError when it returns false.
/// Routines call it between LP solves, which is also where Python's Ctrl-C is noticed.
inline void report_progress(const ProgressCallback& progress, const char* stage, long done,
                            long total, long lp_solves) {
  if (!progress) return;
  Progress p;
  p.stage = stage;
  p.done = done;
  p.total = total;
  p.lp_solves = lp_solves;
  if (!progress(p)) throw CancelledError();
}
}  // namespace detail

}  // namespace corral
