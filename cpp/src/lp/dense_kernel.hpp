#pragma once
// The dense active-set simplex behind the "dense" backend, for tall, skinny LPs
//     maximise c·y  subject to  A y <= b,  y in R^N free,  A of full column rank N.
//
// A vertex is N linearly independent active rows (the basis); the N×N inverse of the basis
// matrix is kept and updated by a rank-one change per pivot (Sherman–Morrison), and
// refactorised by LU every `refactor_every` pivots or when a pivot is small. Each pivot costs
// one dense matrix–vector product A d over the rows (the ratio test) plus O(N²).
//
// - Primal pivots (`primal`) keep A y <= b and move along an edge that increases c·y; the
//   leaving row is chosen by steepest-edge pricing (Goldfarb & Reid 1977), exact here because
//   the edge directions are the columns of the inverse; the entering row by the two-pass ratio
//   test of Harris (1973). Until the basis is a vertex, some of its rows are "artificial":
//   e_j·y = const, which are left first (Fletcher, *Practical Methods of Optimization*, 1987,
//   ch. 8, on active-set methods with free variables). Early stop once c·y passes a threshold.
// - Dual pivots (`dual`) start from a basis with multipliers λ = B⁻ᵀc >= 0 whose point violates
//   some rows (after rows were added or right-hand sides changed): the most violated row enters,
//   the dual ratio test picks the leaving row, λ stays >= 0. No leaving row proves
//   infeasibility and gives a Farkas certificate.
// - After `bland_after` consecutive degenerate pivots both switch to Bland's smallest-index
//   rule (Bland 1977), which cannot cycle, until a pivot makes progress again.
//
// The kernel has no phase 1 and no lineality handling: the adapter (dense_backend.cpp) gives it
// a feasible start or a dual feasible basis, and a matrix of full column rank.

#include <corral/types.hpp>

#include <Eigen/LU>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <vector>

namespace corral::lp::detail {

// out = Bᵀ x for the column-major basis inverse B (N×N): out_k = B.col(k)·x.
inline void inverse_transpose_times(const Eigen::MatrixXd& B, const double* x, Vector& out) {
  const Index N = B.rows();
  out.resize(N);
  const double* col = B.data();
  for (Index k = 0; k < N; ++k, col += N) {
    double acc = 0.0;
    for (Index i = 0; i < N; ++i) acc += col[i] * x[i];
    out(k) = acc;
  }
}

// out = B x for the column-major basis inverse B (N×N).
inline void inverse_times(const Eigen::MatrixXd& B, const Vector& x, Vector& out) {
  const Index N = B.rows();
  out.setZero(N);
  const double* col = B.data();
  for (Index k = 0; k < N; ++k, col += N) {
    const double xk = x(k);
    for (Index i = 0; i < N; ++i) out(i) += col[i] * xk;
  }
}

// out = A x for a row-major A. Short rows (the usual case here) by a plain loop: Eigen's
// general matrix-vector product costs more in set-up than in arithmetic for them.
inline void rows_times(const Matrix& A, const Vector& x, Vector& out) {
  const Index m = A.rows(), n = A.cols();
  out.resize(m);
  if (n > 16) {
    out.noalias() = A * x;
    return;
  }
  const double* a = A.data();
  const double* v = x.data();
  double* o = out.data();
  for (Index i = 0; i < m; ++i, a += n) {
    double acc = 0.0;
    for (Index j = 0; j < n; ++j) acc += a[j] * v[j];
    o[i] = acc;
  }
}

enum class KernelStatus {
  optimal,     // y optimal, lambda() the multipliers of the basis rows
  infeasible,  // dual: farkas() holds y >= 0, Aᵀy = 0, bᵀy < 0
  unbounded,   // primal: ray() holds d, A d <= 0, c·d > 0
  stopped,     // primal: c·y > threshold
  feasible,    // dual: A y <= b reached (call primal to confirm optimality)
  limit,       // iteration limit
  singular,    // the basis became numerically singular
};

struct KernelSettings {
  double primal_tol = 1e-11;  // row i counts as satisfied when b_i - a_i·y >= -tol (|b_i| + ‖y‖)
  double dual_tol = 1e-11;    // λ_k counts as >= 0 when λ_k >= -tol max(‖c‖∞, ‖λ‖∞)
  double pivot_tol = 1e-10;  // a row blocks an edge d only when a_i·d > tol ‖d‖
  int refactor_every = 64;   // pivots between LU refactorisations of the basis
  int bland_after = 40;      // consecutive degenerate pivots before Bland's rule
  long max_pivots = 0;       // 0: 50 (m + N) + 1000
};

class DenseKernel {
 public:
  using Skip = Eigen::Array<bool, Eigen::Dynamic, 1>;

  KernelSettings settings;

  // The problem: A (m×N, rows kept alive by the caller), b, c; rows with skip(i) true (zero
  // rows) are ignored. Rows may be appended between calls (call rows_appended).
  void bind(const Matrix* A, const Vector* b, const Vector* c, const Skip* skip) {
    A_ = A;
    b_ = b;
    c_ = c;
    skip_ = skip;
  }

  Index dim() const { return N_; }
  const Vector& point() const { return y_; }
  const std::vector<Index>& basis() const { return basis_; }
  const Vector& ray() const { return ray_; }
  const Vector& farkas() const { return farkas_; }
  long pivots() const { return pivots_; }
  bool is_vertex() const {
    return std::all_of(basis_.begin(), basis_.end(), [](Index k) { return k >= 0; });
  }

  // Starts at the point y with every basis row artificial (B = I).
  void reset(const Vector& y) {
    N_ = y.size();
    y_ = y;
    art_rhs_ = y;
    basis_.assign(static_cast<size_t>(N_), 0);
    for (Index j = 0; j < N_; ++j) basis_[static_cast<size_t>(j)] = -1 - j;
    Binv_ = Eigen::MatrixXd::Identity(N_, N_);
    in_basis_.assign(static_cast<size_t>(rows()), char(0));
    since_refactor_ = 0;
    recompute_slacks();
  }

  // Starts at the vertex given by N row indices. False when they are not independent.
  bool set_basis(const std::vector<Index>& rows_in_basis) {
    N_ = A_->cols();
    basis_ = rows_in_basis;
    art_rhs_ = Vector::Zero(N_);
    y_ = Vector::Zero(N_);
    in_basis_.assign(static_cast<size_t>(rows()), char(0));
    for (Index k : basis_) in_basis_[static_cast<size_t>(k)] = 1;
    return refactor();
  }

  // Rows appended to A and b since the last call: slacks for them.
  void rows_appended() {
    const Index m0 = static_cast<Index>(in_basis_.size()), m = rows();
    in_basis_.resize(static_cast<size_t>(m), char(0));
    s_.conservativeResize(m);
    for (Index i = m0; i < m; ++i) s_(i) = (*b_)(i)-A_->row(i).dot(y_);
  }

  // Right-hand sides changed: the point moves to B⁻¹ b_B (the basis is kept).
  void rhs_changed() {
    basis_rhs();
    inverse_times(Binv_, rhs_, y_);
    recompute_slacks();
  }

  // True when every row holds at the current point within the primal tolerance.
  bool primal_feasible() const {
    const double yn = y_.norm();
    for (Index i = 0; i < rows(); ++i)
      if (!skipped(i) && s_(i) < -feas_tol(i, yn)) return false;
    return true;
  }

  // λ = B⁻ᵀ c; true when the basis is a vertex and λ >= -tol.
  bool dual_feasible() {
    if (!is_vertex()) return false;
    inverse_transpose_times(Binv_, c_->data(), lambda_);
    const double tol = dual_tol();
    return lambda_.size() == 0 || lambda_.minCoeff() >= -tol;
  }

  // Multipliers of the basis rows (valid after optimal).
  const Vector& lambda() const { return lambda_; }

  // Primal simplex from a feasible point.
  KernelStatus primal(std::optional<double> threshold) {
    int degenerate_run = 0;
    long count = 0;
    std::vector<char>& tried_flip = tried_flip_;
    tried_flip.assign(static_cast<size_t>(N_), char(0));
    for (;;) {
      if (threshold && c_->dot(y_) > *threshold) return KernelStatus::stopped;
      if (++count > max_pivots()) return KernelStatus::limit;
      inverse_transpose_times(Binv_, c_->data(), lambda_);
      const bool bland = degenerate_run >= settings.bland_after;
      const double dtol = dual_tol();
      // While the basis holds artificial rows, move along the projection of c onto the null
      // space of its real rows, d = Σ λ_k B⁻¹e_k over artificial k (c·d = Σ λ_k² > 0, the real
      // rows stay active), until a row blocks; it replaces the artificial row with the largest
      // pivot. This reaches a vertex in at most N steps, usually close to the optimum.
      {
        d_.setZero(N_);
        bool any = false;
        for (Index k = 0; k < N_; ++k)
          if (basis_[static_cast<size_t>(k)] < 0 && std::abs(lambda_(k)) > dtol) {
            d_.noalias() += lambda_(k) * Binv_.col(k);
            any = true;
          }
        if (any) {
          rows_times(*A_, d_, Ad_);
          const Index q = ratio_test(false);
          if (q < 0) {
            ray_ = d_;
            return KernelStatus::unbounded;
          }
          const double t = std::max(s_(q), 0.0) / Ad_(q);
          y_.noalias() += t * d_;
          s_.noalias() -= t * Ad_;
          ++pivots_;
          art_rhs_ = y_;  // the artificial rows e_j·y = y_j hold at the new point
          inverse_transpose_times(Binv_, A_->row(q).data(), v_);
          Index p = -1;
          for (Index k = 0; k < N_; ++k)
            if (basis_[static_cast<size_t>(k)] < 0 && (p < 0 || std::abs(v_(k)) > std::abs(v_(p))))
              p = k;
          if (!replace(p, q)) return KernelStatus::singular;
          continue;
        }
      }
      // Leaving position: an artificial row first (any sign improves; |λ| largest, then any),
      // otherwise the most negative multiplier per unit edge length.
      Index p = -1;
      double sigma = 1.0;
      double best = 0.0;
      for (Index k = 0; k < N_; ++k) {
        if (basis_[static_cast<size_t>(k)] >= 0) continue;
        const double score = std::abs(lambda_(k)) / Binv_.col(k).norm();
        if (p < 0 || score > best) {
          p = k;
          best = score;
        }
      }
      bool artificial = p >= 0;
      if (artificial) {
        if (std::abs(lambda_(p)) > dtol) {
          sigma = lambda_(p) < 0 ? 1.0 : -1.0;  // c·(σ d) = -σ λ_p > 0 with d = -B⁻¹e_p
        } else {
          sigma = tried_flip[static_cast<size_t>(p)] ? -1.0 : 1.0;
        }
      } else {
        for (Index k = 0; k < N_; ++k) {
          if (!(lambda_(k) < -dtol)) continue;
          if (bland) {
            if (p < 0 || basis_[static_cast<size_t>(k)] < basis_[static_cast<size_t>(p)]) p = k;
          } else {
            const double score = lambda_(k) * lambda_(k) / Binv_.col(k).squaredNorm();
            if (p < 0 || score > best) {
              p = k;
              best = score;
            }
          }
        }
        if (p < 0) {
          clean_lambda(dtol);
          return KernelStatus::optimal;
        }
      }
      d_.noalias() = -sigma * Binv_.col(p);
      rows_times(*A_, d_, Ad_);
      const Index q = ratio_test(bland);
      if (q < 0) {
        if (artificial && std::abs(lambda_(p)) <= dtol) {
          // No improving sign: try the other direction once, then give up on this row.
          if (!tried_flip[static_cast<size_t>(p)]) {
            tried_flip[static_cast<size_t>(p)] = 1;
            continue;
          }
          return KernelStatus::singular;  // a direction with A d = 0: A is rank deficient
        }
        ray_ = d_;
        return KernelStatus::unbounded;
      }
      const double t = std::max(s_(q), 0.0) / Ad_(q);
      const double yn = y_.norm();
      if (t * d_.norm() <= 1e-12 * (1.0 + yn)) ++degenerate_run;
      else degenerate_run = 0;
      y_.noalias() += t * d_;
      s_.noalias() -= t * Ad_;
      ++pivots_;
      if (!replace(p, q)) return KernelStatus::singular;
    }
  }

  // Dual simplex from a dual feasible vertex.
  KernelStatus dual() {
    if (!is_vertex()) return KernelStatus::singular;
    int degenerate_run = 0;
    long count = 0;
    Vector w(N_);
    for (;;) {
      const bool bland = degenerate_run >= settings.bland_after;
      const double yn = y_.norm();
      Index q = -1;
      double worst = 0.0;
      for (Index i = 0; i < rows(); ++i) {
        if (skipped(i) || in_basis_[static_cast<size_t>(i)]) continue;
        const double v = -s_(i);
        if (!(v > feas_tol(i, yn))) continue;
        if (bland) {
          q = i;
          break;
        }
        if (v > worst) {
          worst = v;
          q = i;
        }
      }
      if (q < 0) return KernelStatus::feasible;
      if (++count > max_pivots()) return KernelStatus::limit;
      ++pivots_;
      inverse_transpose_times(Binv_, A_->row(q).data(), w);  // a_q = Σ w_k a_{B_k}
      inverse_transpose_times(Binv_, c_->data(), lambda_);
      const double dtol = dual_tol();
      const double wtol = 1e-9 * std::max(w.cwiseAbs().maxCoeff(), 1e-300);
      // Dual ratio test, two passes as in Harris's: bound, then the largest w_k within it.
      double tmax = std::numeric_limits<double>::infinity();
      for (Index k = 0; k < N_; ++k)
        if (w(k) > wtol) tmax = std::min(tmax, (std::max(lambda_(k), 0.0) + dtol) / w(k));
      Index p = -1;
      if (std::isfinite(tmax)) {
        double tmin = std::numeric_limits<double>::infinity();
        for (Index k = 0; k < N_; ++k)
          if (w(k) > wtol) tmin = std::min(tmin, std::max(lambda_(k), 0.0) / w(k));
        for (Index k = 0; k < N_; ++k) {
          if (!(w(k) > wtol)) continue;
          const double ratio = std::max(lambda_(k), 0.0) / w(k);
          if (bland) {
            if (ratio <= tmin * (1 + 1e-12) + 1e-300 &&
                (p < 0 || basis_[static_cast<size_t>(k)] < basis_[static_cast<size_t>(p)]))
              p = k;
          } else if (ratio <= tmax && (p < 0 || w(k) > w(p))) {
            p = k;
          }
        }
      }
      if (p < 0) {
        // a_q - Σ w_k a_{B_k} = 0 with -w >= 0: y_q = 1, y_{B_k} = -w_k certifies that row q
        // cannot hold together with the basis rows (bᵀy = b_q - a_q·y < 0).
        farkas_ = Vector::Zero(rows());
        farkas_(q) = 1.0;
        for (Index k = 0; k < N_; ++k)
          farkas_(basis_[static_cast<size_t>(k)]) = std::max(-w(k), 0.0);
        return KernelStatus::infeasible;
      }
      if (std::max(lambda_(p), 0.0) / w(p) <= 1e-12 * (1.0 + lambda_.cwiseAbs().maxCoeff()))
        ++degenerate_run;
      else degenerate_run = 0;
      d_.noalias() = -Binv_.col(p);
      rows_times(*A_, d_, Ad_);
      const double t = -s_(q) / w(p);
      y_.noalias() += t * d_;
      s_.noalias() -= t * Ad_;
      if (!replace(p, q)) return KernelStatus::singular;
    }
  }

 private:
  Index rows() const { return A_->rows(); }
  bool skipped(Index i) const { return skip_ != nullptr && (*skip_)(i); }
  double feas_tol(Index i, double yn) const {
    return settings.primal_tol * (std::abs((*b_)(i)) + yn);
  }
  double dual_tol() const {
    const double cs = c_->size() ? c_->cwiseAbs().maxCoeff() : 0.0;
    const double ls = lambda_.size() ? lambda_.cwiseAbs().maxCoeff() : 0.0;
    return settings.dual_tol * std::max(cs, ls);
  }
  long max_pivots() const {
    return settings.max_pivots > 0 ? settings.max_pivots : 50 * (rows() + N_) + 1000;
  }

  void clean_lambda(double dtol) {
    for (Index k = 0; k < N_; ++k)
      if (lambda_(k) < 0 && lambda_(k) >= -dtol) lambda_(k) = 0.0;
  }

  // rhs_ = the right-hand sides of the basis rows (b_i, or the value of an artificial row).
  void basis_rhs() {
    rhs_.resize(N_);
    for (Index k = 0; k < N_; ++k) {
      const Index i = basis_[static_cast<size_t>(k)];
      rhs_(k) = i >= 0 ? (*b_)(i) : art_rhs_(-1 - i);
    }
  }

  void recompute_slacks() {
    rows_times(*A_, y_, s_);
    s_ = (*b_) - s_;
    for (Index k : basis_)
      if (k >= 0) s_(k) = 0.0;
  }

  // Harris's two-pass ratio test along d_ (Ad_ = A d_). Returns the entering row or -1.
  // Pass 1 bounds the step by the rows relaxed by their feasibility tolerance and keeps the
  // rows whose plain ratio is within the running bound (it only decreases); pass 2, over those,
  // takes the largest a_i·d (the most stable pivot), or under Bland's rule the smallest index
  // among the rows of minimal ratio.
  Index ratio_test(bool bland) {
    const double piv = settings.pivot_tol * d_.norm();
    const double ptol = settings.primal_tol;
    const double yn = y_.norm();
    const Index m = rows();
    const double* ad = Ad_.data();
    const double* s = s_.data();
    const double* b = b_->data();
    const char* in = in_basis_.data();
    const bool* skip = skip_ != nullptr ? skip_->data() : nullptr;
    double tmax = std::numeric_limits<double>::infinity();
    cand_.clear();
    for (Index i = 0; i < m; ++i) {
      const double a = ad[i];
      if (!(a > piv)) continue;
      const double si = s[i] > 0.0 ? s[i] : 0.0;
      if (si > tmax * a || in[i] || (skip != nullptr && skip[i])) continue;
      const double h = (si + ptol * (std::abs(b[i]) + yn)) / a;
      if (h < tmax) tmax = h;
      cand_.push_back(i);
    }
    if (cand_.empty()) return -1;
    Index q = -1;
    if (bland) {
      double tmin = std::numeric_limits<double>::infinity();
      for (Index i : cand_) tmin = std::min(tmin, std::max(s[i], 0.0) / ad[i]);
      for (Index i : cand_)
        if (std::max(s[i], 0.0) / ad[i] <= tmin * (1 + 1e-12) + 1e-300 && (q < 0 || i < q)) q = i;
      return q;
    }
    for (Index i : cand_)
      if (std::max(s[i], 0.0) <= tmax * ad[i] && (q < 0 || ad[i] > ad[q])) q = i;
    return q;
  }

  // Row q replaces basis position p: B⁻¹ ← B⁻¹ - u (vᵀ - e_pᵀ) / α with u = B⁻¹e_p,
  // vᵀ = a_qᵀ B⁻¹, α = a_q·u (Sherman–Morrison).
  bool replace(Index p, Index q) {
    const Index old = basis_[static_cast<size_t>(p)];
    if (old >= 0) in_basis_[static_cast<size_t>(old)] = 0;
    basis_[static_cast<size_t>(p)] = q;
    in_basis_[static_cast<size_t>(q)] = 1;
    s_(q) = 0.0;
    u_ = Binv_.col(p);
    inverse_transpose_times(Binv_, A_->row(q).data(), v_);
    const double alpha = v_(p);
    if (++since_refactor_ >= settings.refactor_every ||
        !(std::abs(alpha) > 1e-7 * u_.norm() * A_->row(q).norm())) {
      if (!refactor()) return false;
      return true;
    }
    v_(p) -= 1.0;
    {
      double* col = Binv_.data();
      const double* u = u_.data();
      for (Index k = 0; k < N_; ++k, col += N_) {
        const double f = v_(k) / alpha;
        if (f != 0.0)
          for (Index i = 0; i < N_; ++i) col[i] -= u[i] * f;
      }
    }
    // Re-anchor the point on the basis rows so that they stay exactly active.
    if (is_vertex()) {
      basis_rhs();
      inverse_times(Binv_, rhs_, y_);
    }
    return true;
  }

  // LU of the basis matrix; the point is recomputed from it, the slacks from the point.
  bool refactor() {
    since_refactor_ = 0;
    Eigen::MatrixXd M(N_, N_);
    for (Index k = 0; k < N_; ++k) {
      const Index i = basis_[static_cast<size_t>(k)];
      if (i >= 0) {
        M.row(k) = A_->row(i);
      } else {
        M.row(k).setZero();
        M(k, -1 - i) = 1.0;
      }
    }
    Eigen::PartialPivLU<Eigen::MatrixXd> lu(M);
    if (N_ > 0 && !(lu.rcond() > 1e-13)) return false;
    Binv_ = lu.inverse();
    basis_rhs();
    inverse_times(Binv_, rhs_, y_);
    recompute_slacks();
    return true;
  }

  const Matrix* A_ = nullptr;
  const Vector* b_ = nullptr;
  const Vector* c_ = nullptr;
  const Skip* skip_ = nullptr;
  Index N_ = 0;
  std::vector<Index> basis_;  // row index, or -1 - j for the artificial row e_j
  std::vector<char> in_basis_;
  Eigen::MatrixXd Binv_;  // inverse of the basis matrix (column-major: columns are edges)
  Vector y_, s_, art_rhs_, rhs_, lambda_, d_, Ad_, u_, v_, ray_, farkas_;
  std::vector<char> tried_flip_;
  std::vector<Index> cand_;  // rows kept by pass 1 of the ratio test
  int since_refactor_ = 0;
  long pivots_ = 0;
};

}  // namespace corral::lp::detail
