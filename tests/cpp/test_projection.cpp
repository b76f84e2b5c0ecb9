// Tests of corral::project (projection.hpp) against closed forms worked out from the
// definition proj(P) = {y : (y, w) in P for some w}. The comparison with scipy's ConvexHull of
// projected vertices is in the Python tests.

#include <doctest/doctest.h>

#include <corral/corral.hpp>

#include "test_helpers.hpp"

#include <string>

using corral::Index;
using corral::Matrix;
using corral::Polytope;
using corral::Vector;

TEST_CASE("project: closed forms by both methods") {
  for (const char* method : {"fourier-motzkin", "vertices", "auto"}) {
    CAPTURE(method);
    // The box [-1, 1] x [-2, 2] x [-3, 3] x [-4, 4] onto (x4, x2): [-4, 4] x [-2, 2].
    const Polytope box = Polytope::box(-Vector::LinSpaced(4, 1, 4), Vector::LinSpaced(4, 1, 4));
    corral::Info info;
    const Polytope P = box.project({3, 1}, method, {}, &info);
    CHECK(P.num_rows() == 4);
    CHECK(P.same_set(Polytope::box(-corral::test::vec({4, 2}), corral::test::vec({4, 2}))));
    if (std::string(method) != "auto") CHECK(info.method == method);
    // The simplex {x >= 0, Σ x <= 1} in 4-D onto (x1, x3): the 2-D simplex (3 facets).
    const Polytope S = Polytope::simplex(4).project({0, 2}, method);
    CHECK(S.num_rows() == 3);
    CHECK(S.same_set(Polytope::simplex(2)));
  }
}

TEST_CASE("project: unbounded, empty and bad input") {
  // The strip |x1 - x2| <= 1 in the plane onto x1: the whole line (no rows).
  const Polytope strip(corral::test::rows({{1, -1}, {-1, 1}}), corral::test::vec({1, 1}));
  CHECK(strip.project({0}).num_rows() == 0);
  CHECK_THROWS_AS(strip.project({0}, "vertices"), corral::UnboundedSetError);
  const Polytope empty(corral::test::rows({{1, 0}, {-1, 0}}), corral::test::vec({-1, -1}));
  CHECK(empty.project({1}).is_empty());
  const Polytope box = Polytope::box(-Vector::Ones(3), Vector::Ones(3));
  CHECK_THROWS_AS(box.project({3}), corral::InvalidInputError);
  CHECK_THROWS_AS(box.project({1, 1}), corral::InvalidInputError);
  CHECK_THROWS_AS(box.project({}), corral::InvalidInputError);
  CHECK_THROWS_AS(box.project({0}, "sideways"), corral::InvalidInputError);
}
