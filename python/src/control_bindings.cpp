// Bindings of the control-design helpers: lqr.

#include "bindings.hpp"

namespace corral::python {

void register_control(py::module_& m) {
  py::class_<LqrResult>(m, "LqrResult",
                        "Result of lqr(): the gain K of u = -K x and the Riccati solution P.")
      .def_property_readonly("K", [](const LqrResult& r) { return r.K; })
      .def_property_readonly("P", [](const LqrResult& r) { return r.P; })
      .def_readonly("spectral_radius", &LqrResult::spectral_radius,
                    "Spectral radius of the closed loop A - B K (< 1).")
      .def_readonly("residual", &LqrResult::residual,
                    "Max-abs Riccati residual divided by max(1, max |P|).")
      .def_readonly("steps", &LqrResult::steps, "Doubling steps taken.")
      .def("__repr__", [](const LqrResult& r) {
        return "LqrResult(K: " + std::to_string(r.K.rows()) + "x" + std::to_string(r.K.cols()) +
               ", spectral radius " + std::to_string(r.spectral_radius) + ")";
      });
  m.def(
      "lqr",
      [](py::object A, py::object B, py::object Q, py::object R, py::object tol, int max_steps) {
        const Matrix Am = to_matrix(A, "A"), Bm = to_matrix(B, "B"), Qm = to_matrix(Q, "Q"),
                     Rm = to_matrix(R, "R");
        LqrOptions opt;
        if (!tol.is_none()) opt.tol = tol.cast<double>();
        opt.max_steps = max_steps;
        py::gil_scoped_release release;
        return lqr(Am, Bm, Qm, Rm, opt);
      },
      py::arg("A"), py::arg("B"), py::arg("Q"), py::arg("R"), py::kw_only(),
      py::arg("tol") = py::none(), py::arg("max_steps") = 100,
      "Discrete-time LQR for x+ = A x + B u with cost sum x'Qx + u'Ru: the gain K of\n"
      "u = -K x and the stabilising Riccati solution P (structure-preserving doubling).\n"
      "Raises InvalidInputError naming the argument for bad shapes, NaN/inf, asymmetric or\n"
      "indefinite weights, and ('A, B: ...') when (A, B) is not stabilisable or (A, Q) not\n"
      "detectable.");
}

}  // namespace corral::python
