// Redundancy removal benchmark: corral's remove_redundancy on the default LP backend
// (corral::lp::default_backend(), "dense" unless changed) against baselines measured in the
// same run on the same instances:
//   corral-glpk the same call with Options::backend = "glpk" (the speed-up of the default
//               backend over GLPK inside redundancy removal)
//   cdd-canon   cddlib's floating-point canonicalisation (ddf_MatrixCanonicalize)
//   cdd-shoot   cddlib's floating-point ray-shooting redundancy test
//   glpk-loop   one LP per row, written here against GLPK's C API
// Both corral runs report Info::fallbacks (LP answers that failed verification and were
// re-solved by another backend; target 0). See benchmarks/README.md ("bench_redundancy") for
// how to run it and read the table.
//
// Instances (reproducible from --seed): in R^n, K = 20 n random unit normals a_i with
// offset 1 (each hyperplane touches the unit sphere at a_i, so every one is a facet), then
// round(0.02 m) scaled copies of facets (s a_i x <= s, s uniform in [0.5, 3]), and the rest
// of the m rows redundant: random unit directions d with offset (1 + delta) h(d), h the support
// function of the K-facet polytope (one GLPK LP through corral's LP layer), delta uniform in
// [0.0005, 0.3]. Rows are shuffled. A correct method keeps exactly one row of each facet's
// class (the facet or one of its copies) and nothing else.
//
// Every method runs in a forked child killed at the time cap (--cap, default 60 s); the time
// reported is measured inside the child around the call alone.

#include <corral/corral.hpp>
#include <corral/detail/cdd.hpp>
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
#include <map>
#include <random>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
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
using Clock = corral_bench::Clock;
using corral_bench::cpu_model;
using corral_bench::json_escape;
using corral_bench::json_num;
using corral_bench::median;
using corral_bench::now_utc;
using corral_bench::read_all;
using corral_bench::seconds_since;
using corral_bench::write_all;

// ---------------------------------------------------------------------------------------------
// Random numbers. std::mt19937_64's output is fixed by the standard; the distributions of
// <random> are not, so the ones used here are written out to give the same instances with any
// standard library.
class Rng {
 public:
  explicit Rng(std::uint64_t seed) : gen_(seed) {}
  double uniform() { return static_cast<double>(gen_() >> 11) * 0x1.0p-53; }  // [0, 1)
  double uniform(double lo, double hi) { return lo + (hi - lo) * uniform(); }
  // Box-Muller.
  double normal() {
    if (has_spare_) {
      has_spare_ = false;
      return spare_;
    }
    double u = 0.0;
    while (u <= 0.0) u = uniform();
    const double v = uniform();
    const double r = std::sqrt(-2.0 * std::log(u));
    spare_ = r * std::sin(2.0 * M_PI * v);
    has_spare_ = true;
    return r * std::cos(2.0 * M_PI * v);
  }
  // Uniform integer in [0, k), without modulo bias.
  std::uint64_t below(std::uint64_t k) {
    const std::uint64_t limit =
        std::numeric_limits<std::uint64_t>::max() - std::numeric_limits<std::uint64_t>::max() % k;
    std::uint64_t x;
    do x = gen_();
    while (x >= limit);
    return x % k;
  }
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
  std::mt19937_64 gen_;
  bool has_spare_ = false;
  double spare_ = 0.0;
};

std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9e3779b97f4a7c15ULL;
  x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ULL;
  x = (x ^ (x >> 27)) * 0x94d049bb133111ebULL;
  return x ^ (x >> 31);
}

// ---------------------------------------------------------------------------------------------
// Instances.
struct Instance {
  Index m = 0, n = 0, K = 0;
  Matrix A;
  Vector b;
  std::vector<int> cls;  // facet id (0..K-1) of a facet or of a scaled copy; -1: redundant
  Index copies = 0;      // scaled copies of facets
  double gen_seconds = 0;
};

Instance make_instance(Index m, Index n, std::uint64_t seed) {
  const auto t0 = Clock::now();
  Instance I;
  I.m = m;
  I.n = n;
  I.K = 20 * n;
  I.copies = static_cast<Index>(std::llround(0.02 * static_cast<double>(m)));
  const Index random_rows = m - I.K - I.copies;
  if (random_rows < 0)
    throw std::runtime_error("m = " + std::to_string(m) + " is below K + copies = " +
                             std::to_string(I.K + I.copies) + " for n = " + std::to_string(n));
  Rng rng(splitmix64(splitmix64(seed) ^ (static_cast<std::uint64_t>(m) << 20) ^
                     static_cast<std::uint64_t>(n)));

  Matrix F(I.K, n);
  for (Index i = 0; i < I.K; ++i) F.row(i) = rng.unit(n).transpose();
  Matrix A(m, n);
  Vector b(m);
  std::vector<int> cls(static_cast<size_t>(m));
  Index r = 0;
  for (Index i = 0; i < I.K; ++i, ++r) {
    A.row(r) = F.row(i);
    b(r) = 1.0;
    cls[static_cast<size_t>(r)] = static_cast<int>(i);
  }
  for (Index q = 0; q < I.copies; ++q, ++r) {
    const Index f = static_cast<Index>(rng.below(static_cast<std::uint64_t>(I.K)));
    const double s = rng.uniform(0.5, 3.0);
    A.row(r) = s * F.row(f);
    b(r) = s * 1.0;
    cls[static_cast<size_t>(r)] = static_cast<int>(f);
  }
  // Support function of the K-facet polytope by GLPK through corral's LP layer (one
  // incremental problem; only the objective changes between LPs).
  auto lp = corral::lp::make_solver(F, Vector::Ones(I.K), Vector(), "glpk");
  for (Index q = 0; q < random_rows; ++q, ++r) {
    const Vector d = rng.unit(n);
    lp->set_objective(d);
    const corral::lp::Result res = lp->solve();
    if (res.status != corral::lp::Status::optimal)
      throw std::runtime_error(std::string("support-function LP is ") +
                               corral::lp::to_string(res.status) +
                               " (the K-facet polytope should be bounded)");
    const double delta = rng.uniform(0.0005, 0.3);
    A.row(r) = d.transpose();
    b(r) = (1.0 + delta) * res.value;
    cls[static_cast<size_t>(r)] = -1;
  }
  // Fisher-Yates shuffle.
  std::vector<Index> perm(static_cast<size_t>(m));
  for (Index i = 0; i < m; ++i) perm[static_cast<size_t>(i)] = i;
  for (Index i = m - 1; i > 0; --i)
    std::swap(perm[static_cast<size_t>(i)], perm[rng.below(static_cast<std::uint64_t>(i) + 1)]);
  I.A.resize(m, n);
  I.b.resize(m);
  I.cls.resize(static_cast<size_t>(m));
  for (Index i = 0; i < m; ++i) {
    const Index p = perm[static_cast<size_t>(i)];
    I.A.row(i) = A.row(p);
    I.b(i) = b(p);
    I.cls[static_cast<size_t>(i)] = cls[static_cast<size_t>(p)];
  }
  I.gen_seconds = seconds_since(t0);
  return I;
}

// ---------------------------------------------------------------------------------------------
// Outcome of one method on one instance. Plain data: a forked child writes it into a pipe.
enum RunStatus : int { kDone = 0, kError = 1, kCapped = 2, kSkipped = 3, kCrashed = 4 };

struct Outcome {
  int status = kDone;
  double seconds = 0;
  long kept = 0;        // rows the method kept (its irredundant count)
  long wrong_kept = 0;  // kept rows that are redundant (not a facet nor a copy of one)
  long missing = 0;     // facets none of whose rows was kept
  long extra = 0;       // extra rows kept for a facet already represented
  long lp_solves = -1;  // corral and corral-glpk only
  double mean_lp_rows = -1;
  long fallbacks = -1;      // Info::fallbacks of one run (the largest over the timed runs)
  long fallbacks_all = -1;  // Info::fallbacks summed over the timed runs
  long equalities = 0;      // cdd-canon: rows it declared implicit equalities (none expected)
  long lp_failures = 0;     // glpk-loop: LPs that did not end optimal (their row is kept)
  double estimate = 0;      // kSkipped: estimated seconds, 0 if none
  int runs = 0;             // timed runs behind `seconds` (their median)
  char backend[32] = {0};   // corral runs: the LP backend used
  char message[240] = {0};

  bool agrees(Index K) const {
    return status == kDone && kept == K && wrong_kept == 0 && missing == 0 && extra == 0;
  }
};

void set_message(Outcome& o, const std::string& s) {
  std::snprintf(o.message, sizeof o.message, "%s", s.c_str());
}

// Fills the counts of o from keep[i] (row i kept).
void judge(const Instance& I, const std::vector<char>& keep, Outcome& o) {
  std::vector<int> per_facet(static_cast<size_t>(I.K), 0);
  o.kept = o.wrong_kept = o.missing = o.extra = 0;
  for (Index i = 0; i < I.m; ++i) {
    if (!keep[static_cast<size_t>(i)]) continue;
    ++o.kept;
    const int c = I.cls[static_cast<size_t>(i)];
    if (c < 0) ++o.wrong_kept;
    else ++per_facet[static_cast<size_t>(c)];
  }
  for (int k : per_facet) {
    if (k == 0) ++o.missing;
    if (k > 1) o.extra += k - 1;
  }
}

std::vector<char> keep_all_but(Index m, const std::vector<Index>& removed) {
  std::vector<char> keep(static_cast<size_t>(m), 1);
  for (Index i : removed) keep[static_cast<size_t>(i)] = 0;
  return keep;
}

// ---------------------------------------------------------------------------------------------
// Methods.
// backend empty: the process default (corral::lp::default_backend()).
Outcome run_corral(const Instance& I, const std::string& backend) {
  Outcome o;
  corral::Options opt;
  opt.backend = backend;
  std::snprintf(o.backend, sizeof o.backend, "%s",
                (backend.empty() ? corral::lp::default_backend() : backend).c_str());
  const auto t0 = Clock::now();
  const corral::Polytope P(I.A, I.b);
  const corral::RedundancyResult r = corral::remove_redundancy(P, opt, false);
  o.seconds = seconds_since(t0);
  std::vector<char> keep(static_cast<size_t>(I.m), 0);
  for (Index k : r.kept) keep[static_cast<size_t>(P.source_rows()[static_cast<size_t>(k)])] = 1;
  judge(I, keep, o);
  o.lp_solves = r.info.lp_solves;
  o.mean_lp_rows = r.info.mean_lp_rows;
  o.fallbacks = o.fallbacks_all = r.info.fallbacks;
  if (r.empty) set_message(o, "corral reported an empty set");
  return o;
}

Outcome run_cdd_canon(const Instance& I) {
  Outcome o;
  const auto t0 = Clock::now();
  const corral::detail::CddCanonical c = corral::detail::cdd_canonicalize(I.A, I.b, false);
  o.seconds = seconds_since(t0);
  judge(I, keep_all_but(I.m, c.redundant), o);
  o.equalities = static_cast<long>(c.equalities.size());
  return o;
}

Outcome run_cdd_shoot(const Instance& I) {
  Outcome o;
  const auto t0 = Clock::now();
  const std::vector<Index> red = corral::detail::cdd_redundant_rows_via_shooting(I.A, I.b);
  o.seconds = seconds_since(t0);
  judge(I, keep_all_but(I.m, red), o);
  return o;
}

// One LP per row against GLPK's C API: one problem object reused, presolve and messages off.
// For row i: objective a_i, row i's bound relaxed to b_i + 1 (keeps the LP bounded), primal
// simplex from the previous basis; row i is redundant iff the optimum is <= b_i + 1e-9.
// restore_all = false (method glpk-loop): the bound is put back only for rows found
// irredundant, so a row found redundant stays relaxed and cannot make a later row (e.g. a
// scaled copy of the same facet) look redundant. restore_all = true (glpk-loop-restore): the
// bound is always put back; then every copy of a duplicated facet is declared redundant.
// Either way only the objective and one bound change per LP.
Outcome run_glpk_loop(const Instance& I, bool restore_all) {
  Outcome o;
  const auto t0 = Clock::now();
  const int m = static_cast<int>(I.m), n = static_cast<int>(I.n);
  glp_term_out(GLP_OFF);
  glp_prob* lp = glp_create_prob();
  glp_set_obj_dir(lp, GLP_MAX);
  glp_add_rows(lp, m);
  glp_add_cols(lp, n);
  for (int j = 1; j <= n; ++j) glp_set_col_bnds(lp, j, GLP_FR, 0.0, 0.0);
  std::vector<int> ia(1), ja(1);
  std::vector<double> ar(1);
  for (int i = 0; i < m; ++i) {
    glp_set_row_bnds(lp, i + 1, GLP_UP, 0.0, I.b(i));
    for (int j = 0; j < n; ++j)
      if (I.A(i, j) != 0.0) {
        ia.push_back(i + 1);
        ja.push_back(j + 1);
        ar.push_back(I.A(i, j));
      }
  }
  glp_load_matrix(lp, static_cast<int>(ia.size()) - 1, ia.data(), ja.data(), ar.data());
  glp_smcp parm;
  glp_init_smcp(&parm);
  parm.msg_lev = GLP_MSG_OFF;
  parm.presolve = GLP_OFF;
  std::vector<char> keep(static_cast<size_t>(m), 1);
  for (int i = 0; i < m; ++i) {
    for (int j = 0; j < n; ++j) glp_set_obj_coef(lp, j + 1, I.A(i, j));
    glp_set_row_bnds(lp, i + 1, GLP_UP, 0.0, I.b(i) + 1.0);
    int ret = glp_simplex(lp, &parm);
    if (ret == GLP_EBADB || ret == GLP_ESING || ret == GLP_ECOND) {
      glp_std_basis(lp);
      ret = glp_simplex(lp, &parm);
    }
    bool redundant = false;
    if (ret == 0 && glp_get_status(lp) == GLP_OPT) {
      redundant = glp_get_obj_val(lp) <= I.b(i) + 1e-9;
    } else {
      ++o.lp_failures;  // undecided: kept
    }
    keep[static_cast<size_t>(i)] = redundant ? 0 : 1;
    if (!redundant || restore_all) glp_set_row_bnds(lp, i + 1, GLP_UP, 0.0, I.b(i));
  }
  glp_delete_prob(lp);
  o.seconds = seconds_since(t0);
  judge(I, keep, o);
  return o;
}

struct MethodSpec {
  std::string name;
  std::function<Outcome(const Instance&)> run;
  double exponent;  // assumed growth of the time in m, for skipping runs that would hit the cap
                    // (glpk loops: m LPs of m rows, measured 5^2.1 from m = 1000 to 5000)
};

std::vector<MethodSpec> all_methods() {
  return {
      {"corral", [](const Instance& I) { return run_corral(I, ""); }, 1.0},
      {"corral-glpk", [](const Instance& I) { return run_corral(I, "glpk"); }, 1.0},
      {"cdd-canon", run_cdd_canon, 1.5},  // measured 5^1.4 .. 5^1.6 from m = 1000 to 5000
      {"cdd-shoot", run_cdd_shoot, 1.0},  // LPs over the rows found so far, like corral's
      {"glpk-loop", [](const Instance& I) { return run_glpk_loop(I, false); }, 2.0},
      {"glpk-loop-restore", [](const Instance& I) { return run_glpk_loop(I, true); }, 2.0},
  };
}
const std::vector<std::string> kDefaultMethods = {"corral", "corral-glpk", "cdd-canon", "cdd-shoot",
                                                  "glpk-loop"};

// ---------------------------------------------------------------------------------------------

Outcome guarded(const std::function<Outcome(const Instance&)>& f, const Instance& I) {
  try {
    return f(I);
  } catch (const std::exception& e) {
    Outcome o;
    o.status = kError;
    set_message(o, e.what());
    return o;
  }
}

Outcome run_capped(const std::function<Outcome(const Instance&)>& f, const Instance& I, double cap,
                   bool use_fork) {
  if (!use_fork) return guarded(f, I);
  std::fflush(stdout);
  std::fflush(stderr);
  int fd[2];
  if (::pipe(fd) != 0) throw std::runtime_error("pipe() failed");
  const auto t0 = Clock::now();
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error("fork() failed");
  if (pid == 0) {
    ::close(fd[0]);
    const Outcome o = guarded(f, I);
    write_all(fd[1], &o, sizeof o);
    ::_exit(0);
  }
  ::close(fd[1]);
  Outcome o;
  bool ready = false;
  for (;;) {
    const double left = cap - seconds_since(t0);
    if (left <= 0) break;
    pollfd p{fd[0], POLLIN, 0};
    const int r = ::poll(&p, 1, static_cast<int>(std::ceil(left * 1000.0)));
    if (r < 0 && errno == EINTR) continue;
    if (r > 0) ready = true;
    break;
  }
  if (!ready) {
    ::kill(pid, SIGKILL);
    ::waitpid(pid, nullptr, 0);
    ::close(fd[0]);
    o.status = kCapped;
    o.seconds = cap;
    return o;
  }
  const size_t got = read_all(fd[0], &o, sizeof o);
  ::close(fd[0]);
  int wstatus = 0;
  ::waitpid(pid, &wstatus, 0);
  if (got != sizeof o) {
    o = Outcome();
    o.status = kCrashed;
    if (WIFSIGNALED(wstatus))
      set_message(o, std::string("child killed by signal ") + std::to_string(WTERMSIG(wstatus)) +
                         " (" + strsignal(WTERMSIG(wstatus)) + ")");
    else
      set_message(o, "child exited with status " + std::to_string(WEXITSTATUS(wstatus)) +
                         " without a result");
  }
  return o;
}

// ---------------------------------------------------------------------------------------------
// Output.
struct Case {
  Instance inst;  // matrices dropped after the runs; sizes kept
  std::map<std::string, Outcome> out;
};

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

std::string time_cell(const Outcome& o) {
  switch (o.status) {
    case kDone: return fmt("%.3f", o.seconds);
    case kCapped: return "> cap";
    case kSkipped: return "skipped";
    case kError: return "error";
    default: return "crashed";
  }
}

// Baseline time / corral time; ">x" when the baseline hit the cap (a lower bound).
std::string ratio_cell(const Outcome& base, const Outcome& ref) {
  if (ref.status != kDone || ref.seconds <= 0) return "-";
  if (base.status == kDone) return fmt("%.1f", base.seconds / ref.seconds);
  if (base.status == kCapped) return ">" + fmt("%.1f", base.seconds / ref.seconds);
  return "-";
}

double mean_rows_bound(const Instance& I) { return 1.5 * static_cast<double>(I.K) + I.n; }

const char* status_name(int s) {
  switch (s) {
    case kDone: return "done";
    case kCapped: return "capped";
    case kSkipped: return "skipped";
    case kError: return "error";
    default: return "crashed";
  }
}

struct Config {
  std::vector<Index> ms = {1000, 5000, 20000};
  std::vector<Index> ns = {3, 6, 10};
  std::uint64_t seed = 1;
  double cap = 60.0;
  std::vector<std::string> methods = kDefaultMethods;
  std::string out = std::string(CORRAL_BENCH_RESULTS_DIR) + "/redundancy.json";
  bool use_fork = true;
  bool skip = true;
  int repeats = 3;
  double repeat_below = 2.0;  // only runs faster than this (seconds) are repeated
};

void write_json(const Config& cfg, const std::vector<Case>& cases, double total_seconds) {
  std::filesystem::path p(cfg.out);
  if (p.has_parent_path()) std::filesystem::create_directories(p.parent_path());
  std::ofstream f(p);
  if (!f) throw std::runtime_error("cannot write " + cfg.out);
  f << "{\n  \"benchmark\": \"redundancy\",\n";
  f << "  \"seed\": " << cfg.seed << ",\n";
  f << "  \"cap_seconds\": " << json_num(cfg.cap) << ",\n";
  f << "  \"repeats\": " << cfg.repeats
    << ", \"repeat_below_seconds\": " << json_num(cfg.repeat_below) << ",\n";
  f << "  \"forked\": " << (cfg.use_fork ? "true" : "false") << ",\n";
  f << "  \"corral_version\": \"" << corral::version << "\",\n";
  f << "  \"glpk_version\": \"" << glp_version() << "\",\n";
  f << "  \"default_backend\": \"" << json_escape(corral::lp::default_backend()) << "\",\n";
  f << "  \"reference\": \"corral\", \"reference_backend\": \""
    << json_escape(corral::lp::default_backend()) << "\",\n";
  f << "  \"ratio\": \"baseline seconds / corral seconds (above 1: corral faster)\",\n";
  f << "  \"machine\": {\"cpu\": \"" << json_escape(cpu_model())
    << "\", \"cores\": " << std::thread::hardware_concurrency() << ", \"compiler\": \""
    << json_escape(__VERSION__) << "\"},\n";
  f << "  \"date\": \"" << now_utc() << "\",\n";
  f << "  \"total_seconds\": " << json_num(total_seconds) << ",\n";
  f << "  \"cases\": [\n";
  for (size_t c = 0; c < cases.size(); ++c) {
    const Case& C = cases[c];
    const Instance& I = C.inst;
    f << "    {\"m\": " << I.m << ", \"n\": " << I.n << ", \"K\": " << I.K
      << ", \"copies\": " << I.copies << ", \"generation_seconds\": " << json_num(I.gen_seconds)
      << ",\n     \"mean_lp_rows_bound\": " << json_num(mean_rows_bound(I));
    const auto ref = C.out.find("corral");
    if (ref != C.out.end() && ref->second.status == kDone)
      f << ", \"mean_lp_rows_ok\": "
        << (ref->second.mean_lp_rows <= mean_rows_bound(I) ? "true" : "false");
    f << ",\n     \"methods\": {";
    bool first = true;
    for (const auto& [name, o] : C.out) {
      f << (first ? "\n" : ",\n") << "       \"" << name << "\": {\"status\": \""
        << status_name(o.status) << "\"";
      first = false;
      if (o.status == kDone || o.status == kCapped)
        f << ", \"seconds\": " << json_num(o.seconds)
          << (o.status == kCapped ? ", \"seconds_is_lower_bound\": true" : "")
          << ", \"timed_runs\": " << o.runs;
      if (o.status == kDone) {
        f << ", \"irredundant\": " << o.kept
          << ", \"agrees\": " << (o.agrees(I.K) ? "true" : "false")
          << ", \"wrong_kept\": " << o.wrong_kept << ", \"missing_facets\": " << o.missing
          << ", \"extra_copies\": " << o.extra;
        if (o.lp_solves >= 0)
          f << ", \"backend\": \"" << json_escape(o.backend) << "\", \"lp_solves\": " << o.lp_solves
            << ", \"mean_lp_rows\": " << json_num(o.mean_lp_rows)
            << ", \"fallbacks\": " << o.fallbacks
            << ", \"fallbacks_all_runs\": " << o.fallbacks_all;
        if (name == "cdd-canon") f << ", \"equalities\": " << o.equalities;
        if (name.rfind("glpk-loop", 0) == 0) f << ", \"lp_failures\": " << o.lp_failures;
        if (ref != C.out.end() && ref->second.status == kDone && name != "corral")
          f << ", \"ratio\": " << json_num(o.seconds / ref->second.seconds);
      }
      if (o.status == kCapped && ref != C.out.end() && ref->second.status == kDone)
        f << ", \"ratio_lower_bound\": " << json_num(o.seconds / ref->second.seconds);
      if (o.status == kSkipped && o.estimate > 0)
        f << ", \"estimated_seconds\": " << json_num(o.estimate);
      if (o.message[0]) f << ", \"message\": \"" << json_escape(o.message) << "\"";
      f << "}";
    }
    f << "\n     }}" << (c + 1 < cases.size() ? "," : "") << "\n";
  }
  f << "  ]\n}\n";
}

// Fallback count of a corral run as a table cell.
std::string fallback_cell(const Outcome& o) {
  return o.status == kDone && o.fallbacks >= 0 ? std::to_string(o.fallbacks) : "-";
}

std::string case_name(const Instance& I) {
  return "m=" + std::to_string(I.m) + " n=" + std::to_string(I.n);
}

const Case* find_case(const std::vector<Case>& cases, Index m, Index n) {
  for (const Case& C : cases)
    if (C.inst.m == m && C.inst.n == n) return &C;
  return nullptr;
}

// One target line: corral at least `factor` times faster than `base` at (m, n).
void print_target(const std::vector<Case>& cases, const std::string& base, double factor, Index m,
                  Index n) {
  const std::string what = ">= " + fmt("%g", factor) + "x " + base + " at m=" + std::to_string(m) +
                           " n=" + std::to_string(n);
  const Case* C = find_case(cases, m, n);
  if (C == nullptr) {
    std::printf("  %s: not measured (this run has no such case)\n", what.c_str());
    return;
  }
  const auto b = C->out.find(base);
  const Outcome& r = C->out.at("corral");
  if (b == C->out.end()) {
    std::printf("  %s: not measured (%s not in --methods)\n", what.c_str(), base.c_str());
    return;
  }
  if (r.status != kDone) {
    std::printf("  %s: not measured (corral %s)\n", what.c_str(), status_name(r.status));
    return;
  }
  const Outcome& o = b->second;
  std::string verdict;
  if (o.status == kDone) verdict = o.seconds / r.seconds >= factor ? "met" : "MISSED";
  else if (o.status == kCapped)
    verdict = o.seconds / r.seconds >= factor ? "met (" + base + " hit the cap)"
                                              : "undecided (" + base + " hit the cap; raise --cap)";
  else if (o.status == kSkipped)
    verdict = "undecided (" + base + " skipped; raise --cap or use --no-skip)";
  else verdict = std::string("not measured (") + base + " " + status_name(o.status) + ")";
  std::printf("  %s: ratio %s -> %s\n", what.c_str(), ratio_cell(o, r).c_str(), verdict.c_str());
}

void print_table(const Config& cfg, const std::vector<Case>& cases) {
  auto has = [&](const std::string& m) {
    return std::find(cfg.methods.begin(), cfg.methods.end(), m) != cfg.methods.end();
  };
  std::vector<std::string> base;
  for (const char* b : {"corral-glpk", "cdd-canon", "cdd-shoot", "glpk-loop", "glpk-loop-restore"})
    if (has(b)) base.push_back(b);
  std::printf(
      "\nredundancy removal, seed %llu, cap %.0f s; corral on LP backend %s (the default), "
      "corral-glpk on glpk;\ntimes in seconds; ratio = baseline / corral (above 1: corral "
      "faster); fb = Info::fallbacks per run (target 0)\n",
      static_cast<unsigned long long>(cfg.seed), cfg.cap, corral::lp::default_backend().c_str());
  std::string head = "      m   n    K |   corral   LPs  meanrows  <=1.5K+n  fb";
  for (const auto& b : base) {
    char buf[96];
    std::snprintf(buf, sizeof buf, " | %17s  ratio", b.c_str());
    head += buf;
    if (b == "corral-glpk") head += "  fb";
  }
  head += " | agree";
  std::printf("%s\n%s\n", head.c_str(), std::string(head.size(), '-').c_str());
  std::vector<std::string> notes;
  for (const Case& C : cases) {
    const Instance& I = C.inst;
    const Outcome& r = C.out.at("corral");
    std::printf("%7ld %3ld %4ld | %8s", static_cast<long>(I.m), static_cast<long>(I.n),
                static_cast<long>(I.K), time_cell(r).c_str());
    if (r.status == kDone)
      std::printf(" %5ld  %8.1f  %-8s", r.lp_solves, r.mean_lp_rows,
                  r.mean_lp_rows <= mean_rows_bound(I) ? "yes" : "NO");
    else std::printf(" %5s  %8s  %-8s", "-", "-", "-");
    std::printf("  %2s", fallback_cell(r).c_str());
    std::string agree;
    for (const auto& [name, o] : C.out) {
      if (o.status == kDone && !o.agrees(I.K)) {
        agree += (agree.empty() ? "" : ",") + name;
        char buf[256];
        std::snprintf(buf, sizeof buf,
                      "m=%ld n=%ld %s: %ld rows kept, K=%ld (redundant kept %ld, facets "
                      "missing %ld, extra copies %ld)",
                      static_cast<long>(I.m), static_cast<long>(I.n), name.c_str(), o.kept,
                      static_cast<long>(I.K), o.wrong_kept, o.missing, o.extra);
        notes.push_back(buf);
      }
      if (o.status == kError || o.status == kCrashed)
        notes.push_back(case_name(I) + " " + name + ": " + status_name(o.status) + ": " +
                        o.message);
      else if (o.message[0] && o.status != kSkipped)
        notes.push_back(case_name(I) + " " + name + ": " + o.message);
      if (o.lp_failures > 0)
        notes.push_back(case_name(I) + " " + name + ": " + std::to_string(o.lp_failures) +
                        " LPs not optimal (rows kept)");
      if (o.status == kDone && o.fallbacks_all > 0)
        notes.push_back(case_name(I) + " " + name + " (backend " + o.backend +
                        "): " + std::to_string(o.fallbacks_all) + " fallbacks in " +
                        std::to_string(o.runs) + " runs");
    }
    for (const auto& b : base) {
      const auto it = C.out.find(b);
      if (it == C.out.end()) {
        std::printf(" | %17s  %5s", "-", "-");
        if (b == "corral-glpk") std::printf("  %2s", "-");
        continue;
      }
      std::printf(" | %17s  %5s", time_cell(it->second).c_str(), ratio_cell(it->second, r).c_str());
      if (b == "corral-glpk") std::printf("  %2s", fallback_cell(it->second).c_str());
    }
    std::printf(" | %s\n", agree.empty() ? "all" : ("MISMATCH: " + agree).c_str());
  }
  for (const Case& C : cases)
    for (const auto& [name, o] : C.out)
      if (o.status == kSkipped)
        notes.push_back(case_name(C.inst) + " " + name + " skipped: " + o.message);
  if (!notes.empty()) {
    std::printf("\nnotes:\n");
    for (const auto& s : notes) std::printf("  %s\n", s.c_str());
  }
  // Fallbacks over every timed corral run (corral and corral-glpk).
  long fb = 0, fb_runs = 0;
  for (const Case& C : cases)
    for (const auto& [name, o] : C.out)
      if (o.status == kDone && o.fallbacks_all >= 0) {
        fb += o.fallbacks_all;
        fb_runs += o.runs;
      }
  std::printf("\nfallbacks: %ld in %ld runs (target 0)\n", fb, fb_runs);
  // Targets (reported, never asserted).
  std::printf("\ntargets:\n");
  print_target(cases, "cdd-canon", 200, 5000, 6);
  print_target(cases, "cdd-shoot", 10, 5000, 6);
  long ok = 0, total = 0;
  for (const Case& C : cases) {
    const Outcome& r = C.out.at("corral");
    if (r.status != kDone) continue;
    ++total;
    ok += r.mean_lp_rows <= mean_rows_bound(C.inst) ? 1 : 0;
  }
  std::printf("  corral mean LP rows <= 1.5 K + n: %ld of %ld cases\n", ok, total);
  if (const Case* C = find_case(cases, 20000, 10)) {
    const Outcome& r = C->out.at("corral");
    std::string line = "  report: corral at m=20000 n=10: " + time_cell(r) +
                       (r.status == kDone ? " s" : "") + " (backend " + r.backend + ")";
    for (const MethodSpec& s : all_methods()) {
      const auto it = C->out.find(s.name);
      if (s.name == "corral" || it == C->out.end()) continue;
      const Outcome& o = it->second;
      if (o.status == kDone || o.status == kCapped)
        line += "; " + s.name + " " + time_cell(o) + (o.status == kDone ? " s" : "") + ", ratio " +
                ratio_cell(o, r);
    }
    std::printf("%s\n", line.c_str());
  }
}

std::vector<Index> parse_list(const std::string& s) {
  std::vector<Index> v;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ',')) {
    if (item.empty()) continue;
    std::string t;
    for (char c : item)
      if (c != '_') t += c;
    v.push_back(static_cast<Index>(std::stoll(t)));
    if (v.back() < 1) throw std::runtime_error("sizes must be positive: " + item);
  }
  return v;
}

void usage() {
  std::printf(
      "bench_redundancy: corral's redundancy removal (default LP backend) against itself on GLPK,\n"
      "cddlib and a one-LP-per-row GLPK loop\n\n"
      "  --m LIST        rows, comma separated (default 1000,5000,20000)\n"
      "  --n LIST        dimensions (default 3,6,10)\n"
      "  --seed S        instance seed (default 1)\n"
      "  --cap SECONDS   time cap per run; a run past it is killed (default 60)\n"
      "  --methods LIST  any of corral,corral-glpk,cdd-canon,cdd-shoot,glpk-loop,\n"
      "                  glpk-loop-restore (default corral,corral-glpk,cdd-canon,cdd-shoot,\n"
      "                  glpk-loop; corral, on the default backend, is always run)\n"
      "  --repeats R     runs of each method and case faster than --repeat-below; the median\n"
      "                  time is reported (default 3)\n"
      "  --repeat-below SECONDS  (default 2)\n"
      "  --no-skip       also run a method whose estimated time is past the cap\n"
      "  --no-fork       run in this process (no cap; for profilers)\n"
      "  --out FILE      JSON output (default benchmarks/results/redundancy.json)\n");
}

Config parse_args(int argc, char** argv) {
  Config c;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto value = [&]() -> std::string {
      if (i + 1 >= argc) throw std::runtime_error(a + " needs a value");
      return argv[++i];
    };
    if (a == "--m") c.ms = parse_list(value());
    else if (a == "--n") c.ns = parse_list(value());
    else if (a == "--seed") c.seed = std::stoull(value());
    else if (a == "--cap") c.cap = std::stod(value());
    else if (a == "--repeats") c.repeats = std::max(1, std::stoi(value()));
    else if (a == "--repeat-below") c.repeat_below = std::stod(value());
    else if (a == "--out") c.out = value();
    else if (a == "--no-skip") c.skip = false;
    else if (a == "--no-fork") c.use_fork = false;
    else if (a == "--methods") {
      c.methods = {"corral"};
      std::stringstream ss(value());
      std::string item;
      const auto known = all_methods();
      while (std::getline(ss, item, ',')) {
        if (item.empty() || item == "corral") continue;
        if (std::none_of(known.begin(), known.end(),
                         [&](const MethodSpec& s) { return s.name == item; }))
          throw std::runtime_error("unknown method '" + item + "'");
        c.methods.push_back(item);
      }
    } else if (a == "-h" || a == "--help") {
      usage();
      std::exit(0);
    } else {
      throw std::runtime_error("unknown argument '" + a + "' (see --help)");
    }
  }
  if (!(c.cap > 0)) throw std::runtime_error("--cap must be positive");
  std::sort(c.ms.begin(), c.ms.end());
  return c;
}

}  // namespace

int main(int argc, char** argv) {
  Config cfg;
  try {
    cfg = parse_args(argc, argv);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_redundancy: %s\n", e.what());
    return 2;
  }
  const auto t_all = Clock::now();
  std::printf(
      "bench_redundancy: corral %s (default LP backend %s), GLPK %s, seed %llu, cap %.0f s, %s\n",
      corral::version, corral::lp::default_backend().c_str(), glp_version(),
      static_cast<unsigned long long>(cfg.seed), cfg.cap,
      cfg.use_fork ? "each run in a child process" : "in process (no cap)");
  std::fflush(stdout);
  const std::vector<MethodSpec> specs = all_methods();
  struct Last {
    Index m;
    double seconds;
    bool capped;
  };
  std::map<std::pair<std::string, Index>, Last> last;  // (method, n) -> previous size
  std::vector<Case> cases;
  try {
    for (Index n : cfg.ns)
      for (Index m : cfg.ms) {
        Case C;
        C.inst = make_instance(m, n, cfg.seed);
        const Instance& I = C.inst;
        std::fprintf(stderr, "m=%ld n=%ld K=%ld: instance in %.2f s\n", static_cast<long>(m),
                     static_cast<long>(n), static_cast<long>(I.K), I.gen_seconds);
        for (const MethodSpec& s : specs) {
          if (std::find(cfg.methods.begin(), cfg.methods.end(), s.name) == cfg.methods.end())
            continue;
          Outcome o;
          const auto it = last.find({s.name, n});
          if (cfg.skip && s.name != "corral" && it != last.end()) {
            const Last& L = it->second;
            const double est =
                L.seconds * std::pow(static_cast<double>(m) / static_cast<double>(L.m), s.exponent);
            if (L.capped) {
              o.status = kSkipped;
              set_message(o, "hit the cap at m=" + std::to_string(L.m));
            } else if (est > cfg.cap) {
              o.status = kSkipped;
              o.estimate = est;
              set_message(o, "estimated " + fmt("%.0f", est) + " s > cap (" +
                                 fmt("%.3f", L.seconds) + " s at m=" + std::to_string(L.m) +
                                 ", time ~ m^" + fmt("%g", s.exponent) + "; --no-skip runs it)");
            }
          }
          if (o.status != kSkipped) {
            std::vector<double> times;
            long fb_max = -1, fb_sum = 0;
            for (int rep = 0; rep < cfg.repeats; ++rep) {
              o = run_capped(s.run, I, cfg.cap, cfg.use_fork);
              if (o.status != kDone) break;
              times.push_back(o.seconds);
              if (o.fallbacks >= 0) {
                fb_max = std::max(fb_max, o.fallbacks);
                fb_sum += o.fallbacks;
              }
              if (o.seconds >= cfg.repeat_below) break;  // slow runs: once is enough
            }
            o.runs = static_cast<int>(times.size());
            if (o.status == kDone) o.seconds = median(times);
            if (o.status == kDone && o.fallbacks >= 0) {
              o.fallbacks = fb_max;
              o.fallbacks_all = fb_sum;
            }
            if (o.status == kDone || o.status == kCapped)
              last[{s.name, n}] = Last{m, o.seconds, o.status == kCapped};
          }
          std::fprintf(stderr, "  %-17s %s%s%s%s\n", s.name.c_str(), time_cell(o).c_str(),
                       o.runs > 1 ? (" (median of " + std::to_string(o.runs) + ")").c_str() : "",
                       o.status == kDone && o.fallbacks >= 0
                           ? ("  [" + std::string(o.backend) + ", " +
                              std::to_string(o.fallbacks_all) + " fallbacks]")
                                 .c_str()
                           : "",
                       o.status == kDone && !o.agrees(I.K) ? "  (count mismatch)" : "");
          C.out[s.name] = o;
        }
        C.inst.A.resize(0, 0);
        C.inst.b.resize(0);
        C.inst.cls.clear();
        C.inst.cls.shrink_to_fit();
        cases.push_back(std::move(C));
      }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_redundancy: %s\n", e.what());
    return 1;
  }
  print_table(cfg, cases);
  const double total = seconds_since(t_all);
  try {
    write_json(cfg, cases, total);
    std::printf("\nwrote %s (%.0f s in all)\n", cfg.out.c_str(), total);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "bench_redundancy: %s\n", e.what());
    return 1;
  }
  return 0;
}
