// GLPK adapter (backend "glpk"): primal simplex with warm starts between incremental solves.
//
// Pitfalls handled here:
// - Thread safety: GLPK keeps one environment per thread only when built with thread-local
//   storage (glp_config("TLS") != NULL). Otherwise every GLPK call is serialised behind one mutex.
// - A problem object is created, used and freed on one thread; using it from another throws.
// - Terminal output is switched off; presolve is off so that the basis survives re-solves.
// - GLPK aborts the process when its own checks fail and the error hook returns. Input is
//   validated before GLPK sees it; as a last resort the hook longjmps out of GLPK inside a
//   C-style frame (no C++ object lives across it), then glp_free_env() resets the thread's
//   environment, which invalidates every GLPK object of that thread; they then throw SolverError.
// - GLPK reports unboundedness by the index of a variable, not a ray: Result::unbounded_index.

#include <csetjmp>
#include <mutex>
#include <thread>

#include "solver_base.hpp"

extern "C" {
#include <glpk.h>
}

namespace corral::lp::detail {
namespace {

bool glpk_has_tls() {
  static const bool tls = glp_config("TLS") != nullptr;
  return tls;
}

std::mutex& glpk_global_mutex() {
  static std::mutex m;
  return m;
}

// Locks the global mutex only when GLPK has no thread-local environments.
std::unique_lock<std::mutex> glpk_lock() {
  if (glpk_has_tls()) return std::unique_lock<std::mutex>();
  return std::unique_lock<std::mutex>(glpk_global_mutex());
}

// Book-keeping of this thread's GLPK environment.
struct ThreadEnvironment {
  long live = 0;            // problem objects alive on this thread
  unsigned generation = 0;  // bumped whenever the environment is freed after an error
  bool used = false;
  ~ThreadEnvironment() {
    // Free the environment at thread exit when nothing refers to it any more.
    if (used && live == 0 && glpk_has_tls()) glp_free_env();
  }
};
thread_local ThreadEnvironment thread_env;

extern "C" void corral_glpk_error_hook(void* info) {
  std::longjmp(*static_cast<std::jmp_buf*>(info), 1);
}

// Runs fn(arg) with the error hook pointing at a jump buffer in this C-style frame.
// Returns false when GLPK raised an error. fn must not own C++ objects with destructors.
bool run_guarded(void (*fn)(void*), void* arg) {
  std::jmp_buf buf;
  glp_error_hook(corral_glpk_error_hook, &buf);
  if (setjmp(buf) != 0) return false;
  fn(arg);
  glp_error_hook(nullptr, nullptr);
  return true;
}

struct SimplexCall {
  glp_prob* prob;
  const glp_smcp* parm;
  int ret;
};
void call_simplex(void* p) {
  auto* s = static_cast<SimplexCall*>(p);
  s->ret = glp_simplex(s->prob, s->parm);
}
void call_std_basis(void* p) { glp_std_basis(static_cast<glp_prob*>(p)); }

class GlpkSolver final : public SolverBase {
 public:
  GlpkSolver(const Matrix& A, const Vector& b, const Vector& c)
      : SolverBase(A, b, c), owner_(std::this_thread::get_id()) {
    auto lock = glpk_lock();
    thread_env.used = true;
    generation_ = thread_env.generation;
    glp_term_out(GLP_OFF);
    prob_ = glp_create_prob();
    ++thread_env.live;
    glp_set_obj_dir(prob_, GLP_MAX);
    glp_add_cols(prob_, static_cast<int>(n_));
    for (int j = 1; j <= n_; ++j) glp_set_col_bnds(prob_, j, GLP_FR, 0.0, 0.0);
    load_objective();
    if (num_rows() > 0) load_rows(0);
  }

  ~GlpkSolver() override {
    // Objects of another thread, or of an environment already freed, are not touched.
    if (std::this_thread::get_id() != owner_ || generation_ != thread_env.generation) return;
    auto lock = glpk_lock();
    glp_delete_prob(prob_);
    --thread_env.live;
  }

  std::string_view backend() const override { return "glpk"; }

 protected:
  void rows_added(Index first) override {
    check_thread();
    auto lock = glpk_lock();
    load_rows(first);
  }
  void rhs_changed(Index i) override {
    check_thread();
    auto lock = glpk_lock();
    glp_set_row_bnds(prob_, static_cast<int>(i) + 1, GLP_UP, 0.0, bs_(i));
  }
  void objective_changed() override {
    check_thread();
    auto lock = glpk_lock();
    load_objective();
  }

  Result solve_scaled(const SolveOptions&) override {
    check_thread();
    auto lock = glpk_lock();
    Result r;
    glp_smcp parm;
    glp_init_smcp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.presolve = GLP_OFF;
    parm.meth = GLP_PRIMAL;
    const int pivots_before = glp_get_it_cnt(prob_);
    SimplexCall call{prob_, &parm, 0};
    bool ok = run_guarded(call_simplex, &call);
    if (ok && (call.ret == GLP_EBADB || call.ret == GLP_ESING || call.ret == GLP_ECOND ||
               call.ret == GLP_EFAIL)) {
      // The kept basis became unusable: restart from the standard basis once.
      ok = run_guarded(call_std_basis, prob_) && run_guarded(call_simplex, &call);
    }
    if (!ok) {
      reset_environment();
      throw SolverError(
          "glpk: GLPK raised an internal error; its environment on this thread "
          "was reset and its problem objects are no longer usable");
    }
    r.iterations = glp_get_it_cnt(prob_) - pivots_before;
    if (call.ret != 0) {
      r.status = Status::numerical;
      return r;
    }
    const int st = glp_get_status(prob_);
    const Index m = num_rows();
    if (st == GLP_OPT) {
      r.status = Status::optimal;
      r.x.resize(n_);
      for (int j = 1; j <= n_; ++j) r.x(j - 1) = glp_get_col_prim(prob_, j);
      r.value = c_.dot(r.x);
      r.duals.resize(m);
      // For a maximisation with upper-bounded rows GLPK's row duals are >= 0: λ directly.
      for (int i = 1; i <= m; ++i) r.duals(i - 1) = glp_get_row_dual(prob_, i);
    } else if (st == GLP_NOFEAS) {
      r.status = Status::infeasible;
    } else if (st == GLP_UNBND) {
      r.status = Status::unbounded;
      const int k = glp_get_unbnd_ray(prob_);
      r.unbounded_index = k > 0 ? k - 1 : -1;
    } else {
      r.status = Status::numerical;
    }
    return r;
  }

 private:
  void check_thread() const {
    if (std::this_thread::get_id() != owner_)
      throw SolverError("glpk: a solver must be used on the thread that created it");
    if (generation_ != thread_env.generation)
      throw SolverError("glpk: this solver's GLPK environment was reset after an internal error");
  }

  void reset_environment() {
    glp_free_env();
    ++thread_env.generation;
    thread_env.live = 0;
  }

  void load_objective() {
    for (int j = 1; j <= n_; ++j) glp_set_obj_coef(prob_, j, c_(j - 1));
  }

  void load_rows(Index first) {
    const Index m = num_rows();
    glp_add_rows(prob_, static_cast<int>(m - first));
    std::vector<int> idx(static_cast<size_t>(n_) + 1);
    std::vector<double> val(static_cast<size_t>(n_) + 1);
    for (Index i = first; i < m; ++i) {
      int len = 0;
      for (Index j = 0; j < n_; ++j)
        if (As_(i, j) != 0.0) {
          ++len;
          idx[len] = static_cast<int>(j) + 1;
          val[len] = As_(i, j);
        }
      glp_set_mat_row(prob_, static_cast<int>(i) + 1, len, idx.data(), val.data());
      glp_set_row_bnds(prob_, static_cast<int>(i) + 1, GLP_UP, 0.0, bs_(i));
    }
  }

  glp_prob* prob_ = nullptr;
  std::thread::id owner_;
  unsigned generation_ = 0;
};

}  // namespace

std::unique_ptr<Solver> make_glpk_solver(const Matrix& A, const Vector& b, const Vector& c) {
  return std::make_unique<GlpkSolver>(A, b, c);
}

Capabilities glpk_capabilities() {
  Capabilities cap;
  cap.duals = true;
  cap.ray_index = true;
  cap.warm_start = true;
  return cap;
}

}  // namespace corral::lp::detail
