#pragma once
/// \file lp/check.hpp
/// Checks an LP answer against the problem in O(mn): primal feasibility, and for optimal
/// answers dual feasibility, stationarity and complementary slackness, with per-row scaled
/// tolerances. Used by tests and by answer verification.

#include <corral/lp/solver.hpp>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

namespace corral::lp {

/// Outcome of check_answer(): ok, and the first failed condition in words.
struct CheckReport {
  bool ok = true;
  std::string failure;
  double max_primal_violation =
      0.0;  ///< max over rows of (a_i·x - b_i) / (|b_i| + ‖a_i‖ ‖x‖ + tiny)
};

/// Checks `result` for max c·x s.t. A x <= b at relative tolerance `tol`, with the length
/// scale ‖x‖ replaced by max(‖x‖, median_i |b_i| / ‖a_i‖) (the size of the set, for optimisers
/// at or near the origin):
/// - primal: a_i·x - b_i <= tol (|b_i| + ‖a_i‖ ‖x‖) for optimal and stopped answers;
/// - dual (optimal answers with duals), on μ_i = λ_i ‖a_i‖ (the multipliers of unit rows):
///   μ_i >= -tol max μ, ‖Aᵀλ - c‖∞ <= tol (1 + ‖c‖∞ + max μ),
///   μ_i (b_i - a_i·x) / ‖a_i‖ <= tol max μ (|b_i| / ‖a_i‖ + ‖x‖);
/// - stopped: c·x > threshold is the caller's to check;
/// - ray (when present): A d <= tol ‖a_i‖ ‖d‖ and c·d > tol ‖c‖ ‖d‖ (an ascent beyond what
///   the tolerance allows the rows);
/// - Farkas (when present): y >= -tol max y, ‖Aᵀy‖ small, bᵀy < 0.
inline CheckReport check_answer(const Vector& c, const Matrix& A, const Vector& b,
                                const Result& result, double tol = 1e-9) {
  CheckReport rep;
  auto fail = [&rep](const std::string& why) {
    if (rep.ok) rep.failure = why;
    rep.ok = false;
  };
  const Index m = A.rows();
  const Vector row_norm = A.rowwise().norm();
  const double amax = m > 0 ? row_norm.maxCoeff() : 0.0;
  if (result.status == Status::optimal || result.status == Status::stopped) {
    if (result.x.size() != A.cols()) {
      fail("optimiser has the wrong length");
      return rep;
    }
    // Length scale: ‖x‖, but at least the median distance |b_i| / ‖a_i‖ of the rows from the
    // origin, so that an optimiser at (or rounding around) x = 0 is judged against the size of
    // the set, not against its own rounding noise.
    std::vector<double> dist;
    for (Index i = 0; i < m; ++i)
      if (row_norm(i) > 0) dist.push_back(std::abs(b(i)) / row_norm(i));
    double median = 0.0;
    if (!dist.empty()) {
      std::nth_element(dist.begin(), dist.begin() + static_cast<long>(dist.size() / 2), dist.end());
      median = dist[dist.size() / 2];
    }
    const double xn = std::max(result.x.norm(), median);
    const Vector slack = b - A * result.x;
    for (Index i = 0; i < m; ++i) {
      const double scale = std::abs(b(i)) + row_norm(i) * xn + 1e-300;
      const double v = -slack(i) / scale;
      rep.max_primal_violation = std::max(rep.max_primal_violation, v);
      if (-slack(i) > tol * scale) fail("primal infeasible at row " + std::to_string(i));
    }
    if (std::abs(c.dot(result.x) - result.value) >
        tol * (1.0 + std::abs(result.value) + c.norm() * xn))
      fail("value differs from c·x");
    if (result.status == Status::optimal && result.has_duals()) {
      const Vector& y = result.duals;
      if (y.size() != m) {
        fail("duals have the wrong length");
        return rep;
      }
      // Signs and slackness are judged on μ_i = λ_i ‖a_i‖, the multipliers of the rows scaled
      // to unit norm, so that rescaling a row does not change the verdict.
      const Vector mu = y.cwiseProduct(row_norm);
      const double mmax = std::max(mu.cwiseAbs().maxCoeff(), 1e-300);
      for (Index i = 0; i < m; ++i) {
        if (mu(i) < -tol * mmax) fail("dual negative at row " + std::to_string(i));
        const double scale = std::abs(b(i)) / std::max(row_norm(i), 1e-300) + xn;
        const double unit_slack = slack(i) / std::max(row_norm(i), 1e-300);
        if (mu(i) * unit_slack > tol * mmax * scale + 1e-300)
          fail("complementary slackness fails at row " + std::to_string(i));
      }
      const Vector r = A.transpose() * y - c;
      const double cscale =
          1.0 + c.cwiseAbs().maxCoeff() + (y.cwiseAbs().cwiseProduct(row_norm)).maxCoeff();
      if (r.cwiseAbs().maxCoeff() > tol * cscale) fail("stationarity A^T y = c fails");
    }
  }
  if (result.status == Status::unbounded && result.has_ray()) {
    const Vector& d = result.ray;
    const Vector ad = A * d;
    for (Index i = 0; i < m; ++i)
      if (ad(i) > tol * row_norm(i) * d.norm())
        fail("ray leaves the set at row " + std::to_string(i));
    if (!(c.dot(d) > tol * c.norm() * d.norm()))
      fail("ray does not increase the objective beyond the tolerance");
  }
  if (result.status == Status::infeasible && result.has_farkas()) {
    const Vector& y = result.farkas;
    const double ymax = std::max(y.cwiseAbs().maxCoeff(), 1e-300);
    if (y.minCoeff() < -tol * ymax) fail("Farkas multipliers negative");
    const Vector r = A.transpose() * y;
    if (r.cwiseAbs().maxCoeff() > std::sqrt(tol) * ymax * std::max(1.0, amax))
      fail("Farkas multipliers do not cancel A");
    if (!(b.dot(y) < 0)) fail("Farkas multipliers do not give b^T y < 0");
  }
  return rep;
}

}  // namespace corral::lp
