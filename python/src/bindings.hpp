#pragma once
// Shared declarations of the bindings: one registration function per concept, and the
// conversions from Python objects to the library's dense types with argument-named errors.

#include <pybind11/eigen.h>
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <corral/corral.hpp>

#include <string>

namespace corral::python {

namespace py = pybind11;

void register_errors(py::module_& m);
void register_lp(py::module_& m);
void register_polytope(py::module_& m);
void register_control(py::module_& m);

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

/// A vector as a new numpy array, or None when empty.
inline py::object vector_or_none(const Vector& v) {
  if (v.size() == 0) return py::none();
  return py::cast(v);
}

}  // namespace corral::python
