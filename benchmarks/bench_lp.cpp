// LP micro-benchmark: every LP backend of this build (lp::backends()) against GLPK, measured
// in the same run on the same random tall LPs (max c·x s.t. A x <= b, m >> n):
//   cold         lp::maximize(c, A, b, backend): from LP data in memory to the answer (for GLPK
//                this includes loading the problem; for a backend with a phase 1, that too)
//   incremental  one lp::Solver per instance, then a sequence of re-solves: K objective
//                changes, C added cutting rows (each violated by the current optimum), R
//                right-hand-side changes of rows tight at the current optimum
// and, in the same run, correctness: every optimal value against GLPK's, every answer through
// lp::check_answer at tol 1e-9, and the sum of Result::fallbacks per backend.
// See benchmarks/README.md ("bench_lp") for how to run it and read the table.
//
// Instances (reproducible from the seeds): m rows a_i = s_i u_i, u_i uniform on the unit sphere
// (Box-Muller normals, normalised), s_i uniform in [0.5, 2]; b_i uniform in [1, 2]; c a random
// unit vector. Family "interior" is this set: x = 0 is strictly inside (the ball of radius 1/2
// is), and m random normals bound it unless they all lie in one half-space (probability
// 2^-(m-1) sum_{k<n} C(m-1, k), Wendel's theorem, from memory; 3.5e-11 at 50x4). Family "shifted"
// is the same set translated by a centre z of norm 10 (b += A z), so x = 0 is infeasible and the
// backend needs a phase 1. Random numbers are std::mt19937's raw output divided by 2^32 (its
// output is fixed by the standard, unlike the distributions of <random>), so a seed gives the
// same instances with any standard library.
//
// Each (size, family, backend) runs in a forked child process. Times are measured in the child
// around the calls alone; the bookkeeping (cut rows, checks) is outside the timers.

#include <corral/lp/check.hpp>
#include <corral/lp/solver.hpp>
#include <corral/version.hpp>

#include "bench_common.hpp"

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iostream>
#include <limits>
#include <map>
#include <memory>
#include <random>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
#include <type_traits>
#include <utility>
#include <vector>

#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

extern "C" {
#include <glpk.h>
}

#ifndef CORRAL_BENCH_RESULTS_DIR
#define CORRAL_BENCH_RESULTS_DIR "benchmarks/results"
#endif

namespace {

using corral::Index;
using corral::Matrix;
using corral::Vector;
namespace lp = corral::lp;
using Clock = corral_bench::Clock;
using corral_bench::cpu_model;
using corral_bench::json_escape;
using corral_bench::json_num;
using corral_bench::median;
using corral_bench::now_utc;
using corral_bench::read_all;
using corral_bench::seconds_since;
using corral_bench::write_all;

const char* const kBaseline = "glpk";
constexpr double kCheckTol = 1e-9;    // lp::check_answer tolerance
constexpr double kValueFlag = 1e-7;   // relative value difference flagged against GLPK
constexpr double kTightSlack = 1e-7;  // relative slack under which a row counts as tight
constexpr double kCentreNorm = 10.0;  // norm of the shifted family's centre

// ---------------------------------------------------------------------------------------------
// Random numbers: std::mt19937's raw output mapped to [0, 1); the normals and the integer
// choice are written out here, so a seed gives the same numbers with any standard library.
class Rng {
 public:
  explicit Rng(std::uint32_t seed) : gen_(seed) {}
  double uniform() { return static_cast<double>(gen_()) / 4294967296.0; }  // [0, 1)
  double uniform(double lo, double hi) { return lo + (hi - lo) * uniform(); }
  // Box-Muller, one normal per call.
  double normal() {
    double u = 0.0;
    while (u <= 0.0) u = uniform();
    const double v = uniform();
    return std::sqrt(-2.0 * std::log(u)) * std::cos(2.0 * M_PI * v);
  }
  // Uniform on the unit sphere of R^n.
  Vector unit(Index n) {
    Vector d(n);
    double s = 0.0;
    while (!(s > 1e-12)) {
      for (Index j = 0; j < n; ++j) d(j) = normal();
      s = d.norm();
    }
    return d / s;
  }

 private:
  std::mt19937 gen_;
};

std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9e3779b97f4a7c15ULL;
  x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ULL;
  x = (x ^ (x >> 27)) * 0x94d049bb133111ebULL;
  return x ^ (x >> 31);
}

// The mt19937 seed of one random stream of instance (seed, m, n). Streams: 1 the LP data,
// 2 the objectives, 3 the cuts, 4 the right-hand-side changes; so changing K does not change
// the cuts, and both families of a seed share all draws.
std::uint32_t stream_seed(std::uint64_t seed, Index m, Index n, std::uint64_t stream) {
  const std::uint64_t h = splitmix64(splitmix64(seed) ^ (static_cast<std::uint64_t>(m) << 24) ^
                                     static_cast<std::uint64_t>(n));
  return static_cast<std::uint32_t>(splitmix64(h ^ stream) >> 32);
}

// ---------------------------------------------------------------------------------------------
// Instances and the incremental sequence (the same for every backend).
struct Instance {
  std::uint64_t seed = 0;
  Matrix A;
  Vector b;
  Vector c;
  Vector centre;  // strictly inside the set: 0 (interior) or the shift (shifted)
};

Instance make_instance(const std::string& family, Index m, Index n, std::uint64_t seed) {
  Rng rng(stream_seed(seed, m, n, 1));
  Instance I;
  I.seed = seed;
  I.A.resize(m, n);
  I.b.resize(m);
  for (Index i = 0; i < m; ++i) {
    const Vector u = rng.unit(n);
    const double s = rng.uniform(0.5, 2.0);
    I.A.row(i) = s * u.transpose();
  }
  for (Index i = 0; i < m; ++i) I.b(i) = rng.uniform(1.0, 2.0);
  const Vector z = kCentreNorm * rng.unit(n);
  I.c = rng.unit(n);
  if (family == "shifted") {
    I.centre = z;
    I.b += I.A * z;
  } else {
    I.centre = Vector::Zero(n);
  }
  return I;
}

struct Script {
  std::vector<Vector> objectives;  // K unit vectors
  std::vector<Vector> cut_dirs;    // C unit vectors (sign fixed against the current optimum)
  std::vector<double> cut_depth;  // cut through centre + θ (x* - centre) along d, θ in [0.3, 0.9]
  std::vector<double> rhs_pick;   // [0, 1): which tight row
  std::vector<double> rhs_factor;  // [0.7, 1.3]: new distance of the row from the centre
};

Script make_script(Index m, Index n, std::uint64_t seed, int K, int C, int R) {
  Script s;
  Rng ro(stream_seed(seed, m, n, 2)), rc(stream_seed(seed, m, n, 3)),
      rr(stream_seed(seed, m, n, 4));
  for (int k = 0; k < K; ++k) s.objectives.push_back(ro.unit(n));
  for (int k = 0; k < C; ++k) {
    s.cut_dirs.push_back(rc.unit(n));
    s.cut_depth.push_back(rc.uniform(0.3, 0.9));
  }
  for (int k = 0; k < R; ++k) {
    s.rhs_pick.push_back(rr.uniform());
    s.rhs_factor.push_back(rr.uniform(0.7, 1.3));
  }
  return s;
}

// ---------------------------------------------------------------------------------------------
// What one backend did on one case (size, family). Sent from the child through a pipe.
enum RunStatus : int {
  kDone = 0,
  kStopped = 1,
  kKilled = 2,
  kError = 3,
  kCrashed = 4,
  kSkipped = 5
};

struct Answer {
  std::int32_t key;     // instance * stride + position (0 cold, 1 first incremental, 2.. steps)
  std::int32_t status;  // lp::Status
  double value;
};

enum Kind : int { kObjective = 0, kCut = 1, kRhs = 2 };
const char* const kKindName[3] = {"objective", "cut", "rhs"};

struct Outcome {
  int status = kDone;
  std::string message;  // why stopped, error text, skip reason
  bool hit_cap = false;
  double slowest = 0;  // longest single solve
  double child_seconds = 0;
  int cold_instances = 0, inc_instances = 0;
  std::vector<double> cold;    // per instance: median over its timed runs
  std::vector<double> first;   // per instance: make_solver + first solve
  std::vector<double> inc[3];  // every timed re-solve, by kind
  long cold_iters = 0, cold_solves = 0;
  long inc_iters[3] = {0, 0, 0};
  std::vector<Answer> answers;  // one per LP (the first timed run of a cold LP)
  long solves = 0, checked = 0, check_failures = 0, non_optimal = 0, fallbacks = 0;
  std::string first_failure, first_non_optimal;
  double estimate = 0;  // skipped: estimated seconds of one cold solve (0: none)
  // Filled in by the parent from GLPK's answers:
  long compared = 0, status_mismatches = 0;
  double max_rel_diff = std::numeric_limits<double>::quiet_NaN();

  bool has_data() const { return status == kDone || status == kStopped; }
};

// Byte buffer for the pipe.
struct Blob {
  std::string data;
  size_t pos = 0;
  template <class T>
  void put(const T& v) {
    static_assert(std::is_trivially_copyable<T>::value, "plain data only");
    data.append(reinterpret_cast<const char*>(&v), sizeof v);
  }
  template <class T>
  void put_vec(const std::vector<T>& v) {
    put<std::uint64_t>(v.size());
    for (const T& x : v) put(x);
  }
  void put_str(const std::string& s) {
    put<std::uint64_t>(s.size());
    data += s;
  }
  template <class T>
  T get() {
    if (pos + sizeof(T) > data.size()) throw std::runtime_error("truncated result from child");
    T v;
    std::memcpy(&v, data.data() + pos, sizeof v);
    pos += sizeof v;
    return v;
  }
  template <class T>
  std::vector<T> get_vec() {
    const auto k = get<std::uint64_t>();
    std::vector<T> v;
    for (std::uint64_t i = 0; i < k; ++i) v.push_back(get<T>());
    return v;
  }
  std::string get_str() {
    const auto k = static_cast<size_t>(get<std::uint64_t>());
    if (pos + k > data.size()) throw std::runtime_error("truncated result from child");
    std::string s = data.substr(pos, k);
    pos += k;
    return s;
  }
};

Blob serialize(const Outcome& o) {
  Blob b;
  b.put(o.status);
  b.put_str(o.message);
  b.put(o.hit_cap);
  b.put(o.slowest);
  b.put(o.child_seconds);
  b.put(o.cold_instances);
  b.put(o.inc_instances);
  b.put_vec(o.cold);
  b.put_vec(o.first);
  for (const auto& v : o.inc) b.put_vec(v);
  b.put(o.cold_iters);
  b.put(o.cold_solves);
  for (long v : o.inc_iters) b.put(v);
  b.put_vec(o.answers);
  b.put(o.solves);
  b.put(o.checked);
  b.put(o.check_failures);
  b.put(o.non_optimal);
  b.put(o.fallbacks);
  b.put_str(o.first_failure);
  b.put_str(o.first_non_optimal);
  return b;
}

Outcome deserialize(Blob& b) {
  Outcome o;
  o.status = b.get<int>();
  o.message = b.get_str();
  o.hit_cap = b.get<bool>();
  o.slowest = b.get<double>();
  o.child_seconds = b.get<double>();
  o.cold_instances = b.get<int>();
  o.inc_instances = b.get<int>();
  o.cold = b.get_vec<double>();
  o.first = b.get_vec<double>();
  for (auto& v : o.inc) v = b.get_vec<double>();
  o.cold_iters = b.get<long>();
  o.cold_solves = b.get<long>();
  for (long& v : o.inc_iters) v = b.get<long>();
  o.answers = b.get_vec<Answer>();
  o.solves = b.get<long>();
  o.checked = b.get<long>();
  o.check_failures = b.get<long>();
  o.non_optimal = b.get<long>();
  o.fallbacks = b.get<long>();
  o.first_failure = b.get_str();
  o.first_non_optimal = b.get_str();
  return o;
}

// ---------------------------------------------------------------------------------------------
// Settings.
struct Size {
  Index m, n;
};

struct Config {
  std::vector<Size> sizes = {{50, 4}, {200, 8}, {1000, 10}, {5000, 20}};
  std::vector<std::uint64_t> seeds = {1, 2, 3, 4, 5};
  std::vector<std::string> families = {"interior", "shifted"};
  std::vector<std::string> backends;  // default: lp::backends(); the baseline always runs
  int reps = 5;
  double repeat_below = 0.5;  // a cold solve at least this slow is not repeated
  int K = 20, C = 10, R = 10;
  double cap = 2.0;      // per solve
  double budget = 30.0;  // per case and backend
  double kill = 120.0;   // child killed
  bool skip = true;
  bool use_fork = true;
  std::string out = std::string(CORRAL_BENCH_RESULTS_DIR) + "/lp.json";
};

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

std::string size_name(Index m, Index n) { return std::to_string(m) + "x" + std::to_string(n); }

// ---------------------------------------------------------------------------------------------
// One backend on one case: cold solves of every instance, then the incremental sequences.
// Stops early (status kStopped, data kept) after a solve longer than the cap or once the
// case has run for the budget.
Outcome run_backend(const Config& cfg, const std::string& backend,
                    const std::vector<Instance>& insts, const std::vector<Script>& scripts) {
  Outcome o;
  const auto t_start = Clock::now();
  const int stride = 2 + cfg.K + cfg.C + cfg.R;
  // Untimed warm-up: a backend's one-time set-up (library globals) is not charged to the
  // first instance.
  {
    Matrix A(2, 1);
    A << 1.0, -1.0;
    const Vector b = Vector::Ones(2), c = Vector::Ones(1);
    lp::maximize(c, A, b, backend);
  }
  // Which LP a key is, in words (key -1: a repeated cold run).
  auto describe = [&](std::int32_t key) -> std::string {
    if (key < 0) return "cold LP (repeated run)";
    const int pos = key % stride;
    if (pos == 0) return "cold LP";
    if (pos == 1) return "first incremental solve";
    if (pos < 2 + cfg.K) return "objective change " + std::to_string(pos - 1);
    if (pos < 2 + cfg.K + cfg.C) return "cut " + std::to_string(pos - 1 - cfg.K);
    return "rhs change " + std::to_string(pos - 1 - cfg.K - cfg.C);
  };
  bool stop = false;
  auto timed = [&](double t) {
    o.slowest = std::max(o.slowest, t);
    if (t > cfg.cap) {
      o.hit_cap = true;
      stop = true;
      o.message = "a solve took " + fmt("%.3g", t) + " s > cap " + fmt("%g", cfg.cap) + " s";
    } else if (seconds_since(t_start) > cfg.budget) {
      stop = true;
      o.message = "stopped at the budget of " + fmt("%g", cfg.budget) + " s";
    }
  };
  auto record = [&](std::int32_t key, const Instance& I, const Vector& c, const Matrix& A,
                    const Vector& b, const lp::Result& r) {
    ++o.solves;
    o.fallbacks += r.fallbacks;
    const std::string where = "seed " + std::to_string(I.seed) + ", " + describe(key);
    if (r.status != lp::Status::optimal) {
      ++o.non_optimal;
      if (o.first_non_optimal.empty()) o.first_non_optimal = where + ": " + lp::to_string(r.status);
    }
    const lp::CheckReport rep = lp::check_answer(c, A, b, r, kCheckTol);
    ++o.checked;
    if (!rep.ok) {
      ++o.check_failures;
      if (o.first_failure.empty()) o.first_failure = where + ": " + rep.failure;
    }
    if (key >= 0) o.answers.push_back({key, static_cast<std::int32_t>(r.status), r.value});
  };

  // Cold: lp::maximize, repeated; the instance's time is the median of its runs.
  for (size_t k = 0; k < insts.size() && !stop; ++k) {
    const Instance& I = insts[k];
    std::vector<double> times;
    for (int rep = 0; rep < cfg.reps && !stop; ++rep) {
      const auto t0 = Clock::now();
      const lp::Result r = lp::maximize(I.c, I.A, I.b, backend);
      const double t = seconds_since(t0);
      times.push_back(t);
      o.cold_iters += r.iterations;
      ++o.cold_solves;
      record(rep == 0 ? static_cast<std::int32_t>(k) * stride : -1, I, I.c, I.A, I.b, r);
      timed(t);
      if (t >= cfg.repeat_below) break;
    }
    o.cold.push_back(median(times));
    ++o.cold_instances;
  }

  // Incremental: one solver per instance.
  for (size_t k = 0; k < insts.size() && !stop; ++k) {
    const Instance& I = insts[k];
    const Script& S = scripts[k];
    const Index n = I.A.cols();
    Matrix A = I.A;
    Vector b = I.b, c = I.c;
    std::int32_t key = static_cast<std::int32_t>(k) * stride + 1;
    auto t0 = Clock::now();
    std::unique_ptr<lp::Solver> solver = lp::make_solver(A, b, c, backend);
    lp::Result r = solver->solve();
    double t = seconds_since(t0);
    o.first.push_back(t);
    record(key++, I, c, A, b, r);
    timed(t);
    auto step = [&](Kind kind, const std::function<void()>& change) {
      t0 = Clock::now();
      change();
      r = solver->solve();
      t = seconds_since(t0);
      o.inc[kind].push_back(t);
      o.inc_iters[kind] += r.iterations;
      record(key++, I, c, A, b, r);
      timed(t);
    };
    // (a) objective changes.
    for (int j = 0; j < cfg.K && !stop; ++j) {
      c = S.objectives[static_cast<size_t>(j)];
      step(kObjective, [&] { solver->set_objective(c); });
    }
    // (b) one cutting row at a time, violated by the current optimum x*: a unit row d with
    // d·(x* - centre) > 0, through centre + θ (x* - centre). The centre stays strictly inside.
    key = static_cast<std::int32_t>(k) * stride + 2 + cfg.K;
    for (int j = 0; j < cfg.C && !stop; ++j) {
      Vector d = S.cut_dirs[static_cast<size_t>(j)];
      const Vector x = r.status == lp::Status::optimal ? r.x : I.centre;
      double h = d.dot(x - I.centre);
      if (h < 0) {
        d = -d;
        h = -h;
      }
      const double rhs = d.dot(I.centre) + S.cut_depth[static_cast<size_t>(j)] * h +
                         (r.status == lp::Status::optimal ? 0.0 : 1.0);
      const Matrix row = d.transpose();
      const Vector brow = Vector::Constant(1, rhs);
      A.conservativeResize(A.rows() + 1, n);
      A.row(A.rows() - 1) = row;
      b.conservativeResize(b.size() + 1);
      b(b.size() - 1) = rhs;
      step(kCut, [&] { solver->add_rows(row, brow); });
    }
    // (c) right-hand-side changes of a row tight at the current optimum (a random row when
    // none is): its distance from the centre is multiplied by a factor in [0.7, 1.3].
    key = static_cast<std::int32_t>(k) * stride + 2 + cfg.K + cfg.C;
    for (int j = 0; j < cfg.R && !stop; ++j) {
      std::vector<Index> tight;
      if (r.status == lp::Status::optimal) {
        const double xn = r.x.norm();
        for (Index i = 0; i < A.rows(); ++i) {
          const double slack = b(i) - A.row(i).dot(r.x);
          if (slack <= kTightSlack * (std::abs(b(i)) + A.row(i).norm() * xn)) tight.push_back(i);
        }
      }
      const double u = S.rhs_pick[static_cast<size_t>(j)];
      const Index count = tight.empty() ? A.rows() : static_cast<Index>(tight.size());
      const Index pick = std::min(count - 1, static_cast<Index>(u * static_cast<double>(count)));
      const Index i = tight.empty() ? pick : tight[static_cast<size_t>(pick)];
      const double ac = A.row(i).dot(I.centre);
      const double value = ac + (b(i) - ac) * S.rhs_factor[static_cast<size_t>(j)];
      b(i) = value;
      step(kRhs, [&] { solver->set_rhs(i, value); });
    }
    ++o.inc_instances;
  }
  if (stop) o.status = kStopped;
  o.child_seconds = seconds_since(t_start);
  return o;
}

Outcome guarded(const std::function<Outcome()>& f) {
  try {
    return f();
  } catch (const std::exception& e) {
    Outcome o;
    o.status = kError;
    o.message = e.what();
    return o;
  }
}

// ---------------------------------------------------------------------------------------------

// Running in a child process, killed when it passes cfg.kill.
Outcome run_isolated(const std::function<Outcome()>& f, double kill, bool use_fork) {
  if (!use_fork) return guarded(f);
  std::fflush(stdout);
  std::fflush(stderr);
  int fd[2];
  if (::pipe(fd) != 0) throw std::runtime_error("pipe() failed");
  const auto t0 = Clock::now();
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error("fork() failed");
  if (pid == 0) {
    ::close(fd[0]);
    const Blob b = serialize(guarded(f));
    const std::uint64_t len = b.data.size();
    write_all(fd[1], &len, sizeof len);
    write_all(fd[1], b.data.data(), b.data.size());
    ::_exit(0);
  }
  ::close(fd[1]);
  bool ready = false;
  for (;;) {
    const double left = kill - seconds_since(t0);
    if (left <= 0) break;
    pollfd p{fd[0], POLLIN, 0};
    const int r = ::poll(&p, 1, static_cast<int>(std::ceil(left * 1000.0)));
    if (r < 0 && errno == EINTR) continue;
    if (r > 0) ready = true;
    break;
  }
  Outcome o;
  if (!ready) {
    ::kill(pid, SIGKILL);
    ::waitpid(pid, nullptr, 0);
    ::close(fd[0]);
    o.status = kKilled;
    o.hit_cap = true;
    o.message = "killed after " + fmt("%g", kill) + " s (--kill)";
    return o;
  }
  std::uint64_t len = 0;
  size_t got = read_all(fd[0], &len, sizeof len);
  Blob b;
  if (got == sizeof len) {
    b.data.resize(static_cast<size_t>(len));
    got = read_all(fd[0], &b.data[0], b.data.size());
  }
  ::close(fd[0]);
  int wstatus = 0;
  ::waitpid(pid, &wstatus, 0);
  if (got != b.data.size() || b.data.empty()) {
    o.status = kCrashed;
    if (WIFSIGNALED(wstatus))
      o.message = std::string("child killed by signal ") + std::to_string(WTERMSIG(wstatus)) +
                  " (" + strsignal(WTERMSIG(wstatus)) + ")";
    else
      o.message =
          "child exited with status " + std::to_string(WEXITSTATUS(wstatus)) + " without a result";
    return o;
  }
  return deserialize(b);
}

// ---------------------------------------------------------------------------------------------
// Comparison against GLPK: relative difference |v - v_glpk| / max(1, |v_glpk|) over the LPs
// both solved to optimality; a differing status counts as a mismatch.
void compare_with(Outcome& o, const Outcome& ref) {
  std::map<std::int32_t, Answer> g;
  for (const Answer& a : ref.answers) g[a.key] = a;
  o.compared = 0;
  o.status_mismatches = 0;
  o.max_rel_diff = 0.0;
  const auto opt = static_cast<std::int32_t>(lp::Status::optimal);
  for (const Answer& a : o.answers) {
    const auto it = g.find(a.key);
    if (it == g.end()) continue;
    const Answer& r = it->second;
    if (a.status != r.status) {
      ++o.status_mismatches;
      continue;
    }
    if (a.status != opt) continue;
    ++o.compared;
    o.max_rel_diff =
        std::max(o.max_rel_diff, std::abs(a.value - r.value) / std::max(1.0, std::abs(r.value)));
  }
  if (o.compared == 0) o.max_rel_diff = std::numeric_limits<double>::quiet_NaN();
}

struct Case {
  std::string family;
  Index m = 0, n = 0;
  std::vector<std::pair<std::string, Outcome>> out;  // baseline first
  const Outcome* find(const std::string& name) const {
    for (const auto& [k, o] : out)
      if (k == name) return &o;
    return nullptr;
  }
};

double cold_median(const Outcome& o) { return o.has_data() ? median(o.cold) : std::nan(""); }
double inc_median(const Outcome& o, int kind) {
  return o.has_data() ? median(o.inc[kind]) : std::nan("");
}

// Baseline time / backend time (above 1: the backend is faster); NaN when either is missing.
double ratio(double base, double t) {
  return (base > 0 && t > 0) ? base / t : std::numeric_limits<double>::quiet_NaN();
}

// Geometric mean of the incremental ratios that exist.
double inc_ratio(const Outcome& base, const Outcome& o) {
  double s = 0;
  int k = 0;
  for (int kind = 0; kind < 3; ++kind) {
    const double q = ratio(inc_median(base, kind), inc_median(o, kind));
    if (std::isfinite(q)) {
      s += std::log(q);
      ++k;
    }
  }
  return k ? std::exp(s / k) : std::numeric_limits<double>::quiet_NaN();
}

// ---------------------------------------------------------------------------------------------
// Output.
std::string time_cell(double s) {
  if (!std::isfinite(s) || s < 0) return "-";
  if (s < 1e-3) return fmt("%.1fus", s * 1e6);
  if (s < 1.0) return fmt("%.2fms", s * 1e3);
  return fmt("%.2fs", s);
}

// Three significant figures at most, no exponent: 0.05, 1.71, 12.3, 208.
std::string short_num(double v) {
  const char* f = "%.2f";
  if (v >= 100) f = "%.0f";
  else if (v >= 10) f = "%.1f";
  return fmt(f, v);
}

std::string ratio_cell(double q) { return std::isfinite(q) ? short_num(q) : "-"; }

// "12.3x faster than glpk" / "2.1x slower than glpk".
std::string verdict(double q) {
  if (!std::isfinite(q)) return "not measured";
  return short_num(q >= 1 ? q : 1.0 / q) + "x " + (q >= 1 ? "faster" : "slower") + " than " +
         kBaseline;
}

const char* status_name(int s) {
  switch (s) {
    case kDone: return "done";
    case kStopped: return "stopped";
    case kKilled: return "killed";
    case kError: return "error";
    case kSkipped: return "skipped";
    default: return "crashed";
  }
}

std::string json_list(const std::vector<double>& v) {
  std::string s = "[";
  for (size_t i = 0; i < v.size(); ++i) s += (i ? ", " : "") + json_num(v[i]);
  return s + "]";
}

std::string capability_note(const std::string& backend) {
  const lp::Capabilities cap = lp::capabilities(backend);
  std::string s = cap.warm_start ? "warm start" : "re-solves from scratch";
  if (cap.exact) s += ", exact";
  return s;
}

void write_json(const Config& cfg, const std::vector<Case>& cases, double total_seconds) {
  std::filesystem::path p(cfg.out);
  if (p.has_parent_path()) std::filesystem::create_directories(p.parent_path());
  std::ofstream f(p);
  if (!f) throw std::runtime_error("cannot write " + cfg.out);
  f << "{\n  \"benchmark\": \"lp\",\n";
  f << "  \"seeds\": [";
  for (size_t i = 0; i < cfg.seeds.size(); ++i) f << (i ? ", " : "") << cfg.seeds[i];
  f << "],\n  \"sizes\": [";
  for (size_t i = 0; i < cfg.sizes.size(); ++i)
    f << (i ? ", " : "") << "[" << cfg.sizes[i].m << ", " << cfg.sizes[i].n << "]";
  f << "],\n  \"families\": [";
  for (size_t i = 0; i < cfg.families.size(); ++i)
    f << (i ? ", " : "") << "\"" << cfg.families[i] << "\"";
  f << "],\n  \"backends\": [";
  for (size_t i = 0; i < cfg.backends.size(); ++i)
    f << (i ? ", " : "") << "{\"name\": \"" << cfg.backends[i] << "\", \"capabilities\": \""
      << capability_note(cfg.backends[i]) << "\"}";
  f << "],\n  \"default_backend\": \"" << lp::default_backend() << "\",\n";
  f << "  \"baseline\": \"" << kBaseline << "\",\n";
  f << "  \"ratio\": \"baseline seconds / backend seconds (above 1: backend faster)\",\n";
  f << "  \"reps\": " << cfg.reps << ", \"repeat_below_seconds\": " << json_num(cfg.repeat_below)
    << ",\n  \"objectives\": " << cfg.K << ", \"cuts\": " << cfg.C << ", \"rhs_changes\": " << cfg.R
    << ",\n";
  f << "  \"cap_seconds\": " << json_num(cfg.cap)
    << ", \"budget_seconds\": " << json_num(cfg.budget)
    << ", \"kill_seconds\": " << json_num(cfg.kill)
    << ", \"skip\": " << (cfg.skip ? "true" : "false")
    << ", \"forked\": " << (cfg.use_fork ? "true" : "false") << ",\n";
  f << "  \"check_tolerance\": " << json_num(kCheckTol)
    << ", \"value_flag_tolerance\": " << json_num(kValueFlag) << ",\n";
  f << "  \"corral_version\": \"" << CORRAL_VERSION_STRING << "\",\n";
  f << "  \"glpk_version\": \"" << glp_version() << "\",\n";
  f << "  \"machine\": {\"cpu\": \"" << json_escape(cpu_model())
    << "\", \"cores\": " << std::thread::hardware_concurrency() << ", \"compiler\": \""
    << json_escape(__VERSION__) << "\"},\n";
  f << "  \"date\": \"" << now_utc() << "\",\n";
  f << "  \"total_seconds\": " << json_num(total_seconds) << ",\n";
  f << "  \"cases\": [\n";
  for (size_t ci = 0; ci < cases.size(); ++ci) {
    const Case& C = cases[ci];
    const Outcome* base = C.find(kBaseline);
    f << "    {\"family\": \"" << C.family << "\", \"m\": " << C.m << ", \"n\": " << C.n
      << ", \"backends\": {";
    for (size_t bi = 0; bi < C.out.size(); ++bi) {
      const auto& [name, o] = C.out[bi];
      f << (bi ? ",\n" : "\n") << "      \"" << name << "\": {\"status\": \""
        << status_name(o.status) << "\"";
      if (!o.message.empty()) f << ", \"message\": \"" << json_escape(o.message) << "\"";
      if (o.status == kSkipped && o.estimate > 0)
        f << ", \"estimated_seconds\": " << json_num(o.estimate);
      if (o.has_data()) {
        const bool is_base = name == kBaseline;
        f << ",\n        \"cold\": {\"instances\": " << o.cold_instances
          << ", \"median_seconds\": " << json_num(cold_median(o))
          << ", \"per_instance_seconds\": " << json_list(o.cold) << ", \"mean_iterations\": "
          << json_num(o.cold_solves ? static_cast<double>(o.cold_iters) / o.cold_solves : NAN);
        if (base && base->has_data() && !is_base)
          f << ", \"ratio\": " << json_num(ratio(cold_median(*base), cold_median(o)));
        f << "},\n        \"incremental\": {\"instances\": " << o.inc_instances
          << ", \"first_solve_median_seconds\": " << json_num(median(o.first));
        for (int kind = 0; kind < 3; ++kind) {
          const double mi = inc_median(o, kind);
          f << ",\n          \"" << kKindName[kind] << "\": {\"resolves\": " << o.inc[kind].size()
            << ", \"median_seconds\": " << json_num(mi) << ", \"mean_iterations\": "
            << json_num(o.inc[kind].empty() ? NAN
                                            : static_cast<double>(o.inc_iters[kind]) /
                                                  static_cast<double>(o.inc[kind].size()));
          if (base && base->has_data() && !is_base)
            f << ", \"ratio\": " << json_num(ratio(inc_median(*base, kind), mi));
          f << "}";
        }
        if (base && base->has_data() && !is_base)
          f << ",\n          \"ratio_geometric_mean\": " << json_num(inc_ratio(*base, o));
        f << "},\n        \"correctness\": {\"solves\": " << o.solves
          << ", \"checked\": " << o.checked << ", \"check_failures\": " << o.check_failures
          << ", \"not_optimal\": " << o.non_optimal << ", \"fallbacks\": " << o.fallbacks;
        if (!is_base)
          f << ", \"compared_with_glpk\": " << o.compared
            << ", \"status_mismatches\": " << o.status_mismatches
            << ", \"max_rel_value_diff\": " << json_num(o.max_rel_diff);
        if (!o.first_failure.empty())
          f << ", \"first_check_failure\": \"" << json_escape(o.first_failure) << "\"";
        if (!o.first_non_optimal.empty())
          f << ", \"first_not_optimal\": \"" << json_escape(o.first_non_optimal) << "\"";
        f << "},\n        \"slowest_solve_seconds\": " << json_num(o.slowest)
          << ", \"child_seconds\": " << json_num(o.child_seconds);
      }
      f << "}";
    }
    f << "\n    }}" << (ci + 1 < cases.size() ? "," : "") << "\n";
  }
  f << "  ]\n}\n";
}

void print_table(const Config& cfg, const std::vector<Case>& cases) {
  std::printf(
      "\nLP backends against %s. Times: median per LP (cold: over instances, each the median of "
      "its runs;\nre-solves: over every re-solve of the kind). ratio = %s time / backend time "
      "(above 1: backend faster).\nmaxrel = max |value - %s value| / max(1, |%s value|); "
      "chk = lp::check_answer failures at tol %g;\nfb = sum of Result::fallbacks; inst = "
      "instances timed (cold/incremental).\n",
      kBaseline, kBaseline, kBaseline, kBaseline, kCheckTol);
  const std::string head =
      "family   size      backend    inst |    cold   ratio  iters | objective  ratio |      cut"
      "   ratio |      rhs   ratio |   maxrel   chk  fb";
  std::printf("\n%s\n%s\n", head.c_str(), std::string(head.size(), '-').c_str());
  std::vector<std::string> notes;
  for (const Case& C : cases) {
    if (&C != &cases.front() && C.out.size() > 1) std::printf("\n");
    const Outcome* base = C.find(kBaseline);
    const bool base_ok = base && base->has_data();
    const std::string where = C.family + " " + size_name(C.m, C.n) + " ";
    for (const auto& [name, o] : C.out) {
      const bool is_base = name == kBaseline;
      std::printf("%-8s %-9s %-10s", C.family.c_str(), size_name(C.m, C.n).c_str(), name.c_str());
      if (!o.has_data()) {
        std::printf(" %4s | %s\n", "-", status_name(o.status));
        notes.push_back(where + name + " " + status_name(o.status) + ": " + o.message);
        continue;
      }
      const std::string inst =
          std::to_string(o.cold_instances) + "/" + std::to_string(o.inc_instances);
      // The baseline's own ratio is 1 by definition; "-" where either time is missing.
      auto rcell = [&](double base_t, double t) {
        if (!base_ok || !std::isfinite(t)) return std::string("-");
        return is_base ? std::string("1.00") : ratio_cell(ratio(base_t, t));
      };
      const double cm = cold_median(o);
      const double iters =
          o.cold_solves ? static_cast<double>(o.cold_iters) / static_cast<double>(o.cold_solves)
                        : 0.0;
      std::printf(" %4s | %7s  %6s  %5.0f", inst.c_str(), time_cell(cm).c_str(),
                  rcell(base_ok ? cold_median(*base) : cm, cm).c_str(), iters);
      for (int kind = 0; kind < 3; ++kind) {
        const double mi = inc_median(o, kind);
        std::printf(" | %9s  %5s", time_cell(mi).c_str(),
                    rcell(base_ok ? inc_median(*base, kind) : mi, mi).c_str());
      }
      const bool flag = !is_base && std::isfinite(o.max_rel_diff) && o.max_rel_diff > kValueFlag;
      const std::string maxrel =
          !is_base && std::isfinite(o.max_rel_diff) ? fmt("%.1e", o.max_rel_diff) : "-";
      const bool alarm = flag || o.check_failures || o.status_mismatches || o.non_optimal;
      std::printf(" | %8s %5ld %3ld%s\n", maxrel.c_str(), o.check_failures, o.fallbacks,
                  alarm ? "  <-- see notes" : "");
      if (o.status == kStopped) notes.push_back(where + name + " stopped early: " + o.message);
      if (flag)
        notes.push_back(where + name + ": value differs from " + kBaseline + " by " +
                        fmt("%.2e", o.max_rel_diff) + " > " + fmt("%g", kValueFlag));
      if (o.status_mismatches)
        notes.push_back(where + name + ": " + std::to_string(o.status_mismatches) +
                        " LPs with a status other than " + kBaseline + "'s");
      if (o.check_failures)
        notes.push_back(where + name + ": " + std::to_string(o.check_failures) +
                        " check failures, first: " + o.first_failure);
      if (o.non_optimal)
        notes.push_back(where + name + ": " + std::to_string(o.non_optimal) +
                        " answers not optimal, first: " + o.first_non_optimal);
    }
  }

  // Sentences against the baseline.
  std::printf(
      "\nagainst %s (cold: median time per LP; incremental: geometric mean of the three "
      "re-solve ratios):\n",
      kBaseline);
  for (const Case& C : cases) {
    const Outcome* base = C.find(kBaseline);
    if (!base || !base->has_data()) continue;
    std::string cold, inc;
    for (const auto& [name, o] : C.out) {
      if (name == kBaseline || !o.has_data()) continue;
      cold += (cold.empty() ? "" : ", ") + name + " " +
              verdict(ratio(cold_median(*base), cold_median(o)));
      const double q = inc_ratio(*base, o);
      if (std::isfinite(q)) inc += (inc.empty() ? "" : ", ") + name + " " + verdict(q);
    }
    if (cold.empty()) continue;
    std::printf("  %-8s %-9s cold:        %s\n", C.family.c_str(), size_name(C.m, C.n).c_str(),
                cold.c_str());
    if (!inc.empty()) std::printf("  %-8s %-9s incremental: %s\n", "", "", inc.c_str());
  }

  // Correctness over the whole run, per backend.
  std::printf(
      "\ncorrectness over all cases (targets: maxrel <= %g, no check failures, no "
      "fallbacks):\n",
      kValueFlag);
  for (const std::string& name : cfg.backends) {
    long solves = 0, fails = 0, fb = 0, nonopt = 0, compared = 0, mism = 0;
    double maxrel = 0;
    bool any = false;
    for (const Case& C : cases) {
      const Outcome* o = C.find(name);
      if (!o || !o->has_data()) continue;
      any = true;
      solves += o->solves;
      fails += o->check_failures;
      fb += o->fallbacks;
      nonopt += o->non_optimal;
      compared += o->compared;
      mism += o->status_mismatches;
      if (std::isfinite(o->max_rel_diff)) maxrel = std::max(maxrel, o->max_rel_diff);
    }
    if (!any) {
      std::printf("  %-10s not run\n", name.c_str());
      continue;
    }
    if (name == kBaseline)
      std::printf(
          "  %-10s %6ld answers, %ld check failures, %ld fallbacks, %ld not optimal "
          "(the reference)\n",
          name.c_str(), solves, fails, fb, nonopt);
    else
      std::printf(
          "  %-10s %6ld answers, %ld check failures, %ld fallbacks, %ld not optimal; "
          "%ld values compared, max rel diff %.1e%s, %ld status mismatches\n",
          name.c_str(), solves, fails, fb, nonopt, compared, maxrel,
          maxrel > kValueFlag ? " (FLAG)" : "", mism);
  }
  if (!notes.empty()) {
    std::printf("\nnotes:\n");
    for (const auto& s : notes) std::printf("  %s\n", s.c_str());
  }
}

// ---------------------------------------------------------------------------------------------
// Arguments.
std::vector<std::string> split(const std::string& s) {
  std::vector<std::string> v;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ','))
    if (!item.empty()) v.push_back(item);
  return v;
}

std::vector<Size> parse_sizes(const std::string& s) {
  std::vector<Size> v;
  for (const std::string& item : split(s)) {
    const auto x = item.find('x');
    if (x == std::string::npos)
      throw std::runtime_error("--sizes: '" + item + "' is not of the form MxN (e.g. 1000x10)");
    const long long m = std::stoll(item.substr(0, x)), n = std::stoll(item.substr(x + 1));
    if (n < 1 || m < n + 1)
      throw std::runtime_error("--sizes: '" + item + "' needs n >= 1 and m > n (tall LPs)");
    v.push_back({static_cast<Index>(m), static_cast<Index>(n)});
  }
  if (v.empty()) throw std::runtime_error("--sizes: no size given");
  return v;
}

std::vector<std::uint64_t> parse_seeds(const std::string& s) {
  std::vector<std::uint64_t> v;
  for (const std::string& item : split(s)) {
    const auto dash = item.find('-');
    if (dash != std::string::npos && dash > 0) {
      const std::uint64_t lo = std::stoull(item.substr(0, dash)),
                          hi = std::stoull(item.substr(dash + 1));
      if (hi < lo || hi - lo > 10000) throw std::runtime_error("--seeds: bad range '" + item + "'");
      for (std::uint64_t k = lo; k <= hi; ++k) v.push_back(k);
    } else {
      v.push_back(std::stoull(item));
    }
  }
  if (v.empty()) throw std::runtime_error("--seeds: no seed given");
  return v;
}

void usage() {
  std::printf(
      "bench_lp: the LP backends of this build against GLPK on random tall LPs (cold solves,\n"
      "incremental re-solves, and the answers' correctness in the same run)\n\n"
      "  --sizes LIST      MxN sizes, comma separated (default 50x4,200x8,1000x10,5000x20)\n"
      "  --seeds LIST      instance seeds, one instance per seed and size; ranges allowed\n"
      "                    (default 1-5)\n"
      "  --families LIST   interior,shifted (default both)\n"
      "  --backends LIST   backends to time (default: all of this build: %s);\n"
      "                    glpk, the baseline, always runs\n"
      "  --reps R          timed cold runs per instance, median taken (default 5)\n"
      "  --repeat-below S  a cold solve at least S seconds long is not repeated (default 0.5)\n"
      "  --objectives K    objective changes per instance (default 20)\n"
      "  --cuts C          added cutting rows per instance (default 10)\n"
      "  --rhs-changes R   right-hand-side changes per instance (default 10)\n"
      "  --cap S           a backend with one solve longer than S seconds stops the case and\n"
      "                    is skipped at larger sizes (default 2)\n"
      "  --budget S        a backend stops a case after S seconds, keeping what it has\n"
      "                    (default 30)\n"
      "  --kill S          a child process still running after S seconds is killed (default "
      "120)\n"
      "  --no-skip         also run a backend whose estimated solve time is past the cap\n"
      "  --no-fork         run in this process (no kill; for profilers)\n"
      "  --out FILE        JSON output (default benchmarks/results/lp.json)\n",
      [] {
        std::string s;
        for (const auto& b : lp::backends()) s += (s.empty() ? "" : ",") + b;
        return s;
      }()
          .c_str());
}

Config parse_args(int argc, char** argv) {
  Config c;
  const std::vector<std::string> known = lp::backends();
  c.backends = known;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto value = [&]() -> std::string {
      if (i + 1 >= argc) throw std::runtime_error(a + " needs a value");
      return argv[++i];
    };
    auto positive_int = [&](const std::string& v) {
      const int k = std::stoi(v);
      if (k < 0) throw std::runtime_error(a + " must be >= 0, got " + v);
      return k;
    };
    if (a == "--sizes") c.sizes = parse_sizes(value());
    else if (a == "--seeds") c.seeds = parse_seeds(value());
    else if (a == "--families") {
      c.families = split(value());
      for (const auto& f : c.families)
        if (f != "interior" && f != "shifted")
          throw std::runtime_error("--families: unknown family '" + f + "' (interior, shifted)");
      if (c.families.empty()) throw std::runtime_error("--families: no family given");
    } else if (a == "--backends") {
      c.backends = split(value());
      for (const auto& b : c.backends)
        if (std::find(known.begin(), known.end(), b) == known.end()) {
          std::string k;
          for (const auto& x : known) k += (k.empty() ? "" : ", ") + x;
          throw std::runtime_error("--backends: unknown backend '" + b + "'; this build has " + k);
        }
    } else if (a == "--reps") c.reps = std::max(1, positive_int(value()));
    else if (a == "--repeat-below") c.repeat_below = std::stod(value());
    else if (a == "--objectives") c.K = positive_int(value());
    else if (a == "--cuts") c.C = positive_int(value());
    else if (a == "--rhs-changes") c.R = positive_int(value());
    else if (a == "--cap") c.cap = std::stod(value());
    else if (a == "--budget") c.budget = std::stod(value());
    else if (a == "--kill") c.kill = std::stod(value());
    else if (a == "--no-skip") c.skip = false;
    else if (a == "--no-fork") c.use_fork = false;
    else if (a == "--out") c.out = value();
    else if (a == "-h" || a == "--help") {
      usage();
      std::exit(0);
    } else {
      throw std::runtime_error("unknown argument '" + a + "' (see --help)");
    }
  }
  if (!(c.cap > 0)) throw std::runtime_error("--cap must be positive");
  if (!(c.budget > 0)) throw std::runtime_error("--budget must be positive");
  if (!(c.kill > 0)) throw std::runtime_error("--kill must be positive");
  if (c.use_fork && c.kill <= c.budget + c.cap)
    std::fprintf(stderr,
                 "bench_lp: warning: --kill %g s is not above --budget + --cap (%g s); a case "
                 "may be killed before it stops by itself and lose its results\n",
                 c.kill, c.budget + c.cap);
  // The baseline first, then the others in the order given, without repeats.
  std::vector<std::string> order = {kBaseline};
  for (const auto& b : c.backends)
    if (std::find(order.begin(), order.end(), b) == order.end()) order.push_back(b);
  c.backends = order;
  std::stable_sort(c.sizes.begin(), c.sizes.end(),
                   [](const Size& x, const Size& y) { return x.m * x.n < y.m * y.n; });
  return c;
}

// Where a backend stands in one family: its cold medians at the sizes run so far, and why it
// is no longer run.
struct History {
  std::vector<std::pair<double, double>> points;  // (m n, median cold seconds)
  std::string stopped;                            // non-empty: skipped from now on
};

// Estimated seconds of one cold solve at work w = m n, from the last two sizes (time ~ w^p,
// p fitted and kept in [1, 3]; p = 1.5 with one size).
double estimate(const History& h, double w, double* p_out) {
  const auto& [w1, t1] = h.points.back();
  double p = 1.5;
  if (h.points.size() >= 2) {
    const auto& [w0, t0] = h.points[h.points.size() - 2];
    if (w1 > w0 && t0 > 0 && t1 > 0) p = std::log(t1 / t0) / std::log(w1 / w0);
  }
  p = std::min(3.0, std::max(1.0, p));
  *p_out = p;
  return t1 * std::pow(w / w1, p);
}

}  // namespace

int main(int argc, char** argv) {
  Config cfg;
  try {
    cfg = parse_args(argc, argv);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_lp: %s\n", e.what());
    return 2;
  }
  const auto t_all = Clock::now();
  std::string names;
  for (const auto& b : cfg.backends)
    names += (names.empty() ? "" : ", ") + b + " (" + capability_note(b) + ")";
  std::string seeds;
  for (auto s : cfg.seeds) seeds += (seeds.empty() ? "" : ",") + std::to_string(s);
  std::printf("bench_lp: corral %s, GLPK %s; backends %s; default backend %s\n",
              CORRAL_VERSION_STRING, glp_version(), names.c_str(), lp::default_backend().c_str());
  std::printf(
      "seeds %s; %d cold runs per instance (one if >= %g s); incremental: %d objectives, "
      "%d cuts, %d rhs changes\ncap %g s per solve (then skipped at larger sizes), budget "
      "%g s per case, kill %g s; %s\n",
      seeds.c_str(), cfg.reps, cfg.repeat_below, cfg.K, cfg.C, cfg.R, cfg.cap, cfg.budget, cfg.kill,
      cfg.use_fork ? "each backend and case in a child process" : "in process");
  std::fflush(stdout);

  std::map<std::pair<std::string, std::string>, History> hist;  // (backend, family)
  std::vector<Case> cases;
  try {
    for (const Size& sz : cfg.sizes)
      for (const std::string& family : cfg.families) {
        Case C;
        C.family = family;
        C.m = sz.m;
        C.n = sz.n;
        std::vector<Instance> insts;
        std::vector<Script> scripts;
        for (auto s : cfg.seeds) {
          insts.push_back(make_instance(family, sz.m, sz.n, s));
          scripts.push_back(make_script(sz.m, sz.n, s, cfg.K, cfg.C, cfg.R));
        }
        std::fprintf(stderr, "%s %s:\n", family.c_str(), size_name(sz.m, sz.n).c_str());
        const double w = static_cast<double>(sz.m) * static_cast<double>(sz.n);
        for (const std::string& name : cfg.backends) {
          History& h = hist[{name, family}];
          Outcome o;
          const bool is_base = name == kBaseline;
          if (!is_base && cfg.skip && !h.stopped.empty()) {
            o.status = kSkipped;
            o.message = h.stopped;
          } else if (!is_base && cfg.skip && !h.points.empty()) {
            double p = 0;
            const double est = estimate(h, w, &p);
            if (est > cfg.cap) {
              o.status = kSkipped;
              o.estimate = est;
              o.message = "estimated " + fmt("%.3g", est) + " s per solve > cap " +
                          fmt("%g", cfg.cap) + " s (time ~ (m n)^" + fmt("%.2f", p) +
                          " from the smaller sizes; --no-skip runs it)";
            }
          }
          if (o.status != kSkipped) {
            o = run_isolated([&] { return run_backend(cfg, name, insts, scripts); }, cfg.kill,
                             cfg.use_fork);
            if (o.has_data() && !o.cold.empty()) h.points.push_back({w, median(o.cold)});
            if (o.hit_cap || o.status == kKilled)
              h.stopped = "skipped after " + size_name(sz.m, sz.n) + ": " + o.message;
            else if (o.status == kError || o.status == kCrashed)
              h.stopped = "skipped after the " + std::string(status_name(o.status)) + " at " +
                          size_name(sz.m, sz.n);
          }
          std::fprintf(stderr, "  %-10s %-8s %s%s\n", name.c_str(), status_name(o.status),
                       o.has_data() ? ("cold " + time_cell(cold_median(o))).c_str() : "",
                       o.message.empty() ? "" : ("  (" + o.message + ")").c_str());
          C.out.emplace_back(name, std::move(o));
        }
        const Outcome* base = C.find(kBaseline);
        if (base && base->has_data())
          for (auto& [name, o] : C.out)
            if (name != kBaseline && o.has_data()) compare_with(o, *base);
        cases.push_back(std::move(C));
      }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_lp: %s\n", e.what());
    return 1;
  }
  print_table(cfg, cases);
  const double total = seconds_since(t_all);
  try {
    write_json(cfg, cases, total);
    std::printf("\nwrote %s (%.0f s in all)\n", cfg.out.c_str(), total);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_lp: %s\n", e.what());
    return 1;
  }
  return 0;
}
