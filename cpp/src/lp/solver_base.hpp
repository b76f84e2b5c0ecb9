#pragma once
// Shared part of every LP adapter: validation, row scaling, zero rows, trivial cases.
// Backends see the problem with every non-zero row divided by the power of two nearest its
// Euclidean norm: the same set, better conditioned, and exact (a division by a power of two
// loses nothing, so the exact backend still solves the caller's problem). Duals and
// certificates are mapped back to the caller's rows here.

#include <corral/detail/validate.hpp>
#include <corral/lp/solver.hpp>

#include <string>
#include <utility>

namespace corral::lp::detail {

class SolverBase : public Solver {
 public:
  SolverBase(const Matrix& A, const Vector& b, const Vector& c) {
    if (A.cols() < 1) corral::detail::invalid("A", "must have at least one column");
    n_ = A.cols();
    check_rows(A, b, "A", "b");
    if (c.size() == 0) {
      c_ = Vector::Zero(n_);
    } else {
      corral::detail::require_length(c, n_, "c", "one entry per column of A");
      corral::detail::require_finite(c, "c");
      c_ = c;
    }
    As_.resize(0, n_);
    append(A, b);
  }

  Index dim() const override { return n_; }
  Index num_rows() const override { return As_.rows(); }

  void set_objective(const Vector& c) override {
    corral::detail::require_length(c, n_, "c", "one entry per column");
    corral::detail::require_finite(c, "c");
    c_ = c;
    objective_changed();
  }

  void add_rows(const Matrix& A, const Vector& b) override {
    if (A.cols() != n_)
      corral::detail::invalid(
          "A", "has " + std::to_string(A.cols()) + " columns, expected " + std::to_string(n_));
    check_rows(A, b, "A", "b");
    if (A.rows() == 0) return;
    const Index first = As_.rows();
    append(A, b);
    rows_added(first);
  }

  void set_rhs(Index i, double value) override {
    if (i < 0 || i >= num_rows())
      corral::detail::invalid("i", "row " + std::to_string(i) + " out of range [0, " +
                                       std::to_string(num_rows()) + ")");
    if (!std::isfinite(value)) corral::detail::invalid("value", "must be finite");
    b_(i) = value;
    bs_(i) = value / scale_(i);
    rhs_changed(i);
  }

  void set_rhs(const Vector& b) override {
    corral::detail::require_length(b, num_rows(), "b", "one entry per row");
    corral::detail::require_finite(b, "b");
    for (Index i = 0; i < num_rows(); ++i) {
      b_(i) = b(i);
      bs_(i) = b(i) / scale_(i);
    }
    for (Index i = 0; i < num_rows(); ++i) rhs_changed(i);
  }

  Result solve(const SolveOptions& options) override {
    if (options.threshold && !std::isfinite(*options.threshold))
      corral::detail::invalid("threshold", "must be finite");
    Result r;
    // A zero row with b < 0 makes the set empty: certificate e_i.
    for (Index i = 0; i < num_rows(); ++i)
      if (zero_(i) && b_(i) < 0) {
        r.status = Status::infeasible;
        r.farkas = Vector::Zero(num_rows());
        r.farkas(i) = 1.0;
        r.backend = std::string(backend());
        return r;
      }
    r = solve_scaled(options);
    if (r.backend.empty()) r.backend = std::string(backend());  // a fallback names itself
    // Back to the caller's rows: a scaled row is a_i / s_i, so λ_i = μ_i / s_i.
    if (r.duals.size() == num_rows()) r.duals = r.duals.cwiseQuotient(scale_);
    if (r.farkas.size() == num_rows()) r.farkas = r.farkas.cwiseQuotient(scale_);
    return r;
  }

 protected:
  // Called after the data changed; the adapter updates its own copy.
  virtual void rows_added(Index first) = 0;
  virtual void rhs_changed(Index i) = 0;
  virtual void objective_changed() = 0;
  // Solves the scaled problem max c·x s.t. As_ x <= bs_.
  virtual Result solve_scaled(const SolveOptions& options) = 0;

  Index n_ = 0;
  Matrix As_;     // rows scaled by powers of two to norms in [0.5, 1) (zero rows stay zero)
  Vector bs_;     // scaled right-hand sides
  Vector b_;      // caller's right-hand sides
  Vector scale_;  // row norms (1 for zero rows)
  Eigen::Array<bool, Eigen::Dynamic, 1> zero_;
  Vector c_;

 private:
  static void check_rows(const Matrix& A, const Vector& b, const char* an, const char* bn) {
    corral::detail::require_length(b, A.rows(), bn, "one entry per row of A");
    corral::detail::require_finite(A, an);
    corral::detail::require_finite(b, bn);
  }

  void append(const Matrix& A, const Vector& b) {
    const Index m0 = As_.rows(), k = A.rows();
    As_.conservativeResize(m0 + k, n_);
    bs_.conservativeResize(m0 + k);
    b_.conservativeResize(m0 + k);
    scale_.conservativeResize(m0 + k);
    zero_.conservativeResize(m0 + k);
    for (Index i = 0; i < k; ++i) {
      double s = A.row(i).norm();
      if (!std::isfinite(s) || (s == 0.0 && !A.row(i).isZero(0.0))) s = A.row(i).stableNorm();
      const bool z = !(s > 0.0);
      int e = 0;
      if (!z) std::frexp(s, &e);  // s = f 2^e with f in [0.5, 1)
      zero_(m0 + i) = z;
      scale_(m0 + i) = z ? 1.0 : std::ldexp(1.0, e);
      As_.row(m0 + i) = A.row(i) / scale_(m0 + i);
      b_(m0 + i) = b(i);
      bs_(m0 + i) = b(i) / scale_(m0 + i);
    }
  }
};

// Factories, one per adapter file; registry.cpp lists them.
std::unique_ptr<Solver> make_dense_solver(const Matrix& A, const Vector& b, const Vector& c);
std::unique_ptr<Solver> make_glpk_solver(const Matrix& A, const Vector& b, const Vector& c);
std::unique_ptr<Solver> make_cdd_solver(const Matrix& A, const Vector& b, const Vector& c,
                                        bool exact);
Capabilities dense_capabilities();
Capabilities glpk_capabilities();
Capabilities cdd_capabilities(bool exact);

}  // namespace corral::lp::detail
