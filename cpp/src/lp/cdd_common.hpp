#pragma once
// cddlib access shared by every file that calls it (DESIGN.md §4):
// - only libcddgmp is linked; it provides dd_* in GMP rationals (GMPRATIONAL) and ddf_* in double;
// - <gmp.h> comes before the extern "C" block with cddlib's headers;
// - dd_set_global_constants() and ddf_set_global_constants() run once;
// - cddlib has global state, so every call goes through one mutex (callers release the Python
//   GIL before taking it, and never call back into Python while holding it).

#include <mutex>

#include <gmp.h>
extern "C" {
#include <cddlib/setoper.h>
#include <cddlib/cdd.h>
#include <cddlib/cdd_f.h>
}

namespace corral::detail {

/// Takes the cddlib mutex, initialising cddlib's global constants on first use.
inline std::unique_lock<std::mutex> cdd_lock() {
  static std::mutex mutex;
  static std::once_flag once;
  std::unique_lock<std::mutex> lock(mutex);
  std::call_once(once, [] {
    dd_set_global_constants();
    ddf_set_global_constants();
  });
  return lock;
}

}  // namespace corral::detail
