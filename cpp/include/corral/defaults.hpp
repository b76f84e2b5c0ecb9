#pragma once
/// \file defaults.hpp
/// Process-wide defaults: the relative tolerance used when a call gives none. The default LP
/// backend lives with the LP layer (lp::default_backend / lp::set_default_backend).

#include <corral/errors.hpp>

#include <atomic>
#include <cmath>

namespace corral {

namespace detail {
inline std::atomic<double>& default_tol_storage() {
  static std::atomic<double> tol{1e-9};
  return tol;
}
}  // namespace detail

/// The process-wide relative tolerance (initially 1e-9). Thread safe.
inline double default_tol() { return detail::default_tol_storage().load(); }

/// Sets the process-wide relative tolerance; it must be finite and in (0, 0.1).
inline void set_default_tol(double tol) {
  if (!(std::isfinite(tol) && tol > 0.0 && tol < 0.1))
    detail::invalid("tol", "must be a finite number in (0, 0.1)");
  detail::default_tol_storage().store(tol);
}

}  // namespace corral
