#pragma once
/// \file lp/solver.hpp
/// The one linear-programming interface every algorithm in corral uses.
///
/// Problem form: maximise c·x subject to A x <= b, x free (n >= 1 columns, m >= 0 rows).
/// Duals: multipliers λ >= 0 with Aᵀλ = c and bᵀλ = optimal value.
/// Backends are chosen by name at run time (see backends()); each is one adapter file in
/// cpp/src/lp/. No solver library type appears in this header.

#include <corral/types.hpp>

#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace corral::lp {

/// Outcome of one solve. A numerical outcome is a status, never an exception.
enum class Status {
  optimal,     ///< x is optimal; value = c·x; duals when the backend provides them
  infeasible,  ///< no x satisfies A x <= b
  unbounded,   ///< feasible, and c·x is unbounded above
  stopped,     ///< stopped early: x is feasible with c·x > threshold (no duals)
  numerical,   ///< the backend failed numerically; nothing in the result is reliable
};

/// "optimal", "infeasible", "unbounded", "stopped" or "numerical".
const char* to_string(Status status);

/// What a backend can return beyond status, optimiser and value.
struct Capabilities {
  bool duals = false;       ///< dual multipliers λ for optimal answers
  bool ray = false;         ///< an unbounded direction d (A d <= 0, c·d > 0) as a vector
  bool ray_index = false;   ///< only the index of the variable that proved unboundedness
  bool farkas = false;      ///< an infeasibility certificate y >= 0, Aᵀy = 0, bᵀy < 0
  bool early_stop = false;  ///< stops as soon as the objective passes a threshold
  bool warm_start = false;  ///< keeps its basis between incremental re-solves
  bool exact = false;       ///< rational arithmetic (answers are rounded to double on return)
};

/// Result of one LP. Fields a backend cannot provide stay empty (size 0 / -1); its
/// Capabilities say which those are.
struct Result {
  Status status = Status::numerical;
  Vector x;  ///< optimiser (optimal) or a feasible point past the threshold (stopped)
  double value = std::numeric_limits<double>::quiet_NaN();  ///< c·x for optimal / stopped
  Vector duals;   ///< λ, one per row in the caller's order (size m), optimal answers only
  Vector ray;     ///< unbounded direction, when the backend provides one
  Vector farkas;  ///< infeasibility certificate, one per row, when provided
  /// GLPK's unboundedness report: the index (0-based, rows first then columns, as GLPK counts)
  /// of the variable whose ray proved unboundedness; -1 when not given. It is not a ray.
  Index unbounded_index = -1;
  std::string backend;  ///< name of the backend that produced this answer
  long iterations = 0;  ///< pivots reported by the backend (0 when it does not report)
  /// Re-solves by another backend after an answer failed verification (the dense backend
  /// re-solves on GLPK, then on cdd-exact); `backend` names the one that answered.
  int fallbacks = 0;

  bool has_duals() const { return duals.size() > 0; }
  bool has_ray() const { return ray.size() > 0; }
  bool has_farkas() const { return farkas.size() > 0; }
  /// True when the answer shows that max c·x exceeds `threshold`: stopped, unbounded, or
  /// optimal with value > threshold.
  bool exceeds(double threshold) const {
    return status == Status::stopped || status == Status::unbounded ||
           (status == Status::optimal && value > threshold);
  }
};

/// Per-solve options.
struct SolveOptions {
  /// Stop once a feasible point with c·x > threshold is found (status `stopped`). Backends
  /// without early stop solve to optimality instead; use Result::exceeds() either way.
  std::optional<double> threshold;
};

/// An LP kept between solves: change the objective, add rows, change right-hand sides, solve
/// again. Backends that can keep their basis do (GLPK); the others re-solve from scratch.
/// A Solver is not thread safe: create, use and destroy it on one thread.
class Solver {
 public:
  virtual ~Solver() = default;
  /// The backend's name, as listed by backends().
  virtual std::string_view backend() const = 0;
  virtual Index dim() const = 0;
  virtual Index num_rows() const = 0;
  /// Sets the objective c (length dim()).
  virtual void set_objective(const Vector& c) = 0;
  /// Appends rows A x <= b (A has dim() columns).
  virtual void add_rows(const Matrix& A, const Vector& b) = 0;
  /// Changes the right-hand side of row i.
  virtual void set_rhs(Index i, double value) = 0;
  /// Changes all right-hand sides (length num_rows()).
  virtual void set_rhs(const Vector& b) = 0;
  /// Solves the current problem.
  virtual Result solve(const SolveOptions& options = {}) = 0;
};

/// Relative tolerance at which the dense backend verifies every answer before returning it
/// (default 1e-9; the conditions are listed in cpp/src/lp/dense_backend.cpp and DEVELOPERS.md).
/// An answer that fails is re-solved by GLPK, then by cdd-exact (Result::fallbacks).
double verify_tolerance();

/// Sets verify_tolerance() for the process. Throws InvalidInputError unless 0 < tol <= 1e-3.
void set_verify_tolerance(double tol);

/// Names of the backends in this build (the default is default_backend()).
std::vector<std::string> backends();

/// What the named backend provides. Throws InvalidInputError for an unknown name.
Capabilities capabilities(std::string_view backend);

/// Name of the process-wide default backend.
std::string default_backend();

/// Sets the process-wide default backend. Throws InvalidInputError for an unknown name.
void set_default_backend(std::string_view backend);

/// Creates an incremental solver for {x : A x <= b} with objective c (zero when empty).
/// An empty `backend` means the process default. Inputs are validated (shapes, finite values);
/// violations throw InvalidInputError naming the argument.
std::unique_ptr<Solver> make_solver(const Matrix& A, const Vector& b, const Vector& c = Vector(),
                                    std::string_view backend = {});

/// Solves one LP: maximise c·x subject to A x <= b. Validates input as make_solver does.
/// Complexity: that of the backend; the adapters add O(mn) for validation and scaling.
Result maximize(const Vector& c, const Matrix& A, const Vector& b, std::string_view backend = {},
                const SolveOptions& options = {});

}  // namespace corral::lp
