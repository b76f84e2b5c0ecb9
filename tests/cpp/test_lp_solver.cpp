// Tests of corral/lp/solver.hpp and corral/lp/check.hpp: every behaviour on every backend.
//
// Optimal values of the small LPs are worked out by hand in the comments beside them. Answers
// are checked with check_answer() and, independently, by the arithmetic in kkt_ok() below
// (primal feasibility, λ >= 0, Aᵀλ = c, bᵀλ = value). Optimisers and dual vectors are never
// compared with fixed values: degenerate LPs have many of both.

#include <doctest/doctest.h>

#include "test_helpers.hpp"

#include <corral/errors.hpp>
#include <corral/lp/check.hpp>
#include <corral/lp/solver.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <functional>
#include <limits>
#include <random>
#include <string>
#include <thread>
#include <vector>

namespace {

using corral::Index;
using corral::Matrix;
using corral::Vector;
using corral::test::Rng;
using corral::test::rows;
using corral::test::vec;
using corral::test::vstack;
namespace lp = corral::lp;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// The box lower <= x <= upper as rows [I; -I], b = [upper; -lower].
void box(const Vector& lower, const Vector& upper, Matrix& A, Vector& b) {
  const Index n = lower.size();
  A = Matrix::Zero(2 * n, n);
  b.resize(2 * n);
  for (Index j = 0; j < n; ++j) {
    A(j, j) = 1.0;
    b(j) = upper(j);
    A(n + j, j) = -1.0;
    b(n + j) = -lower(j);
  }
}

// max c·x over a box, by hand: each coordinate at the bound its cost points to.
double box_max(const Vector& c, const Vector& lower, const Vector& upper) {
  double v = 0.0;
  for (Index j = 0; j < c.size(); ++j) v += c(j) > 0 ? c(j) * upper(j) : c(j) * lower(j);
  return v;
}

// Independent check of an optimal answer, written without check_answer():
// primal feasibility a_i·x <= b_i (+ scaled tolerance), value = c·x, and, when the backend
// provides duals, λ >= 0, Aᵀλ = c and bᵀλ = value (strong duality), each with a tolerance
// scaled by the magnitudes that enter the sum.
bool kkt_ok(const Vector& c, const Matrix& A, const Vector& b, const lp::Result& r, double tol,
            bool expect_duals, std::string& why) {
  const Index m = A.rows(), n = A.cols();
  if (r.status != lp::Status::optimal) {
    why = "not optimal";
    return false;
  }
  if (r.x.size() != n) {
    why = "x has length " + std::to_string(r.x.size());
    return false;
  }
  double xnorm = 0.0;
  for (Index j = 0; j < n; ++j) xnorm = std::max(xnorm, std::abs(r.x(j)));
  for (Index i = 0; i < m; ++i) {
    double ax = 0.0, scale = std::abs(b(i));
    for (Index j = 0; j < n; ++j) {
      ax += A(i, j) * r.x(j);
      scale += std::abs(A(i, j)) * xnorm;
    }
    if (ax - b(i) > tol * (scale + 1e-300)) {
      why = "row " + std::to_string(i) + " violated by " + std::to_string(ax - b(i));
      return false;
    }
  }
  double cx = 0.0, cx_scale = 0.0;
  for (Index j = 0; j < n; ++j) {
    cx += c(j) * r.x(j);
    cx_scale += std::abs(c(j) * r.x(j));
  }
  if (std::abs(cx - r.value) > tol * (1.0 + cx_scale)) {
    why = "value " + std::to_string(r.value) + " differs from c·x " + std::to_string(cx);
    return false;
  }
  if (!expect_duals) return true;
  if (r.duals.size() != m) {
    why = "duals have length " + std::to_string(r.duals.size()) + ", expected " + std::to_string(m);
    return false;
  }
  // Signs are judged on the multipliers of the rows scaled to unit norm, λ_i ‖a_i‖, so that
  // rescaling a row does not change the verdict.
  Vector weighted(m);
  for (Index i = 0; i < m; ++i) weighted(i) = r.duals(i) * A.row(i).norm();
  const double lmax = m > 0 ? weighted.cwiseAbs().maxCoeff() : 0.0;
  for (Index i = 0; i < m; ++i)
    if (weighted(i) < -tol * lmax) {
      why = "dual " + std::to_string(i) + " negative: " + std::to_string(r.duals(i));
      return false;
    }
  for (Index j = 0; j < n; ++j) {
    double s = -c(j), scale = std::abs(c(j));
    for (Index i = 0; i < m; ++i) {
      s += A(i, j) * r.duals(i);
      scale += std::abs(A(i, j) * r.duals(i));
    }
    if (std::abs(s) > tol * (1.0 + scale)) {
      why = "A^T lambda - c = " + std::to_string(s) + " in column " + std::to_string(j);
      return false;
    }
  }
  double bl = 0.0, bl_scale = 0.0;
  for (Index i = 0; i < m; ++i) {
    bl += b(i) * r.duals(i);
    bl_scale += std::abs(b(i) * r.duals(i));
  }
  if (std::abs(bl - r.value) > tol * (1.0 + std::abs(r.value) + bl_scale)) {
    why = "b^T lambda = " + std::to_string(bl) + " differs from value " + std::to_string(r.value);
    return false;
  }
  return true;
}

// Solves max c·x s.t. A x <= b on `backend`, expects an optimum with value `expected`, and checks
// the answer twice (check_answer and kkt_ok).
void expect_optimum(const std::string& backend, const Vector& c, const Matrix& A, const Vector& b,
                    double expected, double tol = 1e-9) {
  const lp::Capabilities caps = lp::capabilities(backend);
  const lp::Result r = lp::maximize(c, A, b, backend);
  CHECK(lp::to_string(r.status) == std::string("optimal"));
  if (r.status != lp::Status::optimal) return;
  CHECK(r.backend == backend);
  CHECK(r.value == doctest::Approx(expected).epsilon(tol).scale(1.0));
  const lp::CheckReport rep = lp::check_answer(c, A, b, r, tol);
  CHECK_MESSAGE(rep.ok, rep.failure);
  std::string why;
  CHECK_MESSAGE(kkt_ok(c, A, b, r, tol, caps.duals, why), why);
  if (caps.duals) CHECK(r.duals.size() == A.rows());
  if (!caps.duals) CHECK_FALSE(r.has_duals());
}

void expect_infeasible(const std::string& backend, const Vector& c, const Matrix& A,
                       const Vector& b) {
  const lp::Result r = lp::maximize(c, A, b, backend);
  CHECK(lp::to_string(r.status) == std::string("infeasible"));
  if (r.status != lp::Status::infeasible) return;
  CHECK(r.backend == backend);
  CHECK_FALSE(r.has_duals());
  const lp::CheckReport rep = lp::check_answer(c, A, b, r);
  CHECK_MESSAGE(rep.ok, rep.failure);
  if (r.has_farkas()) {
    // y >= 0, Aᵀy = 0, bᵀy < 0 proves emptiness (Farkas' lemma), checked here by hand.
    REQUIRE(r.farkas.size() == A.rows());
    CHECK(r.farkas.minCoeff() >= 0.0);
    const Vector aty = A.transpose() * r.farkas;
    CHECK(aty.cwiseAbs().maxCoeff() <=
          1e-9 * r.farkas.cwiseAbs().maxCoeff() * std::max(1.0, A.cwiseAbs().maxCoeff()));
    CHECK(b.dot(r.farkas) < 0.0);
  }
}

void expect_unbounded(const std::string& backend, const Vector& c, const Matrix& A,
                      const Vector& b) {
  const lp::Capabilities caps = lp::capabilities(backend);
  const lp::Result r = lp::maximize(c, A, b, backend);
  CHECK(lp::to_string(r.status) == std::string("unbounded"));
  if (r.status != lp::Status::unbounded) return;
  CHECK(r.backend == backend);
  CHECK_FALSE(r.has_duals());
  const lp::CheckReport rep = lp::check_answer(c, A, b, r);
  CHECK_MESSAGE(rep.ok, rep.failure);
  if (r.has_ray()) {
    // A d <= 0 and c·d > 0, by hand.
    REQUIRE(r.ray.size() == A.cols());
    if (A.rows() > 0) CHECK((A * r.ray).maxCoeff() <= 1e-12 * r.ray.norm());
    CHECK(c.dot(r.ray) > 0.0);
  }
  if (caps.ray_index && A.rows() > 0) {
    // GLPK counts rows first, then columns.
    CHECK(r.unbounded_index >= 0);
    CHECK(r.unbounded_index < A.rows() + A.cols());
  }
  if (!caps.ray_index) CHECK(r.unbounded_index == -1);
}

// Runs `fn` and expects InvalidInputError whose message names `argument` (the library's messages
// are "<argument>: <problem>", corral/errors.hpp).
void expect_invalid(const std::function<void()>& fn, const std::string& argument) {
  CAPTURE(argument);
  bool thrown = false;
  try {
    fn();
  } catch (const corral::InvalidInputError& e) {
    thrown = true;
    const std::string what = e.what();
    CAPTURE(what);
    CHECK(what.rfind(argument + ":", 0) == 0);
  } catch (const std::exception& e) {
    FAIL("wrong exception type: ", e.what());
  }
  CHECK_MESSAGE(thrown, "no InvalidInputError");
}

// Restores the process default backend when a test changed it.
struct DefaultBackendGuard {
  std::string saved = lp::default_backend();
  ~DefaultBackendGuard() { lp::set_default_backend(saved); }
};

}  // namespace

TEST_CASE("lp: backends are listed and named") {
  const auto names = lp::backends();
  REQUIRE(!names.empty());
  for (const auto& n : {"glpk", "cdd", "cdd-exact"})
    CHECK(std::find(names.begin(), names.end(), n) != names.end());
  CHECK(std::find(names.begin(), names.end(), lp::default_backend()) != names.end());
  for (const auto& backend : names) {
    CAPTURE(backend);
    auto solver = lp::make_solver(rows({{1.0}}), vec({1.0}), vec({1.0}), backend);
    CHECK(solver->backend() == backend);
    CHECK(solver->dim() == 1);
    CHECK(solver->num_rows() == 1);
  }
  CHECK(std::string(lp::to_string(lp::Status::optimal)) == "optimal");
  CHECK(std::string(lp::to_string(lp::Status::infeasible)) == "infeasible");
  CHECK(std::string(lp::to_string(lp::Status::unbounded)) == "unbounded");
  CHECK(std::string(lp::to_string(lp::Status::stopped)) == "stopped");
  CHECK(std::string(lp::to_string(lp::Status::numerical)) == "numerical");
  // What the adapters document (glpk_backend.cpp, cdd_backend.cpp).
  CHECK(lp::capabilities("glpk").ray_index);
  CHECK(lp::capabilities("glpk").duals);
  CHECK(lp::capabilities("cdd-exact").exact);
  CHECK_FALSE(lp::capabilities("cdd").exact);
}

TEST_CASE("lp: the default backend is used when none is named") {
  DefaultBackendGuard guard;
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    lp::set_default_backend(backend);
    CHECK(lp::default_backend() == backend);
    const lp::Result r = lp::maximize(vec({1.0}), rows({{2.0}}), vec({3.0}));
    CHECK(r.backend == backend);
    CHECK(r.value == doctest::Approx(1.5));  // by hand: 2 x <= 3
    CHECK(lp::make_solver(rows({{1.0}}), vec({1.0}))->backend() == backend);
  }
}

TEST_CASE("lp: box") {
  const Vector lower = vec({-1.0, -2.0, 0.5}), upper = vec({2.0, 1.0, 3.0});
  Matrix A;
  Vector b;
  box(lower, upper, A, b);
  // By hand: max c·x over a box puts x_j at upper_j when c_j > 0, at lower_j when c_j < 0.
  const std::vector<Vector> costs = {vec({1.0, -2.0, 0.5}),   // 2 + 4 + 1.5 = 7.5
                                     vec({-1.0, 1.0, -1.0}),  // 1 + 1 - 0.5 = 1.5
                                     vec({0.0, 0.0, 1.0}),    // 3 (a face of optima)
                                     vec({0.0, 0.0, 0.0})};   // 0 (every point is optimal)
  const double by_hand[] = {7.5, 1.5, 3.0, 0.0};
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    for (size_t k = 0; k < costs.size(); ++k) {
      CAPTURE(k);
      CHECK(box_max(costs[k], lower, upper) == by_hand[k]);
      expect_optimum(backend, costs[k], A, b, by_hand[k]);
    }
  }
}

TEST_CASE("lp: simplex-shaped sets") {
  // {x >= 0, sum_j x_j / s_j <= 1}: vertices 0 and s_j e_j, so by hand
  // max c·x = max(0, max_j c_j s_j).
  const Index n = 4;
  const Vector s = vec({1.0, 2.0, 0.5, 4.0});
  Matrix A = Matrix::Zero(n + 1, n);
  Vector b = Vector::Zero(n + 1);
  for (Index j = 0; j < n; ++j) {
    A(j, j) = -1.0;
    A(n, j) = 1.0 / s(j);
  }
  b(n) = 1.0;
  const std::vector<std::pair<Vector, double>> cases = {
      {vec({1.0, 1.0, 1.0, 1.0}), 4.0},      // vertex 4 e_4
      {vec({3.0, 1.0, 1.0, 0.5}), 3.0},      // 3·1 = 3 > 2, 0.5, 2
      {vec({-1.0, -1.0, -1.0, -1.0}), 0.0},  // the origin
      {vec({-1.0, 0.25, 2.0, -3.0}), 1.0},   // 2·0.5 = 1 > 0.25·2 = 0.5
      {vec({1.0, 0.5, 2.0, 0.25}), 1.0},     // all four vertices tie at 1: a face of optima
  };
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    for (size_t k = 0; k < cases.size(); ++k) {
      CAPTURE(k);
      expect_optimum(backend, cases[k].first, A, b, cases[k].second);
    }
    // The standard simplex {x >= 0, sum x <= 1} in R^6, c = (1..6): value 6 (by hand).
    Matrix S = vstack(Matrix(-Matrix::Identity(6, 6)), Matrix::Ones(1, 6));
    Vector t = Vector::Zero(7);
    t(6) = 1.0;
    expect_optimum(backend, Vector::LinSpaced(6, 1.0, 6.0), S, t, 6.0);
  }
}

TEST_CASE("lp: degenerate vertex with 30 tight rows") {
  // 30 rows a_k = (cos θ_k, sin θ_k, 1), θ_k = 2πk/30, all tight at v = (1, 2, -1):
  // b_k = a_k·v. The set is a cone with apex v. c = (0.1, 0.2, 1) lies in the cone spanned by
  // the a_k (|(0.1, 0.2)| = 0.224 is inside the 30-gon of inradius cos(π/30) ≈ 0.9945), so by
  // hand v is optimal and the value is c·v = 0.1 + 0.4 - 1 = -0.5. The duals are not unique
  // (any λ >= 0 with Σ λ_k a_k = c), so only their properties are checked.
  const Index m = 30;
  const Vector v = vec({1.0, 2.0, -1.0});
  Matrix A(m, 3);
  Vector b(m);
  const double pi = std::acos(-1.0);
  for (Index k = 0; k < m; ++k) {
    const double th = 2.0 * pi * static_cast<double>(k) / static_cast<double>(m);
    A.row(k) << std::cos(th), std::sin(th), 1.0;
    b(k) = A.row(k).dot(v);
  }
  const std::vector<std::pair<Vector, double>> cases = {
      {vec({0.1, 0.2, 1.0}), -0.5},
      {vec({0.0, 0.0, 1.0}), -1.0},   // c·v = -1
      {vec({0.0, 0.0, 2.0}), -2.0},   // c·v = -2
      {vec({-0.5, 0.3, 1.0}), -0.9},  // -0.5 + 0.6 - 1 = -0.9
  };
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    for (size_t k = 0; k < cases.size(); ++k) {
      CAPTURE(k);
      expect_optimum(backend, cases[k].first, A, b, cases[k].second);
    }
    // Outside that cone the objective is unbounded: c = (1, 0, 0) has no λ >= 0.
    expect_unbounded(backend, vec({1.0, 0.0, 0.0}), A, b);
  }
}

TEST_CASE("lp: degenerate vertex of a box with repeated tight rows through it") {
  // The unit box [0,1]^4 and 26 further rows through its vertex (1,1,1,1): a = random positive
  // weights, b = a·1. They cut nothing off (a·x <= a·1 on the box), so by hand the maximum of
  // c = (1, 2, 3, 4) is still 10 at (1,1,1,1), where 30 rows are tight.
  Matrix A;
  Vector b;
  box(Vector::Zero(4), Vector::Ones(4), A, b);
  Rng rng(11);
  const Matrix extra = rng.matrix(26, 4, 0.1, 1.0);
  const Vector bextra = extra * Vector::Ones(4);
  A = vstack(A, extra);
  b = vstack(b, bextra);
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    expect_optimum(backend, vec({1.0, 2.0, 3.0, 4.0}), A, b, 10.0);
  }
}

TEST_CASE("lp: duplicate and scaled parallel rows") {
  // The box [-1, 1]^3, each row given three times: as is, times 2.5, times 1e-3 (the same
  // half-space), plus a parallel looser copy x_j <= 5. By hand the optimum of c over the box is
  // Σ |c_j| (each row tight at 1).
  Matrix A0;
  Vector b0;
  box(-Vector::Ones(3), Vector::Ones(3), A0, b0);
  Matrix A = vstack(vstack(A0, Matrix(2.5 * A0)), Matrix(1e-3 * A0));
  Vector b = vstack(vstack(b0, Vector(2.5 * b0)), Vector(1e-3 * b0));
  A = vstack(A, Matrix(Matrix::Identity(3, 3)));
  b = vstack(b, Vector::Constant(3, 5.0));
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    expect_optimum(backend, vec({1.0, -2.0, 0.5}), A, b, 3.5);  // 1 + 2 + 0.5
    expect_optimum(backend, vec({0.0, 0.0, -1.0}), A, b, 1.0);
    // Two identical rows only: x_1 <= 2 twice, -x_1 <= 0 in R^1: max x_1 = 2.
    expect_optimum(backend, vec({1.0}), rows({{1.0}, {1.0}, {-1.0}}), vec({2.0, 2.0, 0.0}), 2.0);
  }
}

TEST_CASE("lp: badly scaled rows give the same optimum") {
  // The box [-1, 2] x [0, 3] x [-2, -1] and the cut x_1 + x_2 + x_3 <= 2, every row multiplied by
  // a factor from 1e-6 to 1e6 (the same set). By hand:
  // - c = (1, 1, 1): the cut binds, value 2 (reached at (2, 1, -1));
  // - c = (1, 0, 0): x_1 = 2 at (2, 0, -1), where the cut reads 1 <= 2, value 2;
  // - c = (0, 1, 2): x_2 <= 3 and x_3 <= -1 give at most 1, reached at (-1, 3, -1) where the cut
  //   reads 1 <= 2, value 1.
  Matrix A0;
  Vector b0;
  box(vec({-1.0, 0.0, -2.0}), vec({2.0, 3.0, -1.0}), A0, b0);
  A0 = vstack(A0, rows({{1.0, 1.0, 1.0}}));
  b0 = vstack(b0, vec({2.0}));
  const double factors[] = {1e-6, 1e6, 1e-3, 1e3, 1.0, 1e-5, 1e5};
  Matrix A = A0;
  Vector b = b0;
  for (Index i = 0; i < A.rows(); ++i) {
    A.row(i) *= factors[i % 7];
    b(i) *= factors[i % 7];
  }
  const std::vector<std::pair<Vector, double>> cases = {
      {vec({1.0, 1.0, 1.0}), 2.0}, {vec({1.0, 0.0, 0.0}), 2.0}, {vec({0.0, 1.0, 2.0}), 1.0}};
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    for (size_t k = 0; k < cases.size(); ++k) {
      CAPTURE(k);
      expect_optimum(backend, cases[k].first, A0, b0, cases[k].second);
      expect_optimum(backend, cases[k].first, A, b, cases[k].second);
      const lp::Result r0 = lp::maximize(cases[k].first, A0, b0, backend);
      const lp::Result r1 = lp::maximize(cases[k].first, A, b, backend);
      CHECK(r1.value == doctest::Approx(r0.value).epsilon(1e-12));
    }
  }
}

TEST_CASE("lp: a set that is a single point, from integer data") {
  // {x_1 <= p, x_2 <= q, x_1 + x_2 >= p + q} is exactly the point (p, q) (by hand: the first
  // two rows give x_1 + x_2 <= p + q, so all three are equalities). In R^3 likewise with
  // {x_j <= v_j, Σ a_j x_j >= a·v}, a > 0. Every number here is a small integer, so the LP is
  // exact in double; an exact backend must find the point, the others within their tolerances.
  struct Case {
    Matrix A;
    Vector b;
    Vector point;
  };
  std::vector<Case> cases;
  for (const auto& pq : {std::pair<double, double>{2, 5}, {1, 1}, {3, 4}, {4, 1}})
    cases.push_back({rows({{1.0, 0.0}, {0.0, 1.0}, {-1.0, -1.0}}),
                     vec({pq.first, pq.second, -(pq.first + pq.second)}),
                     vec({pq.first, pq.second})});
  cases.push_back(
      {rows({{1.0, 0.0}, {0.0, 1.0}, {-1.0, -2.0}}), vec({1.0, 1.0, -3.0}), vec({1.0, 1.0})});
  cases.push_back({rows({{1.0, 0.0, 0.0}, {0.0, 1.0, 0.0}, {0.0, 0.0, 1.0}, {-2.0, -3.0, -5.0}}),
                   vec({1.0, 2.0, 3.0, -23.0}), vec({1.0, 2.0, 3.0})});
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    for (size_t k = 0; k < cases.size(); ++k) {
      CAPTURE(k);
      const Case& cs = cases[k];
      const Index n = cs.A.cols();
      // The point is feasible in exact arithmetic: every product here is an exact integer.
      REQUIRE(((cs.A * cs.point) - cs.b).maxCoeff() <= 0.0);
      const Vector ones = Vector::Ones(n);
      expect_optimum(backend, Vector::Zero(n), cs.A, cs.b, 0.0);
      expect_optimum(backend, ones, cs.A, cs.b, ones.dot(cs.point));
      expect_optimum(backend, -ones, cs.A, cs.b, -ones.dot(cs.point));
    }
  }
}

TEST_CASE("lp: infeasible") {
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // x <= 1 and x >= 2.
    expect_infeasible(backend, vec({1.0}), rows({{1.0}, {-1.0}}), vec({1.0, -2.0}));
    // The simplex {x >= 0, Σ x <= 1} in R^3 and Σ x >= 2.
    Matrix A = vstack(Matrix(-Matrix::Identity(3, 3)), rows({{1.0, 1.0, 1.0}, {-1.0, -1.0, -1.0}}));
    const Vector b = vec({0.0, 0.0, 0.0, 1.0, -2.0});
    expect_infeasible(backend, vec({1.0, 0.0, 0.0}), A, b);
    // Zero objective too: infeasibility does not depend on c.
    expect_infeasible(backend, Vector::Zero(3), A, b);
    // An objective that would be unbounded without the infeasible pair: x_2 free above.
    expect_infeasible(backend, vec({0.0, 1.0}), rows({{1.0, 0.0}, {-1.0, 0.0}}), vec({-1.0, 0.0}));
  }
}

TEST_CASE("lp: unbounded") {
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // {x >= 0} in R^2, c = (1, 1): x = t (1, 1) grows without bound.
    expect_unbounded(backend, vec({1.0, 1.0}), rows({{-1.0, 0.0}, {0.0, -1.0}}), vec({0.0, 0.0}));
    // A slab in x_1, c along the free x_2.
    expect_unbounded(backend, vec({0.0, 1.0}), rows({{1.0, 0.0}, {-1.0, 0.0}}), vec({1.0, 1.0}));
    // A bounded objective over an unbounded set is optimal: max x_1 over the slab is 1, with a
    // lineality space along x_2 (rank-deficient A).
    expect_optimum(backend, vec({1.0, 0.0}), rows({{1.0, 0.0}, {-1.0, 0.0}}), vec({1.0, 1.0}), 1.0);
  }
}

TEST_CASE("lp: no rows") {
  const Matrix A(0, 3);
  const Vector b(0);
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // No constraints: c = 0 is optimal with value 0 everywhere; c != 0 is unbounded.
    expect_optimum(backend, Vector::Zero(3), A, b, 0.0);
    expect_unbounded(backend, vec({0.0, -1.0, 0.0}), A, b);
    auto solver = lp::make_solver(A, b, Vector(), backend);
    CHECK(solver->num_rows() == 0);
    CHECK(lp::to_string(solver->solve().status) == std::string("optimal"));
  }
}

TEST_CASE("lp: zero rows") {
  Matrix A0;
  Vector b0;
  box(-Vector::Ones(2), Vector::Ones(2), A0, b0);
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // A zero row with b >= 0 (0 <= 0.5, 0 <= 0) says nothing: the box optimum |c|_1 stays.
    Matrix A = vstack(rows({{0.0, 0.0}}), vstack(A0, rows({{0.0, 0.0}})));
    Vector b = vstack(vec({0.5}), vstack(b0, vec({0.0})));
    expect_optimum(backend, vec({2.0, -1.0}), A, b, 3.0);
    // A zero row with b < 0 (0 <= -1) makes the set empty; the certificate is e_i.
    for (Index i : {Index(0), Index(5)}) {
      CAPTURE(i);
      Vector bi = b;
      bi(i) = -1.0;
      const lp::Result r = lp::maximize(vec({2.0, -1.0}), A, bi, backend);
      REQUIRE(lp::to_string(r.status) == std::string("infeasible"));
      REQUIRE(r.has_farkas());
      Vector e = Vector::Zero(A.rows());
      e(i) = 1.0;
      CHECK(r.farkas == e);
      expect_infeasible(backend, vec({2.0, -1.0}), A, bi);
    }
    // Only zero rows, all with b >= 0: as if there were no rows.
    expect_optimum(backend, Vector::Zero(2), Matrix::Zero(3, 2), vec({0.0, 1.0, 2.0}), 0.0);
    expect_unbounded(backend, vec({1.0, 0.0}), Matrix::Zero(3, 2), vec({0.0, 1.0, 2.0}));
  }
}

TEST_CASE("lp: threshold and Result::exceeds") {
  // Box [-1, 1]^2, c = (1, 1): value 2 by hand.
  Matrix A;
  Vector b;
  box(-Vector::Ones(2), Vector::Ones(2), A, b);
  const Vector c = vec({1.0, 1.0});
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    const lp::Capabilities caps = lp::capabilities(backend);
    for (double t : {-10.0, 0.0, 1.999, 2.001, 10.0}) {
      CAPTURE(t);
      lp::SolveOptions opt;
      opt.threshold = t;
      const lp::Result r = lp::maximize(c, A, b, backend, opt);
      CHECK(r.exceeds(t) == (2.0 > t));
      if (r.status == lp::Status::stopped) {
        CHECK(caps.early_stop);
        CHECK(r.value > t);
        const lp::CheckReport rep = lp::check_answer(c, A, b, r);
        CHECK_MESSAGE(rep.ok, rep.failure);
      } else {
        CHECK(r.status == lp::Status::optimal);
        CHECK(r.value == doctest::Approx(2.0));
      }
    }
    lp::SolveOptions opt;
    opt.threshold = 1e6;
    // Unbounded exceeds every threshold, infeasible none.
    CHECK(lp::maximize(vec({1.0}), rows({{-1.0}}), vec({0.0}), backend, opt).exceeds(1e6));
    opt.threshold = -1e6;
    CHECK_FALSE(lp::maximize(vec({1.0}), rows({{1.0}, {-1.0}}), vec({0.0, -1.0}), backend, opt)
                    .exceeds(-1e6));
  }
}

namespace {

// A random LP seen both through an incremental solver and as plain data for cold solves.
struct Mirror {
  Matrix A;
  Vector b;
  Vector c;
};

// Compares one incremental answer with a cold lp::maximize on the same data.
void compare_with_cold(const std::string& backend, const Mirror& p, const lp::Result& warm,
                       const lp::SolveOptions& opt, int step, int counts[3]) {
  CAPTURE(step);
  const lp::Result cold = lp::maximize(p.c, p.A, p.b, backend);
  REQUIRE(lp::to_string(warm.status) != std::string("numerical"));
  REQUIRE(lp::to_string(cold.status) != std::string("numerical"));
  if (opt.threshold) {
    // The threshold answer must agree with the cold optimal value.
    const double t = *opt.threshold;
    const bool cold_exceeds = cold.status == lp::Status::unbounded ||
                              (cold.status == lp::Status::optimal && cold.value > t);
    // A cold value within rounding of t may go either way.
    if (cold.status != lp::Status::optimal || std::abs(cold.value - t) > 1e-9 * (1 + std::abs(t)))
      CHECK(warm.exceeds(t) == cold_exceeds);
    if (warm.status == lp::Status::stopped) {
      CHECK(warm.value > t);
      const lp::CheckReport rep = lp::check_answer(p.c, p.A, p.b, warm);
      CHECK_MESSAGE(rep.ok, rep.failure);
      return;
    }
  }
  REQUIRE(lp::to_string(warm.status) == std::string(lp::to_string(cold.status)));
  counts[static_cast<int>(warm.status) < 3 ? static_cast<int>(warm.status) : 0]++;
  if (warm.status == lp::Status::optimal) {
    CHECK(warm.value == doctest::Approx(cold.value).epsilon(1e-8).scale(1.0));
    const lp::CheckReport rep = lp::check_answer(p.c, p.A, p.b, warm);
    CHECK_MESSAGE(rep.ok, rep.failure);
    std::string why;
    CHECK_MESSAGE(kkt_ok(p.c, p.A, p.b, warm, 1e-8, lp::capabilities(backend).duals, why), why);
  }
}

// Random sequences of set_objective / add_rows / set_rhs / solve on one backend. Rows are random
// directions with offsets from a point x0; the first rows are few, so early LPs are often
// unbounded; some right-hand sides are pushed below a·x0, which sometimes empties the set.
void run_incremental(const std::string& backend, int sequences, int steps, std::uint32_t seed) {
  const Index n = 4;
  Rng rng(seed);
  int counts[3] = {0, 0, 0};  // optimal, infeasible, unbounded
  for (int s = 0; s < sequences; ++s) {
    const Vector x0 = rng.vector(n, -1.0, 1.0);
    Mirror p;
    p.A = rng.matrix(2, n, -1.0, 1.0);
    p.b = p.A * x0 + rng.vector(2, 0.1, 1.0);
    p.c = rng.vector(n, -1.0, 1.0);
    auto solver = lp::make_solver(p.A, p.b, p.c, backend);
    for (int k = 0; k < steps; ++k) {
      const double u = rng.uniform(0.0, 1.0);
      if (u < 0.25) {
        p.c = rng.vector(n, -1.0, 1.0);
        solver->set_objective(p.c);
      } else if (u < 0.5) {
        const Index k_rows = 1 + rng.index(3);
        const Matrix Anew = rng.matrix(k_rows, n, -1.0, 1.0);
        const Vector bnew = Anew * x0 + rng.vector(k_rows, 0.05, 1.5);
        solver->add_rows(Anew, bnew);
        p.A = vstack(p.A, Anew);
        p.b = vstack(p.b, bnew);
      } else if (u < 0.7) {
        const Index i = rng.index(p.A.rows());
        // Mostly keep x0 feasible; one time in five cut it off (the set may become empty).
        const double off =
            rng.uniform(0.0, 1.0) < 0.2 ? rng.uniform(-1.5, -0.1) : rng.uniform(0.05, 1.5);
        p.b(i) = p.A.row(i).dot(x0) + off;
        solver->set_rhs(i, p.b(i));
      } else if (u < 0.75) {
        p.b = p.A * x0 + rng.vector(p.A.rows(), 0.05, 1.5);
        solver->set_rhs(p.b);
      }
      CHECK(solver->num_rows() == p.A.rows());
      lp::SolveOptions opt;
      if (rng.uniform(0.0, 1.0) < 0.3) opt.threshold = rng.uniform(-2.0, 2.0);
      const lp::Result warm = solver->solve(opt);
      CHECK(warm.backend == backend);
      compare_with_cold(backend, p, warm, opt, s * steps + k, counts);
    }
  }
  // The sequences must have exercised every outcome, or they test less than they claim.
  CHECK(counts[0] > 0);
  CHECK(counts[1] > 0);
  CHECK(counts[2] > 0);
}

}  // namespace

TEST_CASE("lp: incremental solver agrees with cold solves") {
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // cdd-exact re-solves from scratch in rationals: fewer steps keep the suite fast.
    if (backend == "cdd-exact") run_incremental(backend, 3, 40, 7);
    else run_incremental(backend, 8, 50, 7);
  }
}

TEST_CASE("lp: incremental edits of a known LP") {
  // Start with {x_1 <= 1} in R^2 and c = (1, 0): value 1. Each edit has a hand-worked answer.
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    auto s = lp::make_solver(rows({{1.0, 0.0}}), vec({1.0}), vec({1.0, 0.0}), backend);
    CHECK(s->solve().value == doctest::Approx(1.0));
    s->set_objective(vec({1.0, 1.0}));  // x_2 free above: unbounded
    CHECK(s->solve().status == lp::Status::unbounded);
    s->add_rows(rows({{0.0, 1.0}, {-1.0, -1.0}}), vec({2.0, 10.0}));  // x_2 <= 2: value 3
    CHECK(s->num_rows() == 3);
    CHECK(s->solve().value == doctest::Approx(3.0));
    s->set_rhs(0, -4.0);  // x_1 <= -4: value -2
    CHECK(s->solve().value == doctest::Approx(-2.0));
    s->set_rhs(2, 1.0);  // x_1 + x_2 >= -1 with x_1 <= -4, x_2 <= 2: -4 + 2 = -2 >= -1 fails
    CHECK(s->solve().status == lp::Status::infeasible);
    s->set_rhs(vec({0.5, 0.25, 10.0}));  // value 0.5 + 0.25 = 0.75
    const lp::Result r = s->solve();
    CHECK(r.value == doctest::Approx(0.75));
    const Matrix A = rows({{1.0, 0.0}, {0.0, 1.0}, {-1.0, -1.0}});
    const lp::CheckReport rep = lp::check_answer(vec({1.0, 1.0}), A, vec({0.5, 0.25, 10.0}), r);
    CHECK_MESSAGE(rep.ok, rep.failure);
    s->add_rows(rows({{0.0, 0.0}}), vec({-1.0}));  // 0 <= -1: empty
    CHECK(s->solve().status == lp::Status::infeasible);
    s->set_rhs(3, 0.0);  // 0 <= 0: back to 0.75
    CHECK(s->solve().value == doctest::Approx(0.75));
  }
}

namespace {

struct RandomLp {
  Matrix A;
  Vector b;
  Vector c;
};

// Random 60x5 LPs: rows a_i in [-1,1]^5, b_i in [1, 2] (the origin is inside), random c. Every
// seventh LP also gets x_1 >= 3 and x_1 <= 2 (infeasible); every eleventh has only 4 rows
// (unbounded: a random c is almost surely outside the cone of 4 rows in R^5).
std::vector<RandomLp> random_lps(int count, std::uint32_t seed) {
  Rng rng(seed);
  std::vector<RandomLp> lps;
  for (int k = 0; k < count; ++k) {
    RandomLp p;
    const Index m = k % 11 == 10 ? 4 : 60;
    p.A = rng.matrix(m, 5, -1.0, 1.0);
    p.b = Vector::Ones(m) + rng.vector(m, 0.0, 1.0);
    if (k % 7 == 6) {
      p.A = vstack(p.A, rows({{-1.0, 0.0, 0.0, 0.0, 0.0}, {1.0, 0.0, 0.0, 0.0, 0.0}}));
      p.b = vstack(p.b, vec({-3.0, 2.0}));  // x_1 >= 3 and x_1 <= 2: infeasible
    }
    p.c = rng.vector(5, -1.0, 1.0);
    lps.push_back(p);
  }
  return lps;
}

}  // namespace

TEST_CASE("lp: concurrent solves on every backend give the serial answers") {
  const std::vector<RandomLp> lps = random_lps(50, 2024);
  const auto names = lp::backends();
  // cdd-exact is the slowest and its calls are serialised: it solves the first 25 LPs only.
  auto count_for = [&](const std::string& backend) {
    return backend == "cdd-exact" ? size_t(25) : lps.size();
  };
  std::vector<std::vector<lp::Result>> serial(names.size());
  int statuses[5] = {0, 0, 0, 0, 0};
  for (size_t k = 0; k < names.size(); ++k)
    for (size_t i = 0; i < count_for(names[k]); ++i) {
      serial[k].push_back(lp::maximize(lps[i].c, lps[i].A, lps[i].b, names[k]));
      statuses[static_cast<int>(serial[k].back().status)]++;
    }
  CHECK(statuses[0] > 0);   // optimal
  CHECK(statuses[1] > 0);   // infeasible
  CHECK(statuses[2] > 0);   // unbounded
  CHECK(statuses[4] == 0);  // numerical
  // The serial answers are right, not only repeatable.
  for (size_t k = 0; k < names.size(); ++k)
    for (size_t i = 0; i < serial[k].size(); ++i) {
      const lp::CheckReport rep = lp::check_answer(lps[i].c, lps[i].A, lps[i].b, serial[k][i]);
      CHECK_MESSAGE(rep.ok, names[k], " LP ", i, ": ", rep.failure);
      CHECK(serial[k][i].status == serial[0][i].status);
      if (serial[k][i].status == lp::Status::optimal)
        CHECK(serial[k][i].value == doctest::Approx(serial[0][i].value).epsilon(1e-9));
    }

  // 4 threads, each solving every LP on every backend, starting at different backends so that
  // different backends run at the same time. Results are stored; doctest's CHECK is not used
  // inside the threads.
  const int threads = 4;
  std::vector<std::vector<std::vector<lp::Result>>> got(
      threads, std::vector<std::vector<lp::Result>>(names.size()));
  std::vector<std::string> errors(threads);
  std::vector<lp::Result> incremental(threads);
  std::vector<std::thread> pool;
  for (int t = 0; t < threads; ++t)
    pool.emplace_back([&, t] {
      try {
        for (size_t kk = 0; kk < names.size(); ++kk) {
          const size_t k = (kk + static_cast<size_t>(t)) % names.size();
          for (size_t i = 0; i < count_for(names[k]); ++i)
            got[t][k].push_back(lp::maximize(lps[i].c, lps[i].A, lps[i].b, names[k]));
        }
        // An incremental GLPK solver created, used and destroyed on this thread.
        auto s = lp::make_solver(lps[0].A, lps[0].b, lps[0].c, "glpk");
        s->set_objective(lps[1].c);
        incremental[t] = s->solve();
      } catch (const std::exception& e) {
        errors[t] = e.what();
      }
    });
  for (auto& th : pool) th.join();
  const lp::Result extra = lp::maximize(lps[1].c, lps[0].A, lps[0].b, "glpk");
  for (int t = 0; t < threads; ++t) {
    CAPTURE(t);
    CHECK_MESSAGE(errors[t].empty(), errors[t]);
    for (size_t k = 0; k < names.size(); ++k) {
      CAPTURE(names[k]);
      REQUIRE(got[t][k].size() == serial[k].size());
      for (size_t i = 0; i < serial[k].size(); ++i) {
        CAPTURE(i);
        CHECK(got[t][k][i].status == serial[k][i].status);
        // Same data, same deterministic code: the same double.
        if (serial[k][i].status == lp::Status::optimal)
          CHECK(got[t][k][i].value == serial[k][i].value);
      }
    }
    CHECK(incremental[t].status == extra.status);
    CHECK(incremental[t].value == doctest::Approx(extra.value).epsilon(1e-9));
  }
}

TEST_CASE("lp: a GLPK solver refuses use from another thread") {
  // glpk_backend.cpp: a problem object belongs to the thread that created it; use from another
  // thread throws SolverError, and the solver stays usable on its own thread.
  auto s = lp::make_solver(rows({{1.0}}), vec({2.0}), vec({1.0}), "glpk");
  std::string error;
  bool other_ok = false;
  std::thread th([&] {
    try {
      s->solve();
      other_ok = true;
    } catch (const corral::SolverError& e) {
      error = e.what();
    } catch (const std::exception& e) {
      error = std::string("wrong exception type: ") + e.what();
    }
  });
  th.join();
  CHECK_FALSE(other_ok);
  CHECK(error.rfind("glpk:", 0) == 0);
  CHECK(s->solve().value == doctest::Approx(2.0));  // by hand: x <= 2
}

TEST_CASE("lp: bad input throws InvalidInputError naming the argument") {
  const Matrix A = rows({{1.0, 0.0}, {0.0, 1.0}, {-1.0, -1.0}});
  const Vector b = vec({1.0, 1.0, 1.0});
  const Vector c = vec({1.0, 1.0});
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    Matrix An = A;
    An(1, 0) = kNaN;
    expect_invalid([&] { lp::maximize(c, An, b, backend); }, "A");
    An(1, 0) = kInf;
    expect_invalid([&] { lp::maximize(c, An, b, backend); }, "A");
    An(1, 0) = -kInf;
    expect_invalid([&] { lp::make_solver(An, b, c, backend); }, "A");
    Vector bn = b;
    bn(2) = kNaN;
    expect_invalid([&] { lp::maximize(c, A, bn, backend); }, "b");
    bn(2) = -kInf;
    expect_invalid([&] { lp::maximize(c, A, bn, backend); }, "b");
    Vector cn = c;
    cn(0) = kNaN;
    expect_invalid([&] { lp::maximize(cn, A, b, backend); }, "c");
    cn(0) = kInf;
    expect_invalid([&] { lp::maximize(cn, A, b, backend); }, "c");
    // Shapes.
    expect_invalid([&] { lp::maximize(c, A, vec({1.0, 1.0}), backend); }, "b");
    expect_invalid([&] { lp::maximize(vec({1.0, 1.0, 1.0}), A, b, backend); }, "c");
    expect_invalid([&] { lp::maximize(vec({1.0}), A, b, backend); }, "c");
    expect_invalid([&] { lp::make_solver(A, b, vec({1.0}), backend); }, "c");
    expect_invalid([&] { lp::maximize(Vector(0), Matrix(3, 0), b, backend); }, "A");
    expect_invalid([&] { lp::maximize(Vector(0), Matrix(0, 0), Vector(0), backend); }, "A");
    expect_invalid([&] { lp::make_solver(Matrix(3, 0), b, Vector(), backend); }, "A");
    // Threshold must be a number.
    lp::SolveOptions opt;
    opt.threshold = kNaN;
    expect_invalid([&] { lp::maximize(c, A, b, backend, opt); }, "threshold");
    // Incremental solver.
    auto s = lp::make_solver(A, b, c, backend);
    expect_invalid([&] { s->set_rhs(-1, 0.0); }, "i");
    expect_invalid([&] { s->set_rhs(3, 0.0); }, "i");
    expect_invalid([&] { s->set_rhs(0, kNaN); }, "value");
    expect_invalid([&] { s->set_rhs(vec({1.0, 2.0})); }, "b");
    expect_invalid([&] { s->set_rhs(vec({1.0, kInf, 2.0})); }, "b");
    expect_invalid([&] { s->add_rows(Matrix::Ones(2, 3), vec({1.0, 1.0})); }, "A");
    expect_invalid([&] { s->add_rows(Matrix::Ones(2, 1), vec({1.0, 1.0})); }, "A");
    expect_invalid([&] { s->add_rows(Matrix::Ones(2, 2), vec({1.0})); }, "b");
    expect_invalid([&] { s->add_rows(rows({{kNaN, 1.0}}), vec({1.0})); }, "A");
    expect_invalid([&] { s->add_rows(rows({{1.0, 1.0}}), vec({kInf})); }, "b");
    expect_invalid([&] { s->set_objective(vec({1.0})); }, "c");
    expect_invalid([&] { s->set_objective(vec({kNaN, 1.0})); }, "c");
    // After rejected edits the solver still holds the original LP: max x_1 + x_2 = 2 (by hand).
    CHECK(s->num_rows() == 3);
    const lp::Result r = s->solve();
    CHECK(r.status == lp::Status::optimal);
    CHECK(r.value == doctest::Approx(2.0));
  }
  expect_invalid([&] { lp::maximize(c, A, b, "nope"); }, "backend");
  expect_invalid([&] { lp::make_solver(A, b, c, "GLPK"); }, "backend");
  expect_invalid([&] { lp::capabilities("cdd_exact"); }, "backend");
  DefaultBackendGuard guard;
  expect_invalid([&] { lp::set_default_backend("nope"); }, "backend");
  CHECK(lp::default_backend() == guard.saved);
}

TEST_CASE("lp: options are validated even when a zero row decides the LP") {
  // A zero row with b < 0 makes the LP infeasible before any backend runs; a NaN threshold is
  // still misuse and must be reported as such, not hidden behind the early answer.
  const Matrix A = rows({{1.0, 0.0}, {0.0, 0.0}});
  const Vector b = vec({1.0, -1.0});
  lp::SolveOptions opt;
  opt.threshold = kNaN;
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    expect_invalid([&] { lp::maximize(vec({1.0, 0.0}), A, b, backend, opt); }, "threshold");
  }
}

TEST_CASE("lp: pivots are reported") {
  // Result::iterations is "pivots reported by the backend (0 when it does not report)"; GLPK
  // counts them (glp_get_it_cnt) and cddlib too (total_pivots). From the all-slack start, the
  // optimum of this LP is no vertex of the start, so at least one pivot is needed.
  Rng rng(99);
  Matrix A;
  Vector b;
  box(-Vector::Ones(5), Vector::Ones(5), A, b);
  const Matrix extra = rng.matrix(30, 5, -1.0, 1.0);
  A = vstack(A, extra);
  b = vstack(b, Vector(extra.rowwise().lpNorm<1>() * 0.5));
  const Vector c = rng.vector(5, -1.0, 1.0);
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    const lp::Result r = lp::maximize(c, A, b, backend);
    CHECK(r.status == lp::Status::optimal);
    CHECK(r.iterations > 0);
  }
}

TEST_CASE("lp: check_answer and the independent KKT check reject wrong answers") {
  // Box [-1, 1]^2, c = (1, 1): by hand x = (1, 1), value 2, λ = (1, 1, 0, 0) is the only dual.
  Matrix A;
  Vector b;
  box(-Vector::Ones(2), Vector::Ones(2), A, b);
  const Vector c = vec({1.0, 1.0});
  lp::Result good;
  good.status = lp::Status::optimal;
  good.x = vec({1.0, 1.0});
  good.value = 2.0;
  good.duals = vec({1.0, 1.0, 0.0, 0.0});
  std::string why;
  CHECK(lp::check_answer(c, A, b, good).ok);
  CHECK(kkt_ok(c, A, b, good, 1e-9, true, why));
  auto rejected = [&](const lp::Result& r, bool by_check_answer) {
    std::string w;
    CHECK_FALSE(kkt_ok(c, A, b, r, 1e-9, true, w));
    if (by_check_answer) CHECK_FALSE(lp::check_answer(c, A, b, r).ok);
  };
  lp::Result r = good;
  r.x = vec({1.1, 1.0});  // infeasible point
  r.value = 2.1;
  rejected(r, true);
  r = good;
  r.value = 1.9;  // value is not c·x
  rejected(r, true);
  r = good;
  r.duals = vec({0.5, 1.0, -0.5, 0.0});  // Aᵀλ = c, but λ_3 < 0 (and bᵀλ = 1)
  rejected(r, true);
  r = good;
  r.duals = vec({1.5, 1.0, 0.5, 0.0});  // Aᵀλ = c, λ >= 0, but bᵀλ = 3: slackness fails
  rejected(r, true);
  r = good;
  r.duals = vec({2.0, 1.0, 0.0, 0.0});  // Aᵀλ = (2, 1) != c
  rejected(r, true);
  r = good;
  r.duals = vec({1.0, 1.0, 0.0});  // wrong length
  rejected(r, true);
  r = good;
  r.x = vec({0.0, 0.0});  // feasible but not optimal: the duals of (1, 1) no longer fit
  r.value = 0.0;
  rejected(r, true);
  // Certificates: y = (1, 0, 1, 0) is no Farkas vector for this non-empty box (bᵀy = 2).
  lp::Result f;
  f.status = lp::Status::infeasible;
  f.farkas = vec({1.0, 0.0, 1.0, 0.0});
  CHECK_FALSE(lp::check_answer(c, A, b, f).ok);
  // A ray that leaves the box.
  lp::Result u;
  u.status = lp::Status::unbounded;
  u.ray = vec({1.0, 0.0});
  CHECK_FALSE(lp::check_answer(c, A, b, u).ok);
}

// Sets lp::verify_tolerance() for one scope and restores it.
struct VerifyToleranceGuard {
  double saved = lp::verify_tolerance();
  explicit VerifyToleranceGuard(double tol) { lp::set_verify_tolerance(tol); }
  ~VerifyToleranceGuard() { lp::set_verify_tolerance(saved); }
};

TEST_CASE("lp: the verification tolerance is validated") {
  CHECK(lp::verify_tolerance() == 1e-9);  // the documented default
  for (double bad : {0.0, -1e-9, 1e-2, kNaN, kInf}) {
    CAPTURE(bad);
    CHECK_THROWS_AS(lp::set_verify_tolerance(bad), corral::InvalidInputError);
  }
  CHECK(lp::verify_tolerance() == 1e-9);
}

TEST_CASE("lp: dense answers that fail verification are re-solved and counted") {
  // A box {|x_j| <= j}: max (1, 1, 1)·x = 6 (by hand). Normal tolerance: no fallback.
  const Matrix A = vstack(Matrix(Matrix::Identity(3, 3)), Matrix(-Matrix::Identity(3, 3)));
  const Vector b = vec({1.0, 2.0, 3.0, 1.0, 2.0, 3.0});
  const Vector c = vec({1.0, 1.0, 1.0});
  const lp::Result normal = lp::maximize(c, A, b, "dense");
  CHECK(normal.fallbacks == 0);
  CHECK(normal.backend == "dense");
  // A tolerance that floating-point answers with rounding in them cannot meet makes the dense
  // answer fail verification; the re-solve (GLPK, then cdd-exact) gives GLPK's optimum and is
  // counted. Random rows, so that the optimal vertex carries rounding errors.
  Rng rng(77);
  const Matrix R = rng.matrix(40, 3, -1.0, 1.0);
  const Vector rb = rng.vector(40, 1.0, 2.0);
  const lp::Result ref = lp::maximize(c, R, rb, "glpk");
  REQUIRE(ref.status == lp::Status::optimal);
  {
    VerifyToleranceGuard guard(1e-300);
    const lp::Result r = lp::maximize(c, R, rb, "dense");
    REQUIRE(r.status == lp::Status::optimal);
    CHECK(r.value == doctest::Approx(ref.value).epsilon(1e-9));
    CHECK(r.fallbacks >= 1);
    CHECK(r.backend != "dense");
    CHECK(lp::check_answer(c, R, rb, r).ok);
    // Infeasible: {x_1 <= -1, -x_1 <= 0} (by hand); whoever answers, the status is right.
    const lp::Result inf =
        lp::maximize(vec({1.0}), rows({{1.0}, {-1.0}}), vec({-1.0, 0.0}), "dense");
    CHECK(inf.status == lp::Status::infeasible);
  }
  CHECK(lp::maximize(c, R, rb, "dense").fallbacks == 0);
}

// Kept last in the file: on a library where adding zero rows aborts the process (GLPK's
// glp_add_rows rejects nrs = 0 and its error handler calls abort()), the crash then ends the run
// after every other test has reported. Under CTest each test case runs in its own process.
TEST_CASE("lp: add_rows with no rows changes nothing") {
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    // {x_1 <= 0.5, x_2 <= 0.25, x_1 + x_2 >= -10}, c = (1, 1): value 0.75 (by hand).
    auto s = lp::make_solver(rows({{1.0, 0.0}, {0.0, 1.0}, {-1.0, -1.0}}), vec({0.5, 0.25, 10.0}),
                             vec({1.0, 1.0}), backend);
    CHECK(s->solve().value == doctest::Approx(0.75));
    s->add_rows(Matrix(0, 2), Vector(0));
    CHECK(s->num_rows() == 3);
    CHECK(s->solve().value == doctest::Approx(0.75));
    // A solver made with no rows, then given none, then some.
    auto e = lp::make_solver(Matrix(0, 2), Vector(0), vec({1.0, 0.0}), backend);
    e->add_rows(Matrix(0, 2), Vector(0));
    CHECK(e->solve().status == lp::Status::unbounded);
    e->add_rows(rows({{1.0, 0.0}}), vec({4.0}));
    CHECK(e->solve().value == doctest::Approx(4.0));
  }
}

TEST_CASE("check_answer: a ray must raise the objective beyond the tolerance") {
  // max x1 s.t. x1 <= 1 (c is the row itself): bounded. A "ray" d = (1e-12, 1) meets
  // A d <= tol |d| and has c·d > 0, but its ascent is inside the tolerance: not a proof.
  const corral::Matrix A = corral::test::rows({{1, 0}});
  const corral::Vector b = corral::test::vec({1});
  const corral::Vector c = corral::test::vec({1, 0});
  corral::lp::Result r;
  r.status = corral::lp::Status::unbounded;
  r.ray = corral::test::vec({1e-12, 1});
  CHECK_FALSE(corral::lp::check_answer(c, A, b, r, 1e-9).ok);
  // A real ray of max x2 over the same set passes.
  r.ray = corral::test::vec({0, 1});
  CHECK(corral::lp::check_answer(corral::test::vec({0, 1}), A, b, r, 1e-9).ok);
}
