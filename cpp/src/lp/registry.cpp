// Backend registry and process defaults. Adding a backend: one adapter file with a factory,
// declared in solver_base.hpp, and one entry in kBackends below.

#include <mutex>

#include "solver_base.hpp"

namespace corral::lp {
namespace {

struct BackendEntry {
  const char* name;
  std::unique_ptr<Solver> (*make)(const Matrix&, const Vector&, const Vector&);
  Capabilities (*capabilities)();
};

const BackendEntry kBackends[] = {
    {"dense", detail::make_dense_solver, detail::dense_capabilities},
    {"glpk", detail::make_glpk_solver, detail::glpk_capabilities},
    {"cdd",
     [](const Matrix& A, const Vector& b, const Vector& c) {
       return detail::make_cdd_solver(A, b, c, false);
     },
     [] { return detail::cdd_capabilities(false); }},
    {"cdd-exact",
     [](const Matrix& A, const Vector& b, const Vector& c) {
       return detail::make_cdd_solver(A, b, c, true);
     },
     [] { return detail::cdd_capabilities(true); }},
};

std::mutex& defaults_mutex() {
  static std::mutex m;
  return m;
}
std::string& default_name() {
  static std::string name = "dense";
  return name;
}

const BackendEntry& find_backend(std::string_view name) {
  for (const auto& e : kBackends)
    if (name == e.name) return e;
  std::string known;
  for (const auto& e : kBackends) known += (known.empty() ? "" : ", ") + std::string(e.name);
  corral::detail::invalid("backend",
                          "unknown name '" + std::string(name) + "'; this build has: " + known);
}

}  // namespace

const char* to_string(Status status) {
  switch (status) {
    case Status::optimal: return "optimal";
    case Status::infeasible: return "infeasible";
    case Status::unbounded: return "unbounded";
    case Status::stopped: return "stopped";
    case Status::numerical: return "numerical";
  }
  return "numerical";
}

std::vector<std::string> backends() {
  std::vector<std::string> names;
  for (const auto& e : kBackends) names.emplace_back(e.name);
  return names;
}

Capabilities capabilities(std::string_view backend) { return find_backend(backend).capabilities(); }

std::string default_backend() {
  std::lock_guard<std::mutex> lock(defaults_mutex());
  return default_name();
}

void set_default_backend(std::string_view backend) {
  find_backend(backend);
  std::lock_guard<std::mutex> lock(defaults_mutex());
  default_name() = std::string(backend);
}

std::unique_ptr<Solver> make_solver(const Matrix& A, const Vector& b, const Vector& c,
                                    std::string_view backend) {
  const std::string name = backend.empty() ? default_backend() : std::string(backend);
  return find_backend(name).make(A, b, c);
}

Result maximize(const Vector& c, const Matrix& A, const Vector& b, std::string_view backend,
                const SolveOptions& options) {
  if (c.size() != A.cols())
    corral::detail::invalid("c", "has length " + std::to_string(c.size()) + ", expected " +
                                     std::to_string(A.cols()) + " (one entry per column of A)");
  return make_solver(A, b, c, backend)->solve(options);
}

}  // namespace corral::lp
