// Tests of corral::max_admissible_set (admissible.hpp) against sets that follow from the
// definition O_∞ = {x : A^k x ∈ X for all k >= 0}, worked out in the comments (mind the signs
// and the asymmetric limits). The comparison with an independent loop on scipy's HiGHS is in
// the Python tests.

#include <doctest/doctest.h>

#include <corral/corral.hpp>

#include "test_helpers.hpp"

#include <cmath>

using corral::Index;
using corral::Matrix;
using corral::Polytope;
using corral::Vector;

namespace {

Matrix scalar(double a) { return Matrix::Constant(1, 1, a); }

// rho times the rotation by th (radians).
Matrix damped_rotation(double rho, double th) {
  Matrix A(2, 2);
  A << rho * std::cos(th), -rho * std::sin(th), rho * std::sin(th), rho * std::cos(th);
  return A;
}

Polytope interval(double lo, double hi) {
  Vector l(1), h(1);
  l << lo;
  h << hi;
  return Polytope::box(l, h);
}

}  // namespace

TEST_CASE("admissible: 0 <= a < 1 keeps any interval around 0") {
  // |a x| <= |x| and a x has the sign of x: a x stays in [lo, hi] whenever x does. t* = 0.
  for (double a : {0.0, 0.3, 0.99}) {
    CAPTURE(a);
    const corral::AdmissibleResult r = corral::max_admissible_set(scalar(a), interval(-1, 2));
    CHECK(r.converged);
    CHECK(r.steps == 0);
    CHECK(r.set.same_set(interval(-1, 2)));
    CHECK(r.conditions.origin_interior);
    CHECK(r.conditions.observable_spectral_radius == doctest::Approx(a));
  }
}

TEST_CASE("admissible: a negative a shrinks an asymmetric interval") {
  // a = -0.8, X = [-1, 0.5]. Step 1: a x ∈ X means -0.8 x <= 0.5 (x >= -0.625) and
  // -0.8 x >= -1 (x <= 1.25), so O_1 = [-0.625, 0.5]. Step 2: 0.64 x ∈ X on O_1:
  // 0.64 * -0.625 = -0.4 >= -1 and 0.64 * 0.5 = 0.32 <= 0.5: nothing new, t* = 1.
  const corral::AdmissibleResult r = corral::max_admissible_set(scalar(-0.8), interval(-1, 0.5));
  CHECK(r.converged);
  CHECK(r.steps == 1);
  CHECK(r.set.same_set(interval(-0.625, 0.5)));
}

TEST_CASE("admissible: a non-negative diagonal stable A keeps a box") {
  // Each coordinate is scaled by d_j in [0, 1) with its sign kept: the box is invariant.
  Matrix A = Matrix::Zero(3, 3);
  A.diagonal() << 0.9, 0.0, 0.5;
  Vector lo(3), hi(3);
  lo << -1, -2, -0.5;
  hi << 3, 1, 0.25;
  const corral::AdmissibleResult r = corral::max_admissible_set(A, Polytope::box(lo, hi));
  CHECK(r.converged);
  CHECK(r.steps == 0);
  CHECK(r.set.same_set(Polytope::box(lo, hi)));
}

TEST_CASE("admissible: a nilpotent A gives the first n pre-images") {
  // Shift x+ = (x2, x3, 0): A^k x shifts by k. With X = [-1, 1]^3 ∩ {x1 + x2 + x3 <= 1}:
  // O_∞ = ∩_{k<3} A^{-k} X, and A^3 = 0 adds 0 ∈ X. Written out: |x_i| <= 1,
  // x1 + x2 + x3 <= 1, x2 + x3 <= 1, x3 <= 1 (the last two from k = 1, 2).
  Matrix A = Matrix::Zero(3, 3);
  A(0, 1) = 1.0;
  A(1, 2) = 1.0;
  const Polytope box = Polytope::box(-Vector::Ones(3), Vector::Ones(3));
  Matrix G(7, 3);
  G << box.A(), corral::test::rows({{1, 1, 1}});
  Vector f(7);
  f << box.b(), 1.0;
  const Polytope X(G, f);
  const corral::AdmissibleResult r = corral::max_admissible_set(A, X);
  CHECK(r.converged);
  Matrix E(8, 3);
  E << box.A(), corral::test::rows({{1, 1, 1}, {0, 1, 1}});
  Vector e(8);
  e << box.b(), 1.0, 1.0;
  CHECK(r.set.same_set(Polytope(E, e)));
  CHECK(r.steps <= 2);  // O_2 = O_3 at the latest (A^3 = 0)
  CHECK(r.steps == 1);  // k = 1 adds x2 + x3 <= 1; k = 2 gives x3 <= 1, a row of the box
}

TEST_CASE("admissible: unobservable directions are split off and stay free") {
  // x+ = diag(0.5, 2) x with X = {|x1| <= 1}: x2 (unstable) is not seen by X's rows, so the
  // set is X itself, unbounded along x2, and the observable part has spectral radius 0.5.
  Matrix A = Matrix::Zero(2, 2);
  A(0, 0) = 0.5;
  A(1, 1) = 2.0;
  const Polytope X(corral::test::rows({{1, 0}, {-1, 0}}), Vector::Ones(2));
  const corral::AdmissibleResult r = corral::max_admissible_set(A, X);
  CHECK(r.converged);
  CHECK(r.conditions.observable_dim == 1);
  CHECK(r.conditions.observable_spectral_radius == doctest::Approx(0.5));
  CHECK(r.set.same_set(X));
  CHECK_FALSE(r.set.is_bounded());
}

TEST_CASE("admissible: an unstable observable part raises, 0 outside X gives the empty set") {
  CHECK_THROWS_AS(corral::max_admissible_set(scalar(1.01), interval(-1, 1)),
                  corral::NotFinitelyDeterminedError);
  // a = 0.5 and X = [1, 2]: every trajectory tends to 0, which is not in X.
  const corral::AdmissibleResult r = corral::max_admissible_set(scalar(0.5), interval(1, 2));
  CHECK(r.converged);
  CHECK(r.set.is_empty());
  CHECK_FALSE(r.conditions.origin_interior);
  CHECK_THROWS_AS(corral::max_admissible_set(Matrix::Identity(2, 2), interval(-1, 1)),
                  corral::InvalidInputError);
}

TEST_CASE("admissible: a lightly damped rotation needs many steps and converges") {
  // A = 0.98 R(0.3) on the square [-1, 1]^2: the set is the square cut by rotated, shrunk
  // copies. Checked from the definition: every vertex of the set stays in X for 400 steps
  // and is mapped into the set (A S ⊆ S, enough at the vertices of a convex set).
  const Matrix A = damped_rotation(0.98, 0.3);
  const Polytope X = Polytope::box(-Vector::Ones(2), Vector::Ones(2));
  const corral::AdmissibleResult r = corral::max_admissible_set(A, X);
  REQUIRE(r.converged);
  CHECK(r.steps > 1);
  const Matrix Vt = r.set.vertices();
  for (Index i = 0; i < Vt.rows(); ++i) {
    Vector x = Vt.row(i).transpose();
    for (int k = 0; k < 400; ++k, x = A * x) CHECK(X.contains(x, 1e-9));
    CHECK(r.set.contains(A * Vt.row(i).transpose(), 1e-9));  // A S ⊆ S at the vertices
  }
  // Maximality: a point just outside each facet leaves X within t* steps.
  const Polytope& S = r.set;
  const corral::ChebyshevBall ball = S.chebyshev_center();
  for (Index i = 0; i < S.num_rows(); ++i) {
    // The point of facet i nearest the centre, pushed out by 1e-6.
    const Vector a = S.A().row(i).transpose();
    Vector x = ball.center + (S.b()(i) - a.dot(ball.center) + 1e-6) * a;
    bool left = false;
    for (int k = 0; k <= r.steps && !left; ++k, x = A * x) left = !X.contains(x, 0.0);
    CHECK(left);
  }
}

TEST_CASE("admissible: closed loop with state, input and mixed limits") {
  // Scalar plant x+ = 1.5 x + u with u = -K x, K = 1: the closed loop is x+ = 0.5 x.
  // X = [-4, 4]; U = [-1, 1] gives |x| <= 1 (u = -x); the mixed limit x - 2u <= 1.5 gives
  // x + 2x = 3x <= 1.5, x <= 0.5. The closed loop keeps the sign and shrinks (0 <= 0.5 < 1),
  // so the set is [-4, 4] ∩ [-1, 1] ∩ {x <= 0.5} = [-1, 0.5] and t* = 0.
  const Matrix A = Matrix::Constant(1, 1, 1.5), B = Matrix::Constant(1, 1, 1.0),
               K = Matrix::Constant(1, 1, 1.0);
  const Polytope mixed(corral::test::rows({{1, -2}}), Vector::Constant(1, 1.5));
  const corral::AdmissibleResult r =
      corral::closed_loop_admissible_set(A, B, K, interval(-4, 4), interval(-1, 1), mixed);
  CHECK(r.converged);
  CHECK(r.steps == 0);
  CHECK(r.set.same_set(interval(-1, 0.5)));
  CHECK(r.conditions.observable_spectral_radius == doctest::Approx(0.5));
  CHECK_THROWS_WITH_AS(corral::closed_loop_admissible_set(A, B, Matrix::Ones(2, 1), interval(-4, 4),
                                                          interval(-1, 1), Polytope(2)),
                       doctest::Contains("K:"), corral::InvalidInputError);
}

TEST_CASE("admissible: certificates verify, and the constraint set itself fails when t* > 0") {
  // The rotation of the test above: its set carries certificates of A S ⊆ S and S ⊆ X that
  // check without LPs; X itself (t* > 0, so X is not invariant) fails verification.
  const Matrix A = damped_rotation(0.98, 0.3);
  const Polytope X = Polytope::box(-Vector::Ones(2), Vector::Ones(2));
  const corral::AdmissibleResult r = corral::max_admissible_set(A, X);
  REQUIRE(r.converged);
  REQUIRE(r.steps > 0);
  CHECK(r.certificate.holds);
  CHECK(r.worst_margin >= -1e-12);
  CHECK(r.certificate.invariance.rows.size() == static_cast<size_t>(r.set.num_rows()));
  for (const corral::RowCertificate& rc : r.certificate.invariance.rows)
    CHECK(rc.rows.size() <= 2);  // at most n non-zero multipliers
  // Re-checked from the stored certificate alone (no LP): the same verdict.
  const corral::InvarianceReport again =
      corral::verify_invariance(A, r.set, &r.certificate.invariance);
  CHECK(again.holds);
  CHECK(again.certificate.lp_solves == 0);
  // A tampered certificate fails: one multiplier halved.
  corral::Certificate bad = r.certificate.invariance;
  bad.rows[0].weights[0] *= 0.5;
  CHECK_FALSE(corral::verify_invariance(A, r.set, &bad).holds);
  // X is not invariant: the corner (1, 1) rotates out of the square.
  const corral::InvarianceReport rx = corral::verify_invariance(A, X);
  CHECK_FALSE(rx.holds);
  CHECK(rx.worst_margin < -0.01);
}

TEST_CASE("verify_invariance exact: margins in rationals, from the definition") {
  // S = [-1, 1]^2 and A = diag(1 + 2^-50, 1/2): the row x_1 <= 1 has max (1 + 2^-50) x_1 =
  // 1 + 2^-50 on S (support function of a box), so its margin is -2^-50 exactly: within the
  // tolerance (holds) but not exactly (holds_exactly), and never rounded to zero.
  const Polytope S = Polytope::box(-Vector::Ones(2), Vector::Ones(2));
  Matrix A = Matrix::Zero(2, 2);
  A(0, 0) = 1.0 + std::ldexp(1.0, -50);
  A(1, 1) = 0.5;
  const corral::InvarianceReport rep = corral::verify_invariance(A, S, nullptr, {}, true);
  REQUIRE(rep.worst_margin_exact.has_value());
  CHECK(rep.worst_margin_exact->numerator == "-1");
  CHECK(rep.worst_margin_exact->denominator == "1125899906842624");  // 2^50
  CHECK(rep.worst_margin == -std::ldexp(1.0, -50));
  CHECK(rep.holds);
  CHECK_FALSE(rep.holds_exactly);
  // A = diag(1, 1/2): margin exactly 0.
  A(0, 0) = 1.0;
  const corral::InvarianceReport zero = corral::verify_invariance(A, S, nullptr, {}, true);
  REQUIRE(zero.worst_margin_exact.has_value());
  CHECK(zero.worst_margin_exact->numerator == "0");
  CHECK(zero.holds_exactly);
  // A maximal admissible set: its stored certificate re-checked, margins exact and tiny.
  const Matrix R = damped_rotation(0.98, 0.3);
  const corral::AdmissibleResult r = corral::max_admissible_set(R, S);
  const corral::InvarianceReport ex =
      corral::verify_invariance(R, r.set, &r.certificate.invariance, {}, true);
  REQUIRE(ex.worst_margin_exact.has_value());
  CHECK(ex.holds);
  CHECK(std::abs(ex.worst_margin) < 1e-12);
  CHECK(ex.worst_row >= 0);
  CHECK(ex.worst_row < r.set.num_rows());
}
