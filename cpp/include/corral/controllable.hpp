#pragma once
/// \file controllable.hpp
/// Pre-sets and N-step controllable sets of x+ = A x + B u.
///
/// Pre(C) = {x : A x + B u in C for some u in U with (x, u) in `mixed`}, computed as the
/// projection onto x of the set in (x, u) (projection.hpp; Bertsekas 1972; Borrelli, Bemporad
/// & Morari 2017, ch. 10). The N-step controllable set to a target T under X:
/// K_0 = T, K_{i+1} = X ∩ Pre(K_i): the states that some admissible inputs bring into T in N
/// steps with every state before that in X. One projection (m eliminated variables) per step,
/// with X's rows in the lifted set so that facets X cuts away never appear (on an 8-state
/// plant this halved the rows to remove).

#include <corral/admissible.hpp>
#include <corral/polytope.hpp>
#include <corral/projection.hpp>

#include <chrono>
#include <string>
#include <vector>

namespace corral {

namespace detail {

/// S ∩ Pre(C), S a set in x (no rows: Pre(C) itself): S's rows join the lifted set before
/// the projection, which then never produces the facets of Pre(C) that S cuts away.
inline Polytope pre_set_within(const Matrix& A, const Matrix& B, const Polytope& C,
                               const Polytope& U, const Polytope& mixed, const Polytope& S,
                               const Options& opt, Info* info) {
  const Index n = A.rows(), m = B.cols();
  const Index rows = S.num_rows() + C.num_rows() + U.num_rows() + mixed.num_rows();
  Matrix G = Matrix::Zero(rows, n + m);
  Vector g(rows);
  Index at = 0;
  G.block(at, 0, S.num_rows(), n) = S.A();
  g.segment(at, S.num_rows()) = S.b();
  at += S.num_rows();
  G.block(at, 0, C.num_rows(), n) = C.A() * A;
  G.block(at, n, C.num_rows(), m) = C.A() * B;
  g.segment(at, C.num_rows()) = C.b();
  at += C.num_rows();
  G.block(at, n, U.num_rows(), m) = U.A();
  g.segment(at, U.num_rows()) = U.b();
  at += U.num_rows();
  G.middleRows(at, mixed.num_rows()) = mixed.A();
  g.segment(at, mixed.num_rows()) = mixed.b();
  std::vector<Index> dims(static_cast<size_t>(n));
  for (Index i = 0; i < n; ++i) dims[static_cast<size_t>(i)] = i;
  return project(Polytope(G, g), dims, "auto", opt, info);
}

}  // namespace detail

/// Pre(C) under U and the mixed constraints on (x, u) (`mixed`: dimension n + m; a set with
/// no rows means none). Irredundant. With `info`: LPs, time and the projection method.
inline Polytope pre_set(const Matrix& A, const Matrix& B, const Polytope& C, const Polytope& U,
                        const Polytope& mixed, const Options& opt = {}, Info* info = nullptr) {
  const Index m = detail::require_system(A, B);
  const Index n = A.rows();
  detail::require_set_dim(C, n, "C", "the state");
  detail::require_set_dim(U, m, "U", "the input");
  detail::require_set_dim(mixed, n + m, "mixed", "(x, u)");
  return detail::pre_set_within(A, B, C, U, mixed, Polytope(n), opt, info);
}

/// Result of controllable_set().
struct ControllableResult {
  Polytope set;                ///< K_N, irredundant
  std::vector<Polytope> sets;  ///< K_0 (the target within X), K_1, ..., K_N
  int steps = 0;               ///< N
  long lp_solves = 0;          ///< LPs of the projections and intersections
  long fallbacks = 0;          ///< LP answers re-solved by another backend
  double seconds = 0.0;        ///< wall-clock time
};

/// The N-step controllable set to `target` under X, U and `mixed` (see the file comment).
/// `steps` >= 0 (0 gives the target within X). An empty K_i makes every later one empty.
inline ControllableResult controllable_set(const Matrix& A, const Matrix& B, const Polytope& X,
                                           const Polytope& U, const Polytope& target, int steps,
                                           const Polytope& mixed, const Options& opt = {}) {
  const auto t0 = std::chrono::steady_clock::now();
  const Index m = detail::require_system(A, B);
  const Index n = A.rows();
  detail::require_set_dim(X, n, "X", "the state");
  detail::require_set_dim(U, m, "U", "the input");
  detail::require_set_dim(target, n, "target", "the state");
  detail::require_set_dim(mixed, n + m, "mixed", "(x, u)");
  if (steps < 0) detail::invalid("steps", "must be >= 0, got " + std::to_string(steps));
  ControllableResult out;
  Info info;
  RedundancyResult k0 = remove_redundancy(target.intersect(X), opt);
  info.add(k0.info);
  out.sets.push_back(k0.set);
  for (int i = 0; i < steps; ++i) {
    detail::report_progress(opt.progress, "controllable set", i, steps, info.lp_solves);
    const Polytope& prev = out.sets.back();
    if (prev.is_trivially_empty()) {
      out.sets.push_back(Polytope::empty(n));
      continue;
    }
    Info pi;
    out.sets.push_back(detail::pre_set_within(A, B, prev, U, mixed, X, opt, &pi));
    info.add(pi);
  }
  out.set = out.sets.back();
  out.steps = steps;
  out.lp_solves = info.lp_solves;
  out.fallbacks = info.fallbacks;
  out.seconds = detail::seconds_since(t0);
  return out;
}

}  // namespace corral
