// Dense adapter (backend "dense", the default): corral's own active-set simplex for tall,
// skinny LPs (dense_kernel.hpp), with everything around it:
//
// - Lineality: the row space of A is found by Gram–Schmidt with re-orthogonalisation; when it
//   has dimension r < n the kernel solves in coordinates y of an orthonormal basis Q of it
//   (x = Q y), and an objective with a component c⊥ outside it makes a feasible LP unbounded
//   along the ray c⊥ (A c⊥ = 0). The kernel never sees a rank-deficient matrix.
// - Phase 1, capped slack form: max r s.t. a_i·x + r <= b_i, r <= r_max is feasible at any x;
//   it stops as soon as r > 0; an optimum r* < 0 proves infeasibility, and its multipliers are
//   a Farkas certificate (Σ y_i a_i = 0, Σ y_i = 1, bᵀy = r* < 0).
// - Incremental solves: the basis is kept. A changed objective starts primal pivots from the
//   old vertex; added rows or changed right-hand sides start dual pivots when the old basis is
//   still dual feasible, and phase 1 from the old point otherwise.
// - Verification of every answer in O(mn), on the problem as the kernel saw it (rows scaled to
//   norms in [0.5, 1)), at tolerance τ = verify_tolerance() (default 1e-9), per row:
//     primal  a_i·x - b_i <= τ (|b_i| + ‖a_i‖ ‖x‖);
//     optimal λ_i >= -τ max λ,  ‖Aᵀλ - c‖∞ <= τ (1 + ‖c‖∞),
//             λ_i (b_i - a_i·x) <= τ max λ (|b_i| + ‖a_i‖ ‖x‖);
//     stopped c·x > threshold;  unbounded A d <= τ ‖a_i‖ ‖d‖, c·d > τ ‖c‖ ‖d‖;
//     infeasible y >= -τ max y, ‖Aᵀy‖∞ <= τ Σ|y_i| ‖a_i‖, bᵀy < 0.
//   An answer that fails is re-solved by GLPK and, when GLPK's answer fails too (or GLPK fails),
//   by cdd-exact; Result::fallbacks counts the re-solves and Result::backend names the solver
//   that answered. GLPK's infeasible and unbounded verdicts carry no certificate to check.

#include <algorithm>
#include <atomic>
#include <cmath>

#include "dense_kernel.hpp"
#include "solver_base.hpp"

namespace corral::lp {

namespace {
std::atomic<double>& verify_tol_storage() {
  static std::atomic<double> tol{1e-9};
  return tol;
}
}  // namespace

double verify_tolerance() { return verify_tol_storage().load(); }

void set_verify_tolerance(double tol) {
  if (!(tol > 0.0) || !(tol <= 1e-3))
    corral::detail::invalid("tol", "must lie in (0, 1e-3], got " + std::to_string(tol));
  verify_tol_storage().store(tol);
}

namespace detail {
namespace {

constexpr double kRankTol = 1e-10;  // a row adds to the row space when its residual exceeds this

class DenseSolver final : public SolverBase {
 public:
  DenseSolver(const Matrix& A, const Vector& b, const Vector& c) : SolverBase(A, b, c) {}

  std::string_view backend() const override { return "dense"; }

 protected:
  void rows_added(Index first) override {
    if (!structure_valid_) return;
    if (rank_ == n_) {
      rows_pending_ = true;
      return;
    }
    const Index m = num_rows();
    Matrix extra(m - first, rank_);
    for (Index i = first; i < m; ++i) {
      if (residual_norm(As_.row(i).transpose()) > kRankTol) {
        structure_valid_ = false;  // the row space grew: start again from scratch
        warm_ = false;
        return;
      }
      extra.row(i - first) = As_.row(i) * Q_;
    }
    Ared_.conservativeResize(m, rank_);
    Ared_.bottomRows(m - first) = extra;
    rows_pending_ = true;
  }
  void rhs_changed(Index) override { rhs_dirty_ = true; }
  void objective_changed() override {}

  Result solve_scaled(const SolveOptions& options) override {
    Result r = kernel_solve(options);
    if (r.status != Status::numerical && verify(r, options)) return r;
    warm_ = false;  // the kept basis is not trusted after a failure
    return fallback(options);
  }

 private:
  // ‖(I - Q Qᵀ) v‖ with two Gram–Schmidt passes.
  double residual_norm(Vector v) const {
    for (int pass = 0; pass < 2 && rank_ > 0; ++pass) v.noalias() -= Q_ * (Q_.transpose() * v);
    return v.norm();
  }

  void build_structure() {
    Q_.resize(n_, n_);
    rank_ = 0;
    Vector v(n_), w(n_);
    for (Index i = 0; i < num_rows() && rank_ < n_; ++i) {
      if (zero_(i)) continue;
      v = As_.row(i).transpose();
      for (int pass = 0; pass < 2 && rank_ > 0; ++pass) {
        w.head(rank_).noalias() = Q_.leftCols(rank_).transpose() * v;
        v.noalias() -= Q_.leftCols(rank_) * w.head(rank_);
      }
      const double nv = v.norm();
      if (nv > kRankTol) Q_.col(rank_++) = v / nv;
    }
    if (rank_ < n_) {
      Q_.conservativeResize(n_, rank_);
      Ared_ = As_ * Q_;
    } else {
      Q_.resize(0, 0);
      Ared_.resize(0, 0);
    }
    structure_valid_ = true;
    structure_checked_ = true;
    warm_ = false;
  }

  // The common case, full column rank, is assumed until the kernel meets a direction that no
  // row blocks with a zero multiplier (a null-space direction of A): then build_structure().
  void assume_full_rank() {
    rank_ = n_;
    Q_.resize(0, 0);
    Ared_.resize(0, 0);
    structure_valid_ = true;
    structure_checked_ = false;
    warm_ = false;
  }

  const Matrix& kernel_matrix() const { return rank_ == n_ ? As_ : Ared_; }
  Vector lift(const Vector& y) const { return rank_ == n_ ? y : Vector(Q_ * y); }

  Result kernel_solve(const SolveOptions& options) {
    if (!structure_valid_) assume_full_rank();
    Result r = kernel_solve_once(options);
    if (r.status == Status::numerical && !structure_checked_) {
      build_structure();
      r = kernel_solve_once(options);
    }
    return r;
  }

  Result kernel_solve_once(const SolveOptions& options) {
    Result r;
    // Objective in kernel coordinates, and its part outside the row space.
    Vector c_perp;
    if (rank_ == n_) {
      ck_ = c_;
    } else {
      ck_ = Q_.transpose() * c_;
      c_perp = c_ - Q_ * ck_;
      if (!(c_perp.norm() > 1e-9 * std::max(c_.norm(), 1e-300))) c_perp.resize(0);
    }
    if (rank_ == 0) {
      // Every row is zero (and holds: SolverBase checked b >= 0 on zero rows).
      if (c_perp.size() > 0 || c_.norm() > 0) {
        r.status = Status::unbounded;
        r.ray = c_;
      } else {
        r.status = Status::optimal;
        r.x = Vector::Zero(n_);
        r.value = 0.0;
        r.duals = Vector::Zero(num_rows());
      }
      return r;
    }
    const long pivots_before = kernel_.pivots();
    long extra_pivots = 0;
    if (!warm_) {
      kernel_.bind(&kernel_matrix(), &bs_, &ck_, &zero_);
      kernel_.reset(Vector::Zero(rank_));
      warm_ = true;
      rows_pending_ = rhs_dirty_ = false;
    } else {
      kernel_.bind(&kernel_matrix(), &bs_, &ck_, &zero_);
      if (rows_pending_) kernel_.rows_appended();
      if (rhs_dirty_) kernel_.rhs_changed();
      rows_pending_ = rhs_dirty_ = false;
    }
    if (!kernel_.primal_feasible()) {
      bool feasible = false;
      if (kernel_.dual_feasible()) {
        const KernelStatus st = kernel_.dual();
        if (st == KernelStatus::infeasible) {
          r.status = Status::infeasible;
          r.farkas = kernel_.farkas();
          r.iterations = kernel_.pivots() - pivots_before;
          return r;
        }
        feasible = st == KernelStatus::feasible;
      }
      if (!feasible) {
        Vector y;
        const Status st = phase1(kernel_.point(), y, r, extra_pivots);
        if (st != Status::optimal) {
          r.status = st;
          r.iterations = kernel_.pivots() - pivots_before + extra_pivots;
          return r;
        }
        kernel_.reset(y);
      }
    }
    if (c_perp.size() > 0) {
      r.status = Status::unbounded;
      r.ray = c_perp;
      r.iterations = kernel_.pivots() - pivots_before + extra_pivots;
      return r;
    }
    KernelStatus st = kernel_.primal(options.threshold);
    if (st == KernelStatus::stopped && !(c_.dot(lift(kernel_.point())) > *options.threshold))
      st = kernel_.primal(std::nullopt);  // passed in kernel coordinates only, by rounding
    r.iterations = kernel_.pivots() - pivots_before + extra_pivots;
    switch (st) {
      case KernelStatus::optimal: {
        r.status = Status::optimal;
        r.x = lift(kernel_.point());
        r.value = c_.dot(r.x);
        r.duals = Vector::Zero(num_rows());
        const auto& basis = kernel_.basis();
        for (size_t k = 0; k < basis.size(); ++k)
          r.duals(basis[k]) = kernel_.lambda()(static_cast<Index>(k));
        break;
      }
      case KernelStatus::stopped:
        r.status = Status::stopped;
        r.x = lift(kernel_.point());
        r.value = c_.dot(r.x);
        break;
      case KernelStatus::unbounded:
        r.status = Status::unbounded;
        r.ray = lift(kernel_.ray());
        break;
      default:
        r.status = Status::numerical;
        warm_ = false;
        break;
    }
    return r;
  }

  // Capped-slack phase 1 from the point y0. Optimal: y holds a feasible point. Infeasible:
  // out.farkas holds the certificate. Numerical otherwise.
  Status phase1(const Vector& y0, Vector& y, Result& out, long& pivots) {
    const Matrix& A = kernel_matrix();
    const Index m = A.rows(), N = A.cols();
    const double r_max = 1.0 + (m > 0 ? bs_.cwiseAbs().maxCoeff() : 0.0);
    Matrix A1(m + 1, N + 1);
    Vector b1(m + 1), c1 = Vector::Zero(N + 1);
    DenseKernel::Skip skip1(m + 1);
    A1.topLeftCorner(m, N) = A;
    double r0 = r_max;
    for (Index i = 0; i < m; ++i) {
      A1(i, N) = zero_(i) ? 0.0 : 1.0;
      skip1(i) = zero_(i);
      b1(i) = bs_(i);
      if (!zero_(i)) r0 = std::min(r0, bs_(i) - A.row(i).dot(y0));
    }
    A1.row(m).setZero();
    A1(m, N) = 1.0;
    b1(m) = r_max;
    skip1(m) = false;
    c1(N) = 1.0;
    DenseKernel k1;
    k1.settings = kernel_.settings;
    k1.bind(&A1, &b1, &c1, &skip1);
    Vector start(N + 1);
    start.head(N) = y0;
    start(N) = r0;
    k1.reset(start);
    const KernelStatus st = k1.primal(0.0);
    pivots += k1.pivots();
    const double accept = -1e-11 * (1.0 + (m > 0 ? bs_.cwiseAbs().maxCoeff() : 0.0));
    if (st == KernelStatus::stopped || (st == KernelStatus::optimal && k1.point()(N) >= accept)) {
      y = k1.point().head(N);
      return Status::optimal;
    }
    if (st == KernelStatus::optimal) {
      out.farkas = Vector::Zero(num_rows());
      const auto& basis = k1.basis();
      for (size_t k = 0; k < basis.size(); ++k)
        if (basis[k] >= 0 && basis[k] < m)
          out.farkas(basis[k]) = std::max(k1.lambda()(static_cast<Index>(k)), 0.0);
      return Status::infeasible;
    }
    return Status::numerical;
  }

  // Norms of the scaled rows (0 for zero rows), extended as rows arrive.
  const Vector& row_norms() {
    const Index m0 = norms_.size(), m = num_rows();
    if (m0 < m) {
      norms_.conservativeResize(m);
      for (Index i = m0; i < m; ++i) norms_(i) = zero_(i) ? 0.0 : As_.row(i).norm();
    }
    return norms_;
  }

  // a_i·x - b_i <= tol (|b_i| + ‖a_i‖ ‖x‖) for every row; ax = A x on return.
  bool primal_ok(const Vector& x, double tol, Vector& ax) {
    if (x.size() != n_ || !x.allFinite()) return false;
    const Vector& an = row_norms();
    const double xn = x.norm();
    rows_times(As_, x, ax);
    for (Index i = 0; i < num_rows(); ++i)
      if (ax(i) - bs_(i) > tol * (std::abs(bs_(i)) + an(i) * xn)) return false;
    return true;
  }

  bool verify(const Result& r, const SolveOptions& options) {
    const double tol = verify_tolerance();
    const Index m = num_rows();
    const Vector& an = row_norms();
    Vector& ax = ax_;
    switch (r.status) {
      case Status::optimal: {
        if (!primal_ok(r.x, tol, ax) || r.duals.size() != m || !r.duals.allFinite()) return false;
        const Vector& l = r.duals;
        const double lmax = m > 0 ? std::max(l.maxCoeff(), 0.0) : 0.0;
        const double xn = r.x.norm();
        Vector& atl = atl_;
        atl = -c_;
        for (Index i = 0; i < m; ++i) {
          if (l(i) == 0.0) continue;
          if (l(i) < -tol * lmax) return false;
          if (l(i) * (bs_(i) - ax(i)) > tol * lmax * (std::abs(bs_(i)) + an(i) * xn)) return false;
          atl.noalias() += l(i) * As_.row(i).transpose();
        }
        const double cinf = c_.cwiseAbs().maxCoeff();
        return atl.cwiseAbs().maxCoeff() <= tol * (1.0 + cinf);
      }
      case Status::stopped:
        return options.threshold && primal_ok(r.x, tol, ax) && c_.dot(r.x) > *options.threshold;
      case Status::unbounded: {
        if (r.ray.size() != n_ || !r.ray.allFinite()) return false;
        const double dn = r.ray.norm();
        const Vector ad = As_ * r.ray;
        for (Index i = 0; i < m; ++i)
          if (ad(i) > tol * an(i) * dn) return false;
        // The ascent must exceed what the tolerance allows the rows: when c is (nearly) a row
        // of A, a ray with c·d > 0 but inside the tolerance proves nothing.
        return c_.dot(r.ray) > tol * c_.norm() * dn;
      }
      case Status::infeasible: {
        if (r.farkas.size() != m || !r.farkas.allFinite()) return false;
        const Vector& y = r.farkas;
        const double ymax = y.cwiseAbs().maxCoeff();
        if (!(ymax > 0) || y.minCoeff() < -tol * ymax) return false;
        const double weight = y.cwiseAbs().dot(an);
        const Vector aty = As_.transpose() * y;
        return aty.cwiseAbs().maxCoeff() <= tol * weight && bs_.dot(y) < 0.0;
      }
      default: return false;
    }
  }

  // Re-solves on GLPK, then on cdd-exact, from the scaled data (GLPK keeps the scaling: the
  // rows already have norms in [0.5, 1)).
  Result fallback(const SolveOptions& options) {
    try {
      auto g = make_glpk_solver(As_, bs_, c_);
      Result rg = g->solve(options);
      rg.fallbacks = 1;
      if (rg.status == Status::infeasible || rg.status == Status::unbounded) return rg;
      if (rg.status == Status::optimal && verify(rg, options)) return rg;
    } catch (const SolverError&) {
      // fall through to the exact solver
    }
    auto e = make_cdd_solver(As_, bs_, c_, true);
    Result re = e->solve(options);
    re.fallbacks = 2;
    return re;
  }

  DenseKernel kernel_;
  bool structure_valid_ = false;
  bool structure_checked_ = false;  // rank_ was computed, not assumed
  bool warm_ = false;
  bool rows_pending_ = false;
  bool rhs_dirty_ = false;
  Index rank_ = 0;
  Eigen::MatrixXd Q_;  // orthonormal basis of the row space (n × rank_), when rank_ < n
  Matrix Ared_;        // As_ Q_, when rank_ < n
  Vector ck_;          // objective in kernel coordinates
  Vector norms_;       // row norms of As_, see row_norms()
  Vector ax_, atl_;    // work space of verify()
};

}  // namespace

std::unique_ptr<Solver> make_dense_solver(const Matrix& A, const Vector& b, const Vector& c) {
  return std::make_unique<DenseSolver>(A, b, c);
}

Capabilities dense_capabilities() {
  Capabilities cap;
  cap.duals = true;
  cap.ray = true;
  cap.farkas = true;
  cap.early_stop = true;
  cap.warm_start = true;
  return cap;
}

}  // namespace detail
}  // namespace corral::lp
