// Bindings of Polytope: conversion, GIL release around LP work (make_options / run_released in
// bindings.hpp: progress callbacks take the GIL only to call Python and check for Ctrl-C), and
// nothing algorithmic.

#include "bindings.hpp"

namespace corral::python {

namespace {

py::object rational_matrix(const RationalMatrix& R) {
  py::list rows;
  for (Index i = 0; i < R.rows; ++i) {
    py::list row;
    for (Index j = 0; j < R.cols; ++j) {
      row.append(to_fraction(R(i, j)));
    }
    rows.append(row);
  }
  return rows;
}

}  // namespace

void register_polytope(py::module_& m) {
  py::class_<Polytope> cls(m, "Polytope", "A convex polyhedron {x : A x <= b} (H-representation).");
  cls.def(py::init([](py::object A, py::object b) {
            return Polytope(to_matrix(A, "A"), to_vector(b, "b"));
          }),
          py::arg("A"), py::arg("b"))
      .def_static(
          "box",
          [](py::object lower, py::object upper) {
            return Polytope::box(to_vector(lower, "lower"), to_vector(upper, "upper"));
          },
          py::arg("lower"), py::arg("upper"))
      .def_static("simplex", &Polytope::simplex, py::arg("n"))
      .def_static("empty", &Polytope::empty, py::arg("n"))
      .def_static(
          "_from_vertices",
          [](py::object V, bool exact) {
            const Matrix Vm = to_matrix(V, "V");
            Info info;
            Polytope P = [&] {
              py::gil_scoped_release release;
              return Polytope::from_vertices(Vm, exact, &info);
            }();
            return py::make_tuple(P, info_dict(info));
          },
          py::arg("V"), py::kw_only(), py::arg("exact") = false)
      .def_property_readonly("A", [](const Polytope& P) { return Matrix(P.A()); })
      .def_property_readonly("b", [](const Polytope& P) { return Vector(P.b()); })
      .def_property_readonly("dim", &Polytope::dim)
      .def_property_readonly("num_rows", &Polytope::num_rows)
      .def_property_readonly("source_rows", &Polytope::source_rows)
      .def("_contains_point",
           [](const Polytope& P, py::object x, py::object tol) {
             return P.contains(to_vector(x, "x"), tol_arg(tol));
           })
      .def("_contains_points",
           [](const Polytope& P, py::object X, py::object tol) {
             return P.contains_points(to_matrix(X, "x"), tol_arg(tol));
           })
      .def(
          "is_empty",
          [](const Polytope& P, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.is_empty(c.options); });
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def(
          "is_bounded",
          [](const Polytope& P, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.is_bounded(c.options); });
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def(
          "_chebyshev_center",
          [](const Polytope& P, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            ChebyshevBall ball = run_released(c, [&] { return P.chebyshev_center(c.options); });
            return py::make_tuple(ball.center, ball.radius);
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def(
          "_support",
          [](const Polytope& P, py::object D, py::object backend, py::object tol) {
            const Matrix Dm = to_matrix(D, "directions");
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.support_many(Dm, c.options); });
          },
          py::arg("directions"), py::kw_only(), py::arg("backend") = py::none(),
          py::arg("tol") = py::none())
      .def(
          "bounding_box",
          [](const Polytope& P, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.bounding_box(c.options); });
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def(
          "is_subset",
          [](const Polytope& P, const Polytope& Q, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.is_subset(Q, c.options); });
          },
          py::arg("Q"), py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def(
          "same_set",
          [](const Polytope& P, const Polytope& Q, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            return run_released(c, [&] { return P.same_set(Q, c.options); });
          },
          py::arg("Q"), py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def("intersect", &Polytope::intersect, py::arg("Q"))
      .def("__and__", &Polytope::intersect)
      .def(
          "affine_image",
          [](const Polytope& P, py::object M, py::object t) {
            return P.affine_image(to_matrix(M, "M"), t.is_none() ? Vector() : to_vector(t, "t"));
          },
          py::arg("M"), py::arg("t") = py::none())
      .def(
          "preimage",
          [](const Polytope& P, py::object M, py::object t) {
            return P.preimage(to_matrix(M, "M"), t.is_none() ? Vector() : to_vector(t, "t"));
          },
          py::arg("M"), py::arg("t") = py::none())
      .def(
          "_irredundant",
          [](const Polytope& P, py::object backend, py::object tol, bool exact,
             py::object progress) {
            auto c = make_options(backend, tol, progress);
            Info info;
            Polytope out = run_released(c, [&] { return P.irredundant(c.options, exact, &info); });
            return py::make_tuple(out, info_dict(info));
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none(),
          py::arg("exact") = false, py::arg("progress") = py::none())
      .def(
          "_project",
          [](const Polytope& P, std::vector<Index> dims, const std::string& method,
             py::object backend, py::object tol, py::object progress) {
            auto c = make_options(backend, tol, progress);
            Info info;
            Polytope out =
                run_released(c, [&] { return P.project(dims, method, c.options, &info); });
            return py::make_tuple(out, info_dict(info));
          },
          py::arg("dims"), py::arg("method") = "auto", py::kw_only(),
          py::arg("backend") = py::none(), py::arg("tol") = py::none(),
          py::arg("progress") = py::none())
      .def(
          "_redundant_rows",
          [](const Polytope& P, py::object backend, py::object tol, bool exact,
             py::object progress) {
            auto c = make_options(backend, tol, progress);
            Info info;
            auto rows = run_released(c, [&] { return P.redundant_rows(c.options, exact, &info); });
            return py::make_tuple(rows, info_dict(info));
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none(),
          py::arg("exact") = false, py::arg("progress") = py::none())
      .def(
          "_affine_hull",
          [](const Polytope& P, py::object backend, py::object tol) {
            auto c = make_options(backend, tol, py::none());
            AffineHull h = run_released(c, [&] { return P.affine_hull(c.options); });
            return py::make_tuple(h.E, h.e, h.rows);
          },
          py::kw_only(), py::arg("backend") = py::none(), py::arg("tol") = py::none())
      .def("_vertices",
           [](const Polytope& P, bool exact) {
             Info info;
             Matrix V = [&] {
               py::gil_scoped_release release;
               return P.vertices(exact, &info);
             }();
             return py::make_tuple(V, info_dict(info));
           })
      .def("_vertices_exact", [](const Polytope& P) {
        RationalMatrix R;
        Info info;
        {
          py::gil_scoped_release release;
          R = P.vertices_exact(&info);
        }
        return py::make_tuple(rational_matrix(R), info_dict(info));
      });
}

}  // namespace corral::python
