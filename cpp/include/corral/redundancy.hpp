#pragma once
/// \file redundancy.hpp
/// Redundancy removal: the output-sensitive LP method with ray shooting of Clarkson (1994,
/// "More output-sensitive geometric algorithms", FOCS), after cheap filters.
///
/// Steps, for P = {x : A x <= b} with normalised rows:
/// 1. duplicates: rows with the same normal (within tol) keep the one with the smallest b;
/// 2. an interior point x0 (Chebyshev LP); a set of lower dimension first gets its implicit
///    equalities (Polytope::affine_hull) and is reduced to coordinates of its affine hull;
/// 3. bounding-box test (dimension d <= 4 only): a row with h_box(a_i) < b_i is redundant
///    (2d LPs over all rows);
/// 4. ray shooting from x0 in random directions: the first row a ray meets, when it meets one
///    row alone, is a facet;
/// 5. Clarkson's loop, rows taken grouped by their nearest known facet: for each undecided
///    row k, max a_k·x over the facets found so far, solved by row generation on a working set
///    of the 2d + 2 facets nearest to a_k (violated facets join until the optimum satisfies
///    them all); value <= b_k: redundant; else shoot from x0 towards the optimiser, and the
///    first row met is a new facet (repeat for k).
/// Rows met by a ray together with others (ties) are added too and checked by one LP each at
/// the end. Tolerance: absolute tol * scale(), scale() = max |b_i|.
///
/// exact = true instead runs cddlib in GMP rationals (implicit equalities, then one LP per
/// row) on the stored rows.

#include <corral/detail/cdd.hpp>
#include <corral/polytope.hpp>

#include <chrono>
#include <numeric>
#include <random>

namespace corral {

/// Outcome of remove_redundancy().
struct RedundancyResult {
  Polytope set;                      ///< the irredundant set (rows in the original order)
  std::vector<Index> kept;           ///< stored rows of the input that were kept
  std::vector<Index> redundant;      ///< stored rows of the input that were removed
  std::vector<Index> equality_rows;  ///< stored rows that hold with equality on the whole set
  bool empty = false;                ///< the set is empty (then `set` is the canonical empty set)
  Info info;
};

namespace detail {

class RedundancyRemover {
 public:
  RedundancyRemover(const Matrix& G, const Vector& h, double abs_tol, const Options& opt,
                    Info& info)
      : G_(G), h_(h), tol_(abs_tol), opt_(opt), info_(info), rng_(0x5eed5eedULL) {}

  // Rows of {z : G z <= h} (unit norm, h > 0 so that z = 0 is interior) that are facets.
  std::vector<Index> run() {
    const Index m = G_.rows(), d = G_.cols();
    state_.assign(static_cast<size_t>(m), kUndecided);
    if (m == 0) return {};
    // The box test removes rows mostly in low dimension; from d = 5 on it costs 2d LPs over
    // all rows and, on the sets measured, removes almost nothing.
    if (d <= 4) bounding_box_filter();
    ray_shooting();
    clarkson();
    final_check();
    std::vector<Index> facets;
    for (Index i = 0; i < m; ++i)
      if (state_[static_cast<size_t>(i)] == kFacet || state_[static_cast<size_t>(i)] == kTied)
        facets.push_back(i);
    return facets;
  }

 private:
  enum State : char { kUndecided, kFacet, kTied, kRedundant };

  void report(long done, long total) {
    detail::report_progress(opt_.progress, "redundancy", done, total, info_.lp_solves);
  }

  void bounding_box_filter() {
    const Index m = G_.rows(), d = G_.cols();
    auto solver = lp::make_solver(G_, h_, Vector(), opt_.backend);
    lo_ = Vector::Constant(d, -std::numeric_limits<double>::infinity());
    hi_ = Vector::Constant(d, std::numeric_limits<double>::infinity());
    for (Index j = 0; j < 2 * d; ++j) {
      Vector c = Vector::Zero(d);
      c(j % d) = j < d ? 1.0 : -1.0;
      solver->set_objective(c);
      const lp::Result r = solve_or_throw(*solver, "the bounding-box filter");
      info_.count_lp(static_cast<long>(m), r.fallbacks);
      if (r.status == lp::Status::optimal)
        (j < d ? hi_(j) : lo_(j - d)) = j < d ? r.value : -r.value;
    }
    for (Index i = 0; i < m; ++i) {
      double hb = 0.0;
      for (Index j = 0; j < d; ++j) {
        const double g = G_(i, j);
        hb += g > 0 ? g * hi_(j) : (g < 0 ? g * lo_(j) : 0.0);
      }
      if (hb < h_(i) - tol_) state_[static_cast<size_t>(i)] = kRedundant;
    }
    // (The box must not enter the LPs below: it is derived from every row, row k included,
    // so it would make row k look implied by the others.) A row strictly inside the box is
    // never tight on P and hence redundant.
  }

  // First row met by the ray t ↦ t·dir (t > 0) among rows not known redundant.
  // Returns -1 if none; sets `tied` when another row is met within tolerance.
  Index shoot(const Vector& dir, std::vector<Index>* tied) {
    Vector& gd = gd_;
    gd.noalias() = G_ * dir;
    const double dn = dir.norm();
    // One pass: the smallest ratio h_i / gd_i (h_i > 0, gd_i > 0), and the rows met within tol
    // of the running minimum (a superset of the final ties, filtered below).
    double best = std::numeric_limits<double>::infinity();
    Index arg = -1;
    const double* g = gd.data();
    const double* h = h_.data();
    near_hits_.clear();
    for (Index i = 0; i < G_.rows(); ++i) {
      const double gi = g[i];
      if (!(gi > 0)) continue;
      // h_i > best gd_i + slack: not the minimum and not tied with it (cheap test first).
      const double slack = tol_ * std::max(1.0, best * dn);
      if (h[i] > best * gi + slack || state_[static_cast<size_t>(i)] == kRedundant) continue;
      if (h[i] < best * gi) {
        best = h[i] / gi;
        arg = i;
      }
      near_hits_.push_back(i);
    }
    if (tied) {
      tied->clear();
      if (arg >= 0)
        for (Index i : near_hits_) {
          if (i == arg) continue;
          // Row i is met within tol of the hit point: distance from it to the hyperplane of i.
          if ((h[i] - best * g[i]) <= tol_ * std::max(1.0, best * dn)) tied->push_back(i);
        }
    }
    return arg;
  }

  void mark_hit(Index j, const std::vector<Index>& tied) {
    if (tied.empty()) {
      state_[static_cast<size_t>(j)] = kFacet;
      return;
    }
    // Met together with others: every row of the tie might be a facet; check them at the end.
    std::vector<Index> all = tied;
    all.push_back(j);
    for (Index i : all)
      if (state_[static_cast<size_t>(i)] == kUndecided) state_[static_cast<size_t>(i)] = kTied;
  }

  void ray_shooting() {
    const Index d = G_.cols();
    std::normal_distribution<double> normal;
    std::vector<Index> tied;
    long misses = 0, rays = 0;
    const long max_misses = std::max<long>(2 * d, 10);
    const long max_rays = 20 * d + 200;
    while (misses < max_misses && rays < max_rays) {
      Vector dir(d);
      for (Index j = 0; j < d; ++j) dir(j) = normal(rng_);
      ++rays;
      const Index j = shoot(dir, &tied);
      if (j < 0 || !tied.empty() || state_[static_cast<size_t>(j)] == kFacet) {
        ++misses;
        continue;
      }
      misses = 0;
      state_[static_cast<size_t>(j)] = kFacet;
    }
  }

  // LP rows: facets and tied rows found so far.
  void rebuild_solver() {
    std::vector<Index> rows;
    for (Index i = 0; i < G_.rows(); ++i)
      if (state_[static_cast<size_t>(i)] == kFacet || state_[static_cast<size_t>(i)] == kTied)
        rows.push_back(i);
    Matrix A(static_cast<Index>(rows.size()), G_.cols());
    Vector b(A.rows());
    for (size_t k = 0; k < rows.size(); ++k) {
      A.row(static_cast<Index>(k)) = G_.row(rows[k]);
      b(static_cast<Index>(k)) = h_(rows[k]);
    }
    solver_ = lp::make_solver(A, b, Vector(), opt_.backend);
    in_lp_.assign(static_cast<size_t>(G_.rows()), 0);
    for (Index i : rows) in_lp_[static_cast<size_t>(i)] = 1;
    known_ = rows;
    Gk_.resize(static_cast<Index>(rows.size()), G_.cols());
    hk_.resize(Gk_.rows());
    for (size_t q = 0; q < rows.size(); ++q) {
      Gk_.row(static_cast<Index>(q)) = G_.row(rows[q]);
      hk_(static_cast<Index>(q)) = h_(rows[q]);
    }
    ws_.reset();
  }

  // Adds row i to the LP unless it is there already; returns whether it was added.
  bool include(Index i) {
    if (in_lp_[static_cast<size_t>(i)]) return false;
    in_lp_[static_cast<size_t>(i)] = 1;
    known_.push_back(i);
    Gk_.conservativeResize(Gk_.rows() + 1, Eigen::NoChange);
    hk_.conservativeResize(hk_.rows() + 1);
    Gk_.row(Gk_.rows() - 1) = G_.row(i);
    hk_(hk_.rows() - 1) = h_(i);
    solver_->add_rows(G_.row(i), Vector::Constant(1, h_(i)));
    return true;
  }

  // A point with a_k·z > h_k that satisfies the rows in the LP, for an LP that is unbounded.
  Vector capped_point(Index k) {
    Matrix A(solver_->num_rows() + 1, G_.cols());
    Vector b(A.rows());
    Index r = 0;
    for (Index i = 0; i < G_.rows(); ++i)
      if (state_[static_cast<size_t>(i)] == kFacet || state_[static_cast<size_t>(i)] == kTied) {
        A.row(r) = G_.row(i);
        b(r++) = h_(i);
      }
    A.row(r) = G_.row(k);
    b(r++) = h_(k) + std::max(h_(k), 1.0);
    A.conservativeResize(r, Eigen::NoChange);
    b.conservativeResize(r);
    auto s = lp::make_solver(A, b, G_.row(k).transpose(), opt_.backend);
    const lp::Result res = solve_or_throw(*s, "redundancy removal");
    info_.count_lp(static_cast<long>(r), res.fallbacks);
    if (res.status != lp::Status::optimal)
      throw SolverError("redundancy removal: capped LP is " +
                        std::string(lp::to_string(res.status)));
    return res.x;
  }

  void clarkson() {
    const Index m = G_.rows(), d = G_.cols();
    rebuild_solver();
    const std::vector<Index> order = clarkson_order();
    std::normal_distribution<double> normal;
    std::vector<Index> tied;
    long done = 0;
    for (Index k : order) {
      ++done;
      if ((done & 63) == 0) report(done, static_cast<long>(m));
      while (state_[static_cast<size_t>(k)] == kUndecided) {
        lp::SolveOptions so;
        so.threshold = h_(k) + tol_;
        const lp::Result r = solve_over_known(k, so);
        if (r.status == lp::Status::infeasible)
          throw SolverError("redundancy removal: the facets found so far are infeasible");
        if (!r.exceeds(h_(k) + tol_)) {
          state_[static_cast<size_t>(k)] = kRedundant;
          break;
        }
        const Vector target = r.status == lp::Status::unbounded ? capped_point(k) : r.x;
        // Shoot from the interior point towards the target; the first row met is a facet not
        // yet found (the target satisfies every row found so far).
        Vector dir = target;
        Index j = shoot(dir, &tied);
        int attempts = 0;
        while (j >= 0 && !tied.empty() && attempts < 8) {
          ++attempts;
          Vector pert(d);
          for (Index q = 0; q < d; ++q) pert(q) = normal(rng_);
          dir = target + 1e-3 * std::pow(2.0, -attempts) * target.norm() * pert.normalized();
          j = shoot(dir, &tied);
        }
        if (j < 0) {  // cannot happen for an interior origin; decide k by itself
          state_[static_cast<size_t>(k)] = kTied;
          include(k);
          break;
        }
        mark_hit(j, tied);
        bool added = include(j);
        for (Index i : tied)
          if (state_[static_cast<size_t>(i)] == kTied) added = include(i) || added;
        if (!added) {
          // The ray met only rows already in the LP (rounding at the target): keep k itself
          // and let the final check decide it.
          state_[static_cast<size_t>(k)] = kTied;
          include(k);
        }
      }
    }
    report(static_cast<long>(m), static_cast<long>(m));
  }

  // max g_k·z over the rows in the LP, by row generation on a small working set: it starts with
  // 2d + 2 rows nearest in direction. An optimum of the working set that satisfies
  // every row of the LP is optimal for all of them (a relaxation's optimum that is feasible);
  // otherwise the most violated rows join and the working set is solved again (warm). A
  // working-set maximum <= h_k already proves row k redundant: fewer rows only raise it.
  // Any subset of the LP's rows is a valid working set, so one is built per group of rows with
  // the same nearest facet f (clarkson_order), from the rows nearest to f, and kept for the
  // whole group: the group's LPs are then warm re-solves from the previous vertex, and rows
  // added for one row serve the next ones (up to 4 (2d + 2) rows, then it is rebuilt).
  lp::Result solve_over_known(Index k, const lp::SolveOptions& so) {
    const Index d = G_.cols();
    const std::vector<Index>& known = known_;
    const Index start = 2 * d + 2;
    if (static_cast<Index>(known.size()) > 2 * start) {
      const Index g =
          group_.empty() || group_[static_cast<size_t>(k)] < 0 ? k : group_[static_cast<size_t>(k)];
      if (ws_ != nullptr && g == ws_group_ && ws_->num_rows() <= 4 * start) {
        ws_->set_objective(G_.row(k).transpose());
      } else {
        ws_group_ = g;
        dots_.noalias() = Gk_ * G_.row(g).transpose();
        near_.clear();
        for (size_t q = 0; q < known.size(); ++q)
          near_.emplace_back(-dots_(static_cast<Index>(q)), known[q]);
        std::nth_element(near_.begin(), near_.begin() + (start - 1), near_.end());
        Matrix S(start, d);
        Vector hs(start);
        in_ws_.resize(static_cast<size_t>(G_.rows()), 0);
        for (Index i : ws_rows_) in_ws_[static_cast<size_t>(i)] = 0;
        ws_rows_.clear();
        for (Index q = 0; q < start; ++q) {
          const Index i = near_[static_cast<size_t>(q)].second;
          S.row(q) = G_.row(i);
          hs(q) = h_(i);
          in_ws_[static_cast<size_t>(i)] = 1;
          ws_rows_.push_back(i);
        }
        ws_ = lp::make_solver(S, hs, G_.row(k).transpose(), opt_.backend);
      }
      for (int round = 0; round < 8; ++round) {
        const lp::Result r = solve_or_throw(*ws_, "redundancy removal", so);
        info_.count_lp(static_cast<long>(ws_->num_rows()), r.fallbacks);
        if (r.status == lp::Status::unbounded || r.status == lp::Status::infeasible) break;
        if (!r.exceeds(*so.threshold)) return r;
        violated_.clear();
        dots_.noalias() = Gk_ * r.x;
        for (size_t q = 0; q < known.size(); ++q) {
          const Index i = known[q];
          const double v = dots_(static_cast<Index>(q)) - hk_(static_cast<Index>(q));
          if (v > tol_ && !in_ws_[static_cast<size_t>(i)]) violated_.emplace_back(-v, i);
        }
        if (violated_.empty()) return r;
        std::sort(violated_.begin(), violated_.end());
        const Index add = std::min<Index>(d, static_cast<Index>(violated_.size()));
        Matrix Ga(add, d);
        Vector ha(add);
        for (Index q = 0; q < add; ++q) {
          const Index i = violated_[static_cast<size_t>(q)].second;
          Ga.row(q) = G_.row(i);
          ha(q) = h_(i);
          in_ws_[static_cast<size_t>(i)] = 1;
          ws_rows_.push_back(i);
        }
        ws_->add_rows(Ga, ha);
      }
      ws_.reset();  // did not settle: start afresh next time
    }
    // Few rows, or the working set did not settle: solve over every row of the LP.
    solver_->set_objective(G_.row(k).transpose());
    const lp::Result r = solve_or_throw(*solver_, "redundancy removal", so);
    info_.count_lp(static_cast<long>(solver_->num_rows()), r.fallbacks);
    return r;
  }

  // Undecided rows grouped under the known facet nearest in direction (largest g_k·g_f), and
  // by that dot product within a group: consecutive LPs then differ little in their objective,
  // so warm-started solvers need few pivots. The order changes no result.
  std::vector<Index> clarkson_order() {
    const Index m = G_.rows();
    std::vector<Index> known, order;
    for (Index i = 0; i < m; ++i)
      if (state_[static_cast<size_t>(i)] == kFacet) known.push_back(i);
    std::vector<std::pair<Index, double>> key(static_cast<size_t>(m), {-1, 0.0});
    Matrix Gf(static_cast<Index>(known.size()), G_.cols());
    for (size_t q = 0; q < known.size(); ++q) Gf.row(static_cast<Index>(q)) = G_.row(known[q]);
    // Matrix products over blocks of rows instead of m K short dot products.
    const Index block = 512;
    Matrix dots;
    for (Index i0 = 0; i0 < m; i0 += block) {
      const Index len = std::min(block, m - i0);
      dots.noalias() = G_.middleRows(i0, len) * Gf.transpose();
      for (Index i = i0; i < i0 + len; ++i) {
        order.push_back(i);
        if (state_[static_cast<size_t>(i)] != kUndecided) continue;
        for (size_t q = 0; q < known.size(); ++q) {
          const double dot = dots(i - i0, static_cast<Index>(q));
          if (key[static_cast<size_t>(i)].first < 0 || dot > key[static_cast<size_t>(i)].second)
            key[static_cast<size_t>(i)] = {known[q], dot};
        }
      }
    }
    group_.assign(static_cast<size_t>(m), -1);
    for (Index i = 0; i < m; ++i)
      group_[static_cast<size_t>(i)] = key[static_cast<size_t>(i)].first;
    std::stable_sort(order.begin(), order.end(), [&](Index a, Index b) {
      const auto& ka = key[static_cast<size_t>(a)];
      const auto& kb = key[static_cast<size_t>(b)];
      if (ka.first != kb.first) return ka.first < kb.first;
      return ka.second > kb.second;
    });
    return order;
  }

  // Rows added from ties are checked one by one against all other kept rows.
  void final_check() {
    for (Index k = 0; k < G_.rows(); ++k) {
      if (state_[static_cast<size_t>(k)] != kTied) continue;
      std::vector<Index> rows;
      for (Index i = 0; i < G_.rows(); ++i)
        if (i != k &&
            (state_[static_cast<size_t>(i)] == kFacet || state_[static_cast<size_t>(i)] == kTied))
          rows.push_back(i);
      Matrix A(static_cast<Index>(rows.size()) + 1, G_.cols());
      Vector b(A.rows());
      for (size_t q = 0; q < rows.size(); ++q) {
        A.row(static_cast<Index>(q)) = G_.row(rows[q]);
        b(static_cast<Index>(q)) = h_(rows[q]);
      }
      // Cap row a_k z <= h_k + 1 keeps the LP bounded.
      A.row(A.rows() - 1) = G_.row(k);
      b(A.rows() - 1) = h_(k) + std::max(h_(k), 1.0);
      auto s = lp::make_solver(A, b, G_.row(k).transpose(), opt_.backend);
      lp::SolveOptions so;
      so.threshold = h_(k) + tol_;
      const lp::Result r = solve_or_throw(*s, "redundancy removal", so);
      info_.count_lp(static_cast<long>(A.rows()), r.fallbacks);
      state_[static_cast<size_t>(k)] = r.exceeds(h_(k) + tol_) ? kFacet : kRedundant;
    }
  }

  const Matrix& G_;
  const Vector& h_;
  double tol_;
  const Options& opt_;
  Info& info_;
  std::mt19937_64 rng_;
  std::vector<State> state_;
  Vector lo_, hi_;
  std::unique_ptr<lp::Solver> solver_;
  std::vector<char> in_lp_;   // rows of G in the LP
  std::vector<Index> known_;  // the same rows, as a list
  Matrix Gk_;                 // the same rows of G, contiguous (in the order of known_)
  Vector hk_, dots_, gd_;
  std::vector<Index> near_hits_;    // work space of shoot()
  std::unique_ptr<lp::Solver> ws_;  // working set of solve_over_known, kept between rows
  std::vector<char> in_ws_;         // rows of G in ws_
  std::vector<Index> ws_rows_;      // the same rows, as a list
  std::vector<Index> group_;        // nearest known facet of each row (clarkson_order)
  Index ws_group_ = -2;             // the group ws_ was built for
  std::vector<std::pair<double, Index>> near_, violated_;
};

/// Stored rows that duplicate another row (same normal within tol): all but the one with the
/// smallest right-hand side (the first of equals) are returned.
inline std::vector<Index> duplicate_rows(const Matrix& A, const Vector& b, double tol) {
  const Index m = A.rows(), n = A.cols();
  std::vector<Index> order(static_cast<size_t>(m));
  std::iota(order.begin(), order.end(), Index(0));
  std::sort(order.begin(), order.end(), [&](Index i, Index j) {
    for (Index q = 0; q < n; ++q)
      if (A(i, q) != A(j, q)) return A(i, q) < A(j, q);
    return b(i) != b(j) ? b(i) < b(j) : i < j;
  });
  std::vector<Index> dup;
  size_t g = 0;
  while (g < order.size()) {
    size_t e = g + 1;
    while (e < order.size() && (A.row(order[e]) - A.row(order[g])).cwiseAbs().maxCoeff() <= tol)
      ++e;
    Index keep = order[g];
    for (size_t q = g + 1; q < e; ++q) {
      const Index i = order[q];
      if (b(i) < b(keep) || (b(i) == b(keep) && i < keep)) keep = i;
    }
    for (size_t q = g; q < e; ++q)
      if (order[q] != keep) dup.push_back(order[q]);
    g = e;
  }
  std::sort(dup.begin(), dup.end());
  return dup;
}

}  // namespace detail

/// Removes redundant rows of P (see the file comment for the method). The result keeps the
/// stored rows that are needed, in their order, with their source rows.
inline RedundancyResult remove_redundancy(const Polytope& P, const Options& opt = {},
                                          bool exact = false) {
  const auto t0 = std::chrono::steady_clock::now();
  RedundancyResult out{P, {}, {}, {}, false, {}};
  const Index m = P.num_rows(), n = P.dim();
  const double tol = opt.tolerance();
  const double abs_tol = tol * P.scale();
  auto finish = [&](std::vector<bool> keep) {
    std::vector<Index> src;
    Matrix A(m, n);
    Vector b(m);
    Index k = 0;
    out.kept.clear();
    out.redundant.clear();
    for (Index i = 0; i < m; ++i) {
      if (keep[static_cast<size_t>(i)]) {
        A.row(k) = P.A().row(i);
        b(k++) = P.b()(i);
        src.push_back(P.source_rows()[static_cast<size_t>(i)]);
        out.kept.push_back(i);
      } else {
        out.redundant.push_back(i);
      }
    }
    out.set = Polytope::from_normalized(A.topRows(k), b.head(k), src, P.caller_row_count());
    out.info.seconds = detail::seconds_since(t0);
  };
  if (P.is_trivially_empty() || m == 0) {
    out.empty = P.is_trivially_empty();
    finish(std::vector<bool>(static_cast<size_t>(m), true));
    return out;
  }
  std::vector<bool> keep(static_cast<size_t>(m), true);
  for (Index i : detail::duplicate_rows(P.A(), P.b(), tol)) keep[static_cast<size_t>(i)] = false;
  std::vector<Index> live;
  for (Index i = 0; i < m; ++i)
    if (keep[static_cast<size_t>(i)]) live.push_back(i);
  Matrix A(static_cast<Index>(live.size()), n);
  Vector b(A.rows());
  for (size_t k = 0; k < live.size(); ++k) {
    A.row(static_cast<Index>(k)) = P.A().row(live[k]);
    b(static_cast<Index>(k)) = P.b()(live[k]);
  }

  if (exact) {
    out.info.method = "cdd-exact";
    const detail::CddCanonical c = detail::cdd_redundancy(A, b, true);
    // cddlib solves one LP per row for the implicit equalities and one per other row.
    for (Index i = 0; i < 2 * A.rows() - static_cast<Index>(c.equalities.size()); ++i)
      out.info.count_lp(static_cast<long>(A.rows()));
    for (Index i : c.redundant) keep[static_cast<size_t>(live[static_cast<size_t>(i)])] = false;
    for (Index i : c.equalities) out.equality_rows.push_back(live[static_cast<size_t>(i)]);
    // An empty set: cddlib's LPs find every row redundant or none; decide by one LP.
    if (Polytope::from_normalized(A, b, std::vector<Index>(live.size(), -1)).is_empty(opt)) {
      out.empty = true;
      out.set = Polytope::empty(n);
      out.redundant.clear();
      for (Index i = 0; i < m; ++i) out.redundant.push_back(i);
      return out;
    }
    finish(keep);
    return out;
  }

  out.info.method = "clarkson";
  const Polytope Q = Polytope::from_normalized(A, b, std::vector<Index>(live.size(), -1));
  // Interior point and implicit equalities.
  auto cheb = detail::chebyshev_solver(A, b, P.scale(), opt.backend);
  const lp::Result cr = detail::solve_or_throw(*cheb, "redundancy removal (interior point)");
  out.info.count_lp(static_cast<long>(A.rows()) + 1, cr.fallbacks);
  if (cr.status != lp::Status::optimal)
    throw SolverError("redundancy removal: interior-point LP is " +
                      std::string(lp::to_string(cr.status)));
  const double radius = cr.x(n);
  if (radius < -abs_tol) {
    out.empty = true;
    out.set = Polytope::empty(n);
    out.kept.clear();
    out.redundant.clear();
    for (Index i = 0; i < m; ++i) out.redundant.push_back(i);
    out.info.seconds = detail::seconds_since(t0);
    return out;
  }
  Vector x0 = cr.x.head(n);
  Matrix N = Matrix::Identity(n, n);  // coordinates of the affine hull: x = x0 + N z
  std::vector<bool> is_eq(live.size(), false);
  if (radius <= abs_tol) {
    const AffineHull hull = Q.affine_hull(opt);
    out.info.count_lp(static_cast<long>(A.rows()) + 1);
    for (Index i : hull.rows) {
      is_eq[static_cast<size_t>(i)] = true;
      out.equality_rows.push_back(live[static_cast<size_t>(i)]);
    }
    // Relative interior point: Chebyshev centre inside the hull, in coordinates z.
    Eigen::JacobiSVD<Eigen::MatrixXd> svd(Eigen::MatrixXd(hull.E), Eigen::ComputeFullV);
    const Index k = hull.E.rows();
    N = svd.matrixV().rightCols(n - k);
    x0 = x0 - hull.E.transpose() * (hull.E * x0 - hull.e);  // onto the hull
  }
  // Rows not in E, in coordinates z around x0: (a_i N) z <= b_i - a_i x0.
  std::vector<Index> rest;
  for (size_t k = 0; k < live.size(); ++k)
    if (!is_eq[k]) rest.push_back(static_cast<Index>(k));
  const Index d = N.cols();
  if (d == 0) {  // a single point: only the equalities are needed
    for (Index i : rest) keep[static_cast<size_t>(live[static_cast<size_t>(i)])] = false;
    finish(keep);
    return out;
  }
  Matrix G(static_cast<Index>(rest.size()), d);
  Vector h(G.rows());
  std::vector<Index> grow;  // rows of G -> index into rest
  Index g = 0;
  for (size_t q = 0; q < rest.size(); ++q) {
    const Index i = rest[q];
    const Vector gi = (A.row(i) * N).transpose();
    const double s = gi.norm();
    if (s <= std::sqrt(tol)) {  // parallel to the hull and not an equality: redundant
      keep[static_cast<size_t>(live[static_cast<size_t>(i)])] = false;
      continue;
    }
    G.row(g) = gi.transpose() / s;
    h(g) = (b(i) - A.row(i).dot(x0)) / s;
    grow.push_back(static_cast<Index>(q));
    ++g;
  }
  G.conservativeResize(g, Eigen::NoChange);
  h.conservativeResize(g);
  if (d < n) {
    // Rows that become parallel inside the hull differ only by rounding after the projection;
    // keep one of each group, as for the caller's rows.
    const std::vector<Index> dup = detail::duplicate_rows(G, h, tol);
    if (!dup.empty()) {
      std::vector<bool> drop(static_cast<size_t>(g), false);
      for (Index q : dup) drop[static_cast<size_t>(q)] = true;
      Index w = 0;
      std::vector<Index> grow2;
      for (Index q = 0; q < g; ++q) {
        if (drop[static_cast<size_t>(q)]) {
          keep[static_cast<size_t>(
              live[static_cast<size_t>(rest[static_cast<size_t>(grow[static_cast<size_t>(q)])])])] =
              false;
          continue;
        }
        G.row(w) = G.row(q);
        h(w) = h(q);
        grow2.push_back(grow[static_cast<size_t>(q)]);
        ++w;
      }
      g = w;
      grow = grow2;
      G.conservativeResize(g, Eigen::NoChange);
      h.conservativeResize(g);
    }
  }
  if (d < n) {  // re-centre inside the hull
    auto c2 = detail::chebyshev_solver(G, h, P.scale(), opt.backend);
    const lp::Result r2 = detail::solve_or_throw(*c2, "redundancy removal (relative interior)");
    out.info.count_lp(static_cast<long>(G.rows()) + 1, r2.fallbacks);
    if (r2.status != lp::Status::optimal || !(r2.x(d) > abs_tol))
      throw SolverError("redundancy removal: no relative interior point found");
    h -= G * r2.x.head(d);
  }
  detail::RedundancyRemover remover(G, h, abs_tol, opt, out.info);
  const std::vector<Index> facets = remover.run();
  std::vector<bool> is_facet(static_cast<size_t>(g), false);
  for (Index f : facets) is_facet[static_cast<size_t>(f)] = true;
  for (Index q = 0; q < g; ++q)
    if (!is_facet[static_cast<size_t>(q)])
      keep[static_cast<size_t>(
          live[static_cast<size_t>(rest[static_cast<size_t>(grow[static_cast<size_t>(q)])])])] =
          false;
  finish(keep);
  return out;
}

inline Polytope Polytope::irredundant(const Options& opt, bool exact, Info* info) const {
  RedundancyResult r = remove_redundancy(*this, opt, exact);
  if (info) *info = r.info;
  return r.set;
}

inline std::vector<Index> Polytope::redundant_rows(const Options& opt, bool exact,
                                                   Info* info) const {
  RedundancyResult r = remove_redundancy(*this, opt, exact);
  if (info) *info = r.info;
  // Every caller row not kept is redundant, including zero rows dropped on construction.
  std::vector<bool> kept(static_cast<size_t>(caller_row_count()), false);
  for (Index s : r.set.source_rows())
    if (s >= 0 && s < caller_row_count()) kept[static_cast<size_t>(s)] = true;
  std::vector<Index> out;
  for (Index i = 0; i < caller_row_count(); ++i)
    if (!kept[static_cast<size_t>(i)]) out.push_back(i);
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace corral
