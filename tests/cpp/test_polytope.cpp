// Tests of corral/polytope.hpp (with polytope_queries.hpp, redundancy.hpp, enumeration.hpp):
// construction, queries, redundancy removal, affine hull, vertices, on every LP backend.
//
// Every expected value is a closed form worked out by hand in the comment beside it: boxes
// (2^n vertices, 2n facets), the standard simplex (n+1 vertices and facets, inradius
// 1/(n + sqrt n)), the cross-polytope (2n vertices, 2^n facets), a pyramid with many rows
// through its apex, flat sets, empty and unbounded sets. Vertex sets are compared as sets.

#include <doctest/doctest.h>

#include "test_helpers.hpp"

#include <corral/errors.hpp>
#include <corral/lp/solver.hpp>
#include <corral/polytope.hpp>

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <string>
#include <vector>

namespace {

using corral::Index;
using corral::Matrix;
using corral::Options;
using corral::Polytope;
using corral::Vector;
using corral::test::rows;
using corral::test::vec;
using corral::test::vstack;
namespace lp = corral::lp;

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
const double kPi = std::acos(-1.0);

Options with_backend(const std::string& backend) {
  Options o;
  o.backend = backend;
  return o;
}

std::vector<Index> sorted(std::vector<Index> v) {
  std::sort(v.begin(), v.end());
  return v;
}

std::vector<Index> range(Index lo, Index hi) {
  std::vector<Index> v;
  for (Index i = lo; i < hi; ++i) v.push_back(i);
  return v;
}

// X and Y hold the same points (max-norm tolerance tol), no point repeated in either.
bool same_points(const Matrix& X, const Matrix& Y, double tol = 1e-9) {
  if (X.rows() != Y.rows() || X.cols() != Y.cols()) return false;
  auto near = [&](const Matrix& P, Index i, const Matrix& Q, Index j) {
    return (P.row(i) - Q.row(j)).cwiseAbs().maxCoeff() <= tol;
  };
  for (Index i = 0; i < X.rows(); ++i) {
    Index hits = 0;
    for (Index j = 0; j < Y.rows(); ++j) hits += near(X, i, Y, j) ? 1 : 0;
    if (hits != 1) return false;
    for (Index k = i + 1; k < X.rows(); ++k)
      if (near(X, i, X, k)) return false;
  }
  return true;
}

// All 2^n sign vectors scaled by s, one per row.
Matrix sign_vectors(Index n, double s = 1.0) {
  Matrix S(Index(1) << n, n);
  for (Index k = 0; k < S.rows(); ++k)
    for (Index j = 0; j < n; ++j) S(k, j) = ((k >> j) & 1) ? s : -s;
  return S;
}

// Runs fn and expects InvalidInputError whose message starts with "<argument>: ".
void expect_invalid(const std::string& argument, const std::function<void()>& fn) {
  CAPTURE(argument);
  try {
    fn();
    FAIL("no exception");
  } catch (const corral::InvalidInputError& e) {
    const std::string what = e.what();
    CAPTURE(what);
    CHECK(what.rfind(argument + ": ", 0) == 0);
  } catch (const std::exception& e) {
    FAIL("wrong exception type: ", e.what());
  }
}

}  // namespace

TEST_CASE("polytope: construction normalises rows, drops zero rows, keeps caller indices") {
  // Caller rows: 0 zero row (b = 1), 1: 3x <= 6, 2: zero row (b = 0), 3: -4y <= 0,
  // 4: x + y <= 10.
  const Matrix A = rows({{0, 0}, {3, 0}, {0, 0}, {0, -4}, {1, 1}});
  const Vector b = vec({1, 6, 0, 0, 10});
  const Polytope P(A, b);
  CHECK(P.dim() == 2);
  CHECK(P.num_rows() == 3);
  CHECK(P.source_rows() == std::vector<Index>{1, 3, 4});
  CHECK(P.caller_row_count() == 5);
  // Normalised: x <= 2, -y <= 0, (x + y)/sqrt2 <= 10/sqrt2.
  CHECK(P.A()(0, 0) == doctest::Approx(1.0));
  CHECK(P.b()(0) == doctest::Approx(2.0));
  CHECK(P.A()(1, 1) == doctest::Approx(-1.0));
  CHECK(P.A()(2, 0) == doctest::Approx(1.0 / std::sqrt(2.0)));
  CHECK(P.b()(2) == doctest::Approx(10.0 / std::sqrt(2.0)));
  for (Index i = 0; i < P.num_rows(); ++i) CHECK(P.A().row(i).norm() == doctest::Approx(1.0));
  CHECK(P.scale() == doctest::Approx(10.0 / std::sqrt(2.0)));
  // A zero row with b < 0: the canonical empty set, whatever the other rows say.
  const Polytope E(rows({{1, 0}, {0, 0}}), vec({1, -1}));
  CHECK(E.is_trivially_empty());
  CHECK(E.num_rows() == 1);
  // No rows: the whole space.
  const Polytope W(Matrix(0, 3), Vector(0));
  CHECK(W.num_rows() == 0);
  CHECK(W.contains(vec({1e9, -1e9, 0})));
}

TEST_CASE("polytope: boxes") {
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    for (Index n = 1; n <= 4; ++n) {
      CAPTURE(n);
      // [-1, 1]^n: 2^n vertices (the sign vectors), 2n facets, Chebyshev radius 1 at 0,
      // support h(d) = |d|_1.
      const Polytope P = Polytope::box(Vector::Constant(n, -1.0), Vector::Constant(n, 1.0));
      CHECK(P.num_rows() == 2 * n);
      CHECK(same_points(P.vertices(), sign_vectors(n)));
      CHECK(same_points(P.vertices(true), sign_vectors(n)));
      const corral::ChebyshevBall ball = P.chebyshev_center(opt);
      CHECK(ball.radius == doctest::Approx(1.0));
      CHECK(ball.center.norm() <= 1e-9);
      Vector d = Vector::LinSpaced(n, -1.0, 2.0);
      CHECK(P.support(d, opt) == doctest::Approx(d.cwiseAbs().sum()));
      auto [lo, hi] = P.bounding_box(opt);
      CHECK((lo - Vector::Constant(n, -1.0)).norm() <= 1e-9);
      CHECK((hi - Vector::Constant(n, 1.0)).norm() <= 1e-9);
      CHECK(P.is_bounded(opt));
      CHECK_FALSE(P.is_empty(opt));
      CHECK(P.affine_hull(opt).E.rows() == 0);
    }
    // Infinite bounds add no row: x <= 1, y >= 0; the box reports them back.
    const Polytope B = Polytope::box(vec({-kInf, 0}), vec({1, kInf}));
    CHECK(B.num_rows() == 2);
    auto [lo, hi] = B.bounding_box(opt);
    CHECK(lo(0) == -kInf);
    CHECK(lo(1) == doctest::Approx(0.0));
    CHECK(hi(0) == doctest::Approx(1.0));
    CHECK(hi(1) == kInf);
    CHECK_FALSE(B.is_bounded(opt));
  }
}

TEST_CASE("polytope: standard simplex") {
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    for (Index n = 1; n <= 5; ++n) {
      CAPTURE(n);
      // {x >= 0, sum x <= 1}: n + 1 vertices (0 and e_i), n + 1 facets. Inradius r with
      // centre r·1: r = (1 - n r)/sqrt(n), so r = 1/(n + sqrt n).
      const Polytope S = Polytope::simplex(n);
      Matrix V = Matrix::Zero(n + 1, n);
      V.bottomRows(n) = Matrix::Identity(n, n);
      CHECK(S.num_rows() == n + 1);
      CHECK(same_points(S.vertices(), V));
      const double r = 1.0 / (static_cast<double>(n) + std::sqrt(static_cast<double>(n)));
      const corral::ChebyshevBall ball = S.chebyshev_center(opt);
      CHECK(ball.radius == doctest::Approx(r));
      CHECK((ball.center - Vector::Constant(n, r)).norm() <= 1e-8);
      CHECK(S.irredundant(opt).num_rows() == n + 1);
      const Polytope H = Polytope::from_vertices(V);
      CHECK(H.num_rows() == n + 1);
      CHECK(H.same_set(S, opt));
    }
  }
}

TEST_CASE("polytope: cross-polytope") {
  for (Index n = 2; n <= 4; ++n) {
    CAPTURE(n);
    // {x : s·x <= 1 for every sign vector s}: 2^n facets, 2n vertices ±e_i.
    const Matrix S = sign_vectors(n);
    const Polytope P(S, Vector::Ones(S.rows()));
    const Matrix pm = vstack(Matrix(Matrix::Identity(n, n)), Matrix(-Matrix::Identity(n, n)));
    CHECK(same_points(P.vertices(), pm));
    CHECK(same_points(P.vertices(true), pm));
    const Polytope H = Polytope::from_vertices(pm);
    CHECK(H.num_rows() == (Index(1) << n));
    CHECK(P.irredundant({}, true).num_rows() == (Index(1) << n));
    for (const std::string& backend : lp::backends()) {
      CAPTURE(backend);
      const Options opt = with_backend(backend);
      CHECK(P.irredundant(opt).num_rows() == (Index(1) << n));
      CHECK(H.same_set(P, opt));
      // Chebyshev radius: distance from 0 to s·x = 1, i.e. 1/sqrt(n).
      CHECK(P.chebyshev_center(opt).radius == doctest::Approx(1.0 / std::sqrt(double(n))));
    }
  }
}

TEST_CASE("polytope: redundant rows and duplicates refer to caller rows") {
  // [0,1]^2 (caller rows 0..3: x <= 1, y <= 1, -x <= 0, -y <= 0), then
  // 4: x + y <= 2.5 (redundant: max x + y = 2), 5: 2x <= 2 (duplicate of 0),
  // 6: 0·x <= 3 (zero row, dropped), 7: x - y <= 1 (weakly redundant: tight at (1, 0)),
  // 8: 0.5 y <= 0.5 (duplicate of 1), 9: -x <= 0.3 (redundant, parallel to 2).
  const Matrix A =
      rows({{1, 0}, {0, 1}, {-1, 0}, {0, -1}, {1, 1}, {2, 0}, {0, 0}, {1, -1}, {0, 0.5}, {-1, 0}});
  const Vector b = vec({1, 1, 0, 0, 2.5, 2, 3, 1, 0.5, 0.3});
  const Polytope P(A, b);
  const std::vector<Index> expected_redundant{4, 5, 6, 7, 8, 9};
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    corral::Info info;
    const Polytope Q = P.irredundant(opt, false, &info);
    CHECK(sorted(Q.source_rows()) == range(0, 4));
    CHECK(info.lp_solves > 0);
    CHECK(info.mean_lp_rows > 0);
    CHECK(info.method == "clarkson");
    CHECK(P.redundant_rows(opt) == expected_redundant);
    CHECK(Q.same_set(P, opt));
    CHECK(same_points(Q.vertices(), rows({{0, 0}, {1, 0}, {0, 1}, {1, 1}})));
  }
  corral::Info info;
  CHECK(sorted(P.irredundant({}, true, &info).source_rows()) == range(0, 4));
  CHECK(info.method == "cdd-exact");
  CHECK(P.redundant_rows({}, true) == expected_redundant);
}

TEST_CASE("polytope: many rows through one vertex") {
  // Pyramid over the regular 20-gon with apex (0, 0, 1): rows cos θ x + sin θ y + z <= 1
  // (all 20 through the apex) and -z <= 0; then 20 rows cos φ x + sin φ y + 2z <= 2 at the
  // half angles, weakly redundant (on the pyramid cos φ x + sin φ y <= 1 - z), tight only at
  // the apex. Vertices: apex, and the polygon corners at angles φ, radius 1/cos(π/20).
  const Index k = 20;
  Matrix A(2 * k + 1, 3);
  Vector b(2 * k + 1);
  Matrix V(k + 1, 3);
  const double R = 1.0 / std::cos(kPi / static_cast<double>(k));
  for (Index i = 0; i < k; ++i) {
    const double th = 2 * kPi * static_cast<double>(i) / static_cast<double>(k);
    const double phi = th + kPi / static_cast<double>(k);
    A.row(i) << std::cos(th), std::sin(th), 1.0;
    b(i) = 1.0;
    A.row(k + 1 + i) << std::cos(phi), std::sin(phi), 2.0;
    b(k + 1 + i) = 2.0;
    V.row(i) << R * std::cos(phi), R * std::sin(phi), 0.0;
  }
  A.row(k) << 0, 0, -1;
  b(k) = 0;
  V.row(k) << 0, 0, 1;
  const Polytope P(A, b);
  CHECK(same_points(P.vertices(), V));
  CHECK(same_points(P.vertices(true), V));
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    CHECK(sorted(P.irredundant(opt).source_rows()) == range(0, k + 1));
    CHECK(P.redundant_rows(opt) == range(k + 1, 2 * k + 1));
  }
  CHECK(sorted(P.irredundant({}, true).source_rows()) == range(0, k + 1));
}

TEST_CASE("polytope: flat sets") {
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    // [0,1] x {2} x [0,1]: box rows 0..5 (x <= 1, y <= 2, z <= 1, -x <= 0, -y <= -2,
    // -z <= 0), plus 6: x + z <= 5, 7: y <= 3 (redundant), 8: 3y <= 6, 9: -2y <= -4
    // (the equality again, scaled).
    const Polytope B = Polytope::box(vec({0, 2, 0}), vec({1, 2, 1}));
    const Matrix A = vstack(B.A(), rows({{1, 0, 1}, {0, 1, 0}, {0, 3, 0}, {0, -2, 0}}));
    const Vector b = vstack(B.b(), vec({5, 3, 6, -4}));
    const Polytope P(A, b);
    const corral::AffineHull h = P.affine_hull(opt);
    REQUIRE(h.E.rows() == 1);
    CHECK(std::abs(h.E(0, 1)) == doctest::Approx(1.0));
    CHECK(h.E(0, 1) * 2.0 == doctest::Approx(h.e(0)));
    CHECK(sorted(h.rows) == std::vector<Index>{1, 4, 8, 9});
    const Polytope Q = P.irredundant(opt);
    // Equality rows kept once each, inequalities of the square kept, the rest dropped.
    CHECK(sorted(Q.source_rows()) == range(0, 6));
    CHECK(P.redundant_rows(opt) == range(6, 10));
    CHECK(same_points(P.vertices(), rows({{0, 2, 0}, {1, 2, 0}, {0, 2, 1}, {1, 2, 1}})));
    CHECK(P.chebyshev_center(opt).radius == 0.0);
    CHECK_FALSE(P.is_empty(opt));
    // A single point {(1, 2, 3)}: three independent equalities, every row kept; x+y+z <= 7
    // is redundant (1 + 2 + 3 = 6).
    const Polytope pt = Polytope::box(vec({1, 2, 3}), vec({1, 2, 3}));
    CHECK(pt.affine_hull(opt).E.rows() == 3);
    const Polytope pt2(vstack(pt.A(), rows({{1, 1, 1}})), vstack(pt.b(), vec({7})));
    CHECK(pt2.redundant_rows(opt) == std::vector<Index>{6});
    CHECK(same_points(pt.vertices(), rows({{1, 2, 3}})));
    // The triangle {x >= 0, y >= 0, z >= 0, x + y + z = 1} given by an equality pair, with
    // x <= 1 (weakly redundant) added: vertices e_1, e_2, e_3.
    const Polytope T(rows({{-1, 0, 0}, {0, -1, 0}, {0, 0, -1}, {1, 1, 1}, {-1, -1, -1}, {1, 0, 0}}),
                     vec({0, 0, 0, 1, -1, 1}));
    CHECK(T.affine_hull(opt).E.rows() == 1);
    CHECK(sorted(T.affine_hull(opt).rows) == std::vector<Index>{3, 4});
    CHECK(sorted(T.irredundant(opt).source_rows()) == range(0, 5));
    CHECK(same_points(T.vertices(), Matrix(Matrix::Identity(3, 3))));
  }
}

TEST_CASE("polytope: empty sets") {
  // x <= -1 and -x <= -1 (x >= 1): empty, though no row is zero.
  const Polytope C(rows({{1, 0}, {-1, 0}, {0, 1}}), vec({-1, -1, 1}));
  const Polytope E = Polytope::empty(2);
  const Polytope Z(rows({{1, 0}, {0, 0}}), vec({1, -2}));  // 0·x <= -2
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    for (const Polytope* P : {&C, &E, &Z}) {
      CHECK(P->is_empty(opt));
      CHECK(P->is_bounded(opt));  // convention: the empty set is bounded
      CHECK(P->vertices().rows() == 0);
      CHECK(P->support(vec({1, 0}), opt) == -kInf);
      CHECK(P->is_subset(Polytope::box(vec({5, 5}), vec({6, 6})), opt));
      CHECK(P->irredundant(opt).is_trivially_empty());
      expect_invalid("polytope", [&] { P->chebyshev_center(opt); });
      expect_invalid("polytope", [&] { P->bounding_box(opt); });
      expect_invalid("polytope", [&] { P->affine_hull(opt); });
    }
    CHECK(C.redundant_rows(opt) == range(0, 3));
    CHECK_FALSE(Polytope::box(vec({0, 0}), vec({1, 1})).is_subset(E, opt));
    // Disjoint boxes intersect in the empty set.
    CHECK((Polytope::box(vec({0, 0}), vec({1, 1})) & Polytope::box(vec({2, 0}), vec({3, 1})))
              .is_empty(opt));
  }
  CHECK(C.irredundant({}, true).is_trivially_empty());
}

TEST_CASE("polytope: unbounded sets") {
  const Polytope half(rows({{1, 1}}), vec({1}));
  const Polytope strip(rows({{1, 0}, {-1, 0}}), vec({1, 1}));
  const Polytope cone(rows({{-1, 0}, {0, -1}}), vec({0, 0}));  // the positive quadrant
  const Polytope whole(Matrix(0, 2), Vector(0));
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    for (const Polytope* P : {&half, &strip, &cone, &whole}) {
      CHECK_FALSE(P->is_bounded(opt));
      CHECK_FALSE(P->is_empty(opt));
      CHECK_THROWS_AS(P->vertices(), corral::UnboundedSetError);
      CHECK_THROWS_AS(P->vertices(true), corral::UnboundedSetError);
    }
    CHECK(half.support(vec({1, 1}), opt) == doctest::Approx(1.0));
    CHECK(half.support(vec({1, 0}), opt) == kInf);
    CHECK(cone.support(vec({-1, -2}), opt) == doctest::Approx(0.0));
    CHECK_THROWS_AS(half.chebyshev_center(opt), corral::UnboundedSetError);
    CHECK(strip.chebyshev_center(opt).radius == doctest::Approx(1.0));
    // Redundancy removal on unbounded sets: the strip with x <= 2 and 2x <= 3 added keeps
    // its two rows; x + 0.001 y <= 5 is not implied (y is free) and stays.
    const Polytope S(rows({{1, 0}, {-1, 0}, {1, 0}, {2, 0}, {1, 0.001}}), vec({1, 1, 2, 3, 5}));
    CHECK(S.redundant_rows(opt) == std::vector<Index>{2, 3});
    // x >= 0, y >= 0, x + y >= 1, x <= 1: y >= 0 follows from the others (y >= 1 - x >= 0).
    const Polytope U(rows({{-1, 0}, {0, -1}, {-1, -1}, {1, 0}}), vec({0, 0, -1, 1}));
    CHECK(U.redundant_rows(opt) == std::vector<Index>{1});
  }
}

TEST_CASE("polytope: contains, one point and many") {
  const Polytope P = Polytope::box(vec({0, 0}), vec({1, 1}));
  CHECK(P.contains(vec({0.5, 0.5})));
  CHECK(P.contains(vec({1, 1})));
  CHECK_FALSE(P.contains(vec({1.5, 0.5})));
  // Default tolerance 1e-9 relative to max |b| = 1.
  CHECK(P.contains(vec({1 + 1e-12, 0.5})));
  CHECK_FALSE(P.contains(vec({1 + 1e-6, 0.5})));
  CHECK(P.contains(vec({1 + 1e-6, 0.5}), 1e-5));
  const std::vector<bool> got =
      P.contains_points(rows({{0.5, 0.5}, {2, 0}, {1 + 1e-6, 0}, {0, -1e-12}}));
  CHECK(got == std::vector<bool>{true, false, false, true});
  // Relative to scale: [0, 1000]^2 allows about 1e-6 absolute.
  const Polytope big = Polytope::box(vec({0, 0}), vec({1000, 1000}));
  CHECK(big.contains(vec({1000 + 1e-7, 0})));
  CHECK_FALSE(big.contains(vec({1000 + 1e-5, 0})));
}

TEST_CASE("polytope: intersection, affine image, preimage") {
  const Polytope square = Polytope::box(vec({0, 0}), vec({1, 1}));
  const Polytope tri = Polytope::simplex(2);
  // A square with a zero caller row first: the triangle's rows get caller indices 3..5.
  const Polytope P(rows({{0, 0}, {1, 0}, {0, 1}}), vec({1, 1, 1}));
  const Polytope X = P & tri;
  CHECK(X.source_rows() == std::vector<Index>{1, 2, 3, 4, 5});
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    CHECK(square.intersect(tri).same_set(tri, opt));
    CHECK(X.redundant_rows(opt) == std::vector<Index>{0, 1, 2});
  }
  // Rotation by 90 degrees and shift (2, 3): the square maps to [1, 2] x [3, 4].
  const Matrix R = rows({{0, -1}, {1, 0}});
  const Polytope img = square.affine_image(R, vec({2, 3}));
  CHECK(same_points(img.vertices(), rows({{2, 3}, {1, 3}, {2, 4}, {1, 4}})));
  CHECK(img.source_rows() == square.source_rows());
  expect_invalid("M", [&] { square.affine_image(rows({{1, 2}, {2, 4}})); });
  expect_invalid("M", [&] { square.affine_image(Matrix::Identity(3, 3)); });
  expect_invalid("t", [&] { square.affine_image(R, vec({1, 2, 3})); });
  // Preimage under diag(2, 1/2) shifted by (1, 0): {x : 0 <= 2 x1 + 1 <= 1, 0 <= x2/2 <= 1}
  // = [-1/2, 0] x [0, 2].
  const Polytope pre = square.preimage(rows({{2, 0}, {0, 0.5}}), vec({1, 0}));
  CHECK(same_points(pre.vertices(), rows({{-0.5, 0}, {0, 0}, {-0.5, 2}, {0, 2}})));
  // Into R^3 by M = [1 1 0; 0 0 1]: {0 <= x1 + x2 <= 1, 0 <= x3 <= 1}, unbounded along
  // (1, -1, 0).
  const Polytope pre3 = square.preimage(rows({{1, 1, 0}, {0, 0, 1}}));
  CHECK(pre3.dim() == 3);
  CHECK(pre3.contains(vec({100, -99.5, 0.5})));
  CHECK_FALSE(pre3.contains(vec({1, 1, 0.5})));
  CHECK_FALSE(pre3.is_bounded());
  // A zero map: everything if t is in the square, empty otherwise.
  CHECK(square.preimage(Matrix::Zero(2, 1), vec({0.5, 0.5})).num_rows() == 0);
  CHECK(square.preimage(Matrix::Zero(2, 1), vec({5, 0.5})).is_empty());
  expect_invalid("M", [&] { square.preimage(Matrix::Ones(3, 2)); });
  expect_invalid("Q", [&] { square.intersect(Polytope::simplex(3)); });
}

TEST_CASE("polytope: subsets and equal sets") {
  const Polytope inner = Polytope::box(vec({0.2, 0.2}), vec({0.8, 0.8}));
  const Polytope outer = Polytope::box(vec({0, 0}), vec({1, 1}));
  const Polytope hull =
      Polytope::from_vertices(rows({{0, 0}, {1, 0}, {0, 1}, {1, 1}, {0.5, 0.5}, {1, 1}}));
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    CHECK(inner.is_subset(outer, opt));
    CHECK_FALSE(outer.is_subset(inner, opt));
    CHECK(Polytope::box(vec({0, 0}), vec({1, 0.5})).is_subset(outer, opt));
    CHECK_FALSE(Polytope::box(vec({0, 0}), vec({1.001, 0.5})).is_subset(outer, opt));
    CHECK(hull.same_set(outer, opt));
    CHECK_FALSE(inner.same_set(outer, opt));
    CHECK(Polytope(rows({{1, 0}}), vec({0})).is_subset(Polytope(Matrix(0, 2), Vector(0)), opt));
    CHECK_FALSE(Polytope(rows({{1, 0}}), vec({0})).is_subset(outer, opt));
    expect_invalid("Q", [&] { inner.is_subset(Polytope::simplex(3), opt); });
  }
  CHECK(hull.num_rows() == 4);
}

TEST_CASE("polytope: progress callback and cancellation") {
  // 200 rows tangent-ish to the unit disc (cos θ, sin θ)·x <= 1 + (i mod 3) * 0.1, in R^2:
  // only the rows with offset 1 at distinct angles can be facets; enough rows for several
  // progress reports.
  const Index m = 200;
  Matrix A(m, 2);
  Vector b(m);
  for (Index i = 0; i < m; ++i) {
    const double th = 2 * kPi * static_cast<double>(i) / static_cast<double>(m);
    A.row(i) << std::cos(th), std::sin(th);
    b(i) = 1.0 + 0.1 * static_cast<double>(i % 3);
  }
  const Polytope P(A, b);
  Options opt;
  long calls = 0, last_done = -1;
  bool monotone = true;
  opt.progress = [&](const corral::Progress& p) {
    ++calls;
    monotone = monotone && p.done >= last_done && p.done <= p.total;
    last_done = p.done;
    return true;
  };
  const Polytope Q = P.irredundant(opt);
  CHECK(calls > 0);
  CHECK(monotone);
  CHECK(Q.same_set(P));
  opt.progress = [](const corral::Progress&) { return false; };
  CHECK_THROWS_AS(P.irredundant(opt), corral::CancelledError);
  CHECK_THROWS_AS(P.redundant_rows(opt), corral::CancelledError);
}

TEST_CASE("polytope: bad input names the argument") {
  const Polytope sq = Polytope::box(vec({0, 0}), vec({1, 1}));
  expect_invalid("A", [] { Polytope(rows({{kNaN, 0}}), vec({1})); });
  expect_invalid("A", [] { Polytope(rows({{kInf, 0}}), vec({1})); });
  expect_invalid("b", [] { Polytope(rows({{1, 0}}), vec({kNaN})); });
  expect_invalid("b", [] { Polytope(rows({{1, 0}}), vec({1, 2})); });
  expect_invalid("A", [] { Polytope(Matrix(1, 0), vec({1})); });
  expect_invalid("n", [] { Polytope(Index(0)); });
  expect_invalid("lower", [] { Polytope::box(vec({0, 2}), vec({1, 1})); });
  expect_invalid("lower", [] { Polytope::box(vec({kNaN, 0}), vec({1, 1})); });
  expect_invalid("upper", [] { Polytope::box(vec({0, 0}), vec({1, kNaN})); });
  expect_invalid("lower", [] { Polytope::box(vec({kInf, 0}), vec({kInf, 1})); });
  expect_invalid("upper", [] { Polytope::box(vec({0, -kInf}), vec({1, -kInf})); });
  expect_invalid("upper", [] { Polytope::box(vec({0, 0}), vec({1, 1, 1})); });
  expect_invalid("n", [] { Polytope::simplex(0); });
  expect_invalid("n", [] { Polytope::empty(0); });
  expect_invalid("V", [] { Polytope::from_vertices(rows({{0, kNaN}})); });
  expect_invalid("x", [&] { sq.contains(vec({0.5})); });
  expect_invalid("x", [&] { sq.contains(vec({kNaN, 0.5})); });
  expect_invalid("direction", [&] { sq.support(vec({1, 0, 0})); });
  expect_invalid("directions", [&] { sq.support_many(Matrix::Ones(2, 3)); });
  Options bad;
  bad.backend = "no-such-backend";
  expect_invalid("backend", [&] { sq.is_empty(bad); });
  expect_invalid("backend", [&] { sq.irredundant(bad); });
  expect_invalid("backend", [&] { sq.chebyshev_center(bad); });
  expect_invalid("tol", [] { corral::set_default_tol(0.5); });
  expect_invalid("tol", [] { corral::set_default_tol(-1.0); });
}

// Defects found and fixed: these cases keep them fixed.

TEST_CASE("polytope: rows parallel inside the affine hull of flat unbounded sets") {
  // Flat and unbounded: rows 5, 6 (identical) and 8 give -2x + 2y - z = 2. On that plane
  // z = -2x + 2y - 2, so row 1 (-2x + 2y + 2z <= 0) reads -x + y <= 2/3 and row 0
  // (-2x + 2y <= 2) reads -x + y <= 1: row 0 is redundant. Rows 2, 3, 4 are implied too;
  // the irredundant rows are 1, 5, 7, 8. (The two rows are parallel in the hull only up to
  // rounding; the cdd-exact LP backend once kept row 0 for lack of a duplicate filter there.)
  const Polytope P(rows({{-2, 2, 0},
                         {-2, 2, 2},
                         {1, 1, -1},
                         {0, 2, 0},
                         {2, 0, -1},
                         {-2, 2, -1},
                         {-2, 2, -1},
                         {0, 2, -2},
                         {2, -2, 1}}),
                   vec({2, 0, 0, 1, 0, 2, 2, 0, -2}));
  const std::vector<Index> expected{1, 5, 7, 8};
  // Rows 2 and 4 give 2x + y - z = -2, so z = 2x + y + 2; then row 0 reads x <= 0, row 1
  // x <= -4, row 3 x <= -1: only row 1 is needed, and keeping row 0 instead enlarges the set.
  const Polytope W(rows({{2, 0, 0}, {-1, -1, 1}, {2, 1, -1}, {-2, -2, 2}, {-2, -1, 1}}),
                   vec({0, -2, -2, 2, 2}));
  const std::vector<Index> expected_w{1, 2, 4};
  CHECK(sorted(P.irredundant({}, true).source_rows()) == expected);
  CHECK(sorted(W.irredundant({}, true).source_rows()) == expected_w);
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    CHECK(sorted(P.irredundant(opt).source_rows()) == expected);
    CHECK(sorted(W.irredundant(opt).source_rows()) == expected_w);
    CHECK(W.irredundant(opt).same_set(W));
  }
}

TEST_CASE("polytope: exact redundancy removal counts its LPs") {
  // cddlib solves one LP per row; the Info of the exact path reports them.
  const Polytope P(rows({{1, 0}, {0, 1}, {-1, 0}, {0, -1}, {1, 1}}), vec({1, 1, 0, 0, 3}));
  corral::Info info;
  P.irredundant({}, true, &info);
  CHECK(info.lp_solves > 0);
}

TEST_CASE("polytope: flat set with no row outside its affine hull") {
  // Once crashed (chebyshev_solver read past A when A had 0 rows). The line {x = 1} in R^2 and the
  // plane {2x + y = 2} in R^3 (with a parallel, redundant 2x + y <= 5): every row is an equality or
  // parallel to the hull.
  for (const std::string& backend : lp::backends()) {
    CAPTURE(backend);
    const Options opt = with_backend(backend);
    const Polytope L(rows({{1, 0}, {-1, 0}}), vec({1, -1}));
    CHECK(sorted(L.irredundant(opt).source_rows()) == std::vector<Index>{0, 1});
    const Polytope H(rows({{-2, -1, 0}, {2, 1, 0}, {2, 1, 0}}), vec({-2, 2, 5}));
    CHECK(sorted(H.irredundant(opt).source_rows()) == std::vector<Index>{0, 1});
  }
}
