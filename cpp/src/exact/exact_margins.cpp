// Exact worst margin of rows over a polytope: an exact simplex per row, started at a vertex
// that floating-point LPs suggest; exact LPs over relaxations where that start fails. The
// method is described in corral/detail/exact.hpp.
//
// Every double is an integer times a power of two. A row of doubles is stored as an integer
// vector with one exponent (value = z * 2^e), so that products and feasibility checks run on
// GMP integers instead of rationals, whose gcds dominate otherwise.

#include <corral/detail/exact.hpp>
#include <corral/detail/validate.hpp>
#include <corral/errors.hpp>
#include <corral/lp/solver.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <string>
#include <utility>
#include <vector>

#include "cdd/cdd_common.hpp"

namespace corral::detail {
namespace {

// RAII holders of GMP numbers (copyable, so they live in std::vector).
struct Z {
  mpz_t v;
  Z() { mpz_init(v); }
  Z(const Z& o) { mpz_init_set(v, o.v); }
  Z& operator=(const Z& o) {
    if (this != &o) mpz_set(v, o.v);
    return *this;
  }
  ~Z() { mpz_clear(v); }
};
struct Q {
  mpq_t v;
  Q() { mpq_init(v); }
  Q(const Q& o) {
    mpq_init(v);
    mpq_set(v, o.v);
  }
  Q& operator=(const Q& o) {
    if (this != &o) mpq_set(v, o.v);
    return *this;
  }
  ~Q() { mpq_clear(v); }
};

// x = mant * 2^exp exactly (|mant| < 2^53); zero gives mant = 0, exp = 0.
void split(double x, Z& mant, long& exp) {
  if (x == 0.0) {
    mpz_set_ui(mant.v, 0);
    exp = 0;
    return;
  }
  int e = 0;
  const double f = std::frexp(x, &e);  // x = f 2^e, 0.5 <= |f| < 1
  mpz_set_d(mant.v, std::ldexp(f, 53));
  exp = static_cast<long>(e) - 53;
}

// A vector of exact dyadic rationals: value_q = z_q * 2^e (one exponent for the vector).
struct IntRow {
  std::vector<Z> z;
  long e = 0;
};

// acc_m * 2^acc_e += m * 2^e (acc_m == 0 means empty).
void add_dyadic(Z& acc_m, long& acc_e, const mpz_t m, long e) {
  if (mpz_sgn(m) == 0) return;
  if (mpz_sgn(acc_m.v) == 0) {
    mpz_set(acc_m.v, m);
    acc_e = e;
    return;
  }
  if (e >= acc_e) {
    Z shifted;
    mpz_mul_2exp(shifted.v, m, static_cast<mp_bitcnt_t>(e - acc_e));
    mpz_add(acc_m.v, acc_m.v, shifted.v);
  } else {
    mpz_mul_2exp(acc_m.v, acc_m.v, static_cast<mp_bitcnt_t>(acc_e - e));
    mpz_add(acc_m.v, acc_m.v, m);
    acc_e = e;
  }
}

// Brings entries m_q * 2^{e_q} to one exponent.
IntRow common_exponent(std::vector<Z>& m, const std::vector<long>& e) {
  IntRow row;
  long emin = std::numeric_limits<long>::max();
  for (size_t q = 0; q < m.size(); ++q)
    if (mpz_sgn(m[q].v) != 0) emin = std::min(emin, e[q]);
  if (emin == std::numeric_limits<long>::max()) emin = 0;
  row.e = emin;
  row.z.resize(m.size());
  for (size_t q = 0; q < m.size(); ++q)
    if (mpz_sgn(m[q].v) != 0)
      mpz_mul_2exp(row.z[q].v, m[q].v, static_cast<mp_bitcnt_t>(e[q] - emin));
  return row;
}

// Row i of M as integers.
IntRow int_row(const Matrix& M, Index i) {
  const Index n = M.cols();
  std::vector<Z> m(static_cast<size_t>(n));
  std::vector<long> e(static_cast<size_t>(n), 0);
  for (Index q = 0; q < n; ++q)
    split(M(i, q), m[static_cast<size_t>(q)], e[static_cast<size_t>(q)]);
  return common_exponent(m, e);
}

// Row j of G times A, formed exactly.
IntRow int_product_row(const Matrix& G, const Matrix& A, Index j) {
  const Index k = G.cols(), n = A.cols();
  std::vector<Z> acc(static_cast<size_t>(n));
  std::vector<long> acc_e(static_cast<size_t>(n), 0);
  Z mg, ma, prod;
  long eg = 0, ea = 0;
  for (Index l = 0; l < k; ++l) {
    split(G(j, l), mg, eg);
    if (mpz_sgn(mg.v) == 0) continue;
    for (Index q = 0; q < n; ++q) {
      split(A(l, q), ma, ea);
      if (mpz_sgn(ma.v) == 0) continue;
      mpz_mul(prod.v, mg.v, ma.v);
      add_dyadic(acc[static_cast<size_t>(q)], acc_e[static_cast<size_t>(q)], prod.v, eg + ea);
    }
  }
  return common_exponent(acc, acc_e);
}

// q = z * 2^e.
void set_dyadic(mpq_t q, const mpz_t z, long e) {
  mpq_set_z(q, z);
  if (e > 0) mpq_mul_2exp(q, q, static_cast<mp_bitcnt_t>(e));
  if (e < 0) mpq_div_2exp(q, q, static_cast<mp_bitcnt_t>(-e));
}

// Solves W[:, 0..k) mu = W[:, k] for W with r >= k rows of integers, by fraction-free
// elimination with row exchanges (Bareiss 1968). False unless the k columns are independent
// and the system is consistent. W is overwritten.
bool bareiss_solve(std::vector<std::vector<Z>>& W, size_t k, std::vector<Q>& mu) {
  const size_t r = W.size();
  if (r < k) return false;
  Z prev, tmp;
  mpz_set_ui(prev.v, 1);
  for (size_t col = 0; col < k; ++col) {
    size_t p = col;
    while (p < r && mpz_sgn(W[p][col].v) == 0) ++p;
    if (p == r) return false;
    std::swap(W[p], W[col]);
    for (size_t i = col + 1; i < r; ++i) {
      for (size_t jj = col + 1; jj <= k; ++jj) {
        mpz_mul(tmp.v, W[col][col].v, W[i][jj].v);
        mpz_submul(tmp.v, W[i][col].v, W[col][jj].v);
        mpz_divexact(W[i][jj].v, tmp.v, prev.v);
      }
      mpz_set_ui(W[i][col].v, 0);
    }
    mpz_set(prev.v, W[col][col].v);
  }
  for (size_t i = k; i < r; ++i)
    if (mpz_sgn(W[i][k].v) != 0) return false;
  mu.assign(k, Q());
  Q term, acc;
  for (size_t col = k; col-- > 0;) {
    mpq_set_z(acc.v, W[col][k].v);
    for (size_t jj = col + 1; jj < k; ++jj) {
      mpq_set_z(term.v, W[col][jj].v);
      mpq_mul(term.v, term.v, mu[jj].v);
      mpq_sub(acc.v, acc.v, term.v);
    }
    mpq_set_z(term.v, W[col][col].v);
    mpq_div(mu[col].v, acc.v, term.v);
  }
  return true;
}

// v * 2^e for a rational v (in place).
void scale2(mpq_t v, long e) {
  if (e > 0) mpq_mul_2exp(v, v, static_cast<mp_bitcnt_t>(e));
  if (e < 0) mpq_div_2exp(v, v, static_cast<mp_bitcnt_t>(-e));
}

// A rational vector as X / D with integers X and a common denominator D > 0.
void common_denominator(const std::vector<Q>& x, std::vector<Z>& X, Z& D) {
  mpz_set_ui(D.v, 1);
  for (const Q& v : x) mpz_lcm(D.v, D.v, mpq_denref(v.v));
  X.assign(x.size(), Z());
  for (size_t l = 0; l < x.size(); ++l) {
    mpz_divexact(X[l].v, D.v, mpq_denref(x[l].v));
    mpz_mul(X[l].v, X[l].v, mpq_numref(x[l].v));
  }
}

enum class LpOutcome { optimal, unbounded, empty, failed };

// max c·x over the rows `rows` of {F x <= t}, in GMP rationals (cddlib's dual simplex), c
// exact. On optimal: `value` and the optimiser `x`.
LpOutcome exact_lp(const Matrix& F, const Vector& t, const std::vector<Index>& rows,
                   const std::vector<Q>& c, Q& value, std::vector<Q>& x) {
  const long m = static_cast<long>(rows.size()), n = static_cast<long>(F.cols());
  auto lock = cdd_lock();
  auto solve = [&](bool zero_objective, bool keep) {
    dd_MatrixPtr M = dd_CreateMatrix(m, n + 1);
    M->representation = dd_Inequality;
    M->numbtype = dd_Rational;
    M->objective = dd_LPmax;
    for (long q = 0; q < m; ++q) {
      const Index i = rows[static_cast<size_t>(q)];
      dd_set_d(M->matrix[q][0], t(i));
      for (long j = 0; j < n; ++j) dd_set_d(M->matrix[q][j + 1], F(i, j) == 0.0 ? 0.0 : -F(i, j));
    }
    dd_set_si(M->rowvec[0], 0);
    for (long j = 0; j < n; ++j) {
      if (zero_objective) dd_set_si(M->rowvec[j + 1], 0);
      else mpq_set(M->rowvec[j + 1], c[static_cast<size_t>(j)].v);
    }
    dd_ErrorType err = dd_NoError;
    dd_LPPtr lp = dd_Matrix2LP(M, &err);
    dd_FreeMatrix(M);
    if (lp == nullptr || err != dd_NoError) {
      if (lp) dd_FreeLPData(lp);
      return LpOutcome::failed;
    }
    LpOutcome status = LpOutcome::failed;
    if (dd_LPSolve(lp, dd_DualSimplex, &err) && err == dd_NoError) {
      if (lp->LPS == dd_Optimal) {
        status = LpOutcome::optimal;
        if (keep) {
          mpq_set(value.v, lp->optvalue);
          x.assign(static_cast<size_t>(n), Q());
          for (long j = 0; j < n; ++j) mpq_set(x[static_cast<size_t>(j)].v, lp->sol[j + 1]);
        }
      } else if (lp->LPS == dd_Inconsistent || lp->LPS == dd_StrucInconsistent) {
        status = LpOutcome::empty;
      } else if (lp->LPS == dd_DualInconsistent || lp->LPS == dd_StrucDualInconsistent ||
                 lp->LPS == dd_Unbounded) {
        status = LpOutcome::unbounded;
      }
    }
    dd_FreeLPData(lp);
    return status;
  };
  LpOutcome r = solve(false, true);
  if (r == LpOutcome::unbounded) {
    // Dual infeasibility means unbounded only for a feasible set: a zero objective decides.
    const LpOutcome f = solve(true, false);
    if (f == LpOutcome::empty) r = LpOutcome::empty;
    if (f == LpOutcome::failed) r = LpOutcome::failed;
  }
  return r;
}

// What is known of one row's margin: a lower bound d - v from the exact LP over a subset of
// S's rows (a relaxation, so v >= the true maximum), exact once x is feasible for all rows.
struct RowState {
  enum class Kind { bound, exact, unbounded } kind = Kind::bound;
  Q value;                  // lower bound (bound) or the margin (exact)
  std::vector<Q> x;         // optimiser of the relaxation
  std::vector<Index> rows;  // rows of S in the relaxation (sorted)
};

class Worker {
 public:
  Worker(const Matrix& F, const Vector& t, const Matrix& G, const Matrix* A, const Vector& d,
         const Options& opt)
      : F_(F), t_(t), G_(G), A_(A), d_(d), opt_(opt), n_(F.cols()) {
    Frows_.reserve(static_cast<size_t>(F.rows()));
    for (Index i = 0; i < F.rows(); ++i) Frows_.push_back(int_row(F, i));
    tz_.resize(static_cast<size_t>(F.rows()));
    te_.assign(static_cast<size_t>(F.rows()), 0);
    tq_.resize(static_cast<size_t>(F.rows()));
    for (Index i = 0; i < F.rows(); ++i) {
      split(t(i), tz_[static_cast<size_t>(i)], te_[static_cast<size_t>(i)]);
      mpq_set_d(tq_[static_cast<size_t>(i)].v, t(i));
    }
    scale_ = 1.0;
    if (t.size()) scale_ = std::max(scale_, t.cwiseAbs().maxCoeff());
  }

  ExactWorstMargin run(const std::vector<std::vector<Index>>& supports, double threshold) {
    ExactWorstMargin out;
    const Index k = G_.rows();
    if (k == 0) {
      out.nonnegative = out.meets_threshold = true;
      return out;
    }
    if (F_.rows() == 0) return no_constraints(threshold);
    auto lp = lp::make_solver(F_, t_, Vector::Zero(n_), opt_.backend);
    std::vector<RowState> rows(static_cast<size_t>(k));
    for (Index j = 0; j < k; ++j) {
      detail::report_progress(opt_.progress, "exact", j, k, out.exact_lps);
      const std::vector<Index> none;
      const std::vector<Index>& hint =
          static_cast<size_t>(j) < supports.size() ? supports[static_cast<size_t>(j)] : none;
      RowState& rs = rows[static_cast<size_t>(j)];
      // The relaxation: the support hint and the rows nearly tight at a floating-point
      // optimiser; more rows (by slack) while it is unbounded.
      const IntRow c = objective(j);
      lp->set_objective(objective_double(j));
      const lp::Result fr = lp->solve();
      const std::vector<Index> B = start_basis(by_slack(refine(c, fr)), fr);
      if (!B.empty()) {
        ++out.exact_solves;
        Q best;
        const LpOutcome r = exact_simplex(c, B, best, out);
        if (r == LpOutcome::optimal) {
          rs.kind = RowState::Kind::exact;
          mpq_set_d(rs.value.v, d_(j));
          mpq_sub(rs.value.v, rs.value.v, best.v);
          continue;
        }
        if (r == LpOutcome::unbounded) {
          rs.kind = RowState::Kind::unbounded;
          continue;
        }
      }
      const std::vector<Index> order = by_slack(fr);
      size_t take = 0;
      while (take < order.size() && near_tight(fr, order[take])) ++take;
      take = std::max<size_t>(take, std::min<size_t>(order.size(), static_cast<size_t>(n_)));
      rs.rows = merge(clean(hint), order, take);
      for (;;) {
        const LpOutcome r = settle(j, c, rs, out);
        if (r == LpOutcome::empty) return finish_empty(out);
        if (r != LpOutcome::unbounded || rs.rows.size() == static_cast<size_t>(F_.rows())) break;
        take = std::min(order.size(), 2 * take + 1);
        rs.rows = merge(rs.rows, order, take);
      }
    }
    // The smallest value is the exact worst margin once its row is exact: every other margin
    // is at least its own value.
    for (;;) {
      Index worst = -1;
      for (Index j = 0; j < k; ++j) {
        const RowState& rs = rows[static_cast<size_t>(j)];
        if (rs.kind == RowState::Kind::unbounded) {
          out.status = ExactWorstMargin::Status::unbounded;
          out.row = j;
          return out;
        }
        if (worst < 0 || mpq_cmp(rs.value.v, rows[static_cast<size_t>(worst)].value.v) < 0)
          worst = j;
      }
      RowState& rs = rows[static_cast<size_t>(worst)];
      if (rs.kind == RowState::Kind::exact) {
        out.status = ExactWorstMargin::Status::optimal;
        out.row = worst;
        out.margin = to_rational(rs.value.v);
        out.nonnegative = mpq_sgn(rs.value.v) >= 0;
        Q thr;
        mpq_set_d(thr.v, threshold);
        out.meets_threshold = mpq_cmp(rs.value.v, thr.v) >= 0;
        return out;
      }
      ++out.primal_checks;
      const std::vector<Index> violated = violated_rows(rs.x, false);
      if (violated.empty()) {
        rs.kind = RowState::Kind::exact;  // the relaxation's optimiser is feasible: optimal
        continue;
      }
      rs.rows = merge(rs.rows, violated, violated.size());
      if (settle(worst, objective(worst), rs, out) == LpOutcome::empty) return finish_empty(out);
    }
  }

 private:
  // S is the whole space: a row is bounded only when c = 0, and then its margin is d.
  ExactWorstMargin no_constraints(double threshold) const {
    ExactWorstMargin out;
    Index worst = -1;
    for (Index j = 0; j < G_.rows(); ++j) {
      const IntRow c = objective(j);
      const bool zero =
          std::all_of(c.z.begin(), c.z.end(), [](const Z& z) { return mpz_sgn(z.v) == 0; });
      if (!zero) {
        out.status = ExactWorstMargin::Status::unbounded;
        out.row = j;
        return out;
      }
      if (worst < 0 || d_(j) < d_(worst)) worst = j;
    }
    Q v;
    mpq_set_d(v.v, d_(worst));
    out.status = ExactWorstMargin::Status::optimal;
    out.row = worst;
    out.margin = to_rational(v.v);
    out.nonnegative = d_(worst) >= 0.0;
    out.meets_threshold = d_(worst) >= threshold;
    return out;
  }

  static ExactWorstMargin& finish_empty(ExactWorstMargin& out) {
    out.status = ExactWorstMargin::Status::empty;
    out.row = -1;
    out.nonnegative = out.meets_threshold = true;
    return out;
  }

  // Valid, distinct, sorted indices.
  std::vector<Index> clean(const std::vector<Index>& hint) const {
    std::vector<Index> P;
    for (Index i : hint)
      if (i >= 0 && i < F_.rows()) P.push_back(i);
    std::sort(P.begin(), P.end());
    P.erase(std::unique(P.begin(), P.end()), P.end());
    return P;
  }

  // `base` with the first `take` entries of `more`, sorted and distinct.
  static std::vector<Index> merge(const std::vector<Index>& base, const std::vector<Index>& more,
                                  size_t take) {
    std::vector<Index> out = base;
    out.insert(out.end(), more.begin(), more.begin() + static_cast<std::ptrdiff_t>(take));
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    return out;
  }

  // Rows of S by increasing slack at the floating-point optimiser (index order without one).
  std::vector<Index> by_slack(const lp::Result& r) const {
    std::vector<Index> order(static_cast<size_t>(F_.rows()));
    std::iota(order.begin(), order.end(), Index{0});
    if (r.x.size() != n_) return order;
    const Vector slack = t_ - F_ * r.x;
    std::stable_sort(order.begin(), order.end(),
                     [&](Index a, Index b) { return slack(a) < slack(b); });
    return order;
  }

  // A floating-point optimiser nearer to the exact one. c = λᵀ F_P + δ with λ the
  // floating-point duals on their support P and δ formed exactly: δ is of the order of
  // rounding, below what the first LP sees, and decides which vertex of the optimal face
  // {F_P x = t_P} is optimal. So δ is maximised over that face (its rows relaxed by 1e-9 of
  // the scale). The same optimiser when there is nothing to refine.
  lp::Result refine(const IntRow& c, const lp::Result& r) const {
    if (r.status != lp::Status::optimal || !r.has_duals() || r.x.size() != n_) return r;
    const double top = r.duals.maxCoeff();
    if (!(top > 0.0)) return r;
    std::vector<Index> P;
    for (Index i = 0; i < r.duals.size(); ++i)
      if (r.duals(i) > 1e-12 * top) P.push_back(i);
    // δ = c - Σ λ_q F_q, exactly, then rounded.
    std::vector<Z> acc(static_cast<size_t>(n_));
    std::vector<long> acc_e(static_cast<size_t>(n_), 0);
    Z lm, prod;
    long le = 0;
    for (Index l = 0; l < n_; ++l)
      add_dyadic(acc[static_cast<size_t>(l)], acc_e[static_cast<size_t>(l)],
                 c.z[static_cast<size_t>(l)].v, c.e);
    for (Index i : P) {
      split(-r.duals(i), lm, le);
      const IntRow& fr = Frows_[static_cast<size_t>(i)];
      for (Index l = 0; l < n_; ++l) {
        mpz_mul(prod.v, lm.v, fr.z[static_cast<size_t>(l)].v);
        add_dyadic(acc[static_cast<size_t>(l)], acc_e[static_cast<size_t>(l)], prod.v, le + fr.e);
      }
    }
    Vector delta(n_);
    for (Index l = 0; l < n_; ++l) {
      long ex = 0;
      const double mant = mpz_get_d_2exp(&ex, acc[static_cast<size_t>(l)].v);
      delta(l) = std::ldexp(mant, static_cast<int>(std::clamp<long>(
                                      ex + acc_e[static_cast<size_t>(l)], -2000, 2000)));
    }
    const double norm = delta.cwiseAbs().maxCoeff();
    if (!(norm > 0.0) || !std::isfinite(norm)) return r;
    const Index k = static_cast<Index>(P.size());
    Matrix Fa(F_.rows() + k, n_);
    Vector ta(F_.rows() + k);
    Fa.topRows(F_.rows()) = F_;
    ta.head(F_.rows()) = t_;
    for (Index q = 0; q < k; ++q) {
      Fa.row(F_.rows() + q) = -F_.row(P[static_cast<size_t>(q)]);
      ta(F_.rows() + q) = -t_(P[static_cast<size_t>(q)]) + 1e-9 * scale_;
    }
    const lp::Result r2 = lp::maximize(delta / norm, Fa, ta, opt_.backend);
    if (r2.status != lp::Status::optimal || r2.x.size() != n_) return r;
    return r2;
  }

  bool near_tight(const lp::Result& r, Index i) const {
    if (r.x.size() != n_) return false;
    return t_(i) - F_.row(i).dot(r.x) <= 1e-7 * scale_;
  }

  IntRow objective(Index j) const { return A_ ? int_product_row(G_, *A_, j) : int_row(G_, j); }

  std::vector<Q> objective_q(const IntRow& c) const {
    std::vector<Q> cq(static_cast<size_t>(n_));
    for (Index q = 0; q < n_; ++q)
      set_dyadic(cq[static_cast<size_t>(q)].v, c.z[static_cast<size_t>(q)].v, c.e);
    return cq;
  }

  Vector objective_double(Index j) const {
    return A_ ? Vector((G_.row(j) * *A_).transpose()) : Vector(G_.row(j).transpose());
  }

  // Solves the row's relaxation exactly; its value gives the bound, or the margin when the
  // relaxation holds every row of S.
  LpOutcome settle(Index j, const IntRow& c, RowState& rs, ExactWorstMargin& out) const {
    ++out.exact_lps;
    Q value;
    const LpOutcome r = exact_lp(F_, t_, rs.rows, objective_q(c), value, rs.x);
    const bool all = rs.rows.size() == static_cast<size_t>(F_.rows());
    switch (r) {
      case LpOutcome::optimal:
        rs.kind = all ? RowState::Kind::exact : RowState::Kind::bound;
        mpq_set_d(rs.value.v, d_(j));
        mpq_sub(rs.value.v, rs.value.v, value.v);
        return r;
      case LpOutcome::unbounded:
        if (all) rs.kind = RowState::Kind::unbounded;
        return r;
      case LpOutcome::empty:  // a relaxation of S is empty, so S is
        return r;
      case LpOutcome::failed: break;
    }
    throw SolverError("exact margin: cddlib's rational LP failed on row " + std::to_string(j));
  }

  // Rows of S that x violates, exactly, on integers: x = X / D with a common denominator.
  // (`first_only`: stops at the first one.)
  std::vector<Index> violated_rows(const std::vector<Q>& x, bool first_only) const {
    std::vector<Index> out;
    Z D, s, lhs, rhs, tm;
    std::vector<Z> X;
    common_denominator(x, X, D);
    for (Index i = 0; i < F_.rows(); ++i) {
      const IntRow& fr = Frows_[static_cast<size_t>(i)];
      mpz_set_ui(s.v, 0);
      for (size_t l = 0; l < x.size(); ++l) mpz_addmul(s.v, fr.z[l].v, X[l].v);
      // F_i x <= t_i  <=>  s 2^{e_F} <= m_t D 2^{e_t}
      const long te = te_[static_cast<size_t>(i)];
      mpz_mul(tm.v, tz_[static_cast<size_t>(i)].v, D.v);
      const long e = std::min(fr.e, te);
      mpz_mul_2exp(lhs.v, s.v, static_cast<mp_bitcnt_t>(fr.e - e));
      mpz_mul_2exp(rhs.v, tm.v, static_cast<mp_bitcnt_t>(te - e));
      if (mpz_cmp(lhs.v, rhs.v) > 0) {
        out.push_back(i);
        if (first_only) break;
      }
    }
    return out;
  }

  // n rows of `order` (by slack at the floating-point optimiser) that are independent in
  // floating point (modified Gram-Schmidt); empty without an optimiser or without n such rows.
  std::vector<Index> start_basis(const std::vector<Index>& order, const lp::Result& r) const {
    std::vector<Index> B;
    if (r.status != lp::Status::optimal || r.x.size() != n_) return B;
    Matrix Qb(n_, n_);
    for (Index i : order) {
      if (static_cast<Index>(B.size()) == n_) break;
      Vector v = F_.row(i).transpose();
      const double norm = v.norm();
      if (!(norm > 0.0)) continue;
      v /= norm;
      for (int pass = 0; pass < 2; ++pass)
        for (Index q = 0; q < static_cast<Index>(B.size()); ++q) v -= Qb.col(q).dot(v) * Qb.col(q);
      const double rest = v.norm();
      if (rest < 1e-8) continue;
      Qb.col(static_cast<Index>(B.size())) = v / rest;
      B.push_back(i);
    }
    if (static_cast<Index>(B.size()) < n_) B.clear();
    return B;
  }

  // The vertex F_B x = t_B, exactly; false when F_B is singular.
  bool solve_vertex(const std::vector<Index>& B, std::vector<Q>& x) const {
    std::vector<std::vector<Z>> W(B.size(), std::vector<Z>(static_cast<size_t>(n_) + 1));
    for (size_t p = 0; p < B.size(); ++p) {
      const size_t i = static_cast<size_t>(B[p]);
      const IntRow& fr = Frows_[i];
      const long e = std::min(fr.e, te_[i]);
      for (Index l = 0; l < n_; ++l)
        mpz_mul_2exp(W[p][static_cast<size_t>(l)].v, fr.z[static_cast<size_t>(l)].v,
                     static_cast<mp_bitcnt_t>(fr.e - e));
      mpz_mul_2exp(W[p][static_cast<size_t>(n_)].v, tz_[i].v, static_cast<mp_bitcnt_t>(te_[i] - e));
    }
    return bareiss_solve(W, static_cast<size_t>(n_), x);
  }

  // Multipliers λ with F_Bᵀ λ = c, exactly; false when F_B is singular.
  bool solve_duals(const std::vector<Index>& B, const IntRow& c, std::vector<Q>& lambda) const {
    const size_t k = B.size();
    std::vector<std::vector<Z>> W(static_cast<size_t>(n_), std::vector<Z>(k + 1));
    for (Index l = 0; l < n_; ++l) {
      for (size_t q = 0; q < k; ++q)
        mpz_set(W[static_cast<size_t>(l)][q].v,
                Frows_[static_cast<size_t>(B[q])].z[static_cast<size_t>(l)].v);
      mpz_set(W[static_cast<size_t>(l)][k].v, c.z[static_cast<size_t>(l)].v);
    }
    if (!bareiss_solve(W, k, lambda)) return false;
    // μ solves Σ z_{B_q} μ_q = z_c, so λ_q = μ_q 2^{e_c - e_{B_q}}.
    for (size_t q = 0; q < k; ++q) scale2(lambda[q].v, c.e - Frows_[static_cast<size_t>(B[q])].e);
    return true;
  }

  // Edge direction d with F_B d = -e_q (the row B_q leaves, the others stay tight).
  bool solve_direction(const std::vector<Index>& B, size_t q, std::vector<Q>& dir) const {
    std::vector<std::vector<Z>> W(B.size(), std::vector<Z>(static_cast<size_t>(n_) + 1));
    for (size_t p = 0; p < B.size(); ++p) {
      const IntRow& fr = Frows_[static_cast<size_t>(B[p])];
      for (Index l = 0; l < n_; ++l)
        mpz_set(W[p][static_cast<size_t>(l)].v, fr.z[static_cast<size_t>(l)].v);
      if (p == q) {
        // z 2^e d = -1: scale to integers.
        if (fr.e >= 0) {
          for (Index l = 0; l < n_; ++l)
            mpz_mul_2exp(W[p][static_cast<size_t>(l)].v, W[p][static_cast<size_t>(l)].v,
                         static_cast<mp_bitcnt_t>(fr.e));
          mpz_set_si(W[p][static_cast<size_t>(n_)].v, -1);
        } else {
          mpz_set_si(W[p][static_cast<size_t>(n_)].v, -1);
          mpz_mul_2exp(W[p][static_cast<size_t>(n_)].v, W[p][static_cast<size_t>(n_)].v,
                       static_cast<mp_bitcnt_t>(-fr.e));
        }
      }
    }
    return bareiss_solve(W, static_cast<size_t>(n_), dir);
  }

  // Exact simplex over all rows of S from the basis B (n rows): the vertex F_B x = t_B must be
  // feasible. Each step drops the row of B with the smallest index among negative
  // multipliers and takes the blocking row with the smallest index among the tied ratios
  // (Bland 1977: no cycling). optimal: `best` = max c·x; unbounded: an edge with c·d > 0
  // that no row blocks, from a feasible point; failed: singular or infeasible start, or the
  // step cap (the caller then uses the relaxations).
  LpOutcome exact_simplex(const IntRow& c, std::vector<Index> B, Q& best,
                          ExactWorstMargin& out) const {
    const Index m = F_.rows();
    std::vector<Q> x, lambda, dir;
    if (!solve_vertex(B, x)) return LpOutcome::failed;
    if (!violated_rows(x, true).empty()) return LpOutcome::failed;
    std::vector<char> in_basis(static_cast<size_t>(m), 0);
    for (Index i : B) in_basis[static_cast<size_t>(i)] = 1;
    const long cap = 20 * static_cast<long>(m) + 100;
    Z Dx, Dd, s, a;
    std::vector<Z> X, Dv;
    Q step, best_step, tmp;
    for (long it = 0; it < cap; ++it) {
      if (!solve_duals(B, c, lambda)) return LpOutcome::failed;
      size_t q = B.size();
      for (size_t p = 0; p < B.size(); ++p)
        if (mpq_sgn(lambda[p].v) < 0 && (q == B.size() || B[p] < B[q])) q = p;
      if (q == B.size()) {
        mpq_set_ui(best.v, 0, 1);
        for (size_t p = 0; p < B.size(); ++p) {
          mpq_mul(tmp.v, lambda[p].v, tq_[static_cast<size_t>(B[p])].v);
          mpq_add(best.v, best.v, tmp.v);
        }
        return LpOutcome::optimal;
      }
      ++out.pivots;
      if (!solve_direction(B, q, dir)) return LpOutcome::failed;
      common_denominator(x, X, Dx);
      common_denominator(dir, Dv, Dd);
      Index enter = -1;
      for (Index i = 0; i < m; ++i) {
        if (in_basis[static_cast<size_t>(i)]) continue;
        const IntRow& fr = Frows_[static_cast<size_t>(i)];
        mpz_set_ui(a.v, 0);
        for (Index l = 0; l < n_; ++l)
          mpz_addmul(a.v, fr.z[static_cast<size_t>(l)].v, Dv[static_cast<size_t>(l)].v);
        if (mpz_sgn(a.v) <= 0) continue;
        // F_i d = a 2^e / Dd and F_i x = s 2^e / Dx, so the step to row i is
        // (t_i - s 2^e / Dx) Dd / (a 2^e).
        mpz_set_ui(s.v, 0);
        for (Index l = 0; l < n_; ++l)
          mpz_addmul(s.v, fr.z[static_cast<size_t>(l)].v, X[static_cast<size_t>(l)].v);
        mpq_set_num(tmp.v, s.v);
        mpq_set_den(tmp.v, Dx.v);
        mpq_canonicalize(tmp.v);
        scale2(tmp.v, fr.e);
        mpq_sub(step.v, tq_[static_cast<size_t>(i)].v, tmp.v);
        mpq_set_num(tmp.v, Dd.v);
        mpq_set_den(tmp.v, a.v);
        mpq_canonicalize(tmp.v);
        scale2(tmp.v, -fr.e);
        mpq_mul(step.v, step.v, tmp.v);
        if (enter < 0 || mpq_cmp(step.v, best_step.v) < 0) {
          enter = i;
          mpq_set(best_step.v, step.v);
        }
      }
      if (enter < 0) return LpOutcome::unbounded;
      for (size_t l = 0; l < x.size(); ++l) {
        mpq_mul(tmp.v, best_step.v, dir[l].v);
        mpq_add(x[l].v, x[l].v, tmp.v);
      }
      in_basis[static_cast<size_t>(B[q])] = 0;
      in_basis[static_cast<size_t>(enter)] = 1;
      B[q] = enter;
    }
    return LpOutcome::failed;
  }

  const Matrix& F_;
  const Vector& t_;
  const Matrix& G_;
  const Matrix* A_;
  const Vector& d_;
  const Options& opt_;
  const Index n_;
  double scale_ = 1.0;
  std::vector<IntRow> Frows_;  // F_i = z * 2^e
  std::vector<Z> tz_;          // t_i = tz_i * 2^{te_i}
  std::vector<long> te_;
  std::vector<Q> tq_;
};

}  // namespace

ExactWorstMargin exact_worst_margin(const Matrix& F, const Vector& t, const Matrix& G,
                                    const Matrix* A, const Vector& d,
                                    const std::vector<std::vector<Index>>& supports,
                                    double threshold, const Options& opt) {
  const Index n = F.cols();
  if (t.size() != F.rows()) invalid("t", "must have one entry per row of F");
  if (d.size() != G.rows()) invalid("d", "must have one entry per row of G");
  if (A != nullptr) {
    if (A->rows() != G.cols() || A->cols() != n)
      invalid("A", "must be " + std::to_string(G.cols()) + " x " + std::to_string(n));
    require_finite(*A, "A");
  } else if (G.cols() != n) {
    invalid("G", "must have " + std::to_string(n) + " columns");
  }
  require_finite(F, "F");
  require_finite(t, "t");
  require_finite(G, "G");
  require_finite(d, "d");
  if (!std::isfinite(threshold)) invalid("threshold", "must be finite");
  Worker w(F, t, G, A, d, opt);
  return w.run(supports, threshold);
}

}  // namespace corral::detail
