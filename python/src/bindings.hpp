#pragma once
// Shared declarations of the bindings: one registration function per concept, and the
// conversions from Python objects to the library's dense types with argument-named errors.

#include <pybind11/eigen.h>
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <corral/corral.hpp>

#include <chrono>
#include <memory>
#include <string>

namespace corral::python {

namespace py = pybind11;

void register_errors(py::module_& m);
void register_lp(py::module_& m);
void register_polytope(py::module_& m);
void register_control(py::module_& m);
void register_design(py::module_& m);

/// Converts to a float64 numpy array of the given number of dimensions, or throws
/// InvalidInputError naming the argument.
inline py::array_t<double, py::array::c_style | py::array::forcecast> to_array(py::handle obj,
                                                                               const char* name,
                                                                               int ndim) {
  // Only numbers: numpy would also turn strings such as "1" into floats.
  py::array raw = py::array::ensure(obj);
  if (!raw) {
    PyErr_Clear();
    corral::detail::invalid(name, "must be an array of real numbers");
  }
  const char kind = raw.dtype().kind();
  if (kind != 'b' && kind != 'i' && kind != 'u' && kind != 'f')
    corral::detail::invalid(name, "must be an array of real numbers");
  auto arr = py::array_t<double, py::array::c_style | py::array::forcecast>::ensure(raw);
  if (!arr) {
    PyErr_Clear();
    corral::detail::invalid(name, "must be an array of real numbers");
  }
  if (arr.ndim() != ndim)
    corral::detail::invalid(
        name, "must be " + std::to_string(ndim) + "-D, got " + std::to_string(arr.ndim()) + "-D");
  return arr;
}

inline Matrix to_matrix(py::handle obj, const char* name) {
  auto arr = to_array(obj, name, 2);
  Matrix M(arr.shape(0), arr.shape(1));
  std::copy(arr.data(), arr.data() + arr.size(), M.data());
  return M;
}

inline Vector to_vector(py::handle obj, const char* name) {
  auto arr = to_array(obj, name, 1);
  Vector v(arr.shape(0));
  std::copy(arr.data(), arr.data() + arr.size(), v.data());
  return v;
}

/// The backend keyword: None means the process default; otherwise a known backend name.
inline std::string backend_arg(py::handle obj) {
  if (obj.is_none()) return "";
  if (!py::isinstance<py::str>(obj))
    corral::detail::invalid("backend", "must be a string naming a backend, or None");
  std::string name = obj.cast<std::string>();
  lp::capabilities(name);  // throws InvalidInputError naming the argument for unknown names
  return name;
}

/// The tol keyword: None means the process default; otherwise a number in (0, 0.1).
inline double tol_arg(py::handle obj) {
  if (obj.is_none()) return 0.0;
  double tol = 0.0;
  try {
    tol = py::float_(py::reinterpret_borrow<py::object>(obj)).cast<double>();
  } catch (py::error_already_set&) {
    corral::detail::invalid("tol", "must be a number");
  }
  if (py::isinstance<py::str>(obj)) corral::detail::invalid("tol", "must be a number");
  if (!(std::isfinite(tol) && tol > 0.0 && tol < 0.1))
    corral::detail::invalid("tol", "must be a finite number in (0, 0.1)");
  return tol;
}

/// Info as a dict (the Python side makes it a corral.Info).
inline py::dict info_dict(const Info& info) {
  py::dict d;
  d["lp_solves"] = info.lp_solves;
  d["mean_lp_rows"] = info.mean_lp_rows;
  d["seconds"] = info.seconds;
  d["fallbacks"] = info.fallbacks;
  d["method"] = info.method;
  return d;
}

/// A Polytope argument of dimension `dim`; None is the whole space when `optional`.
inline Polytope polytope_arg(py::handle obj, Index dim, const char* name, bool optional) {
  if (obj.is_none()) {
    if (!optional) detail::invalid(name, "must be a Polytope, got None");
    return Polytope(dim);
  }
  if (!py::isinstance<Polytope>(obj)) detail::invalid(name, "must be a Polytope");
  return obj.cast<Polytope>();
}

/// An exact rational as a Python fractions.Fraction.
inline py::object to_fraction(const Rational& q) {
  static py::object Fraction = py::module_::import("fractions").attr("Fraction");
  return Fraction(py::int_(py::str(q.numerator)), py::int_(py::str(q.denominator)));
}

/// A vector as a new numpy array, or None when empty.
inline py::object vector_or_none(const Vector& v) {
  if (v.size() == 0) return py::none();
  return py::cast(v);
}

// Builds Options from Python keywords. The progress wrapper is called without the GIL (the
// algorithms run with it released); it takes the GIL, checks signals at most every 50 ms, and
// calls the user's callback. A Python exception is kept and re-raised after the C++ call.
struct CallOptions {
  Options options;
  std::shared_ptr<py::object> callback;
  std::shared_ptr<std::exception_ptr> error = std::make_shared<std::exception_ptr>();
};

inline CallOptions make_options(py::object backend, py::object tol, py::object progress) {
  CallOptions c;
  c.options.backend = backend_arg(backend);
  c.options.tol = tol_arg(tol);
  if (!progress.is_none() && !PyCallable_Check(progress.ptr()))
    corral::detail::invalid("progress", "must be callable or None");
  c.callback = std::make_shared<py::object>(progress);
  auto cb = c.callback;
  auto err = c.error;
  auto last = std::make_shared<std::chrono::steady_clock::time_point>();
  c.options.progress = [cb, err, last](const Progress& p) -> bool {
    const auto now = std::chrono::steady_clock::now();
    if (cb->is_none() && now - *last < std::chrono::milliseconds(50)) return true;
    *last = now;
    py::gil_scoped_acquire gil;
    try {
      if (PyErr_CheckSignals() != 0) throw py::error_already_set();
      if (cb->is_none()) return true;
      py::dict d;
      d["stage"] = p.stage;
      d["done"] = p.done;
      d["total"] = p.total;
      d["lp_solves"] = p.lp_solves;
      py::object r = (*cb)(d);
      return r.is_none() || r.cast<bool>();
    } catch (py::error_already_set&) {
      *err = std::current_exception();
      return false;
    }
  };
  return c;
}

// Runs f with the GIL released; re-raises a Python exception caught in the progress callback.
template <class F>
auto run_released(const CallOptions& c, F&& f) {
  try {
    py::gil_scoped_release release;
    return f();
  } catch (const CancelledError&) {
    if (*c.error) std::rethrow_exception(*c.error);
    throw;
  }
}

}  // namespace corral::python
