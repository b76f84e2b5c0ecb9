// cddlib adapter: backends "cdd" (floating point, ddf_*) and "cdd-exact" (GMP rationals, dd_*),
// both by cddlib's dual simplex. cddlib keeps no basis between calls, so the incremental
// interface re-solves from scratch. Doubles convert to rationals exactly (mpq_set_d); exact
// answers are rounded to double on return.

#include <cmath>
#include <string>

#include "cdd/cdd_common.hpp"
#include "solver_base.hpp"

namespace corral::lp::detail {
namespace {

using corral::detail::CddExact;
using corral::detail::CddFloat;

// Dual multipliers cddlib reports per basic row: row nbindex[j+1] (1-based) carries dsol[j].
template <class T>
Vector dual_multipliers(typename T::LPPtr lp, long m, long n) {
  Vector y = Vector::Zero(m);
  for (long j = 1; j <= n; ++j) {
    const long row = T::nbindex(lp, j + 1);
    if (row > 0 && row <= m) y(row - 1) = T::dsol(lp, j);
  }
  return y;
}

// Solves max c·x s.t. A x <= b in cddlib's form: rows [b_i, -a_i] mean b_i - a_i·x >= 0.
template <class T>
Result cdd_solve(const Matrix& A, const Vector& b, const Vector& c) {
  const long m = static_cast<long>(A.rows()), n = static_cast<long>(A.cols());
  Result r;
  auto lock = corral::detail::cdd_lock();
  typename T::MatrixPtr M = T::create(m, n + 1);
  T::prepare_lp(M);
  for (long i = 0; i < m; ++i) {
    T::set(M, i, 0, b(i));
    for (long j = 0; j < n; ++j) T::set(M, i, j + 1, A(i, j) == 0.0 ? 0.0 : -A(i, j));
  }
  T::set_obj(M, 0, 0.0);
  for (long j = 0; j < n; ++j) T::set_obj(M, j + 1, c(j));
  typename T::ErrorType err = T::kNoError;
  typename T::LPPtr lp = T::to_lp(M, &err);
  T::free_matrix(M);
  if (lp == nullptr || !T::no_error(err)) {
    if (lp) T::free_lp(lp);
    r.status = Status::numerical;
    return r;
  }
  const bool solved = T::solve(lp, &err) && T::no_error(err);
  r.iterations = T::pivots(lp);
  if (!solved) {
    r.status = Status::numerical;
  } else if (T::optimal(lp)) {
    r.status = Status::optimal;
    r.x.resize(n);
    for (long j = 0; j < n; ++j) r.x(j) = T::sol(lp, j + 1);
    r.value = c.dot(r.x);
    // cddlib lists the dual of the row nbindex[j+1] (1-based; the objective row is m+1) as
    // dsol[j], with the sign of our λ >= 0.
    r.duals = dual_multipliers<T>(lp, m, n);
  } else if (T::infeasible(lp)) {
    r.status = Status::infeasible;  // cddlib's row certificate is not a full Farkas vector
  } else if (T::unbounded(lp)) {
    r.status = Status::unbounded;
  } else {
    r.status = Status::numerical;
  }
  T::free_lp(lp);
  return r;
}

class CddSolver final : public SolverBase {
 public:
  CddSolver(const Matrix& A, const Vector& b, const Vector& c, bool exact)
      : SolverBase(A, b, c), exact_(exact) {}
  std::string_view backend() const override { return exact_ ? "cdd-exact" : "cdd"; }

 protected:
  void rows_added(Index) override {}
  void rhs_changed(Index) override {}
  void objective_changed() override {}

  Result solve_scaled(const SolveOptions&) override {
    if (num_rows() == 0) {  // cddlib needs at least one row
      Result r;
      if (c_.isZero(0.0)) {
        r.status = Status::optimal;
        r.x = Vector::Zero(n_);
        r.value = 0.0;
        r.duals = Vector();
      } else {
        r.status = Status::unbounded;
      }
      return r;
    }
    Result r = exact_ ? cdd_solve<CddExact>(As_, bs_, c_) : cdd_solve<CddFloat>(As_, bs_, c_);
    if (!exact_ && r.status == Status::infeasible) {
      // cddlib's floating point sometimes calls a feasible LP infeasible (badly scaled
      // columns): confirm with a zero objective, and report a disagreement as numerical.
      const Result f = cdd_solve<CddFloat>(As_, bs_, Vector::Zero(n_));
      if (f.status != Status::infeasible) r.status = Status::numerical;
    }
    if (r.status == Status::unbounded) {
      // cddlib's dual simplex reports dual infeasibility; the LP is unbounded only if it is
      // also primal feasible, which a zero objective decides.
      const Vector zero = Vector::Zero(n_);
      const Result f =
          exact_ ? cdd_solve<CddExact>(As_, bs_, zero) : cdd_solve<CddFloat>(As_, bs_, zero);
      if (f.status == Status::infeasible) {
        r.status = Status::infeasible;
      } else if (f.status != Status::optimal) r.status = Status::numerical;
    }
    return r;
  }

 private:
  bool exact_;
};

}  // namespace

std::unique_ptr<Solver> make_cdd_solver(const Matrix& A, const Vector& b, const Vector& c,
                                        bool exact) {
  return std::make_unique<CddSolver>(A, b, c, exact);
}

Capabilities cdd_capabilities(bool exact) {
  Capabilities cap;
  cap.duals = true;
  cap.exact = exact;
  return cap;
}

}  // namespace corral::lp::detail
