// Tests of corral::pre_set, controllable_set (controllable.hpp) and dual_mode_region
// (dual_mode.hpp) against the definitions and the closed-form cost of the LQR gain. The
// comparisons with scipy (HiGHS loops, ConvexHull, solve_discrete_are/lyapunov) and the
// simulations are in the Python tests.

#include <doctest/doctest.h>

#include <corral/corral.hpp>

#include "test_helpers.hpp"

using corral::Matrix;
using corral::Polytope;
using corral::Vector;

TEST_CASE("pre_set and dual_mode_region: consistency with the definitions") {
  // A cart sampled at 0.2 s (invented): Pre of the box [-1, 1]^2 under |u| <= 1 contains the
  // box's own pre-image under A with u = 0, and the dual-mode state region equals the
  // projection of the augmented set.
  Matrix A(2, 2), B(2, 1);
  A << 1, 0.2, 0, 1;
  B << 0.02, 0.2;
  const Polytope X = Polytope::box(-corral::test::vec({4, 1.5}), corral::test::vec({4, 1.5}));
  const Polytope U = Polytope::box(-Vector::Ones(1), Vector::Ones(1));
  const Polytope C = Polytope::box(-Vector::Ones(2), Vector::Ones(2));
  const Polytope pre = corral::pre_set(A, B, C, U, Polytope(3));
  CHECK(C.preimage(A).is_subset(pre));
  const Matrix Q = Matrix::Identity(2, 2), R = Matrix::Identity(1, 1);
  const corral::LqrResult g = corral::lqr(A, B, Q, R);
  const corral::DualModeRegion reg =
      corral::dual_mode_region(A, B, g.K, X, U, 3, &Q, &R, Polytope(3));
  REQUIRE(reg.converged);
  const Polytope proj = reg.augmented.project({0, 1});
  CHECK(proj.same_set(reg.state_region));
  CHECK(reg.terminal_set.is_subset(reg.state_region));
  // LQR gain: H = blockdiag(R + Bᵀ P B) (Kouvaritakis & Cannon 2016, ch. 2), H_xc = 0.
  const double blk = (R + B.transpose() * g.P * B)(0, 0);
  CHECK((reg.H - blk * Matrix::Identity(3, 3)).cwiseAbs().maxCoeff() < 1e-9);
  CHECK(reg.H_xc.cwiseAbs().maxCoeff() < 1e-9);
  CHECK_THROWS_AS(corral::dual_mode_region(A, B, g.K, X, U, 0, nullptr, nullptr, Polytope(3)),
                  corral::InvalidInputError);
}
