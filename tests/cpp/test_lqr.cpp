// Tests of corral::lqr (lqr.hpp). Outside references: the scalar closed form worked out from
// the Riccati equation (below), and the Riccati equation itself checked directly. The
// comparison with scipy.linalg.solve_discrete_are is in tests/python/test_lqr.py.

#include <doctest/doctest.h>

#include <corral/lqr.hpp>

#include <array>
#include <cmath>

using corral::Matrix;

TEST_CASE("lqr: scalar systems give the closed form") {
  // b^2 p^2 + (r (1 - a^2) - q b^2) p - q r = 0 (the Riccati equation multiplied out), the
  // positive root, and k = a b p / (r + b^2 p).
  for (auto [a, b, q, r] : {std::array<double, 4>{1.2, 1.0, 1.0, 1.0},
                            {0.5, 2.0, 3.0, 0.1},
                            {-1.5, 0.3, 0.2, 4.0},
                            {0.0, 1.0, 1.0, 1.0}}) {
    CAPTURE(a);
    const double c = r * (1 - a * a) - q * b * b;
    const double p = (-c + std::sqrt(c * c + 4 * b * b * q * r)) / (2 * b * b);
    const double k = a * b * p / (r + b * b * p);
    const corral::LqrResult res = corral::lqr(Matrix::Constant(1, 1, a), Matrix::Constant(1, 1, b),
                                              Matrix::Constant(1, 1, q), Matrix::Constant(1, 1, r));
    CHECK(res.P(0, 0) == doctest::Approx(p).epsilon(1e-10));
    CHECK(res.K(0, 0) == doctest::Approx(k).epsilon(1e-10));
    CHECK(res.spectral_radius < 1.0);
  }
}

TEST_CASE("lqr: the Riccati equation holds and the loop is stable") {
  Matrix A(3, 3), B(3, 1);
  A << 1.0, 0.1, 0.0, 0.0, 1.0, 0.1, 0.0, 0.0, 1.05;  // a chain of integrators, one unstable
  B << 0.0, 0.0, 0.1;
  const Matrix Q = Matrix::Identity(3, 3), R = Matrix::Identity(1, 1) * 0.5;
  const corral::LqrResult res = corral::lqr(A, B, Q, R);
  const Matrix& P = res.P;
  const Matrix S = R + B.transpose() * P * B;
  const Matrix lhs =
      A.transpose() * P * A - A.transpose() * P * B * S.inverse() * B.transpose() * P * A + Q;
  CHECK((lhs - P).cwiseAbs().maxCoeff() <= 1e-9 * P.cwiseAbs().maxCoeff());
  CHECK((P - P.transpose()).cwiseAbs().maxCoeff() == 0.0);
  const Matrix Acl = A - B * res.K;
  CHECK(Acl.eigenvalues().cwiseAbs().maxCoeff() < 1.0);
}

TEST_CASE("lqr: unstabilisable pairs and bad weights raise naming the argument") {
  Matrix A = Matrix::Zero(2, 2), B(2, 1);
  A(0, 0) = 1.5;
  A(1, 1) = 0.5;
  B << 0.0, 1.0;  // the unstable mode is not reachable
  CHECK_THROWS_WITH_AS(corral::lqr(A, B, Matrix::Identity(2, 2), Matrix::Identity(1, 1)),
                       doctest::Contains("A, B:"), corral::InvalidInputError);
  CHECK_THROWS_WITH_AS(corral::lqr(A, B, -Matrix::Identity(2, 2), Matrix::Identity(1, 1)),
                       doctest::Contains("Q:"), corral::InvalidInputError);
  CHECK_THROWS_WITH_AS(corral::lqr(A, B, Matrix::Identity(2, 2), Matrix::Zero(1, 1)),
                       doctest::Contains("R:"), corral::InvalidInputError);
  CHECK_THROWS_WITH_AS(
      corral::lqr(Matrix::Identity(2, 3), B, Matrix::Identity(2, 2), Matrix::Identity(1, 1)),
      doctest::Contains("A:"), corral::InvalidInputError);
}
