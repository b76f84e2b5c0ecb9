// Bindings of the control routines: lqr, maximal admissible sets. Thin: conversion, GIL
// release, progress; nothing algorithmic.

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
  py::class_<FiniteDetermination>(m, "FiniteDetermination",
                                  "The conditions of finite determination as found.")
      .def_readonly("origin_margin", &FiniteDetermination::origin_margin,
                    "min f_i over the unit rows of X (> 0: the origin is inside X).")
      .def_readonly("origin_interior", &FiniteDetermination::origin_interior)
      .def_readonly("bounded_up_to_subspace", &FiniteDetermination::bounded_up_to_subspace,
                    "Every d with G d <= 0 has G d = 0.")
      .def_readonly("observable_dim", &FiniteDetermination::observable_dim)
      .def_readonly("observable_spectral_radius", &FiniteDetermination::observable_spectral_radius)
      .def("__repr__", [](const FiniteDetermination& c) {
        return "FiniteDetermination(origin_margin=" + std::to_string(c.origin_margin) +
               ", bounded_up_to_subspace=" + (c.bounded_up_to_subspace ? "True" : "False") +
               ", observable_dim=" + std::to_string(c.observable_dim) +
               ", observable_spectral_radius=" + std::to_string(c.observable_spectral_radius) + ")";
      });
  py::class_<Certificate>(m, "Certificate",
                          "Farkas certificates of rows c x <= d over a set S = {F x <= t}: for "
                          "each row, multipliers lam >= 0 on S's rows with lam F = c and "
                          "lam t <= d.")
      .def_property_readonly(
          "rows",
          [](const Certificate& c) {
            py::list out;
            for (const RowCertificate& r : c.rows) {
              Eigen::Matrix<Index, Eigen::Dynamic, 1> idx(static_cast<Index>(r.rows.size()));
              for (size_t q = 0; q < r.rows.size(); ++q) idx(static_cast<Index>(q)) = r.rows[q];
              const Vector w =
                  Eigen::Map<const Vector>(r.weights.data(), static_cast<Index>(r.weights.size()));
              out.append(py::make_tuple(idx, w));
            }
            return out;
          },
          "One (row indices, multipliers) pair per certified row (sparse lam).")
      .def_property_readonly("margins",
                             [](const Certificate& c) {
                               Vector v(static_cast<Index>(c.rows.size()));
                               for (size_t j = 0; j < c.rows.size(); ++j)
                                 v(static_cast<Index>(j)) = c.rows[j].margin;
                               return v;
                             })
      .def_readonly("worst_margin", &Certificate::worst_margin)
      .def_readonly("worst_row", &Certificate::worst_row)
      .def_readonly("max_residual", &Certificate::max_residual)
      .def_readonly("holds", &Certificate::holds)
      .def_readonly("tolerance", &Certificate::tolerance)
      .def_readonly("lp_solves", &Certificate::lp_solves);
  py::class_<AdmissibleCertificate>(m, "AdmissibleCertificate",
                                    "Invariance and admissibility certificates of a set.")
      .def_readonly("invariance", &AdmissibleCertificate::invariance)
      .def_readonly("admissibility", &AdmissibleCertificate::admissibility)
      .def_readonly("holds", &AdmissibleCertificate::holds);
  py::class_<InvarianceReport>(m, "InvarianceReport", "Result of verify_invariance().")
      .def_readonly("holds", &InvarianceReport::holds,
                    "Every row holds within `tolerance` (judged on the exact margin when exact).")
      .def_readonly("worst_margin", &InvarianceReport::worst_margin)
      .def_readonly("worst_row", &InvarianceReport::worst_row)
      .def_readonly("tolerance", &InvarianceReport::tolerance)
      .def_readonly("certificate", &InvarianceReport::certificate)
      .def_readonly("exact", &InvarianceReport::exact)
      .def_property_readonly(
          "worst_margin_exact",
          [](const InvarianceReport& r) -> py::object {
            return r.worst_margin_exact ? to_fraction(*r.worst_margin_exact) : py::none();
          },
          "The exact worst margin as a fractions.Fraction (None unless exact and finite).")
      .def_readonly("holds_exactly", &InvarianceReport::holds_exactly,
                    "exact, and every margin >= 0 with no tolerance.")
      .def_readonly("exact_lps", &InvarianceReport::exact_lps);
  m.def(
      "verify_invariance",
      [](py::object A, py::object S, py::object certificate, bool exact, py::object backend,
         py::object tol, py::object progress) {
        const Matrix Am = to_matrix(A, "A");
        if (!py::isinstance<Polytope>(S)) corral::detail::invalid("S", "must be a Polytope");
        const Polytope Sp = S.cast<Polytope>();
        const Certificate* given = nullptr;
        Certificate held;
        if (!certificate.is_none()) {
          if (!py::isinstance<Certificate>(certificate))
            corral::detail::invalid("certificate", "must be a Certificate or None");
          held = certificate.cast<Certificate>();
          given = &held;
        }
        CallOptions c = make_options(backend, tol, progress);
        return run_released(c, [&] { return verify_invariance(Am, Sp, given, c.options, exact); });
      },
      py::arg("A"), py::arg("S"), py::kw_only(), py::arg("certificate") = py::none(),
      py::arg("exact") = false, py::arg("backend") = py::none(), py::arg("tol") = py::none(),
      py::arg("progress") = py::none(),
      "Checks A S <= S for S = {F x <= t}: with a certificate, checks it without LPs; otherwise\n"
      "computes one (one LP per row). exact=True also computes the worst margin exactly in\n"
      "rationals (.worst_margin_exact, .holds_exactly) and judges .holds on it.");
  py::class_<AdmissibleResult>(m, "AdmissibleResult", "Result of max_admissible_set().")
      .def_readonly("set", &AdmissibleResult::set, "The set (irredundant when converged).")
      .def_readonly("steps", &AdmissibleResult::steps,
                    "Determinedness index t* (steps done when not converged).")
      .def_readonly("converged", &AdmissibleResult::converged,
                    "False: max_steps was reached and `set` is an outer bound.")
      .def_readonly("lp_solves", &AdmissibleResult::lp_solves)
      .def_readonly("fallbacks", &AdmissibleResult::fallbacks)
      .def_readonly("seconds", &AdmissibleResult::seconds)
      .def_readonly("conditions", &AdmissibleResult::conditions)
      .def_readonly("certificate", &AdmissibleResult::certificate,
                    "Invariance and admissibility certificates (converged, non-empty sets).")
      .def_readonly("worst_margin", &AdmissibleResult::worst_margin)
      .def("__repr__", [](const AdmissibleResult& r) {
        return "AdmissibleResult(" + std::to_string(r.set.num_rows()) + " rows, steps " +
               std::to_string(r.steps) + (r.converged ? ", converged" : ", NOT converged") + ", " +
               std::to_string(r.lp_solves) + " LPs)";
      });
  auto admissible_options = [](py::object backend, py::object tol, py::object progress,
                               int max_steps) {
    CallOptions c = make_options(backend, tol, progress);
    AdmissibleOptions o;
    static_cast<Options&>(o) = c.options;
    o.max_steps = max_steps;
    return std::make_pair(c, o);
  };
  m.def(
      "max_admissible_set",
      [admissible_options](py::object A, py::object X, int max_steps, py::object backend,
                           py::object tol, py::object progress) {
        const Matrix Am = to_matrix(A, "A");
        if (!py::isinstance<Polytope>(X)) corral::detail::invalid("X", "must be a Polytope");
        const Polytope Xp = X.cast<Polytope>();
        const auto co = admissible_options(backend, tol, progress, max_steps);
        const AdmissibleOptions& o = co.second;
        return run_released(co.first, [&] { return max_admissible_set(Am, Xp, o); });
      },
      py::arg("A"), py::arg("X"), py::kw_only(), py::arg("max_steps") = 1000,
      py::arg("backend") = py::none(), py::arg("tol") = py::none(),
      py::arg("progress") = py::none(),
      "Maximal admissible set of x+ = A x in X (Gilbert & Tan 1991): every x whose trajectory\n"
      "stays in X forever. Returns an AdmissibleResult (.set, .steps = t*, .converged,\n"
      ".conditions, .lp_solves, .seconds). Raises NotFinitelyDeterminedError when the part of\n"
      "A observable from X's rows is not strictly stable.");
  m.def(
      "closed_loop_admissible_set",
      [admissible_options](py::object A, py::object B, py::object K, py::object X, py::object U,
                           py::object mixed, int max_steps, py::object backend, py::object tol,
                           py::object progress) {
        const Matrix Am = to_matrix(A, "A"), Bm = to_matrix(B, "B"), Km = to_matrix(K, "K");
        const Index n = Am.rows(), mu = Bm.cols();
        const Polytope Xp = polytope_arg(X, n, "X", true), Up = polytope_arg(U, mu, "U", true),
                       Mp = polytope_arg(mixed, n + mu, "mixed", true);
        const auto co = admissible_options(backend, tol, progress, max_steps);
        const AdmissibleOptions& o = co.second;
        return run_released(co.first,
                            [&] { return closed_loop_admissible_set(Am, Bm, Km, Xp, Up, Mp, o); });
      },
      py::arg("A"), py::arg("B"), py::arg("K"), py::arg("X") = py::none(),
      py::arg("U") = py::none(), py::kw_only(), py::arg("mixed") = py::none(),
      py::arg("max_steps") = 1000, py::arg("backend") = py::none(), py::arg("tol") = py::none(),
      py::arg("progress") = py::none(),
      "Maximal admissible set of the closed loop x+ = (A - B K) x, u = -K x, under state\n"
      "limits X, input limits U and mixed limits (a Polytope in (x, u)); None: no limit.");
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
