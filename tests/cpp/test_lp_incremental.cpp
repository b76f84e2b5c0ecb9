// Tests of the incremental LP solver of corral/lp/solver.hpp: random edit sequences on every
// backend, each solve compared with a cold solve of the accumulated data.
//
// A sequence makes a Solver on a random tall LP (m from 5 to 300 rows, n from 1 to 12
// columns), then runs rounds of 1-3 edits (set_objective, add_rows, set_rhs(i, v),
// set_rhs(b)) and one solve, with or without an early-stop threshold. Every answer is checked
// three ways:
// - by check_answer() at 1e-9: primal feasibility, value = c·x, duals, and the ray or Farkas
//   certificate when the answer carries one (and it must when the backend's capabilities say
//   so);
// - against the reference, a cold lp::maximize(c, A, b, "glpk") of the same data: the same
//   status and the same optimal value to relative 1e-7. GLPK is the reference only where it is
//   right: its answer must pass check_answer() and the known facts below, and a GLPK answer
//   that does not is reported as a failure naming GLPK (and not used);
// - against what the construction knows without any solver: a point known to lie in the set
//   (then the LP is not infeasible), and in the degenerate family the optimal value c·v when
//   c = Σ w_i a_i (w >= 0) over rows tight at the feasible point v (weak duality:
//   c·x = Σ w_i a_i·x <= Σ w_i b_i = c·v for every feasible x).
// The sequences are generated once per test case, with their GLPK references, and replayed on
// every backend; an exact backend replays only the small ones. A failure names the family, the
// seed and the step: Generator(family, seed, small).make() rebuilds that one sequence.
//
// Families (one test case each):
// - interior:   x = 0 strictly inside; random rows, sometimes a box;
// - offset:     a point x0 far from 0 inside, 0 outside (phase 1 is needed);
// - degenerate: integer data, many rows through one integer vertex v (exact in double);
// - duplicates: exact duplicate rows, positive multiples, parallel looser rows, opposite rows;
// - scaled:     every row multiplied by a factor from 1e-6 to 1e6 (the same set);
// - lineality:  integer A = B P with P of rank r < n (repeated, negated, zero and summed
//               columns): a lineality space of dimension n - r; zero rows too.
// Edits cut off the current optimum, pass rows through it, bound the objective, make the set
// empty (by a row a·x <= min a·x - margin, the minimum from GLPK), tighten, loosen, restore and
// translate (b + A t) right-hand sides.

#include <doctest/doctest.h>

#include "test_helpers.hpp"

#include <corral/lp/check.hpp>
#include <corral/lp/solver.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <exception>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <vector>

namespace {

using corral::Index;
using corral::Matrix;
using corral::Vector;
using corral::test::Rng;
using corral::test::rows;
using corral::test::vec;
using corral::test::vstack;
namespace lp = corral::lp;

enum class Family { interior, offset, degenerate, duplicates, scaled, lineality };

const char* family_name(Family f) {
  switch (f) {
    case Family::interior: return "interior";
    case Family::offset: return "offset";
    case Family::degenerate: return "degenerate";
    case Family::duplicates: return "duplicates";
    case Family::scaled: return "scaled";
    case Family::lineality: return "lineality";
  }
  return "?";
}

// One edit, or a solve with what is known about its answer.
struct Step {
  enum Kind { objective, add_rows, set_rhs_one, set_rhs_all, solve } kind = solve;
  Vector c;          // objective
  Matrix A;          // add_rows
  Vector b;          // add_rows, set_rhs_all
  Index i = -1;      // set_rhs_one
  double value = 0;  // set_rhs_one
  // Solve only:
  std::optional<double> threshold;
  lp::Result ref;                     // cold GLPK solve of the accumulated data
  std::string ref_problem;            // why GLPK's answer is not usable (empty: usable)
  bool known_feasible = false;        // a point of the set is known (by construction)
  std::optional<double> known_value;  // optimal value by weak duality (degenerate family)
};

struct Script {
  Family family = Family::interior;
  std::uint32_t seed = 0;
  bool small = false;
  Matrix A0;
  Vector b0;
  Vector c0;  // may be empty: make_solver's zero objective
  std::vector<Step> steps;
  Index max_rows = 0;
};

// The accumulated data of a sequence, for cold solves and checks.
struct Mirror {
  Matrix A;
  Vector b;
  Vector c;
  void apply(const Step& st) {
    switch (st.kind) {
      case Step::objective: c = st.c; break;
      case Step::add_rows:
        A = vstack(A, st.A);
        b = vstack(b, st.b);
        break;
      case Step::set_rhs_one: b(st.i) = st.value; break;
      case Step::set_rhs_all: b = st.b; break;
      case Step::solve: break;
    }
  }
};

// check_answer()'s tolerances scale with |b_i| + ‖a_i‖ ‖x‖ and have no absolute part, so an
// optimum at x = 0 on rows with b_i = 0 must be met exactly: x = 1e-16 fails. For a failure
// message: does the answer pass on the same LP translated by t (x -> x + t, b -> b + A t),
// |t_j| = max(1, max_i |b_i| / ‖a_i‖), where rounding of that size is within tolerance?
bool passes_translated(const Mirror& p, const lp::Result& r) {
  double s = 1.0;
  for (Index i = 0; i < p.A.rows(); ++i) {
    const double an = p.A.row(i).norm();
    if (an > 0) s = std::max(s, std::abs(p.b(i)) / an);
  }
  const Vector t = Vector::Constant(p.A.cols(), s);
  lp::Result moved = r;
  if (moved.x.size() == t.size()) {
    moved.x += t;
    moved.value += p.c.dot(t);
  }
  return lp::check_answer(p.c, p.A, Vector(p.b + p.A * t), moved, 1e-9).ok;
}

std::string describe(const lp::Result& r) {
  std::ostringstream os;
  os.precision(17);
  os << lp::to_string(r.status);
  if (r.status == lp::Status::optimal || r.status == lp::Status::stopped) os << " " << r.value;
  return os.str();
}

// Builds random sequences of one family and computes their GLPK references.
class Generator {
 public:
  Generator(Family family, std::uint32_t seed, bool small)
      : family_(family), seed_(seed), small_(small), rng_(seed) {}

  Script make() {
    Script s;
    s.family = family_;
    s.seed = seed_;
    s.small = small_;
    setup();
    s.A0 = p_.A;
    s.b0 = p_.b;
    s.c0 = rng_.chance(0.1) ? Vector() : objective();
    p_.c = s.c0.size() > 0 ? s.c0 : Vector::Zero(n_);
    const int rounds = long_    ? 20 + rng_.integer(0, 20)
                       : small_ ? 3 + rng_.integer(0, 5)
                                : 3 + rng_.integer(0, 7);
    for (int k = 0; k < rounds; ++k) {
      // Now and then no edit: a solve of an unchanged problem from a kept basis.
      const int edits = k == 0 || rng_.chance(0.08) ? rng_.integer(0, 1) : rng_.integer(1, 3);
      for (int e = 0; e < edits; ++e) {
        Step st = edit();
        p_.apply(st);
        s.steps.push_back(std::move(st));
      }
      s.steps.push_back(solve());
      s.max_rows = std::max(s.max_rows, p_.A.rows());
    }
    return s;
  }

 private:
  bool exact() const { return family_ == Family::degenerate || family_ == Family::lineality; }
  // Right-hand sides of the exact families lie on a grid (integers, or quarters), so that
  // every sum in the data is exact in double.
  double grid() const { return family_ == Family::degenerate ? 1.0 : 0.25; }
  double down(double v) const { return exact() ? std::floor(v / grid()) * grid() : v; }
  double up(double v) const { return exact() ? std::ceil(v / grid()) * grid() : v; }

  // The normal of a new row, in the family's structure.
  Vector direction(bool keep_recession = true) {
    for (;;) {
      Vector a;
      if (family_ == Family::degenerate) a = rng_.integers(n_, -4, 4);
      else if (family_ == Family::lineality) a = P_.transpose() * rng_.integers(r_, -3, 3);
      else a = rng_.vector(n_, -1.0, 1.0);
      // With a recession direction d, every row keeps a·d <= 0: d stays in the recession
      // cone, and objectives with c·d > 0 are unbounded until a row bounds them.
      if (keep_recession && recession_.size() > 0 && a.dot(recession_) > 0) a = -a;
      if (a.cwiseAbs().maxCoeff() > 0) return a;
    }
  }

  // Right-hand side of an ordinary row: the anchor point is inside with a margin.
  double offset(const Vector& a) {
    const double at = a.dot(anchor_);
    if (exact()) return at + grid() * rng_.integer(1, 8);
    const double lo = family_ == Family::interior || base_interior_ ? 0.2 : 0.05;
    return at + rng_.uniform(lo, 1.5) * a.norm();
  }

  // A positive factor s for which s·a is exact in double (checked with fma; a power of two
  // when no other is), so that s·a x <= s·b is exactly parallel to a x <= b. An inexact
  // multiple would tilt the row by an ulp, and in exact arithmetic the two rows would then meet
  // far away: a bounded LP with a value near 1e17 where GLPK's tolerances see an unbounded one.
  double multiple(const Vector& a) {
    const double s = std::vector<double>{2.0, 0.5, 3.0, 1000.0, 5.0, 0.75, std::ldexp(1.0, -10),
                                         1.25}[static_cast<size_t>(rng_.index(8))];
    for (Index j = 0; j < a.size(); ++j)
      if (std::fma(s, a(j), -(s * a(j))) != 0.0) return std::ldexp(1.0, rng_.integer(-10, 10));
    return s;
  }

  // Row factor of the scaled family: 10^u, u uniform in [-6, 6].
  double factor() {
    return family_ == Family::scaled ? std::pow(10.0, rng_.uniform(-6.0, 6.0)) : 1.0;
  }

  void push_row(Matrix& A, Vector& b, const Vector& a, double bi) {
    A.conservativeResize(A.rows() + 1, n_);
    b.conservativeResize(b.rows() + 1);
    A.row(A.rows() - 1) = a.transpose();
    b(b.rows() - 1) = bi;
  }

  void setup() {
    n_ = small_ ? 1 + rng_.index(6) : 1 + rng_.index(12);
    if (family_ == Family::lineality) n_ = std::max<Index>(n_, 2);
    long_ = rng_.chance(0.08);  // a long sequence (20 to 40 solves) on a small LP
    const Index m0 =
        small_ || long_
            ? 5 + rng_.index(26)
            : static_cast<Index>(std::lround(5.0 * std::pow(60.0, rng_.uniform(0.0, 1.0))));
    base_interior_ = rng_.chance(0.5);
    Matrix& A = p_.A;
    Vector& b = p_.b;
    A.resize(0, n_);
    b.resize(0);
    anchor_ = Vector::Zero(n_);
    switch (family_) {
      case Family::interior: base_interior_ = true; break;
      case Family::offset: base_interior_ = false; break;
      case Family::degenerate: anchor_ = rng_.integers(n_, -3, 3); break;
      case Family::lineality: {
        // P = [I_r, columns built from I_r], columns permuted: A = B P has rank r, and its
        // null space (the lineality space of every set here) has dimension n - r.
        r_ = 1 + rng_.index(n_ - 1);
        Matrix P = Matrix::Zero(r_, n_);
        for (Index j = 0; j < r_; ++j) P(j, j) = 1.0;
        for (Index j = r_; j < n_; ++j) {
          const double u = rng_.uniform(0.0, 1.0);
          const Index k = rng_.index(r_), l = rng_.index(r_);
          if (u < 0.3) P(k, j) = 1.0;         // a repeated column
          else if (u < 0.45) P(k, j) = -1.0;  // a negated column
          else if (u < 0.65) continue;        // a zero column
          else if (u < 0.8) {
            P(k, j) += 1.0;  // a sum of two
            P(l, j) += 1.0;
          } else {
            P.col(j) = rng_.integers(r_, -2, 2);  // any integer combination
          }
        }
        P_ = Matrix(r_, n_);
        std::vector<Index> perm(static_cast<size_t>(n_));
        for (Index j = 0; j < n_; ++j) perm[static_cast<size_t>(j)] = j;
        for (Index j = n_ - 1; j > 0; --j)
          std::swap(perm[static_cast<size_t>(j)], perm[static_cast<size_t>(rng_.index(j + 1))]);
        for (Index j = 0; j < n_; ++j) P_.col(j) = P.col(perm[static_cast<size_t>(j)]);
        anchor_ = rng_.integers(n_, -2, 2);
        break;
      }
      default: break;
    }
    if (!base_interior_ && !exact()) {
      anchor_ = rng_.vector(n_, -4.0, 4.0);
      if (anchor_.norm() < 1.0) anchor_(0) = 2.0;
    }
    const bool degenerate = family_ == Family::degenerate;
    if (family_ != Family::lineality && rng_.chance(degenerate ? 0.6 : 0.25)) {
      // A recession direction d (integer in the exact family); in the offset family with
      // d·x0 >= 0, so that the row that cuts 0 off keeps it too. In the degenerate family it
      // also makes the rows through v a pointed cone with apex v: without it, their normals
      // would span R^n positively and the set near v would be the single point v.
      recession_ = exact() ? rng_.integers(n_, -1, 1) : rng_.vector(n_, -1.0, 1.0);
      if (recession_.cwiseAbs().maxCoeff() == 0) recession_(0) = 1.0;
      if (recession_.dot(anchor_) < 0) recession_ = -recession_;
    }
    // A box bounds every direction; with the degenerate family's cone it makes a polytope
    // with the degenerate vertex v and many others.
    const bool boxed =
        family_ != Family::lineality && (recession_.size() == 0 || degenerate) && rng_.chance(0.45);
    Index tight = 0;
    if (family_ == Family::degenerate) tight = n_ + rng_.index(std::max<Index>(m0 - n_, 0) + 1);
    for (Index i = 0; i < m0; ++i) {
      const Vector a = direction();
      if (i < tight) {
        // A row through v; one in five repeats an earlier row through v exactly.
        if (i > n_ && rng_.chance(0.2)) {
          const Index k = rng_.index(i);
          push_row(A, b, A.row(k).transpose(), b(k));
        } else {
          push_row(A, b, a, a.dot(anchor_));
        }
      } else {
        push_row(A, b, a, offset(a));
      }
    }
    if (family_ == Family::lineality) {
      for (int z = rng_.integer(0, 2); z > 0; --z)  // zero rows 0 <= b_i, b_i >= 0
        push_row(A, b, Vector::Zero(n_), grid() * rng_.integer(0, 3));
    }
    if (!base_interior_ && !exact()) {
      // A row that x0 satisfies and 0 does not: -x0·x/|x0| <= -|x0|/2.
      push_row(A, b, -anchor_ / anchor_.norm(), -0.5 * anchor_.norm());
    }
    if (boxed) {
      for (Index j = 0; j < n_; ++j)
        for (double sgn : {1.0, -1.0}) {
          Vector e = Vector::Zero(n_);
          e(j) = sgn;
          push_row(A, b, e,
                   exact() ? e.dot(anchor_) + rng_.integer(1, 3)
                           : e.dot(anchor_) + rng_.uniform(1.0, 3.0));
        }
    }
    if (family_ == Family::duplicates) {
      // Replace about half the rows by copies of the others.
      const Index keep = std::max<Index>(1, A.rows() / 2);
      for (Index i = keep; i < A.rows(); ++i) {
        const Index k = rng_.index(keep);
        const Vector a = A.row(k).transpose();
        const double u = rng_.uniform(0.0, 1.0);
        if (u < 0.35) {
          A.row(i) = a.transpose(), b(i) = b(k);  // exact duplicate
        } else if (u < 0.65) {
          const double s = multiple(a);
          A.row(i) = s * a.transpose(), b(i) = s * b(k);  // the same half-space
        } else if (u < 0.85) {
          A.row(i) = a.transpose(), b(i) = b(k) + rng_.uniform(0.01, 1.0) * a.norm();  // looser
        } else if (recession_.size() == 0) {
          A.row(i) = -a.transpose(), b(i) = offset(-a);  // the opposite side: a slab
        }
      }
    }
    if (family_ == Family::scaled) {
      for (Index i = 0; i < A.rows(); ++i) {
        const double f = i == 0 ? 1e-6 : i == 1 ? 1e6 : factor();
        A.row(i) *= f;
        b(i) *= f;
      }
    }
    original_b_ = b;
  }

  // A random objective in the family's structure.
  Vector objective() {
    constructed_ = false;
    if (family_ == Family::degenerate) {
      // c = Σ w_i a_i over rows tight at v, w_i in {1, 2, 3}: v is optimal (weak duality).
      std::vector<Index> tight;
      if (((p_.A * anchor_) - p_.b).maxCoeff() <= 0.0)
        for (Index i = 0; i < p_.A.rows(); ++i)
          if (p_.A.row(i).dot(anchor_) == p_.b(i)) tight.push_back(i);
      if (!tight.empty() && rng_.chance(0.6)) {
        known_rows_.clear();
        Vector c = Vector::Zero(n_);
        const int count = rng_.integer(1, static_cast<int>(n_) + 2);
        for (int k = 0; k < count; ++k) {
          const Index i = tight[static_cast<size_t>(rng_.index(static_cast<Index>(tight.size())))];
          c += rng_.integer(1, 3) * p_.A.row(i).transpose();
          known_rows_.push_back(i);
        }
        constructed_ = true;
        return c;
      }
      return rng_.integers(n_, -3, 3);
    }
    if (family_ == Family::lineality) {
      if (rng_.chance(0.05)) return Vector::Zero(n_);
      Vector c = P_.transpose() * rng_.integers(r_, -3, 3);
      if (rng_.chance(0.3)) c += rng_.integers(n_, -1, 1);  // leaves the row space: unbounded
      return c;
    }
    const double u = rng_.uniform(0.0, 1.0);
    if (u < 0.06) return Vector::Zero(n_);
    if (u < 0.18 && p_.A.rows() > 0) {
      // Parallel to a row, exactly (see multiple()): the optimum may be a whole face.
      const Vector a = p_.A.row(rng_.index(p_.A.rows())).transpose();
      int e = 0;
      std::frexp(a.norm(), &e);
      if (a.norm() > 0) return std::ldexp(multiple(a), -e) * a;
    }
    return rng_.vector(n_, -1.0, 1.0);
  }

  // A row a·x <= b with min over the set of a·x > b: the set becomes empty. The minimum comes
  // from GLPK; the margin is large enough that no tolerance decides the verdict.
  bool emptying_row(Vector& a, double& bi) {
    a = direction(false);
    const lp::Result r = lp::maximize(-a, p_.A, p_.b, "glpk");
    if (r.status != lp::Status::optimal) return false;
    const double lo = -r.value;  // min a·x
    bi = down(lo - rng_.uniform(0.05, 1.0) * (a.norm() * (1.0 + r.x.norm()) + std::abs(lo)));
    return true;
  }

  Step edit() {
    Step st;
    const Index m = p_.A.rows();
    double u = rng_.uniform(0.0, 1.0);
    const bool recover = last_infeasible_ && rng_.chance(0.4);  // often a way out: loosen all
    if (recover) u = 0.99;
    if (u < 0.22) {
      st.kind = Step::objective;
      st.c = objective();
    } else if (u < 0.57) {
      st.kind = Step::add_rows;
      const int k = rng_.integer(1, 5);
      st.A.resize(0, n_);
      st.b.resize(0);
      bool emptied = false;
      for (int j = 0; j < k; ++j) {
        Vector a;
        double bi = 0.0;
        // Rows that must stay exactly parallel to a row or to c are scaled by a power of two
        // only: f·a with f = 10^u would tilt them by an ulp (see multiple()).
        bool parallel = false;
        const double v = rng_.uniform(0.0, 1.0);
        if (!emptied && rng_.chance(0.06) && emptying_row(a, bi)) {
          emptied = true;
        } else if (have_xstar_ && v < 0.35) {
          // Cuts off the current optimum x*.
          a = direction();
          bi = down(a.dot(xstar_) - rng_.uniform(0.001, 0.3) * a.norm() * (1.0 + xstar_.norm()));
        } else if (have_xstar_ && v < 0.45) {
          // Through x* (onto the grid below it in the exact families: then a cut).
          a = direction();
          bi = down(a.dot(xstar_));
          if (!exact()) {
            // If P lay in a·x >= a·x*, the row would leave the single point x* and rounding
            // would decide whether the set is empty. Then -a·x <= -a·x* instead: a row that
            // supports P at x* (a degenerate vertex, the same set).
            const lp::Result lo = lp::maximize(-a, p_.A, p_.b, "glpk");
            if (lo.status == lp::Status::optimal &&
                -lo.value > bi - 1e-3 * a.norm() * (1.0 + xstar_.norm())) {
              a = -a;
              bi = -bi;
            }
          }
        } else if (v < 0.55) {
          // A copy of an existing row, or a positive multiple of it (the same half-space).
          const Index i = rng_.index(m);
          a = p_.A.row(i).transpose();
          const double s = rng_.chance(0.5) ? 1.0 : multiple(a);
          a *= s;
          bi = s * p_.b(i);
          parallel = true;
        } else if (v < 0.62 && p_.c.cwiseAbs().maxCoeff() > 0) {
          // Bounds the objective: c·x <= t (below the optimum when there is one).
          a = p_.c;
          bi = have_xstar_ ? down(p_.c.dot(xstar_) - rng_.uniform(0.0, 0.5) * (1 + p_.c.norm()))
                           : down(offset(a));
          parallel = true;
        } else if (family_ == Family::lineality && v < 0.64) {
          // A row outside the row space of A: the lineality space shrinks.
          a = rng_.integers(n_, -2, 2);
          bi = down(offset(a));
        } else if (v < 0.65) {
          // A zero row: 0 <= b_i says nothing, or, one time in five, empties the set.
          a = Vector::Zero(n_);
          bi = rng_.chance(0.1) ? -grid() : grid() * rng_.integer(0, 2);
        } else {
          a = direction();
          bi = offset(a);
        }
        if (a.cwiseAbs().maxCoeff() > 0) {
          double f = factor();
          if (parallel) f = std::ldexp(1.0, std::ilogb(f));
          a *= f;
          bi *= f;
        }
        push_row(st.A, st.b, a, bi);
      }
      original_b_ = vstack(original_b_, st.b);
      for (Index j = 0; j < st.b.size(); ++j)
        if (original_b_(m + j) < 0 && st.A.row(j).cwiseAbs().maxCoeff() == 0)
          original_b_(m + j) = 0.0;  // restoring a zero row makes it harmless
    } else if (u < 0.82) {
      st.kind = Step::set_rhs_one;
      st.i = rng_.index(m);
      const Vector a = p_.A.row(st.i).transpose();
      const double bi = p_.b(st.i), an = a.norm(), v = rng_.uniform(0.0, 1.0);
      if (an == 0) {
        st.value = bi < 0 ? original_b_(st.i) : rng_.chance(0.3) ? -grid() : grid();
      } else if (have_xstar_ && v < 0.3) {
        st.value = down(a.dot(xstar_) - rng_.uniform(0.001, 0.3) * an * (1.0 + xstar_.norm()));
      } else if (v < 0.55) {
        st.value = up(bi + rng_.uniform(0.01, 2.0) * (std::abs(bi) + an));  // loosen
      } else if (v < 0.8) {
        st.value = down(bi - rng_.uniform(0.0, 0.3) * (std::abs(bi) + an));  // tighten
      } else {
        st.value = original_b_(st.i);  // restore
      }
    } else {
      st.kind = Step::set_rhs_all;
      const double v = recover ? 0.6 : rng_.uniform(0.0, 1.0);
      if (v < 0.35) {
        // Translate the set by t: b + A t. The anchor, x* and the originals move along.
        const Vector t = exact() ? rng_.integers(n_, -2, 2) : rng_.vector(n_, -1.0, 1.0);
        st.b = p_.b + p_.A * t;
        anchor_ += t;
        if (have_xstar_) xstar_ += t;
        original_b_ += p_.A * t;
      } else if (v < 0.55) {
        st.b = original_b_;
      } else {
        st.b = p_.b;
        const bool loosen_all = v < 0.75;
        for (Index i = 0; i < m; ++i) {
          const double s = std::abs(st.b(i)) + p_.A.row(i).norm();
          if (loosen_all || rng_.chance(0.5)) st.b(i) = up(st.b(i) + rng_.uniform(0.0, 1.0) * s);
          else st.b(i) = down(st.b(i) - rng_.uniform(0.0, 0.1) * s);
        }
      }
    }
    return st;
  }

  Step solve() {
    Step st;
    st.kind = Step::solve;
    st.ref = lp::maximize(p_.c, p_.A, p_.b, "glpk");
    // What the construction knows.
    const Vector slack = p_.b - p_.A * anchor_;
    bool inside = true;
    for (Index i = 0; i < slack.size(); ++i) {
      const double margin =
          exact() ? 0.0 : 1e-9 * (std::abs(p_.b(i)) + p_.A.row(i).norm() * anchor_.norm());
      if (slack(i) < margin) inside = false;
    }
    st.known_feasible = inside;
    if (constructed_ && inside) {
      bool tight = true;
      for (Index i : known_rows_) tight = tight && slack(i) == 0.0;
      if (tight) st.known_value = p_.c.dot(anchor_);
    }
    // Is GLPK's answer right, as far as can be told?
    const lp::Result& r = st.ref;
    std::ostringstream why;
    why.precision(17);
    if (r.status == lp::Status::numerical || r.status == lp::Status::stopped) {
      why << "GLPK answered " << lp::to_string(r.status);
    } else {
      const lp::CheckReport rep = lp::check_answer(p_.c, p_.A, p_.b, r, 1e-9);
      if (!rep.ok) {
        why << "GLPK's answer fails check_answer: " << rep.failure;
        if (passes_translated(p_, r)) why << " (off by rounding near x = 0 only)";
      } else if (inside && r.status == lp::Status::infeasible)
        why << "GLPK says infeasible, but a point of the set is known";
      else if (st.known_value && (r.status != lp::Status::optimal ||
                                  std::abs(r.value - *st.known_value) >
                                      1e-7 * std::max(1.0, std::abs(*st.known_value))))
        why << "GLPK answered " << describe(r) << ", the optimum by weak duality is "
            << *st.known_value;
    }
    st.ref_problem = why.str();
    // The threshold, placed relative to the optimum.
    if (rng_.chance(0.35)) {
      if (r.status == lp::Status::optimal) {
        const double v = r.value, s = 1.0 + std::abs(v), u = rng_.uniform(0.0, 1.0);
        if (u < 0.05) st.threshold = v;  // not exceeded: c·x > t is strict
        else if (u < 0.3) st.threshold = v - std::pow(10.0, rng_.uniform(-6.0, 0.0)) * s;
        else if (u < 0.55) st.threshold = v + std::pow(10.0, rng_.uniform(-6.0, 0.0)) * s;
        else if (u < 0.8) st.threshold = v - std::pow(10.0, rng_.uniform(0.0, 1.0)) * s;
        else st.threshold = rng_.uniform(-10.0, 10.0);
      } else {
        st.threshold = rng_.chance(0.2) ? 1e6 : rng_.uniform(-10.0, 10.0);
      }
    }
    if (r.status == lp::Status::optimal) {
      xstar_ = r.x;
      have_xstar_ = true;
    }
    last_infeasible_ = r.status == lp::Status::infeasible;
    return st;
  }

  Family family_;
  std::uint32_t seed_;
  bool small_;
  Rng rng_;
  Index n_ = 1;
  Index r_ = 1;
  Matrix P_;       // lineality: rows are wᵀ P
  Vector anchor_;  // a point inside the initial set (0, x0 or v)
  bool base_interior_ = true;
  bool long_ = false;
  bool last_infeasible_ = false;
  Vector recession_;  // empty, or a direction every row keeps in the recession cone
  Mirror p_;
  Vector original_b_;  // right-hand sides as rows were made (moved by translations)
  Vector xstar_;       // the last optimum GLPK found
  bool have_xstar_ = false;
  bool constructed_ = false;       // the objective is Σ w_i a_i over known_rows_
  std::vector<Index> known_rows_;  // rows tight at v when the objective was made
};

std::vector<Script> generate(Family family, std::uint32_t seed, int count, bool small) {
  std::vector<Script> out;
  for (int k = 0; k < count; ++k)
    out.push_back(Generator(family, seed + static_cast<std::uint32_t>(k), small).make());
  return out;
}

struct Tally {
  int sequences = 0;
  int solves = 0;
  int status[5] = {0, 0, 0, 0, 0};
  int fallbacks = 0;
  int failures = 0;
  std::vector<std::string> messages;  // the first few failures
  void fail(const std::string& msg) {
    ++failures;
    if (messages.size() < 8) messages.push_back(msg);
  }
};

// Checks one answer; returns what is wrong, or an empty string.
std::string check_one(const Mirror& p, const Step& st, const lp::Result& r,
                      const std::string& backend, const lp::Capabilities& caps,
                      bool allow_fallbacks, Tally& tally) {
  std::ostringstream why;
  why.precision(17);
  const Index m = p.A.rows(), n = p.A.cols();
  if (r.fallbacks < 0) return "negative fallbacks";
  if (r.fallbacks > 0) {
    ++tally.fallbacks;
    if (!allow_fallbacks) {
      why << r.fallbacks << " fallback(s) (answered by " << r.backend
          << ") on a well-conditioned LP";
      return why.str();
    }
  } else if (r.backend != backend) {
    return "Result::backend is '" + r.backend + "' without a fallback";
  }
  const bool own = r.fallbacks == 0;  // the answer is the tested backend's own
  if (r.status == lp::Status::numerical) return "status numerical";
  if (r.status == lp::Status::stopped) {
    if (!st.threshold) return "stopped without a threshold";
    if (own && !caps.early_stop) return "stopped, but the backend has no early stop";
    if (!(r.value > *st.threshold)) {
      why << "stopped at value " << r.value << ", not above the threshold " << *st.threshold;
      return why.str();
    }
    if (r.has_duals()) return "a stopped answer carries duals";
  }
  if (r.has_ray() && r.ray.size() != n) return "ray has the wrong length";
  if (r.has_farkas() && r.farkas.size() != m) return "Farkas vector has the wrong length";
  if (own) {
    if (r.status == lp::Status::optimal && caps.duals && !r.has_duals()) return "no duals";
    if (r.status == lp::Status::unbounded && caps.ray && !r.has_ray()) return "unbounded, no ray";
    if (r.status == lp::Status::infeasible && caps.farkas && !r.has_farkas())
      return "infeasible, no Farkas certificate";
  }
  const lp::CheckReport rep = lp::check_answer(p.c, p.A, p.b, r, 1e-9);
  if (!rep.ok) {
    return "check_answer: " + rep.failure + " (" + describe(r) + ")" +
           (passes_translated(p, r) ? "; it passes on the LP translated by t (x -> x + t, "
                                      "b -> b + A t): off by rounding near x = 0 only"
                                    : "");
  }
  // What the construction knows (no solver involved).
  if (st.known_feasible && r.status == lp::Status::infeasible)
    return "infeasible, but a point of the set is known";
  if (st.known_value) {
    const double kv = *st.known_value;
    if (r.status == lp::Status::stopped
            ? r.value > kv + 1e-7 * std::max(1.0, std::abs(kv))
            : (r.status != lp::Status::optimal ||
               std::abs(r.value - kv) > 1e-7 * std::max(1.0, std::abs(kv)))) {
      why << describe(r) << ", but the optimum is " << kv << " by weak duality";
      return why.str();
    }
  }
  // The GLPK reference, where it is right.
  if (!st.ref_problem.empty()) return "";
  const lp::Result& g = st.ref;
  const double tol = 1e-7 * std::max(1.0, std::abs(g.value));
  if (r.status == lp::Status::stopped) {
    const double t = *st.threshold;
    const bool ok = g.status == lp::Status::unbounded ||
                    (g.status == lp::Status::optimal && g.value > t - 1e-9 * (1 + std::abs(t)) &&
                     r.value <= g.value + tol);
    if (!ok) {
      why << "stopped at " << r.value << " (threshold " << t << "), GLPK: " << describe(g);
      return why.str();
    }
    return "";
  }
  if (r.status != g.status) {
    why << describe(r) << ", GLPK: " << describe(g);
    if (r.has_ray() || r.has_farkas() || (r.status == lp::Status::optimal && r.has_duals()))
      why << " (this answer carries a certificate that passed check_answer: GLPK may be wrong)";
    return why.str();
  }
  if (r.status == lp::Status::optimal && std::abs(r.value - g.value) > tol) {
    why << "value " << r.value << ", GLPK " << g.value;
    return why.str();
  }
  return "";
}

void replay(const Script& s, int index, const std::string& backend, const lp::Capabilities& caps,
            Tally& tally) {
  ++tally.sequences;
  const bool allow_fallbacks = s.family == Family::scaled;
  std::ostringstream where;
  where << backend << ", family " << family_name(s.family) << ", " << (s.small ? "small " : "")
        << "sequence " << index << " (seed " << s.seed << ", n = " << s.A0.cols()
        << ", m0 = " << s.A0.rows() << ")";
  Mirror p{s.A0, s.b0, s.c0.size() > 0 ? s.c0 : Vector::Zero(s.A0.cols())};
  size_t k = 0;
  try {
    auto solver = lp::make_solver(s.A0, s.b0, s.c0, backend);
    for (; k < s.steps.size(); ++k) {
      const Step& st = s.steps[k];
      switch (st.kind) {
        case Step::objective: solver->set_objective(st.c); break;
        case Step::add_rows: solver->add_rows(st.A, st.b); break;
        case Step::set_rhs_one: solver->set_rhs(st.i, st.value); break;
        case Step::set_rhs_all: solver->set_rhs(st.b); break;
        case Step::solve: break;
      }
      p.apply(st);
      if (solver->num_rows() != p.A.rows() || solver->dim() != p.A.cols()) {
        tally.fail(where.str() + ", step " + std::to_string(k) + ": num_rows/dim disagree");
        return;
      }
      if (st.kind != Step::solve) continue;
      lp::SolveOptions opt;
      opt.threshold = st.threshold;
      const lp::Result r = solver->solve(opt);
      ++tally.solves;
      ++tally.status[static_cast<int>(r.status)];
      const std::string why = check_one(p, st, r, backend, caps, allow_fallbacks, tally);
      if (!why.empty()) {
        std::ostringstream os;
        os.precision(17);
        os << where.str() << ", step " << k << " (m = " << p.A.rows();
        if (st.threshold) os << ", threshold " << *st.threshold;
        os << "): " << why;
        tally.fail(os.str());
        return;  // the rest of this sequence would repeat the same fault
      }
    }
  } catch (const std::exception& e) {
    tally.fail(where.str() + ", step " + std::to_string(k) + ": exception: " + e.what());
  }
}

// Sequence counts per family: `main` sequences of every size for the floating-point backends,
// `small` ones (m0 <= 30, n <= 6, fewer rounds) for every backend, the exact one included.
void run_family(Family family, std::uint32_t seed, int main_count, int small_count) {
  const std::vector<Script> main = generate(family, seed, main_count, false);
  const std::vector<Script> small = generate(family, seed + 100000u, small_count, true);
  // The reference first: every GLPK answer that could not be used is a failure naming GLPK.
  int ref_status[5] = {0, 0, 0, 0, 0}, ref_problems = 0;
  for (const auto* list : {&main, &small})
    for (size_t s = 0; s < list->size(); ++s)
      for (size_t k = 0; k < (*list)[s].steps.size(); ++k) {
        const Step& st = (*list)[s].steps[k];
        if (st.kind != Step::solve) continue;
        ++ref_status[static_cast<int>(st.ref.status)];
        if (st.ref_problem.empty()) continue;
        if (++ref_problems <= 8)
          FAIL_CHECK("GLPK reference, family ", std::string(family_name(family)), ", seed ",
                     (*list)[s].seed, ", step ", k, ": ", st.ref_problem);
      }
  CHECK_MESSAGE(ref_problems == 0, ref_problems, " GLPK reference answers were unusable");
  // The family must produce every outcome, or it tests less than it claims.
  CHECK(ref_status[static_cast<int>(lp::Status::optimal)] > 0);
  CHECK(ref_status[static_cast<int>(lp::Status::infeasible)] > 0);
  CHECK(ref_status[static_cast<int>(lp::Status::unbounded)] > 0);
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    const lp::Capabilities caps = lp::capabilities(backend);
    Tally tally;
    if (!caps.exact)
      for (size_t s = 0; s < main.size(); ++s)
        replay(main[s], static_cast<int>(s), backend, caps, tally);
    for (size_t s = 0; s < small.size(); ++s)
      replay(small[s], static_cast<int>(s), backend, caps, tally);
    for (const auto& msg : tally.messages) FAIL_CHECK(msg);
    CHECK_MESSAGE(tally.failures == 0, tally.failures, " of ", tally.sequences,
                  " sequences failed on ", backend);
    CHECK(tally.solves > 0);
    if (caps.early_stop) CHECK(tally.status[static_cast<int>(lp::Status::stopped)] > 0);
    if (tally.fallbacks > 0)  // only the scaled family allows them; reported, not failed
      MESSAGE(backend, ": ", tally.fallbacks, " of ", tally.solves, " solves fell back (family ",
              std::string(family_name(family)), ")");
  }
}

}  // namespace

TEST_CASE("lp: incremental sequences, x = 0 inside") {
  run_family(Family::interior, 1000, 170, 60);
}

TEST_CASE("lp: incremental sequences, x = 0 infeasible") {
  run_family(Family::offset, 2000, 150, 60);
}

TEST_CASE("lp: incremental sequences, degenerate vertex, integer data") {
  run_family(Family::degenerate, 3000, 160, 60);
}

TEST_CASE("lp: incremental sequences, duplicate and parallel rows") {
  run_family(Family::duplicates, 4000, 150, 50);
}

TEST_CASE("lp: incremental sequences, rows scaled by 1e-6 to 1e6") {
  run_family(Family::scaled, 5000, 150, 50);
}

TEST_CASE("lp: incremental sequences, lineality space (rank-deficient A)") {
  run_family(Family::lineality, 6000, 160, 60);
}

TEST_CASE("lp: incremental solver keeps working after infeasible, unbounded, ill-conditioned") {
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    const lp::Capabilities caps = lp::capabilities(backend);
    Mirror p{rows({{1.0, 0.0, 0.0}, {0.0, 1.0, 0.0}}), vec({1.0, 1.0}), vec({1.0, 1.0, 0.0})};
    auto s = lp::make_solver(p.A, p.b, p.c, backend);
    // Solves and checks the status and, for an optimum, the value worked out by hand.
    auto expect = [&](const char* what, lp::Status status, double value) {
      CAPTURE(what);
      const lp::Result r = s->solve();
      CHECK(lp::to_string(r.status) == std::string(lp::to_string(status)));
      CHECK(r.fallbacks == 0);
      const lp::CheckReport rep = lp::check_answer(p.c, p.A, p.b, r, 1e-9);
      CHECK_MESSAGE(rep.ok, rep.failure);
      if (status == lp::Status::optimal && r.status == status)
        CHECK(r.value == doctest::Approx(value).epsilon(1e-12).scale(1.0));
      if (r.status == lp::Status::unbounded && caps.ray) CHECK(r.has_ray());
      if (r.status == lp::Status::infeasible && caps.farkas) CHECK(r.has_farkas());
    };
    auto objective = [&](const Vector& c) {
      p.c = c;
      s->set_objective(c);
    };
    auto add = [&](const Matrix& A, const Vector& b) {
      p.A = vstack(p.A, A);
      p.b = vstack(p.b, b);
      s->add_rows(A, b);
    };
    auto rhs = [&](Index i, double v) {
      p.b(i) = v;
      s->set_rhs(i, v);
    };
    // {x_1 <= 1, x_2 <= 1} in R^3.
    expect("max x_1 + x_2 = 2", lp::Status::optimal, 2.0);
    objective(vec({0.0, 0.0, 1.0}));
    expect("x_3 is free: unbounded", lp::Status::unbounded, 0.0);
    expect("again", lp::Status::unbounded, 0.0);
    add(rows({{0.0, 0.0, 1.0}}), vec({5.0}));
    expect("x_3 <= 5: max x_3 = 5", lp::Status::optimal, 5.0);
    objective(vec({1.0, 1.0, 1.0}));
    expect("max x_1 + x_2 + x_3 = 1 + 1 + 5", lp::Status::optimal, 7.0);
    add(rows({{-1.0, -1.0, -1.0}}), vec({-100.0}));
    expect("sum >= 100 > 7: empty", lp::Status::infeasible, 0.0);
    expect("again", lp::Status::infeasible, 0.0);
    rhs(3, -7.0);
    expect("sum >= 7: the single point (1, 1, 5)", lp::Status::optimal, 7.0);
    rhs(3, -6.5);
    expect("sum >= 6.5: still 7", lp::Status::optimal, 7.0);
    objective(vec({-1.0, -1.0, -1.0}));
    expect("max -sum with sum >= 6.5: -6.5", lp::Status::optimal, -6.5);
    p.b = vec({1.0, 1.0, 5.0, 100.0});
    s->set_rhs(p.b);
    expect("sum >= -100: max -sum = 100", lp::Status::optimal, 100.0);
    add(rows({{0.0, 0.0, 0.0}}), vec({-1.0}));
    expect("0 <= -1: empty", lp::Status::infeasible, 0.0);
    rhs(4, 0.0);
    expect("0 <= 0: back to 100", lp::Status::optimal, 100.0);
    objective(vec({-1.0, 0.0, 0.0}));
    expect("x_1 >= -100 - 1 - 5 = -106 is the only lower bound: 106", lp::Status::optimal, 106.0);

    // Nearly parallel rows: 8 rows (1, 1e-12 k, 0)·x <= 1 + 1e-12 k, all tight at
    // x_1 = x_2 = 1. The set is unchanged ({x_1 <= 1, x_2 <= 1} implies them), so
    // max x_1 + x_2 + x_3 is 7 at (1, 1, 5) (by hand). A numerical status is allowed here; a
    // wrong optimum is not.
    p.b = vec({1.0, 1.0, 5.0, 100.0, 0.0});
    s->set_rhs(p.b);
    Matrix nasty(8, 3);
    Vector bn(8);
    for (Index k = 0; k < 8; ++k) {
      const double e = 1e-12 * static_cast<double>(k + 1);
      nasty.row(k) << 1.0, e, 0.0;
      bn(k) = 1.0 + e;
    }
    add(nasty, bn);
    objective(vec({1.0, 1.0, 1.0}));
    for (int again = 0; again < 2; ++again) {
      const lp::Result r = s->solve();
      CHECK(r.status != lp::Status::infeasible);
      CHECK(r.status != lp::Status::unbounded);
      if (r.status == lp::Status::optimal) {
        CHECK(r.value == doctest::Approx(7.0).epsilon(1e-9));
        const lp::CheckReport rep = lp::check_answer(p.c, p.A, p.b, r, 1e-9);
        CHECK_MESSAGE(rep.ok, rep.failure);
      }
    }
    // Loosen the ill-conditioned rows far away; the LP is well posed again: 7 (by hand).
    for (Index k = 5; k < 13; ++k) rhs(k, 1e3);
    expect("ill-conditioned rows loosened: 7", lp::Status::optimal, 7.0);
    rhs(0, -2.0);
    expect("x_1 <= -2: -2 + 1 + 5 = 4", lp::Status::optimal, 4.0);
  }
}

TEST_CASE("lp: incremental solver recovers from an ill-conditioned LP") {
  // The box [-1, 1]^8 and 32 Vandermonde rows ±(1, t, t^2, ..., t^7)·x <= 1, t = i/31 (sign
  // alternating), whose vertices are very ill-conditioned: any answer, even a wrong one, is
  // accepted from those solves (they are not what this test checks). Then the Vandermonde rows
  // are loosened to 1e4: every |entry| <= 1, so on the box |row·x| <= 8 and they are slack by
  // far, and the optimum is the box's, Σ |c_j| (by hand). The solver must find it from whatever
  // state the ill-conditioned solves left, and again after the rows are tightened and loosened.
  const Index n = 8, k = 32;
  Matrix A = Matrix::Zero(2 * n + k, n);
  Vector b = Vector::Ones(2 * n + k);
  for (Index j = 0; j < n; ++j) {
    A(j, j) = 1.0;
    A(n + j, j) = -1.0;
  }
  for (Index i = 0; i < k; ++i) {
    const double t = static_cast<double>(i) / static_cast<double>(k - 1);
    for (Index j = 0; j < n; ++j)
      A(2 * n + i, j) = (i % 2 ? -1.0 : 1.0) * std::pow(t, static_cast<double>(j));
  }
  const Vector c1 = Vector::LinSpaced(n, 1.0, 8.0);                      // Σ = 36
  const Vector c2 = vec({-1.0, 2.0, -3.0, 4.0, -0.5, 0.25, -2.0, 1.0});  // Σ |c_j| = 13.75
  for (const auto& backend : lp::backends()) {
    CAPTURE(backend);
    auto s = lp::make_solver(A, b, c1, backend);
    Vector bb = b;
    auto loosen = [&](double value) {
      for (Index i = 2 * n; i < 2 * n + k; ++i) bb(i) = value;
      s->set_rhs(bb);
    };
    auto box_optimum = [&](const Vector& c, double by_hand) {
      const lp::Result r = s->solve();
      CHECK(lp::to_string(r.status) == std::string("optimal"));
      CHECK(r.fallbacks == 0);
      CHECK(r.value == doctest::Approx(by_hand).epsilon(1e-9));
      const lp::CheckReport rep = lp::check_answer(c, A, bb, r, 1e-9);
      CHECK_MESSAGE(rep.ok, rep.failure);
    };
    CHECK_NOTHROW(s->solve());
    CHECK_NOTHROW(s->solve());
    loosen(1e4);
    box_optimum(c1, 36.0);
    loosen(1.0);
    s->set_objective(c2);
    CHECK_NOTHROW(s->solve());
    loosen(1e4);
    box_optimum(c2, 13.75);
    s->set_objective(c1);
    box_optimum(c1, 36.0);
  }
}
