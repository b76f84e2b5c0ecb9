#pragma once
/// \file enumeration.hpp
/// Vertex and facet enumeration by double description (Motzkin et al. 1953; Fukuda & Prodon
/// 1996) through cddlib, in double or in GMP rationals (included by polytope.hpp).
/// Cost: output-sensitive at best, exponential in the dimension at worst; a single cddlib call
/// cannot be interrupted.

#include <corral/detail/cdd.hpp>
#include <corral/polytope.hpp>

namespace corral {

namespace detail {
inline CddGenerators bounded_generators(const Polytope& P, bool exact, bool rationals) {
  if (P.num_rows() == 0)
    throw UnboundedSetError("polytope: has no rows (the whole space); no vertices");
  CddGenerators g = cdd_generators(P.A(), P.b(), exact, rationals);
  if (g.has_lines || g.rays.rows() > 0)
    throw UnboundedSetError("polytope: is unbounded (" + std::to_string(g.rays.rows()) +
                            " extreme rays or lines); vertices need a bounded set");
  return g;
}
}  // namespace detail

inline Matrix Polytope::vertices(bool exact) const {
  if (is_trivially_empty()) return Matrix(0, dim());
  return detail::bounded_generators(*this, exact, false).points;
}

inline RationalMatrix Polytope::vertices_exact() const {
  if (is_trivially_empty()) {
    RationalMatrix r;
    r.cols = dim();
    return r;
  }
  return detail::bounded_generators(*this, true, true).exact_points;
}

inline Polytope Polytope::from_vertices(const Matrix& V, bool exact) {
  if (V.cols() < 1) detail::invalid("V", "must have at least one column");
  detail::require_finite(V, "V");
  const Index n = V.cols();
  if (V.rows() == 0) return empty(n);
  const detail::CddHull h = detail::cdd_hull(V, exact);
  Index m = 0;
  for (bool e : h.equality) m += e ? 2 : 1;
  Matrix A(m, n);
  Vector b(m);
  Index k = 0;
  for (Index i = 0; i < h.A.rows(); ++i) {
    A.row(k) = h.A.row(i);
    b(k++) = h.b(i);
    if (h.equality[static_cast<size_t>(i)]) {  // an equality: both directions
      A.row(k) = -h.A.row(i);
      b(k++) = -h.b(i);
    }
  }
  return Polytope(A, b);
}

}  // namespace corral
