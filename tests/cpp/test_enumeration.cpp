// Tests of corral/enumeration.hpp with its qhull wrapper (detail/qhull.hpp) and validation
// (detail/hull_check.hpp): which path answers (Info::method), the answers, and the fallback.
//
// Outside references, named beside each check: closed forms worked out in the comments
// (hypercube 2^n vertices and 2n facets, cross-polytope 2n vertices and 2^n facets, simplex
// n + 1 of each, products v(P) v(Q) vertices and f(P) + f(Q) facets, prism and pyramid over
// a k-gon), cyclic polytopes C(k, d) with facets counted here by Gale's evenness condition
// (Ziegler 1995, *Lectures on Polytopes*, Thm 0.7; statement from memory; the count is
// checked against the even-d formula k/(k - d/2) binom(k - d/2, d/2), also from memory), and
// exact cddlib (GMP rationals) on the same input. The comparisons against scipy's qhull and
// pycddlib are in tests/python/test_enumeration.py.

#include <doctest/doctest.h>

#include "test_helpers.hpp"

#include <corral/detail/cdd.hpp>
#include <corral/detail/hull_check.hpp>
#include <corral/detail/qhull.hpp>
#include <corral/errors.hpp>
#include <corral/polytope.hpp>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

namespace {

using corral::Index;
using corral::Info;
using corral::Matrix;
using corral::Polytope;
using corral::Vector;
using corral::test::rows;

// Every row of X is within tol (max norm) of a row of Y and vice versa, and both have the
// same number of rows, none repeated.
bool same_points(const Matrix& X, const Matrix& Y, double tol = 1e-7) {
  if (X.rows() != Y.rows() || X.cols() != Y.cols()) return false;
  auto covered = [tol](const Matrix& P, const Matrix& Q) {
    for (Index i = 0; i < P.rows(); ++i) {
      bool found = false;
      for (Index j = 0; j < Q.rows() && !found; ++j)
        found = (P.row(i) - Q.row(j)).cwiseAbs().maxCoeff() <= tol;
      if (!found) return false;
      for (Index j = i + 1; j < P.rows(); ++j)
        if ((P.row(i) - P.row(j)).cwiseAbs().maxCoeff() <= tol) return false;
    }
    return true;
  };
  return covered(X, Y) && covered(Y, X);
}

// The rows [a | b] of two H-representations (normalised rows) agree as sets.
bool same_rows(const Polytope& P, const Polytope& Q, double tol = 1e-7) {
  Matrix X(P.num_rows(), P.dim() + 1), Y(Q.num_rows(), Q.dim() + 1);
  X << P.A(), P.b();
  Y << Q.A(), Q.b();
  return same_points(X, Y, tol);
}

Matrix sign_vectors(int n) {
  Matrix V(1 << n, n);
  for (int i = 0; i < (1 << n); ++i)
    for (int j = 0; j < n; ++j) V(i, j) = (i >> j & 1) ? 1.0 : -1.0;
  return V;
}

Matrix plus_minus_unit(int n) {
  Matrix V = Matrix::Zero(2 * n, n);
  for (int j = 0; j < n; ++j) {
    V(j, j) = 1.0;
    V(n + j, j) = -1.0;
  }
  return V;
}

Matrix simplex_vertices(int n) {
  Matrix V = Matrix::Zero(n + 1, n);
  for (int j = 0; j < n; ++j) V(j + 1, j) = 1.0;
  return V;
}

// Points (t, t^2, ..., t^d) for t = t0, t0 + 1, ..., t0 + k - 1.
Matrix moment_curve(int k, int d, double t0 = 1.0) {
  Matrix V(k, d);
  for (int i = 0; i < k; ++i) {
    double p = 1.0;
    for (int j = 0; j < d; ++j) V(i, j) = (p *= t0 + i);
  }
  return V;
}

// Facets of C(k, d) by Gale's evenness condition (Ziegler 1995, Thm 0.7, from memory): a
// d-subset S of the k points on the curve is a facet iff every two points not in S are
// separated by an even number of points of S. It suffices to check consecutive non-members.
long gale_facets(int k, int d) {
  long count = 0;
  std::vector<int> S(static_cast<size_t>(d));
  for (int j = 0; j < d; ++j) S[static_cast<size_t>(j)] = j;
  while (true) {
    std::vector<char> in(static_cast<size_t>(k), 0);
    for (int s : S) in[static_cast<size_t>(s)] = 1;
    bool even = true;
    int prev = -1, between = 0;
    for (int i = 0; i < k && even; ++i) {
      if (in[static_cast<size_t>(i)]) {
        ++between;
        continue;
      }
      if (prev >= 0 && between % 2 != 0) even = false;
      prev = i;
      between = 0;
    }
    if (even) ++count;
    int j = d - 1;
    while (j >= 0 && S[static_cast<size_t>(j)] == k - d + j) --j;
    if (j < 0) break;
    ++S[static_cast<size_t>(j)];
    for (int q = j + 1; q < d; ++q) S[static_cast<size_t>(q)] = S[static_cast<size_t>(q - 1)] + 1;
  }
  return count;
}

long binom(long n, long r) {
  long c = 1;
  for (long i = 1; i <= r; ++i) c = c * (n - r + i) / i;
  return c;
}

Matrix random_unit_rows(std::mt19937& gen, Index m, Index n) {
  std::normal_distribution<double> N;
  Matrix A(m, n);
  for (Index i = 0; i < m; ++i) {
    for (Index j = 0; j < n; ++j) A(i, j) = N(gen);
    A.row(i).normalize();
  }
  return A;
}

}  // namespace

TEST_CASE("enumeration: Gale's evenness count matches the even-dimension formula") {
  // For even d: f(C(k, d)) = k / (k - d/2) * binom(k - d/2, d/2) (Ziegler 1995, from memory).
  for (int d : {2, 4, 6})
    for (int k = d + 1; k <= 16; ++k)
      CHECK(gale_facets(k, d) * (k - d / 2) == k * binom(k - d / 2, d / 2));
  // d = 3: simplicial with k vertices, so 2k - 4 facets (Euler's relation).
  for (int k = 4; k <= 12; ++k) CHECK(gale_facets(k, 3) == 2 * k - 4);
}

TEST_CASE("enumeration: closed-form families take the qhull path") {
  for (int n = 2; n <= 6; ++n) {
    CAPTURE(n);
    // [-1, 1]^n: 2^n vertices (the sign vectors), 2n facets.
    Info info;
    const Polytope box = Polytope::box(-Vector::Ones(n), Vector::Ones(n));
    CHECK(same_points(box.vertices(false, &info), sign_vectors(n)));
    CHECK(info.method == "qhull");
    CHECK(info.fallbacks == 0);
    CHECK(info.lp_solves == 1);  // the Chebyshev centre
    const Polytope H = Polytope::from_vertices(sign_vectors(n), false, &info);
    CHECK(info.method == "qhull");
    CHECK(H.num_rows() == 2 * n);
    CHECK(same_rows(H, box));
    // Cross-polytope {x : s·x <= 1 for all sign vectors s}: 2n vertices ±e_i, 2^n facets.
    const Polytope cross(sign_vectors(n), Vector::Ones(1 << n));
    CHECK(same_points(cross.vertices(false, &info), plus_minus_unit(n)));
    CHECK(info.method == "qhull");
    const Polytope C = Polytope::from_vertices(plus_minus_unit(n), false, &info);
    CHECK(info.method == "qhull");
    CHECK(C.num_rows() == (1 << n));
    CHECK(same_rows(C, cross));
    // Standard simplex: n + 1 vertices (0 and e_i), n + 1 facets.
    CHECK(same_points(Polytope::simplex(n).vertices(false, &info), simplex_vertices(n)));
    CHECK(info.method == "qhull");
    const Polytope S = Polytope::from_vertices(simplex_vertices(n), false, &info);
    CHECK(info.method == "qhull");
    CHECK(same_rows(S, Polytope::simplex(n)));
  }
}

TEST_CASE("enumeration: products, prisms and pyramids (vertices in more than n facets)") {
  // Δ_p x Δ_q: (p+1)(q+1) vertices, (p+1) + (q+1) facets (products: v = v_P v_Q,
  // f = f_P + f_Q).
  for (auto [p, q] : std::vector<std::pair<int, int>>{{1, 1}, {1, 2}, {2, 2}, {2, 3}, {3, 3}}) {
    CAPTURE(p);
    CAPTURE(q);
    const Matrix vp = simplex_vertices(p), vq = simplex_vertices(q);
    Matrix V(vp.rows() * vq.rows(), p + q);
    for (Index i = 0, r = 0; i < vp.rows(); ++i)
      for (Index j = 0; j < vq.rows(); ++j, ++r) V.row(r) << vp.row(i), vq.row(j);
    Info info;
    const Polytope P = Polytope::from_vertices(V, false, &info);
    CHECK(info.method == "qhull");
    CHECK(P.num_rows() == p + q + 2);
    CHECK(same_points(P.vertices(false, &info), V));
    CHECK(info.method == "qhull");
  }
  // Regular k-gon x [0, 1]: 2k vertices, k + 2 facets; pyramid over it with apex (0, 0, 1):
  // k + 1 vertices, k + 1 facets (the apex lies in k facets).
  for (int k : {3, 5, 8, 20}) {
    CAPTURE(k);
    Matrix prism(2 * k, 3), pyramid(k + 1, 3);
    for (int i = 0; i < k; ++i) {
      const double th = 2 * M_PI * i / k;
      prism.row(i) << std::cos(th), std::sin(th), 0.0;
      prism.row(k + i) << std::cos(th), std::sin(th), 1.0;
      pyramid.row(i) << std::cos(th), std::sin(th), 0.0;
    }
    pyramid.row(k) << 0.0, 0.0, 1.0;
    for (const Matrix* V : {&prism, &pyramid}) {
      Info info;
      const Polytope P = Polytope::from_vertices(*V, false, &info);
      CHECK(info.method == "qhull");
      CHECK(P.num_rows() == (V == &prism ? k + 2 : k + 1));
      CHECK(same_points(P.vertices(false, &info), *V));
      CHECK(info.method == "qhull");
      CHECK(same_rows(P, Polytope::from_vertices(*V, true)));  // reference: exact cddlib
    }
  }
}

TEST_CASE("enumeration: repeated points, face points and redundant rows") {
  for (int n = 2; n <= 5; ++n) {
    CAPTURE(n);
    // The cube's corners three times, the centre, the facet centres ±e_i, and the midpoints
    // of the edges (a corner with one coordinate set to 0): still 2n facets.
    const Matrix C = sign_vectors(n);
    Matrix V(3 * C.rows() + 1 + 2 * n + C.rows() * n, n);
    V << C, C, C, Matrix::Zero(1, n), plus_minus_unit(n), Matrix::Zero(C.rows() * n, n);
    for (Index i = 0, r = 3 * C.rows() + 1 + 2 * n; i < C.rows(); ++i)
      for (Index j = 0; j < n; ++j, ++r) {
        V.row(r) = C.row(i);
        V(r, j) = 0.0;
      }
    Info info;
    const Polytope P = Polytope::from_vertices(V, false, &info);
    CHECK(info.method == "qhull");
    CHECK(P.num_rows() == 2 * n);
    CHECK(same_points(P.vertices(), C));
    // The box with every row three times (scaled) and a weakly redundant row through a
    // vertex, sum x <= n: the same 2^n vertices, each once.
    const Polytope B = Polytope::box(-Vector::Ones(n), Vector::Ones(n));
    Matrix A(3 * B.num_rows() + 1, n);
    A << B.A(), 2.5 * B.A(), 0.01 * B.A(), Matrix::Ones(1, n);
    Vector b(A.rows());
    b << B.b(), 2.5 * B.b(), 0.01 * B.b(), static_cast<double>(n);
    CHECK(same_points(Polytope(A, b).vertices(false, &info), C));
    CHECK(info.method == "qhull");
  }
  // Pyramid with 20 rows through its apex and 20 more through it that are weakly redundant
  // (cos φ x + sin φ y + 2 z <= 2 at the half angles: on the pyramid cos φ x + sin φ y <=
  // 1 - z, so the row holds, tight only at the apex): 21 vertices, the base corners at radius
  // 1 / cos(π/20) and the apex.
  const int k = 20;
  Matrix A(2 * k + 1, 3);
  Vector b(2 * k + 1);
  Matrix expect(k + 1, 3);
  for (int i = 0; i < k; ++i) {
    const double th = 2 * M_PI * i / k, ph = th + M_PI / k;
    A.row(i) << std::cos(th), std::sin(th), 1.0;
    b(i) = 1.0;
    A.row(k + 1 + i) << std::cos(ph), std::sin(ph), 2.0;
    b(k + 1 + i) = 2.0;
    expect.row(i) << std::cos(ph) / std::cos(M_PI / k), std::sin(ph) / std::cos(M_PI / k), 0.0;
  }
  A.row(k) << 0.0, 0.0, -1.0;
  b(k) = 0.0;
  expect.row(k) << 0.0, 0.0, 1.0;
  Info info;
  CHECK(same_points(Polytope(A, b).vertices(false, &info), expect));
  CHECK(info.method == "qhull");
}

TEST_CASE("enumeration: random polytopes agree with cddlib") {
  // reference: cddlib's double description, exact for n <= 4 (quick there) and in double
  // above (sound on these well-spread sets).
  std::mt19937 gen(11);
  std::normal_distribution<double> N;
  for (int n = 2; n <= 6; ++n) {
    CAPTURE(n);
    // Facets: random unit rows at random offsets (a simple polytope with probability 1).
    const Index m = 8 * n;
    std::uniform_real_distribution<double> offset(0.5, 1.5);
    Vector b(m);
    for (Index i = 0; i < m; ++i) b(i) = offset(gen);
    const Polytope P(random_unit_rows(gen, m, n), b);
    Info info;
    const Matrix V = P.vertices(false, &info);
    CHECK(info.method == "qhull");
    const corral::detail::CddGenerators ref =
        corral::detail::cdd_generators(P.A(), P.b(), n <= 4, false);
    CHECK(same_points(V, ref.points, 1e-8));
    // Hull of random points (a simplicial polytope with probability 1), some inside.
    Matrix X(15 * n, n);
    for (Index i = 0; i < X.rows(); ++i)
      for (Index j = 0; j < n; ++j) X(i, j) = N(gen);
    const Polytope H = Polytope::from_vertices(X, false, &info);
    CHECK(info.method == "qhull");
    const corral::detail::CddHull href = corral::detail::cdd_hull(X, n <= 4);
    CHECK(same_rows(H, Polytope(href.A, href.b), 1e-8));
  }
}

TEST_CASE("enumeration: badly scaled cyclic polytopes give Gale's facet counts") {
  // Integer moment-curve parameters t = 1..k: coordinates up to k^d, many points nearly on
  // each other's facets. Whichever path answers, the counts are the closed form.
  struct Case {
    int d, k;
  };
  // Up to C(30, 6) (3250 facets) qhull's answer validates; C(38, 6) fails validation (with
  // qhull 2020.2 at tol 1e-9: points within the tolerance of facets they are not on) and is
  // answered by exact cddlib, which exercises the fallback.
  for (const Case c : {Case{5, 12}, Case{5, 20}, Case{5, 30}, Case{6, 12}, Case{6, 20}, Case{6, 30},
                       Case{6, 37}, Case{6, 38}}) {
    CAPTURE(c.d);
    CAPTURE(c.k);
    const Matrix V = moment_curve(c.k, c.d);
    Info info;
    const Polytope P = Polytope::from_vertices(V, false, &info);
    CHECK(P.num_rows() == gale_facets(c.k, c.d));
    if (c.k == 38) {
      CHECK(info.method == "cdd-exact");
      CHECK(info.fallbacks == 1);
    } else if (c.k <= 30) {
      CHECK(info.method == "qhull");
      CHECK(info.fallbacks == 0);
    } else {
      CHECK((info.method == "qhull" || (info.method == "cdd-exact" && info.fallbacks == 1)));
    }
  }
  // Small ones also the other way round: the vertices of the facets are the k points
  // (cyclic polytopes are neighbourly: every point is a vertex).
  for (const Case c : {Case{5, 9}, Case{6, 10}}) {
    CAPTURE(c.d);
    CAPTURE(c.k);
    const Polytope P = Polytope::from_vertices(moment_curve(c.k, c.d), true);
    Info info;
    const Matrix V = P.vertices(false, &info);
    CHECK((info.method == "qhull" || info.method == "cdd-exact"));
    // Compared per coordinate relative to its largest value (up to k^d).
    const Matrix M = moment_curve(c.k, c.d);
    const Eigen::RowVectorXd scale = M.cwiseAbs().colwise().maxCoeff();
    CHECK(same_points(V.array().rowwise() / scale.array(), M.array().rowwise() / scale.array(),
                      1e-7));
  }
}

TEST_CASE("enumeration: validation rejects what qhull loses on unpreconditioned input") {
  // Run on the raw integer coordinates of C(30, 6) (3250 facets by Gale's evenness
  // condition), qhull merges nearly coplanar facets into coarser ones. Whatever qhull
  // returns, the validation either reproduces the closed form or rejects it.
  const int d = 6, k = 30;
  const Matrix V = moment_curve(k, d);
  const long facets = gale_facets(k, d);
  const corral::detail::QhullRun raw = corral::detail::qhull_hull(V);
  REQUIRE(raw.ok);
  // The validation's own working coordinates: centred and scaled per coordinate.
  const Eigen::RowVectorXd c = V.colwise().mean();
  Matrix W = V.rowwise() - c;
  const Eigen::RowVectorXd sigma = W.cwiseAbs().colwise().maxCoeff();
  W = W.array().rowwise() / sigma.array();
  const corral::detail::PolarCheck chk = corral::detail::polar_vertices(
      W, Vector::Ones(k), raw, corral::detail::PolarMode::facets, 1e-9);
  INFO("raw qhull: " << raw.num_facets() << " facets, " << raw.merged_facets
                     << " merged; validation: " << (chk.ok ? "accepted" : chk.failure));
  if (chk.ok) CHECK(chk.objects.rows() == facets);
  if (raw.num_facets() != facets) CHECK_FALSE(chk.ok);  // coarser facets are rejected
  // Preconditioned, the same points give the right answer on the qhull path.
  Info info;
  CHECK(Polytope::from_vertices(V, false, &info).num_rows() == facets);
  CHECK(info.method == "qhull");
}

TEST_CASE("enumeration: the validation rejects broken hulls") {
  // qhull's hull of the 3-cube (6 square facets, 4 ridges each), then: one facet dropped
  // (a hole), one vertex of a facet replaced by the opposite corner (not on the boundary),
  // one ridge listed a third time.
  const Matrix V = sign_vectors(3);
  const corral::detail::QhullRun run = corral::detail::qhull_hull(V);
  REQUIRE(run.ok);
  REQUIRE(run.num_facets() == 6);
  auto check = [&V](const corral::detail::QhullRun& h) {
    return corral::detail::polar_vertices(V, Vector::Ones(V.rows()), h,
                                          corral::detail::PolarMode::facets, 1e-9);
  };
  const corral::detail::PolarCheck ok = check(run);
  CHECK(ok.ok);
  CHECK(ok.objects.rows() == 6);
  // A hole: the last facet and its ridges removed.
  corral::detail::QhullRun hole = run;
  const int last = static_cast<int>(run.num_facets()) - 1;
  hole.facet_start.pop_back();
  hole.facet_points.resize(static_cast<size_t>(hole.facet_start.back()));
  hole.ridge_owner.clear();
  hole.ridge_points.clear();
  for (size_t r = 0; r < run.ridge_owner.size(); ++r)
    if (run.ridge_owner[r] != last) {
      hole.ridge_owner.push_back(run.ridge_owner[r]);
      hole.ridge_points.insert(hole.ridge_points.end(), run.ridge_points.begin() + 2 * r,
                               run.ridge_points.begin() + 2 * r + 2);
    }
  CHECK_FALSE(check(hole).ok);
  CHECK(check(hole).failure.find("not closed") != std::string::npos);
  // A facet through a corner that is not on it: the plane of three corners of one square
  // and the opposite corner of the cube cuts the cube.
  corral::detail::QhullRun across = run;
  const int p0 = run.facet_points[0];
  across.facet_points[0] = static_cast<int>((V.rows() - 1) - p0);  // the antipodal corner
  CHECK_FALSE(check(across).ok);
  // A ridge listed a third time.
  corral::detail::QhullRun thrice = run;
  thrice.ridge_owner.push_back(run.ridge_owner[1] == 0 ? 1 : 0);
  thrice.ridge_points.insert(thrice.ridge_points.end(), run.ridge_points.begin(),
                             run.ridge_points.begin() + 2);
  CHECK_FALSE(check(thrice).ok);
}

TEST_CASE("enumeration: the validation rejects broken hulls with many points (box tree path)") {
  // 120 random unit vectors in R^4 (so more than 64 points: the row-vertex tests go through
  // the box tree): qhull's hull validates; then (a) one point is pushed outward after qhull
  // ran, so it lies outside the facets near it, and (b) one vertex of one facet is replaced
  // by a point that is not on that facet. Both must fail validation.
  std::mt19937 gen(11);
  const Index n = 4, k = 120;
  const Matrix V = random_unit_rows(gen, k, n);
  const corral::detail::QhullRun run = corral::detail::qhull_hull(V);
  REQUIRE(run.ok);
  auto check = [](const Matrix& W, const corral::detail::QhullRun& h) {
    return corral::detail::polar_vertices(W, Vector::Ones(W.rows()), h,
                                          corral::detail::PolarMode::facets, 1e-9);
  };
  const corral::detail::PolarCheck ok = check(V, run);
  REQUIRE(ok.ok);
  CHECK(ok.objects.rows() == run.num_facets());  // random points: a simplicial hull
  // (a) Point 7 pushed outward by 1 %: it is now beyond the facets around it.
  Matrix out = V;
  out.row(7) *= 1.01;
  const corral::detail::PolarCheck a = check(out, run);
  CHECK_FALSE(a.ok);
  CHECK(a.failure.find("outside") != std::string::npos);
  // (b) The first vertex of facet 0 replaced by a point on none of facet 0's neighbours'
  // planes: the facet's points no longer lie on one hyperplane with the rest of the hull
  // inside.
  corral::detail::QhullRun moved = run;
  int other = 0;
  for (; other < k; ++other) {
    bool on = false;
    for (int p = run.facet_start[0]; p < run.facet_start[1]; ++p)
      on = on || run.facet_points[static_cast<size_t>(p)] == other;
    if (!on) break;
  }
  moved.facet_points[0] = other;
  CHECK_FALSE(check(V, moved).ok);
}

TEST_CASE("enumeration: the convex-surface test in vertex enumeration, and what it rejects") {
  // 120 random unit rows in R^4 with right-hand side 1 (every row a facet, a simple polytope)
  // and 10 more at 3 (redundant: their polar points lie inside the hull). Vertex enumeration
  // of this set takes the surface test: the rows on qhull's hull are not evaluated at every
  // vertex, the 10 others are. Reference for the accepted answer: exact cddlib's vertices.
  std::mt19937 gen(5);
  const Index n = 4, k = 130;
  const Matrix R = random_unit_rows(gen, k, n);
  Vector s = Vector::Ones(k);
  s.tail(10).setConstant(3.0);
  Matrix D = R.array().colwise() / s.array();  // the polar points (the origin is inside)
  const corral::detail::QhullRun run = corral::detail::qhull_hull(D);
  REQUIRE(run.ok);
  auto check = [&run](const Matrix& W, const Vector& t) {
    return corral::detail::polar_vertices(W, t, run, corral::detail::PolarMode::vertices, 1e-9);
  };
  const corral::detail::PolarCheck ok = check(R, s);
  REQUIRE(ok.ok);
  CHECK(ok.convex_surface);
  const corral::detail::CddGenerators ref = corral::detail::cdd_generators(R, s, true, false);
  CHECK(same_points(ok.objects, ref.points, 1e-9));
  // (a) A facet row moved inward by 2 % after qhull ran: the vertices near it are now outside
  // it, which the surface test sees at a ridge; validation fails.
  Vector a = s;
  a(3) = 0.98;
  CHECK_FALSE(check(R, a).ok);
  // (b) A redundant row (not on qhull's hull) moved inward to 0.9: it is evaluated at every
  // vertex, and found violated.
  Vector b = s;
  b(k - 1) = 0.9;
  const corral::detail::PolarCheck rb = check(R, b);
  CHECK_FALSE(rb.ok);
  CHECK(rb.failure.find("outside") != std::string::npos);
  // (c) A row of one qhull facet replaced by a row that is not on it.
  corral::detail::QhullRun moved = run;
  int other = 0;
  for (; other < k - 10; ++other) {
    bool on = false;
    for (int p = run.facet_start[0]; p < run.facet_start[1]; ++p)
      on = on || run.facet_points[static_cast<size_t>(p)] == other;
    if (!on) break;
  }
  moved.facet_points[0] = other;
  CHECK_FALSE(
      corral::detail::polar_vertices(R, s, moved, corral::detail::PolarMode::vertices, 1e-9).ok);
  // (d) The cross-polytope |x|_1 <= 1 has vertices in 2^(n-1) facets (its polar, a cube, has
  // facets of 2^(n-1) points): qhull merges, and the full check runs. With copies of its rows
  // further out (redundant) to pass 64 rows. Reference: its 2n vertices +-e_i.
  const Matrix signs = sign_vectors(static_cast<int>(n)) / std::sqrt(static_cast<double>(n));
  Matrix many(80, n);
  Vector sb(80);
  for (Index i = 0; i < 80; ++i) {
    many.row(i) = signs.row(i % signs.rows());
    sb(i) = (1.0 + 0.01 * static_cast<double>(i / signs.rows())) / std::sqrt(double(n));
  }
  const corral::detail::QhullRun brun =
      corral::detail::qhull_hull((many.array().colwise() / sb.array()).matrix());
  REQUIRE(brun.ok);
  const corral::detail::PolarCheck rbox =
      corral::detail::polar_vertices(many, sb, brun, corral::detail::PolarMode::vertices, 1e-9);
  CHECK(rbox.ok);
  CHECK_FALSE(rbox.convex_surface);
  CHECK(same_points(rbox.objects, plus_minus_unit(static_cast<int>(n))));
}

TEST_CASE("enumeration: unbounded sets raise on every path") {
  struct Set {
    const char* what;
    Matrix A;
    Vector b;
  };
  const std::vector<Set> sets = {
      {"strip |x| <= 1", rows({{1, 0}, {-1, 0}}), corral::test::vec({1, 1})},
      {"halfplane", rows({{1, 1}}), corral::test::vec({1})},
      {"orthant", rows({{-1, 0, 0}, {0, -1, 0}, {0, 0, -1}}), corral::test::vec({0, 0, 0})},
      // x, y >= 0 and |x - y| <= 1: finite Chebyshev radius, unbounded along (1, 1).
      {"slanted strip", rows({{-1, 0}, {0, -1}, {1, -1}, {-1, 1}}),
       corral::test::vec({0, 0, 1, 1})},
      // A box in (x, y) times the free z axis, with enough rows for a bounded set in R^3.
      {"prism along z", rows({{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {1, 1, 0}}),
       corral::test::vec({1, 1, 1, 1, 3})},
      // Four rows around a half-line: x <= 1, y <= 1, -x - y <= 1 plus z free except z >= 0.
      {"half-infinite prism", rows({{1, 0, 0}, {0, 1, 0}, {-1, -1, 0}, {0, 0, -1}}),
       corral::test::vec({1, 1, 1, 0})},
      {"half-line in R^1", rows({{1}}), corral::test::vec({2})},
  };
  for (const Set& s : sets) {
    CAPTURE(s.what);
    const Polytope P(s.A, s.b);
    CHECK_THROWS_AS(P.vertices(), corral::UnboundedSetError);
    CHECK_THROWS_AS(P.vertices(true), corral::UnboundedSetError);
    CHECK_THROWS_AS(P.vertices_exact(), corral::UnboundedSetError);
  }
  // The polar points of the slanted strip do not surround the origin: the qhull path fails
  // by itself, before the boundedness LPs.
  const Polytope slanted(sets[3].A, sets[3].b);
  const auto ball = slanted.chebyshev_center();
  CHECK(corral::detail::qhull_vertices(slanted.A(), slanted.b(), ball.center, 1e-9).outcome ==
        corral::detail::QhullEnumeration::Outcome::failed);
}

TEST_CASE("enumeration: lower-dimensional, tiny and bad input never crash") {
  Info info;
  // NaN / inf are rejected before any library sees them.
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  CHECK_THROWS_AS(Polytope::from_vertices(rows({{0, 0}, {1, 0}, {0, nan}})),
                  corral::InvalidInputError);
  CHECK_THROWS_AS(Polytope::from_vertices(rows({{0, 0}, {inf, 0}, {0, 1}})),
                  corral::InvalidInputError);
  // Too few points for a full-dimensional hull: cddlib; a segment in R^3 (hand-worked: the
  // hull of (0,0,0) and (1,2,3) has the two vertices).
  const Polytope seg = Polytope::from_vertices(rows({{0, 0, 0}, {1, 2, 3}}), false, &info);
  CHECK(info.method == "cdd");
  CHECK(same_points(seg.vertices(false, &info), rows({{0, 0, 0}, {1, 2, 3}})));
  CHECK(info.method == "cdd");  // Chebyshev radius 0: lower-dimensional
  // One point given five times.
  Matrix same = Matrix::Constant(5, 3, 0.25);
  const Polytope pt = Polytope::from_vertices(same, false, &info);
  CHECK(info.method == "cdd");
  CHECK(same_points(pt.vertices(), Matrix::Constant(1, 3, 0.25)));
  // Points on the plane x + y + z = 1 (exact in binary), more than n + 1 of them: cddlib,
  // with the equality as a pair of rows.
  const Matrix flat = rows({{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {0.5, 0.5, 0}, {0.25, 0.25, 0.5}});
  const Polytope F = Polytope::from_vertices(flat, false, &info);
  CHECK(info.method == "cdd");
  CHECK(same_points(F.vertices(), rows({{1, 0, 0}, {0, 1, 0}, {0, 0, 1}})));
  // 1-D: the interval [-1, 3] from three points; its vertices.
  const Polytope I = Polytope::from_vertices(rows({{3}, {-1}, {0.5}}), false, &info);
  CHECK(info.method == "cdd");
  CHECK(same_points(I.vertices(false, &info), rows({{-1}, {3}})));
  CHECK(info.method == "cdd");
  // No points: the empty set, no method.
  CHECK(Polytope::from_vertices(Matrix(0, 2), false, &info).is_trivially_empty());
  CHECK(info.method.empty());
  // Empty sets (one found by LP) have no vertices.
  CHECK(Polytope::empty(3).vertices(false, &info).rows() == 0);
  // x <= -1 and x >= 2: empty.
  const Polytope E(rows({{1, 0}, {-1, 0}, {0, 1}, {0, -1}}), corral::test::vec({-1, -2, 1, 1}));
  CHECK(E.vertices(false, &info).rows() == 0);
  CHECK(info.method == "cdd");
  // The wrapper itself on input qhull refuses: flat points (message passed on) and too few.
  const corral::detail::QhullRun r1 = corral::detail::qhull_hull(flat);
  CHECK_FALSE(r1.ok);
  CHECK(r1.exit_code != 0);
  CHECK(r1.message.find("QH") != std::string::npos);
  const corral::detail::QhullRun r2 = corral::detail::qhull_hull(rows({{0, 0}}));
  CHECK_FALSE(r2.ok);
  CHECK(r2.exit_code != 0);
}

TEST_CASE("enumeration: exact requests and the exact fallback report their method") {
  const Polytope box = Polytope::box(-Vector::Ones(3), Vector::Ones(3));
  Info info;
  CHECK(same_points(box.vertices(true, &info), sign_vectors(3)));
  CHECK(info.method == "cdd-exact");
  CHECK(info.fallbacks == 0);
  box.vertices_exact(&info);
  CHECK(info.method == "cdd-exact");
  CHECK(Polytope::from_vertices(sign_vectors(3), true, &info).num_rows() == 6);
  CHECK(info.method == "cdd-exact");
  CHECK(info.seconds >= 0.0);
}

// The points of X on the boundary of conv(X) (reference: the facets of exact cddlib's hull of
// X, GMP rationals); for points in general position these are the vertices.
Matrix boundary_points(const Matrix& X) {
  const corral::detail::CddHull h = corral::detail::cdd_hull(X, true);
  std::vector<Index> on;
  for (Index p = 0; p < X.rows(); ++p) {
    bool tight = false;
    for (Index f = 0; f < h.A.rows() && !tight; ++f)
      tight = std::abs(h.b(f) - h.A.row(f).dot(X.row(p))) <= 1e-9 * h.A.row(f).norm();
    if (tight) on.push_back(p);
  }
  Matrix out(static_cast<Index>(on.size()), X.cols());
  for (size_t j = 0; j < on.size(); ++j) out.row(static_cast<Index>(j)) = X.row(on[j]);
  return out;
}

TEST_CASE("enumeration: the second qhull option set takes what the defaults reject") {
  // Random points in R^5 (the 38th case of a generator sweep over n = 3..6): their hull is
  // simplicial, so every vertex lies in many facets and the polar point cloud has many points
  // on each facet. On it qhull's defaults stop with a precision error (a "wide merge"); the
  // run with "C-0 Q12" validates, and vertices() answers on the qhull path.
  std::mt19937 gen(1);
  std::normal_distribution<double> N;
  Matrix X;
  for (int t = 0; t <= 38; ++t) {
    const Index n = 3 + t % 4, k = n + 1 + (t * 7) % 40;
    X.resize(k, n);
    for (Index i = 0; i < k; ++i)
      for (Index j = 0; j < n; ++j) X(i, j) = N(gen);
  }
  REQUIRE(X.cols() == 5);
  const Polytope P = Polytope::from_vertices(X);
  const auto ball = P.chebyshev_center();
  const auto& ladder = corral::detail::qhull_option_ladder();
  REQUIRE(ladder.size() >= 2);
  const auto first = corral::detail::qhull_vertices(P.A(), P.b(), ball.center, 1e-9, ladder[0]);
  const auto second = corral::detail::qhull_vertices(P.A(), P.b(), ball.center, 1e-9, ladder[1]);
  // Which option set fails depends on qhull's version (this is Debian's libqhull_r 8.0); the
  // one that validates must be right.
  if (first.outcome == corral::detail::QhullEnumeration::Outcome::ok)
    MESSAGE("qhull's defaults validated here; the second option set was not needed");
  REQUIRE(second.outcome == corral::detail::QhullEnumeration::Outcome::ok);
  const Matrix ref = boundary_points(X);  // reference: exact cddlib's hull of the points
  CHECK(same_points(second.V, ref, 1e-8));
  Info info;
  CHECK(same_points(P.vertices(false, &info), ref, 1e-8));
  CHECK(info.method == "qhull");
  CHECK(info.fallbacks == 0);
}

TEST_CASE("enumeration: the third qhull option set takes a pinched ridge") {
  // tests/cpp/data/lattice_hull_6d_rows.txt: the rows (bit for bit) of the hull of 19 integer
  // points in R^6, where qhull's defaults stop with a "dupridge" error and the answer of
  // "C-0 Q12" fails validation. Reference: the vertices are the 19 integer points, checked
  // here as the points on exact cddlib's hull of their rounded values.
  std::ifstream in(std::string(CORRAL_TEST_DATA_DIR) + "/lattice_hull_6d_rows.txt");
  REQUIRE(in.good());
  std::vector<double> values;
  for (std::string line; std::getline(in, line);) {
    if (line.empty() || line[0] == '#') continue;
    std::istringstream row(line);
    for (double v; row >> v;) values.push_back(v);
  }
  const Index n = 6, m = static_cast<Index>(values.size()) / (n + 1);
  REQUIRE(m == 306);
  Matrix A(m, n);
  Vector b(m);
  for (Index i = 0; i < m; ++i) {
    for (Index j = 0; j < n; ++j) A(i, j) = values[static_cast<size_t>(i * (n + 1) + j)];
    b(i) = values[static_cast<size_t>(i * (n + 1) + n)];
  }
  // The rows as stored (the Polytope constructor would normalise them again, which changes
  // the last bits and, with them, what qhull does).
  auto solver = corral::detail::chebyshev_solver(A, b, std::numeric_limits<double>::infinity(),
                                                 corral::Options{}.backend);
  const corral::lp::Result centre = corral::detail::solve_or_throw(*solver, "the centre");
  REQUIRE(centre.status == corral::lp::Status::optimal);
  const Vector x0 = centre.x.head(n);
  const auto& ladder = corral::detail::qhull_option_ladder();
  REQUIRE(ladder.size() == 3);
  using Outcome = corral::detail::QhullEnumeration::Outcome;
  for (size_t o = 0; o < 2; ++o)  // qhull-version dependent: reported, not required
    if (corral::detail::qhull_vertices(A, b, x0, 1e-9, ladder[o]).outcome == Outcome::ok)
      MESSAGE("option set " << o << " validated here; the third was not needed");
  const auto third = corral::detail::qhull_vertices(A, b, x0, 1e-9, ladder[2]);
  REQUIRE(third.outcome == Outcome::ok);
  const Matrix rounded = third.V.array().round().matrix();
  CHECK((third.V - rounded).cwiseAbs().maxCoeff() <= 1e-9);
  CHECK(third.V.rows() == 19);
  CHECK(same_points(third.V, boundary_points(rounded), 1e-9));
  CHECK(((A * third.V.transpose()).colwise() - b).maxCoeff() <= 1e-9);
}

TEST_CASE("enumeration: the exact fallback gives the vertices at tolerance") {
  // The facets of the hull of random points in R^4, rounded to doubles: a vertex lies in many
  // of them, and in exact arithmetic those rounded rows no longer meet in one point. The
  // exact vertices of the rows are many more than the hull's (clusters, and points in the
  // middle of edges at rounding distance from them); reduced at tolerance they are the
  // hull's vertices again (reference: the points on exact cddlib's hull of the input).
  std::mt19937 gen(7);
  std::normal_distribution<double> N;
  Matrix X(14, 4);
  for (Index i = 0; i < X.rows(); ++i)
    for (Index j = 0; j < X.cols(); ++j) X(i, j) = N(gen);
  const Polytope P = Polytope::from_vertices(X);
  const Matrix exact = P.vertices(true);  // the rows as given, exactly
  const Matrix ref = boundary_points(X);
  CHECK(exact.rows() > ref.rows());
  const Matrix reduced = corral::detail::vertices_at_tolerance(P.A(), P.b(), exact, 1e-9);
  CHECK(same_points(reduced, ref, 1e-8));
  // Every exact vertex is within rounding of the hull: no row of the reference hull is
  // violated by more than 1e-12 (what was dropped lies on its boundary).
  const corral::detail::CddHull h = corral::detail::cdd_hull(X, true);
  CHECK(((h.A * exact.transpose()).colwise() - h.b).maxCoeff() <= 1e-12);
  // A simple polytope's exact vertices are kept as they are (reference: the box's 2^n).
  const Polytope box = Polytope::box(-Vector::Ones(4), 2.0 * Vector::Ones(4));
  const Matrix bv = box.vertices(true);
  CHECK(corral::detail::vertices_at_tolerance(box.A(), box.b(), bv, 1e-9).rows() == 16);
}

TEST_CASE("enumeration: concurrent qhull runs") {
  // libqhull_r keeps its state in one struct per call: two threads at once give the answers
  // of one thread (2^5 facets of the 5-D cross-polytope, 2 * 5 of the 5-cube).
  long got[2] = {0, 0};
  auto work = [&got](int slot) {
    for (int rep = 0; rep < 50; ++rep) {
      got[slot] += Polytope::from_vertices(plus_minus_unit(5)).num_rows();
      got[slot] += Polytope::from_vertices(sign_vectors(5)).num_rows();
    }
  };
  std::thread t0(work, 0), t1(work, 1);
  t0.join();
  t1.join();
  CHECK(got[0] == 50 * (32 + 10));
  CHECK(got[1] == 50 * (32 + 10));
}
