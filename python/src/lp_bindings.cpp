// Bindings of the LP layer: maximize, backends, capabilities, process defaults.

#include "bindings.hpp"

namespace corral::python {

void register_lp(py::module_& m) {
  py::class_<lp::Result>(m, "LPResult", "Result of one LP: maximise c·x subject to A x <= b.")
      .def_property_readonly(
          "status", [](const lp::Result& r) { return lp::to_string(r.status); },
          "'optimal', 'infeasible', 'unbounded', 'stopped' or 'numerical'")
      .def_property_readonly(
          "x", [](const lp::Result& r) { return vector_or_none(r.x); },
          "optimiser (None unless optimal or stopped)")
      .def_property_readonly(
          "value", [](const lp::Result& r) { return r.value; },
          "c·x (nan unless optimal or stopped)")
      .def_property_readonly(
          "duals", [](const lp::Result& r) { return vector_or_none(r.duals); },
          "λ >= 0 with Aᵀλ = c, one per row (None when not provided)")
      .def_property_readonly(
          "ray", [](const lp::Result& r) { return vector_or_none(r.ray); },
          "an unbounded direction d (None when the backend gives none)")
      .def_property_readonly(
          "farkas", [](const lp::Result& r) { return vector_or_none(r.farkas); },
          "y >= 0 with Aᵀy = 0, bᵀy < 0 (None when not provided)")
      .def_property_readonly(
          "unbounded_index",
          [](const lp::Result& r) -> py::object {
            if (r.unbounded_index < 0) return py::none();
            return py::int_(r.unbounded_index);
          },
          "GLPK's report of unboundedness: a variable index, not a ray (None otherwise)")
      .def_property_readonly("backend", [](const lp::Result& r) { return r.backend; })
      .def_property_readonly("iterations", [](const lp::Result& r) { return r.iterations; })
      .def_property_readonly(
          "fallbacks", [](const lp::Result& r) { return r.fallbacks; },
          "re-solves by another backend after an answer failed verification (dense backend)")
      .def("__repr__", [](const lp::Result& r) {
        std::string s = std::string("LPResult(status='") + lp::to_string(r.status) + "'";
        if (r.status == lp::Status::optimal || r.status == lp::Status::stopped)
          s += ", value=" + std::to_string(r.value);
        return s + ", backend='" + r.backend + "')";
      });

  m.def(
      "maximize",
      [](py::object c, py::object A, py::object b, py::object backend,
         std::optional<double> threshold) {
        const Matrix Am = to_matrix(A, "A");
        const Vector bv = to_vector(b, "b");
        const Vector cv = to_vector(c, "c");
        lp::SolveOptions options;
        options.threshold = threshold;
        const std::string name = backend_arg(backend);
        py::gil_scoped_release release;
        return lp::maximize(cv, Am, bv, name, options);
      },
      py::arg("c"), py::arg("A"), py::arg("b"), py::kw_only(), py::arg("backend") = py::none(),
      py::arg("threshold") = py::none(),
      "Solves max c·x subject to A x <= b (x free) on the named backend or the default.");

  m.def("lp_verify_tolerance", &lp::verify_tolerance,
        "Relative tolerance at which the dense backend verifies every LP answer (default 1e-9).");
  m.def("set_lp_verify_tolerance", &lp::set_verify_tolerance, py::arg("tol"),
        "Sets lp_verify_tolerance() for the process; tol must lie in (0, 1e-3].");
  m.def("backends", &lp::backends, "Names of the LP backends in this build.");
  m.def("default_backend", &lp::default_backend, "Name of the process-wide default backend.");
  m.def("_set_default_backend", [](const std::string& name) { lp::set_default_backend(name); });
  m.def("default_tol", &corral::default_tol, "The process-wide relative tolerance.");
  m.def("_set_default_tol", &corral::set_default_tol);
  m.def(
      "backend_capabilities",
      [](const std::string& name) {
        const lp::Capabilities c = lp::capabilities(name);
        py::dict d;
        d["duals"] = c.duals;
        d["ray"] = c.ray;
        d["ray_index"] = c.ray_index;
        d["farkas"] = c.farkas;
        d["early_stop"] = c.early_stop;
        d["warm_start"] = c.warm_start;
        d["exact"] = c.exact;
        return d;
      },
      py::arg("backend"), "What the named backend provides beyond status, optimiser and value.");
}

}  // namespace corral::python
