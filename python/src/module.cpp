// Module definition and the one place where C++ exceptions map to Python classes.

#include "bindings.hpp"

namespace corral::python {

namespace {
PyObject* g_corral_error = nullptr;
PyObject* g_invalid_input = nullptr;
PyObject* g_unbounded_set = nullptr;
PyObject* g_not_finitely_determined = nullptr;
PyObject* g_solver_error = nullptr;
PyObject* g_cancelled = nullptr;

PyObject* new_exception(py::module_& m, const char* name, PyObject* bases, const char* doc) {
  const std::string qualified = std::string("corral.") + name;
  PyObject* type = PyErr_NewExceptionWithDoc(qualified.c_str(), doc, bases, nullptr);
  if (type == nullptr) throw py::error_already_set();
  m.add_object(name, py::handle(type));
  return type;
}
}  // namespace

void register_errors(py::module_& m) {
  g_corral_error = new_exception(m, "CorralError", PyExc_Exception,
                                 "Base of every exception corral raises on purpose.");
  py::tuple invalid_bases =
      py::make_tuple(py::handle(g_corral_error), py::handle(PyExc_ValueError));
  g_invalid_input = new_exception(m, "InvalidInputError", invalid_bases.ptr(),
                                  "An argument is malformed; the message names it.");
  g_unbounded_set = new_exception(m, "UnboundedSetError", g_corral_error,
                                  "A routine that needs a bounded set got an unbounded one.");
  g_not_finitely_determined = new_exception(m, "NotFinitelyDeterminedError", g_corral_error,
                                            "The conditions for finite determination fail.");
  g_solver_error = new_exception(m, "SolverError", g_corral_error,
                                 "A solver failed and no fallback could repair it.");
  g_cancelled =
      new_exception(m, "CancelledError", g_corral_error, "A progress callback returned False.");
  py::register_exception_translator([](std::exception_ptr p) {
    try {
      if (p) std::rethrow_exception(p);
    } catch (const InvalidInputError& e) {
      PyErr_SetString(g_invalid_input, e.what());
    } catch (const UnboundedSetError& e) {
      PyErr_SetString(g_unbounded_set, e.what());
    } catch (const NotFinitelyDeterminedError& e) {
      PyErr_SetString(g_not_finitely_determined, e.what());
    } catch (const CancelledError& e) {
      PyErr_SetString(g_cancelled, e.what());
    } catch (const SolverError& e) {
      PyErr_SetString(g_solver_error, e.what());
    } catch (const CorralError& e) {
      PyErr_SetString(g_corral_error, e.what());
    }
  });
}

}  // namespace corral::python

PYBIND11_MODULE(_core, m) {
  m.doc() = "corral's compiled core; import corral instead.";
  m.attr("__version__") = CORRAL_PY_VERSION;
  corral::python::register_errors(m);
  corral::python::register_lp(m);
  corral::python::register_polytope(m);
  corral::python::register_control(m);
  corral::python::register_design(m);
}
