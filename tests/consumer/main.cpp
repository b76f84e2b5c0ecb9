// Consumer of an installed corral: solves one small LP of our own on every backend of the build
// and compares the answer with the optimum worked out by hand. Exit status 0 when every backend
// agrees, 1 otherwise.
//
// The LP: a joinery makes benches (x0), stools (x1) and shelves (x2) each week, with profits
// 7, 6 and 6 (in hundreds) per piece, and maximises its profit under four limits:
//   timber     2 x0 +   x1 + 3 x2 <= 20   boards
//   labour       x0 + 2 x1 +   x2 <= 18   hours
//   finishing  3 x0 +   x1 +   x2 <= 20   hours in the paint shop
//   demand            x1          <= 10   stools
//   x0, x1, x2 >= 0
//
// Worked out by hand: with timber, labour and finishing tight, the 3x3 system
//   2 x0 + x1 + 3 x2 = 20,  x0 + 2 x1 + x2 = 18,  3 x0 + x1 + x2 = 20
// (determinant -11, so the point is a vertex) gives x* = (4, 6, 2). It is feasible: demand
// 6 <= 10 and x* > 0. Multipliers λ = (1, 2, 1) on those three rows give
//   1·(2, 1, 3) + 2·(1, 2, 1) + 1·(3, 1, 1) = (7, 6, 6) = c,
// so λ >= 0 with Aᵀλ = c, and bᵀλ = 20 + 36 + 20 = 76 = c·x* = 28 + 36 + 12. By LP duality x* is
// optimal with value 76; it is the only optimum, since λ > 0 on the three tight rows forces
// them to stay tight and they fix x* alone.

#include <corral/corral.hpp>

#include <cmath>
#include <cstdio>
#include <exception>
#include <string>

namespace {

constexpr double kTol = 1e-7;  // relative; the data are small integers

bool close(double got, double want) {
  return std::abs(got - want) <= kTol * (1.0 + std::abs(want));
}

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.12g", v);
  return buf;
}

// True when u and v have the same length and agree entrywise to kTol relative to v.
bool close(const corral::Vector& u, const corral::Vector& v) {
  if (u.size() != v.size()) return false;
  for (corral::Index i = 0; i < v.size(); ++i)
    if (!close(u(i), v(i))) return false;
  return true;
}

}  // namespace

int main() {
  using corral::Matrix;
  using corral::Vector;
  namespace lp = corral::lp;

  Matrix A(7, 3);
  // clang-format off
  A <<  2,  1,  3,   // timber
        1,  2,  1,   // labour
        3,  1,  1,   // finishing
        0,  1,  0,   // demand for stools
       -1,  0,  0,   // x0 >= 0
        0, -1,  0,   // x1 >= 0
        0,  0, -1;   // x2 >= 0
  // clang-format on
  Vector b(7);
  b << 20, 18, 20, 10, 0, 0, 0;
  Vector c(3);
  c << 7, 6, 6;

  const double want_value = 76.0;  // by hand, see above
  Vector want_x(3);
  want_x << 4, 6, 2;
  Vector want_duals(7);
  want_duals << 1, 2, 1, 0, 0, 0, 0;

  const auto names = lp::backends();
  if (names.empty()) {
    std::printf("FAIL: corral::lp::backends() lists no backend\n");
    return 1;
  }
  std::printf("corral %s, backends:", corral::version);
  for (const auto& name : names) std::printf(" %s", name.c_str());
  std::printf("\n");

  int failures = 0;
  for (const auto& name : names) {
    lp::Result r;
    std::string problem;
    try {
      r = lp::maximize(c, A, b, name);
    } catch (const std::exception& e) {
      problem = std::string("threw: ") + e.what();
    }
    if (!problem.empty()) {
      // reported below
    } else if (r.status != lp::Status::optimal) {
      problem = std::string("status ") + lp::to_string(r.status) + ", expected optimal";
    } else if (!close(r.value, want_value)) {
      problem = "value " + number(r.value) + ", expected " + number(want_value);
    } else if (!close(r.x, want_x)) {
      problem = "optimiser is not (4, 6, 2)";
    } else if (r.backend != name) {
      problem = "result names backend '" + r.backend + "'";
    } else if (lp::capabilities(name).duals && !close(r.duals, want_duals)) {
      problem = "duals are not (1, 2, 1, 0, 0, 0, 0)";
    }
    if (problem.empty()) {
      std::printf("ok   %-10s value %.12g\n", name.c_str(), r.value);
    } else {
      std::printf("FAIL %-10s %s\n", name.c_str(), problem.c_str());
      ++failures;
    }
  }
  return failures == 0 ? 0 : 1;
}
