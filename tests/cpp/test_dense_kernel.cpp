// Tests of the dense backend's simplex kernel (cpp/src/lp/dense_kernel.hpp) on its own: pivot
// rules that the public interface cannot select. Values are checked against scipy's HiGHS
// (computed once, quoted below) and against GLPK in the same run.

#include <doctest/doctest.h>

#include "test_helpers.hpp"

#include <corral/lp/check.hpp>
#include <corral/lp/solver.hpp>

#include <cstdint>
#include <random>
#include <vector>

#include "lp/dense_kernel.hpp"

namespace {

using corral::Index;
using corral::Matrix;
using corral::Vector;
using corral::test::rows;
using corral::test::vec;
namespace lp = corral::lp;
using lp::detail::DenseKernel;
using lp::detail::KernelStatus;

// Beale's cycling example (E. M. L. Beale, "Cycling in the dual simplex algorithm", Naval
// Research Logistics Quarterly 2, 1955), as usually quoted (from memory):
//   minimise -3/4 z4 + 20 z5 - 1/2 z6 + 6 z7
//   s.t. z1 + 1/4 z4 -  8 z5 -     z6 + 9 z7 = 0
//        z2 + 1/2 z4 - 12 z5 - 1/2 z6 + 3 z7 = 0
//        z3                  +     z6        = 1,   z >= 0.
// Dantzig's rule with the slack basis {z1, z2, z3} can cycle on it. Its optimum is -5/4
// (scipy.optimize.linprog, method="highs": z = (3/4, 0, 0, 1, 0, 1, 0)).
const double kBealeCost[7] = {0, 0, 0, -0.75, 20, -0.5, 6};
const double kBealeE[3][7] = {
    {1, 0, 0, 0.25, -8, -1, 9}, {0, 1, 0, 0.5, -12, -0.5, 3}, {0, 0, 1, 0, 0, 1, 0}};

// The kernel's dual pivots are primal simplex pivots on the standard-form problem
// min gᵀz s.t. E z = f, z >= 0, whose dual is max fᵀy s.t. Eᵀy <= g: the kernel solves the
// latter with A = Eᵀ, b = g, c = f, and the basis {z1, z2, z3} is the rows {0, 1, 2}.
struct BealeDual {
  Matrix A{7, 3};
  Vector b{7}, c{3};
  BealeDual() {
    for (Index i = 0; i < 7; ++i) {
      b(i) = kBealeCost[i];
      for (Index j = 0; j < 3; ++j) A(i, j) = kBealeE[j][i];
    }
    c << 0, 0, 1;
  }
};

KernelStatus run_from_slack_basis(BealeDual& P, int bland_after, DenseKernel& k) {
  k.settings.bland_after = bland_after;
  k.settings.max_pivots = 200;
  k.bind(&P.A, &P.b, &P.c, nullptr);
  REQUIRE(k.set_basis({0, 1, 2}));
  REQUIRE(k.dual_feasible());  // λ = f >= 0: the slack basis is feasible for Beale's problem
  REQUIRE(!k.primal_feasible());
  const KernelStatus st = k.dual();
  if (st != KernelStatus::feasible) return st;
  return k.primal(std::nullopt);
}

TEST_CASE("dense kernel: Beale's cycling example terminates at the optimum") {
  for (int bland_after : {0, 1, 5, 40}) {
    CAPTURE(bland_after);
    BealeDual P;
    DenseKernel k;
    REQUIRE(run_from_slack_basis(P, bland_after, k) == KernelStatus::optimal);
    CHECK(P.c.dot(k.point()) == doctest::Approx(-1.25).epsilon(1e-12));  // HiGHS: -5/4
    CHECK(k.pivots() < 50);
    // The multipliers of the basis rows are Beale's z at the optimum: z4 = z6 = 1, z1 = 3/4.
    Vector z = Vector::Zero(7);
    for (size_t p = 0; p < k.basis().size(); ++p) z(k.basis()[p]) = k.lambda()(Index(p));
    CHECK(z(0) == doctest::Approx(0.75));
    CHECK(z(3) == doctest::Approx(1.0));
    CHECK(z(5) == doctest::Approx(1.0));
  }
}

TEST_CASE("dense kernel: Beale's problem in its own form on the dense backend") {
  // max -gᵀz s.t. E z <= f, -E z <= -f, -z <= 0: optimum 5/4 (HiGHS, above).
  Matrix A(13, 7);
  Vector b(13), c(7);
  A.setZero();
  for (Index j = 0; j < 3; ++j)
    for (Index i = 0; i < 7; ++i) {
      A(j, i) = kBealeE[j][i];
      A(3 + j, i) = -kBealeE[j][i];
    }
  b << 0, 0, 1, 0, 0, -1, 0, 0, 0, 0, 0, 0, 0;
  for (Index i = 0; i < 7; ++i) {
    A(6 + i, i) = -1.0;
    c(i) = -kBealeCost[i];
  }
  const lp::Result r = lp::maximize(c, A, b, "dense");
  REQUIRE(r.status == lp::Status::optimal);
  CHECK(r.value == doctest::Approx(1.25).epsilon(1e-12));
  CHECK(r.fallbacks == 0);
  CHECK(lp::check_answer(c, A, b, r).ok);
}

// Random LPs with many rows through one vertex: Bland's rule from the first pivot and the
// default rules reach the same optimal value, which GLPK confirms.
TEST_CASE("dense kernel: Bland's rule and the default rules agree on degenerate LPs") {
  std::mt19937 gen(2024);
  auto uniform = [&gen](double lo, double hi) {
    return lo + (hi - lo) * (static_cast<double>(gen()) / 4294967296.0);
  };
  for (int trial = 0; trial < 60; ++trial) {
    const Index n = 2 + trial % 5, m = 4 * n + trial % 7;
    Matrix A(m, n);
    Vector b(m), c(n);
    for (Index i = 0; i < m; ++i) {
      for (Index j = 0; j < n; ++j) A(i, j) = uniform(-1, 1);
      // Half the rows pass through the vertex (1, ..., 1); the rest hold there strictly.
      b(i) = A.row(i).sum() + (i % 2 == 0 ? 0.0 : uniform(0.1, 1.0));
    }
    for (Index j = 0; j < n; ++j) c(j) = uniform(-1, 1);
    const lp::Result ref = lp::maximize(c, A, b, "glpk");
    for (int bland_after : {0, 40}) {
      CAPTURE(trial);
      CAPTURE(bland_after);
      DenseKernel k;
      k.settings.bland_after = bland_after;
      k.bind(&A, &b, &c, nullptr);
      k.reset(Vector::Constant(n, 1.0));  // start at the degenerate vertex itself
      const KernelStatus st = k.primal(std::nullopt);
      if (ref.status == lp::Status::unbounded) {
        CHECK(st == KernelStatus::unbounded);
        if (st == KernelStatus::unbounded) {
          CHECK((A * k.ray()).maxCoeff() <= 1e-9 * k.ray().norm());
          CHECK(c.dot(k.ray()) > 0);
        }
      } else {
        REQUIRE(ref.status == lp::Status::optimal);
        REQUIRE(st == KernelStatus::optimal);
        CHECK(c.dot(k.point()) == doctest::Approx(ref.value).epsilon(1e-9));
      }
    }
  }
}

}  // namespace
