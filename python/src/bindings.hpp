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

/// Converts to a float64 numpy array of the given number of dimensions, or throws
/// InvalidInputError naming the argument.
inline py::array_t<double, py::array::c_style> to_array(py::handle obj, const char* name,
                                                         int ndim) {
  py::array_t<double, py::array::c_style> arr;
  try {
    arr = py::array_t<double, py::array::c_style | py::array::forcecast>::ensure(obj);
    if (!arr) throw py::error_already_set();
  } catch (py::error_already_set&) {
    PyErr_Clear();
    corral::detail::invalid(name, "must be an array of real numbers");
  }
  if (arr.ndim() != ndim)
    corral::detail::invalid(name, "must be " + std::to_string(ndim) + "-D, got " +
                                      std::to_string(arr.ndim()) + "-D");
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

/// A vector as a new numpy array, or None when empty.
inline py::object vector_or_none(const Vector& v) {
  if (v.size() == 0) return py::none();
  return py::cast(v);
}

}  // namespace corral::python
