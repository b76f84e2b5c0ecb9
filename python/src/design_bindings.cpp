// Bindings of the design routines: pre-sets, controllable sets and the dual-mode region.
// Argument checks, GIL release, progress; nothing algorithmic.

#include "bindings.hpp"

namespace corral::python {

void register_design(py::module_& m) {
  py::class_<ControllableResult>(m, "ControllableResult", "Result of controllable_set().")
      .def_readonly("set", &ControllableResult::set, "K_N, irredundant.")
      .def_readonly("sets", &ControllableResult::sets,
                    "K_0 (the target within X), K_1, ..., K_N: the i-step controllable sets.")
      .def_readonly("steps", &ControllableResult::steps)
      .def_readonly("lp_solves", &ControllableResult::lp_solves)
      .def_readonly("fallbacks", &ControllableResult::fallbacks)
      .def_readonly("seconds", &ControllableResult::seconds)
      .def_property_readonly(
          "certificate", [](const ControllableResult&) { return py::none(); },
          "None: controllable sets carry no certificate yet.")
      .def("__repr__", [](const ControllableResult& r) {
        return "ControllableResult(" + std::to_string(r.set.num_rows()) + " rows, steps " +
               std::to_string(r.steps) + ", " + std::to_string(r.lp_solves) + " LPs)";
      });
  py::class_<DualModeRegion>(m, "DualModeRegion", "Result of dual_mode_region().")
      .def_readonly("augmented", &DualModeRegion::augmented,
                    "Maximal admissible set in z = (x, c_0, ..., c_{N-1}), irredundant.")
      .def_readonly("F_x", &DualModeRegion::F_x, "QP constraints F_x x + F_c c <= t.")
      .def_readonly("F_c", &DualModeRegion::F_c)
      .def_readonly("t", &DualModeRegion::t)
      .def_property_readonly(
          "H",
          [](const DualModeRegion& r) -> py::object {
            return r.has_cost ? py::cast(r.H) : py::none();
          },
          "QP cost c'H c + 2 x'H_xc c (None without Q, R).")
      .def_property_readonly("H_xc",
                             [](const DualModeRegion& r) -> py::object {
                               return r.has_cost ? py::cast(r.H_xc) : py::none();
                             })
      .def_readonly("dynamics", &DualModeRegion::dynamics, "The prediction dynamics in z.")
      .def_readonly("state_region", &DualModeRegion::state_region,
                    "States where the QP is feasible (N-step controllable set).")
      .def_readonly("terminal_set", &DualModeRegion::terminal_set,
                    "The closed loop's maximal admissible set (u = -K x).")
      .def_readonly("horizon", &DualModeRegion::horizon)
      .def_readonly("steps", &DualModeRegion::steps, "Determinedness index of the augmented set.")
      .def_readonly("converged", &DualModeRegion::converged)
      .def_readonly("lp_solves", &DualModeRegion::lp_solves)
      .def_readonly("fallbacks", &DualModeRegion::fallbacks)
      .def_readonly("seconds", &DualModeRegion::seconds)
      .def_readonly("conditions", &DualModeRegion::conditions)
      .def_readonly("certificate", &DualModeRegion::certificate)
      .def("__repr__", [](const DualModeRegion& r) {
        return "DualModeRegion(horizon " + std::to_string(r.horizon) + ", " +
               std::to_string(r.augmented.num_rows()) + " QP rows, state region " +
               std::to_string(r.state_region.num_rows()) + " rows, " + std::to_string(r.lp_solves) +
               " LPs)";
      });

  m.def(
      "_pre_set",
      [](py::object A, py::object B, py::object C, py::object U, py::object mixed,
         py::object backend, py::object tol, py::object progress) {
        const Matrix Am = to_matrix(A, "A"), Bm = to_matrix(B, "B");
        const Index n = Am.rows(), mu = Bm.cols();
        const Polytope Cp = polytope_arg(C, n, "C", false), Up = polytope_arg(U, mu, "U", true),
                       Mp = polytope_arg(mixed, n + mu, "mixed", true);
        CallOptions c = make_options(backend, tol, progress);
        Info info;
        Polytope out =
            run_released(c, [&] { return pre_set(Am, Bm, Cp, Up, Mp, c.options, &info); });
        return py::make_tuple(out, info_dict(info));
      },
      py::arg("A"), py::arg("B"), py::arg("C"), py::arg("U") = py::none(), py::kw_only(),
      py::arg("mixed") = py::none(), py::arg("backend") = py::none(), py::arg("tol") = py::none(),
      py::arg("progress") = py::none(),
      "Pre(C) = {x : A x + B u in C for some u in U, (x, u) in mixed}, irredundant (a\n"
      "projection of the set in (x, u)). U, mixed: Polytopes or None (no limit).");
  m.def(
      "controllable_set",
      [](py::object A, py::object B, py::object X, py::object U, py::object target, int steps,
         py::object mixed, py::object backend, py::object tol, py::object progress) {
        const Matrix Am = to_matrix(A, "A"), Bm = to_matrix(B, "B");
        const Index n = Am.rows(), mu = Bm.cols();
        const Polytope Xp = polytope_arg(X, n, "X", true), Up = polytope_arg(U, mu, "U", true),
                       Tp = polytope_arg(target, n, "target", false),
                       Mp = polytope_arg(mixed, n + mu, "mixed", true);
        CallOptions c = make_options(backend, tol, progress);
        return run_released(
            c, [&] { return controllable_set(Am, Bm, Xp, Up, Tp, steps, Mp, c.options); });
      },
      py::arg("A"), py::arg("B"), py::arg("X"), py::arg("U"), py::arg("target"), py::arg("steps"),
      py::kw_only(), py::arg("mixed") = py::none(), py::arg("backend") = py::none(),
      py::arg("tol") = py::none(), py::arg("progress") = py::none(),
      "The states that admissible inputs bring into `target` in `steps` steps, every state\n"
      "before in X: K_0 = target ∩ X, K_{i+1} = X ∩ Pre(K_i). Returns a ControllableResult\n"
      "(.set, .sets = [K_0, ..., K_N], .steps, .lp_solves, .seconds; .certificate None).");
  m.def(
      "dual_mode_region",
      [](py::object A, py::object B, py::object K, py::object X, py::object U, int horizon,
         py::object Q, py::object R, py::object mixed, int max_steps, py::object backend,
         py::object tol, py::object progress) {
        const Matrix Am = to_matrix(A, "A"), Bm = to_matrix(B, "B"), Km = to_matrix(K, "K");
        const Index n = Am.rows(), mu = Bm.cols();
        const Polytope Xp = polytope_arg(X, n, "X", true), Up = polytope_arg(U, mu, "U", true),
                       Mp = polytope_arg(mixed, n + mu, "mixed", true);
        Matrix Qm, Rm;
        if (!Q.is_none()) Qm = to_matrix(Q, "Q");
        if (!R.is_none()) Rm = to_matrix(R, "R");
        CallOptions c = make_options(backend, tol, progress);
        AdmissibleOptions o;
        static_cast<Options&>(o) = c.options;
        o.max_steps = max_steps;
        return run_released(c, [&] {
          return dual_mode_region(Am, Bm, Km, Xp, Up, horizon, Q.is_none() ? nullptr : &Qm,
                                  R.is_none() ? nullptr : &Rm, Mp, o);
        });
      },
      py::arg("A"), py::arg("B"), py::arg("K"), py::arg("X"), py::arg("U"), py::arg("horizon"),
      py::kw_only(), py::arg("Q") = py::none(), py::arg("R") = py::none(),
      py::arg("mixed") = py::none(), py::arg("max_steps") = 1000, py::arg("backend") = py::none(),
      py::arg("tol") = py::none(), py::arg("progress") = py::none(),
      "Feasible region of dual-mode predictive control with u_k = -K x_k + c_k for k < horizon:\n"
      "the augmented maximal admissible set in (x, c) (.augmented; QP rows .F_x, .F_c, .t),\n"
      "the cost matrices .H, .H_xc when Q and R are given, the states where the QP is\n"
      "feasible (.state_region, by pre-sets from .terminal_set), .steps, .lp_solves, .seconds.");
}

}  // namespace corral::python
