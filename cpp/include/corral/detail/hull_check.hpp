#pragma once
/// \file detail/hull_check.hpp
/// Turns the hull that qhull returns (detail/qhull.hpp: facets and ridges as point indices;
/// nothing else of qhull's is used) into facets or vertices recomputed from the caller's own
/// data, and validates the result. Both enumerations are written in one form, the vertices
/// of {y : r_i·y <= s_i} with s_i > 0 (the origin strictly inside):
///
/// - vertex enumeration: r_i are the unit rows, s_i their slacks at the interior point; the
///   facets are those of the hull of the polar points r_i / s_i;
/// - facet enumeration: r_i are the centred, scaled points and s_i = 1; a "vertex" y is the
///   facet {w : y·w <= 1} of their hull (polarity).
///
/// Every vertex is recomputed from the rows of its qhull facet (least squares; an n x n solve
/// for a simplicial facet). Adjacent qhull facets are grouped when each one's vertex rows are
/// tight at the other's vertex (a facet of the hull that qhull left in pieces), and again
/// when two groups turn out to have the same tight rows. The result is accepted only if:
/// 1. every ridge (its n - 1 indices) is listed by exactly two qhull facets, and the ridges
///    of each group form a closed cycle: every (n - 2)-subset of their indices occurs an even
///    number of times (ridges inside a group cancel);
/// 2. every row holds at every vertex within the tolerance, and the vertex rows of each
///    group's qhull facets are tight at its recomputed vertex;
/// 3. the rows tight at each vertex have rank n (n affinely independent points on a facet);
/// 4. no two vertices have the same tight rows, and every edge between adjacent vertices
///    (their common tight rows, rank n - 1) has exactly two end vertices: in facet terms,
///    every ridge lies in exactly two facets.
/// By 1 and 2 the groups form a closed surface (mod 2) of pieces of supporting hyperplanes,
/// each piece bounded by its own ridges; such a surface covers the whole boundary of the hull,
/// so a facet that qhull lost, or merged into a coarser one, makes a check fail.
///
/// The surface test (vertex enumeration with every qhull facet a simplex of n rows of rank n,
/// the common case of a simple polytope): in the polar, qhull's facets form
/// a closed simplicial surface through the polar points p_i = r_i / s_i. It is the boundary of
/// a convex polytope when it is locally convex at every ridge (the point of the neighbouring
/// facet off the ridge lies strictly inside the facet's hyperplane), the origin lies strictly
/// inside every facet's hyperplane (true here by construction), and the ray from the origin
/// through the centroid of one facet meets no other facet (Mehlhorn, Näher, Schilz, Schirra,
/// Seel, Seidel & Uhrig 1999, "Checking geometric programs or verification of geometric
/// structures", Comput. Geom. 12; conditions from memory). Then every polar point on the
/// surface lies inside every facet: check 2 holds for those rows without evaluating them at
/// every vertex, and each is tight exactly at the vertices of its facets. The strictness is
/// required with the tolerance as margin (slack > tol), the ray test with a relative margin of
/// 1e-9 on the barycentric coordinates; where a margin is not met the test is off and check 2
/// runs in full. Rows not on qhull's surface (its interior points) are always evaluated at
/// every vertex. Cost: two slacks per ridge and one n x n solve per facet near the ray,
/// against one box-tree walk per row (or, with 64 rows or fewer, one product per pair).
///
/// Slacks are distances in the caller's working (preconditioned) coordinates: for vertex
/// enumeration s_i - r_i·y with unit rows, judged at tol times max |y|_inf over the vertices;
/// for facet enumeration the distance (1 - r_i·y) / |y| of point i from facet y, judged at
/// tol (the points are centred and scaled to extent 1). Ranks use the same tol as the
/// relative threshold on pivots of unit rows.

#include <corral/detail/qhull.hpp>
#include <corral/types.hpp>

#include <Eigen/LU>
#include <Eigen/QR>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numeric>
#include <string>
#include <utility>
#include <vector>

namespace corral::detail {

/// What the rows and slacks mean (see the file comment).
enum class PolarMode { vertices, facets };

/// Sets of row indices stored one after another (compressed rows): set g is
/// items[start[g] .. start[g + 1]), ascending. One allocation for all sets instead of one each.
struct RowSets {
  std::vector<Index> start{0};
  std::vector<Index> items;

  /// A read-only view of one set (a range of Index).
  struct View {
    const Index* first;
    const Index* last;
    const Index* begin() const { return first; }
    const Index* end() const { return last; }
    size_t size() const { return static_cast<size_t>(last - first); }
    bool empty() const { return first == last; }
    Index operator[](size_t j) const { return first[j]; }
    Index back() const { return last[-1]; }
  };
  View operator[](size_t g) const { return {items.data() + start[g], items.data() + start[g + 1]}; }
  Index count() const { return static_cast<Index>(start.size()) - 1; }
  void clear() {
    start.assign(1, 0);
    items.clear();
  }
  /// Appends a set (any range of Index); the caller keeps it ascending.
  template <class Range>
  void push(const Range& r) {
    items.insert(items.end(), r.begin(), r.end());
    start.push_back(static_cast<Index>(items.size()));
  }
};

inline bool operator==(const RowSets::View& a, const RowSets::View& b) {
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin());
}
inline bool operator!=(const RowSets::View& a, const RowSets::View& b) { return !(a == b); }

/// Vertices of {y : r_i·y <= s_i} recomputed from qhull's hull of the polar points, and the
/// checks.
struct PolarCheck {
  bool ok = false;
  std::string failure;  ///< the first check that failed, when !ok
  Matrix objects;       ///< one vertex y per row
  RowSets tight;        ///< rows tight at each vertex, ascending
  /// Check 2 for the rows on qhull's hull came from its convexity (the surface test in the
  /// file comment) rather than from evaluating every row at every vertex.
  bool convex_surface = false;
};

namespace hull_check {

// Union-find over qhull facets.
inline Index find_root(std::vector<Index>& parent, Index a) {
  while (parent[static_cast<size_t>(a)] != a) {
    parent[static_cast<size_t>(a)] = parent[static_cast<size_t>(parent[static_cast<size_t>(a)])];
    a = parent[static_cast<size_t>(a)];
  }
  return a;
}
inline void unite(std::vector<Index>& parent, Index a, Index b) {
  a = find_root(parent, a);
  b = find_root(parent, b);
  if (a != b) parent[static_cast<size_t>(std::max(a, b))] = std::min(a, b);
}

// Numerical rank of the unit rows `rows` of U (relative pivot threshold tol).
template <class Rows>
Index rank_of(const Matrix& U, const Rows& rows, double tol) {
  Eigen::MatrixXd M(static_cast<Index>(rows.size()), U.cols());
  for (size_t k = 0; k < rows.size(); ++k) M.row(static_cast<Index>(k)) = U.row(rows[k]);
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(M);
  qr.setThreshold(tol);
  return qr.rank();
}

// Least-squares solution of U_rows y = u_rows; false when the rows have rank < n. The
// factorisations and their storage are kept between calls (one solver per validation).
struct RowSolver {
  Eigen::MatrixXd M;
  Eigen::VectorXd rhs;
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr;
  std::vector<Index> col;
  std::vector<double> a, z;

  // Gaussian elimination with complete pivoting on a copy of M (n x n) and rhs:
  // rank < n when a pivot is at most tol times the largest pivot so far (the rule of a
  // rank-revealing LU). For the small systems here it is several times faster than a general
  // LU object.
  bool solve_square(Index n, double tol, Eigen::Ref<Eigen::RowVectorXd> y) {
    // Working copy, row-major, and the right-hand side in its last column.
    const Index w = n + 1;
    a.resize(static_cast<size_t>(n * w));
    for (Index i = 0; i < n; ++i) {
      for (Index j = 0; j < n; ++j) a[static_cast<size_t>(i * w + j)] = M(i, j);
      a[static_cast<size_t>(i * w + n)] = rhs(i);
    }
    col.resize(static_cast<size_t>(n));
    std::iota(col.begin(), col.end(), Index{0});
    double* A = a.data();
    double largest = 0.0;
    for (Index k = 0; k < n; ++k) {
      Index pi = k, pj = k;
      double best = -1.0;
      for (Index i = k; i < n; ++i)
        for (Index j = k; j < n; ++j)
          if (std::abs(A[i * w + j]) > best) {
            best = std::abs(A[i * w + j]);
            pi = i;
            pj = j;
          }
      largest = std::max(largest, best);
      if (!(best > tol * largest) || !(largest > 0.0)) return false;
      if (pi != k)
        for (Index j = 0; j <= n; ++j) std::swap(A[pi * w + j], A[k * w + j]);
      if (pj != k) {
        for (Index i = 0; i < n; ++i) std::swap(A[i * w + pj], A[i * w + k]);
        std::swap(col[static_cast<size_t>(pj)], col[static_cast<size_t>(k)]);
      }
      const double* rowk = A + k * w;
      for (Index i = k + 1; i < n; ++i) {
        double* rowi = A + i * w;
        const double f = rowi[k] / rowk[k];
        if (f == 0.0) continue;
        for (Index j = k + 1; j <= n; ++j) rowi[j] -= f * rowk[j];
      }
    }
    z.resize(static_cast<size_t>(n));
    for (Index k = n - 1; k >= 0; --k) {
      const double* rowk = A + k * w;
      double v = rowk[n];
      for (Index j = k + 1; j < n; ++j) v -= rowk[j] * z[static_cast<size_t>(j)];
      z[static_cast<size_t>(k)] = v / rowk[k];
    }
    for (Index k = 0; k < n; ++k) y(col[static_cast<size_t>(k)]) = z[static_cast<size_t>(k)];
    return true;
  }

  template <class Rows>
  bool solve(const Matrix& U, const Vector& u, const Rows& rows, double tol,
             Eigen::Ref<Eigen::RowVectorXd> y) {
    const Index n = U.cols();
    M.resize(static_cast<Index>(rows.size()), n);
    rhs.resize(M.rows());
    for (size_t p = 0; p < rows.size(); ++p) {
      M.row(static_cast<Index>(p)) = U.row(rows[p]);
      rhs(static_cast<Index>(p)) = u(rows[p]);
    }
    if (M.rows() == n) return solve_square(n, tol, y);
    qr.compute(M);
    qr.setThreshold(tol);
    if (qr.rank() < n) return false;
    y = qr.solve(rhs).transpose();
    return true;
  }
};

template <class Big, class Small>
bool sorted_includes(const Big& big, const Small& small) {
  return std::includes(big.begin(), big.end(), small.begin(), small.end());
}

// Order-independent hashes of sets of row indices: the sum of one random 64-bit word per row
// (splitmix64), so that the hash of a set without one element is one subtraction. Equal
// hashes are always confirmed by comparing the sets.
inline std::vector<std::uint64_t> row_words(Index k) {
  std::vector<std::uint64_t> z(static_cast<size_t>(k));
  std::uint64_t x = 0x9e3779b97f4a7c15ULL;
  for (auto& w : z) {
    x += 0x9e3779b97f4a7c15ULL;
    std::uint64_t v = x;
    v = (v ^ (v >> 30)) * 0xbf58476d1ce4e5b9ULL;
    v = (v ^ (v >> 27)) * 0x94d049bb133111ebULL;
    w = v ^ (v >> 31);
  }
  return z;
}

// Calls visit(first, count) for every run of entries with equal keys, where entries are
// sorted by (hash, ...) and same(a, b) compares two entries' keys exactly (hash collisions
// split a run). Stops and returns false as soon as visit does.
template <class Entry, class Same, class Visit>
bool for_each_equal(const std::vector<Entry>& sorted, Same same, Visit visit) {
  std::vector<Entry> run, rest, equal;
  for (size_t p = 0; p < sorted.size();) {
    size_t q = p + 1;
    while (q < sorted.size() && sorted[q].first == sorted[p].first) ++q;
    // The common case, one key in the run: visited in place.
    bool one_key = true;
    for (size_t t = p + 1; t < q && one_key; ++t) one_key = same(sorted[p], sorted[t]);
    if (one_key) {
      if (!visit(sorted.data() + p, q - p)) return false;
      p = q;
      continue;
    }
    run.assign(sorted.begin() + static_cast<std::ptrdiff_t>(p),
               sorted.begin() + static_cast<std::ptrdiff_t>(q));
    p = q;
    while (!run.empty()) {
      equal.clear();
      rest.clear();
      for (const Entry& e : run) (same(run.front(), e) ? equal : rest).push_back(e);
      if (!visit(equal.data(), equal.size())) return false;
      run.swap(rest);
    }
  }
  return true;
}

// Bounding boxes over a point set, for finding the points where a linear function may reach
// a threshold without evaluating it at all of them: a k-d tree (Bentley 1975, CACM 18(9)),
// split at the median of the widest coordinate down to leaves of at most `leaf` points, each
// node with its box (centre c, half-widths h) and the largest per-point offset below it.
struct BoxTree {
  struct Node {
    Index begin, end;             // points perm[begin .. end)
    Index left = -1, right = -1;  // children, or -1 for a leaf
    double max_off = 0.0;
  };
  std::vector<Node> nodes;
  std::vector<Index> perm;
  Index depth = 0;  // the longest path from the root to a leaf, in edges
  Matrix Yp;        // the points in tree order
  Vector offp;      // their offsets in tree order
  // One row per node: the box's centre c, and its half-widths h widened by 1e-12 (|c| + h),
  // a margin for the rounding of the bound r·c + |r|·h against that of r·y.
  Matrix centre, spread;

  BoxTree(const Matrix& Y, const Vector& off, Index leaf) {
    const Index G = Y.rows(), n = Y.cols();
    perm.resize(static_cast<size_t>(G));
    std::iota(perm.begin(), perm.end(), Index{0});
    if (G == 0) return;  // no nodes: candidates() visits nothing
    nodes.reserve(static_cast<size_t>(2 * (G / std::max<Index>(leaf, 1) + 1)));
    build(Y, 0, G, leaf);
    Yp.resize(G, n);
    offp.resize(G);
    for (Index p = 0; p < G; ++p) {
      Yp.row(p) = Y.row(perm[static_cast<size_t>(p)]);
      offp(p) = off(perm[static_cast<size_t>(p)]);
    }
    // Boxes bottom-up: children come after their parent in `nodes`. lo / hi hold the box's
    // corners until they become its centre and widened half-widths.
    const Index N = static_cast<Index>(nodes.size());
    centre.resize(N, n);  // the lower corners first
    spread.resize(N, n);  // the upper corners first
    for (Index v = N - 1; v >= 0; --v) {
      Node& nd = nodes[static_cast<size_t>(v)];
      double* l = centre.data() + v * n;
      double* h = spread.data() + v * n;
      if (nd.left < 0) {
        const double* y0 = Yp.data() + nd.begin * n;
        for (Index j = 0; j < n; ++j) l[j] = h[j] = y0[j];
        nd.max_off = offp(nd.begin);
        for (Index p = nd.begin + 1; p < nd.end; ++p) {
          const double* y = Yp.data() + p * n;
          for (Index j = 0; j < n; ++j) {
            l[j] = std::min(l[j], y[j]);
            h[j] = std::max(h[j], y[j]);
          }
          nd.max_off = std::max(nd.max_off, offp(p));
        }
      } else {
        const double *la = centre.data() + nd.left * n, *lb = centre.data() + nd.right * n;
        const double *ha = spread.data() + nd.left * n, *hb = spread.data() + nd.right * n;
        for (Index j = 0; j < n; ++j) {
          l[j] = std::min(la[j], lb[j]);
          h[j] = std::max(ha[j], hb[j]);
        }
        nd.max_off = std::max(nodes[static_cast<size_t>(nd.left)].max_off,
                              nodes[static_cast<size_t>(nd.right)].max_off);
      }
    }
    for (Index v = 0; v < N; ++v) {
      double* l = centre.data() + v * n;
      double* h = spread.data() + v * n;
      for (Index j = 0; j < n; ++j) {
        const double c = 0.5 * (h[j] + l[j]), w = 0.5 * (h[j] - l[j]);
        l[j] = c;
        h[j] = w + 1e-12 * (std::abs(c) + w);
      }
    }
  }

  // Calls visit(p, r·y) for every point p (in tree order: the original index is perm[p]) where
  // r·y_p + off_p may be >= threshold; skips only boxes where it is certainly below. r: n
  // values; stack and ra: scratch.
  template <class Visit>
  void candidates(const double* r, double threshold, std::vector<Index>& stack,
                  std::vector<double>& ra, Visit visit) const {
    // The dimension as a compile-time constant for the common small ones (loops unrolled).
    switch (Yp.cols()) {
      case 2: return walk<2>(r, threshold, stack, ra, visit);
      case 3: return walk<3>(r, threshold, stack, ra, visit);
      case 4: return walk<4>(r, threshold, stack, ra, visit);
      case 5: return walk<5>(r, threshold, stack, ra, visit);
      case 6: return walk<6>(r, threshold, stack, ra, visit);
      case 7: return walk<7>(r, threshold, stack, ra, visit);
      case 8: return walk<8>(r, threshold, stack, ra, visit);
      default: return walk<0>(r, threshold, stack, ra, visit);
    }
  }

 private:
  // candidates() for dimension N (0: Yp.cols() at run time).
  template <int N, class Visit>
  void walk(const double* r, double threshold, std::vector<Index>& stack, std::vector<double>& ra,
            Visit& visit) const {
    const Index n = N > 0 ? N : Yp.cols();
    ra.resize(static_cast<size_t>(n));
    for (Index j = 0; j < n; ++j) ra[static_cast<size_t>(j)] = std::abs(r[j]);
    const double* rabs = ra.data();
    if (nodes.empty()) return;
    // At most one pending sibling per level besides the current path: depth + 2 entries.
    stack.resize(static_cast<size_t>(depth + 2));
    Index* st = stack.data();
    Index top = 0;
    st[top++] = 0;
    while (top > 0) {
      const Index v = st[--top];
      const Node& nd = nodes[static_cast<size_t>(v)];
      const double* c = centre.data() + v * n;
      const double* h = spread.data() + v * n;
      double bound = nd.max_off;
      for (Index j = 0; j < n; ++j) bound += c[j] * r[j] + h[j] * rabs[j];
      if (bound < threshold) continue;
      if (nd.left >= 0) {
        st[top++] = nd.right;
        st[top++] = nd.left;
        continue;
      }
      for (Index p = nd.begin; p < nd.end; ++p) {
        const double* y = Yp.data() + p * n;
        double d = 0.0;
        for (Index j = 0; j < n; ++j) d += y[j] * r[j];
        visit(p, d);
      }
    }
  }

  // Splits perm[begin .. end) at the median of its widest coordinate, recursively; returns the
  // node's index (a parent comes before its children).
  Index build(const Matrix& Y, Index begin, Index end, Index leaf, Index level = 0) {
    const Index v = static_cast<Index>(nodes.size());
    nodes.push_back({begin, end});
    depth = std::max(depth, level);
    if (end - begin <= leaf) return v;
    const Index n = Y.cols();
    Index axis = 0;
    double widest = -1.0;
    for (Index j = 0; j < n; ++j) {
      double mn = Y(perm[static_cast<size_t>(begin)], j), mx = mn;
      for (Index p = begin + 1; p < end; ++p) {
        const double y = Y(perm[static_cast<size_t>(p)], j);
        mn = std::min(mn, y);
        mx = std::max(mx, y);
      }
      if (mx - mn > widest) {
        widest = mx - mn;
        axis = j;
      }
    }
    const Index mid = begin + (end - begin) / 2;
    std::nth_element(perm.begin() + begin, perm.begin() + mid, perm.begin() + end,
                     [&Y, axis](Index a, Index b) { return Y(a, axis) < Y(b, axis); });
    const Index l = build(Y, begin, mid, leaf, level + 1);
    const Index r = build(Y, mid, end, leaf, level + 1);
    nodes[static_cast<size_t>(v)].left = l;
    nodes[static_cast<size_t>(v)].right = r;
    return v;
  }
};

}  // namespace hull_check

/// See the file comment. R: k x n rows; s: k positive right-hand sides; hull: qhull's facets
/// and ridges of the polar points; tol: the relative tolerance (Options::tolerance()).
inline PolarCheck polar_vertices(const Matrix& R, const Vector& s, const QhullRun& hull,
                                 PolarMode mode, double tol) {
  using hull_check::find_root;
  using Entry = std::pair<std::uint64_t, Index>;
  PolarCheck out;
  const Index n = R.cols(), k = R.rows();
  const Index F = hull.num_facets();
  const Index NR = static_cast<Index>(hull.ridge_owner.size());
  auto fail = [&out](std::string why) {
    out.ok = false;
    out.failure = "validation: " + std::move(why);
    return out;
  };
  if (n < 2 || F < n + 1 || static_cast<Index>(hull.ridge_points.size()) != NR * (n - 1))
    return fail("qhull's hull has fewer than n + 1 facets");

  // Unit rows and their right-hand sides (the rows of vertex enumeration are unit already).
  Matrix U(k, n);
  Vector u(k), inv_norm(k);
  for (Index i = 0; i < k; ++i) {
    if (!(s(i) > 0.0))
      return fail("the right-hand side of row " + std::to_string(i) + " is not positive");
    const double nr = R.row(i).norm();
    if (!(nr > 0.0) && mode == PolarMode::vertices)
      return fail("row " + std::to_string(i) + " is zero");
    // A zero row (a point at the centre, in facet enumeration) holds strictly everywhere; it
    // is never tight, and a facet containing it has rank < n.
    inv_norm(i) = nr > 0.0 ? 1.0 / nr : 0.0;
    U.row(i) = R.row(i) * inv_norm(i);
    u(i) = s(i) * inv_norm(i);
  }
  auto yscale_of = [](const Eigen::Ref<const Vector>& y) {
    const double nr = y.norm();
    return nr > 0.0 ? 1.0 / nr : 0.0;
  };
  // Slack of row i at y, in the distance of the mode (yscale = 1 / |y| for facets).
  auto slack = [&](Index i, const Eigen::Ref<const Vector>& y, double yscale) {
    const double v = s(i) - R.row(i).dot(y);
    return mode == PolarMode::facets ? v * yscale : v * inv_norm(i);
  };

  // qhull's facets (sorted rows) and ridges (sorted rows).
  RowSets facet_rows;
  facet_rows.items.reserve(hull.facet_points.size());
  facet_rows.start.reserve(static_cast<size_t>(F + 1));
  for (Index f = 0; f < F; ++f) {
    const size_t first = facet_rows.items.size();
    for (int p = hull.facet_start[static_cast<size_t>(f)];
         p < hull.facet_start[static_cast<size_t>(f + 1)]; ++p) {
      const int id = hull.facet_points[static_cast<size_t>(p)];
      if (id < 0 || id >= k) return fail("qhull returned an index out of range");
      facet_rows.items.push_back(id);
    }
    const auto fb = facet_rows.items.begin() + static_cast<std::ptrdiff_t>(first);
    std::sort(fb, facet_rows.items.end());
    if (static_cast<Index>(facet_rows.items.size() - first) < n ||
        std::adjacent_find(fb, facet_rows.items.end()) != facet_rows.items.end())
      return fail("a facet of qhull's hull has fewer than n distinct vertices");
    facet_rows.start.push_back(static_cast<Index>(facet_rows.items.size()));
  }
  const Index nk = n - 1;
  std::vector<Index> ridge_ids(static_cast<size_t>(NR * nk));
  auto ridge_at = [&ridge_ids, nk](Index r) { return ridge_ids.data() + r * nk; };
  for (Index r = 0; r < NR; ++r) {
    const int owner = hull.ridge_owner[static_cast<size_t>(r)];
    if (owner < 0 || owner >= F) return fail("qhull returned a ridge of no facet");
    for (Index j = 0; j < nk; ++j) {
      const int id = hull.ridge_points[static_cast<size_t>(r * nk + j)];
      if (id < 0 || id >= k) return fail("qhull returned an index out of range");
      ridge_at(r)[j] = id;
    }
    std::sort(ridge_at(r), ridge_at(r) + nk);
  }
  const std::vector<std::uint64_t> word = hull_check::row_words(k);

  // Check 1, first part: every ridge listed by exactly two facets, and by two different ones.
  // Equal ridges meet in an open-addressing table keyed by the ridge's hash (equal hashes are
  // confirmed by comparing the ridges).
  std::vector<std::pair<Index, Index>> adjacent;  // ridge entries (r, r') of the same ridge
  {
    std::vector<std::uint64_t> hash(static_cast<size_t>(NR));
    for (Index r = 0; r < NR; ++r) {
      std::uint64_t h = 0;
      for (Index j = 0; j < nk; ++j) h += word[static_cast<size_t>(ridge_at(r)[j])];
      hash[static_cast<size_t>(r)] = h;
    }
    size_t cap = 2;
    while (cap < 2 * static_cast<size_t>(NR)) cap <<= 1;
    std::vector<Index> slot(cap, -1), partner(static_cast<size_t>(NR), -1);
    adjacent.reserve(static_cast<size_t>(NR / 2));
    for (Index r = 0; r < NR; ++r) {
      const std::uint64_t h = hash[static_cast<size_t>(r)];
      size_t pos = static_cast<size_t>(h ^ (h >> 29)) & (cap - 1);
      bool placed = false;
      for (; slot[pos] >= 0; pos = (pos + 1) & (cap - 1)) {
        const Index q = slot[pos];
        if (hash[static_cast<size_t>(q)] != h ||
            !std::equal(ridge_at(q), ridge_at(q) + nk, ridge_at(r)))
          continue;
        if (partner[static_cast<size_t>(q)] >= 0)
          return fail(
              "a ridge of qhull's hull is listed by 3 or more facets (the boundary is "
              "not closed)");
        if (hull.ridge_owner[static_cast<size_t>(q)] == hull.ridge_owner[static_cast<size_t>(r)])
          return fail(
              "a ridge of qhull's hull is listed twice by one facet (the boundary is "
              "not closed)");
        partner[static_cast<size_t>(q)] = r;
        partner[static_cast<size_t>(r)] = q;
        adjacent.emplace_back(q, r);
        placed = true;
        break;
      }
      if (!placed) slot[pos] = r;
    }
    for (Index r = 0; r < NR; ++r)
      if (partner[static_cast<size_t>(r)] < 0)
        return fail("a ridge of qhull's hull is listed by 1 facet (the boundary is not closed)");
  }

  // Candidate vertex of each qhull facet, and the grouping of adjacent pieces.
  hull_check::RowSolver solver;
  Matrix Y(F, n);
  std::vector<char> simplex_full(static_cast<size_t>(F), 0);  // n rows of rank n
  for (Index f = 0; f < F; ++f) {
    const auto& fr = facet_rows[static_cast<size_t>(f)];
    if (!solver.solve(U, u, fr, tol, Y.row(f)))
      return fail("the vertex rows of a facet of qhull's hull have rank < n");
    simplex_full[static_cast<size_t>(f)] = static_cast<Index>(fr.size()) == n;
  }
  double cand_scale = Y.cwiseAbs().maxCoeff();
  if (!(cand_scale > 0.0) || !std::isfinite(cand_scale))
    return fail("a vertex from qhull's facets is not finite");
  const double group_tol = mode == PolarMode::facets ? tol : tol * cand_scale;
  std::vector<Index> parent(static_cast<size_t>(F));
  std::iota(parent.begin(), parent.end(), Index{0});
  // The surface test (file comment) applies to vertex enumeration with every qhull facet a
  // simplex of n rows of rank n; it stays on while every ridge is strictly convex.
  bool surface_test = mode == PolarMode::vertices;
  for (Index f = 0; f < F && surface_test; ++f) surface_test = simplex_full[static_cast<size_t>(f)];
  {
    auto rows_tight_at = [&](Index f, Index at) {
      const double ys = yscale_of(Y.row(at).transpose());
      for (Index i : facet_rows[static_cast<size_t>(f)])
        if (std::abs(slack(i, Y.row(at).transpose(), ys)) > group_tol) return false;
      return true;
    };
    // One test per ridge: two facets that share several ridges (pieces of a merged facet)
    // are tested again, which changes nothing.
    // A quick rejection first: the row of f off the ridge (the one row an adjacent simplex
    // does not share) is almost never tight at the other facet's vertex. The same slack,
    // signed, serves the surface test (file comment): with simplicial facets it must be
    // strictly positive, beyond the tolerance, both ways across every ridge. NaN when f
    // has no row off the ridge.
    auto off_ridge_slack = [&](Index f, Index r, Index at) {
      const Index* rg = ridge_at(r);
      for (Index i : facet_rows[static_cast<size_t>(f)])
        if (!std::binary_search(rg, rg + nk, i)) {
          const double ys = mode == PolarMode::facets ? yscale_of(Y.row(at).transpose()) : 1.0;
          return slack(i, Y.row(at).transpose(), ys);
        }
      return std::numeric_limits<double>::quiet_NaN();
    };
    auto tight_or_none = [&](double v) { return std::isnan(v) || std::abs(v) <= group_tol; };
    for (const auto& [ra, rb] : adjacent) {
      const Index fa = hull.ridge_owner[static_cast<size_t>(ra)];
      const Index fb = hull.ridge_owner[static_cast<size_t>(rb)];
      const double sb = off_ridge_slack(fb, rb, fa);
      const double sa = surface_test || tight_or_none(sb)
                            ? off_ridge_slack(fa, ra, fb)
                            : std::numeric_limits<double>::quiet_NaN();
      if (surface_test && !(sb > group_tol && sa > group_tol)) surface_test = false;
      if (!tight_or_none(sb) || !tight_or_none(sa)) continue;
      if (find_root(parent, fa) == find_root(parent, fb)) continue;
      if (rows_tight_at(fb, fa) && rows_tight_at(fa, fb)) hull_check::unite(parent, fa, fb);
    }
  }

  // The ray condition of the surface test: the ray from the origin through the centroid c of
  // facet 0's polar points meets no other facet. Facet g (the simplex of the polar points
  // p_i = U_i / u_i, i in its rows T, on the hyperplane p·y_g = 1) is met, if at all, at
  // x = c / (c·y_g) with c·y_g > 0; x = sum_q lambda_q p_q with lambda_q = mu_q u_q, where
  // U_T^T mu = x. It is missed when some lambda_q is clearly negative; a facet met or
  // touched within rounding turns the test off (check 2 then runs in full).
  if (surface_test) {
    // The centroid of a facet's polar points into m (no allocation: this runs per facet).
    auto centroid = [&](const RowSets::View& T, Vector& m) {
      m.setZero();
      for (Index i : T) m += U.row(i).transpose() / u(i);
      m /= static_cast<double>(n);
    };
    Vector c(n), x(n), centre(n);
    centroid(facet_rows[0], c);
    solver.M.resize(n, n);
    solver.rhs.resize(n);
    Eigen::RowVectorXd mu(n);
    for (Index g = 1; g < F && surface_test; ++g) {
      const double d = Y.row(g).dot(c);
      if (!(d > 0.0)) continue;
      const auto& T = facet_rows[static_cast<size_t>(g)];
      // A quick miss first: x farther from the facet's centroid than its farthest point
      // (with a margin) is outside the simplex.
      x = c / d;
      centroid(T, centre);
      double reach = 0.0;
      for (Index i : T) reach = std::max(reach, (U.row(i).transpose() / u(i) - centre).norm());
      if ((x - centre).norm() > 1.01 * reach) continue;
      for (Index q = 0; q < n; ++q)
        for (Index j = 0; j < n; ++j) solver.M(j, q) = U(T[static_cast<size_t>(q)], j);
      solver.rhs = x;
      if (!solver.solve_square(n, tol, mu)) {
        surface_test = false;
        break;
      }
      double lowest = std::numeric_limits<double>::infinity(), largest = 0.0;
      for (Index q = 0; q < n; ++q) {
        const double lambda = mu(q) * u(T[static_cast<size_t>(q)]);
        lowest = std::min(lowest, lambda);
        largest = std::max(largest, std::abs(lambda));
      }
      if (!(lowest < -1e-9 * largest)) surface_test = false;
    }
  }

  // Groups and their rows; each group's vertex is recomputed by least squares on its rows,
  // then check 2. Groups with the same tight rows are one vertex (facet): they are merged and
  // the groups rebuilt, once.
  std::vector<Index> group_of(static_cast<size_t>(F));
  std::vector<Index> first_facet, count;
  RowSets group_rows;
  std::vector<Index> members, gather;                // facets by group; scratch
  std::vector<std::pair<Index, Index>> tight_pairs;  // (vertex, row) as found
  Index G = 0;
  for (int pass = 0;; ++pass) {
    std::vector<Index> root_group(static_cast<size_t>(F), -1);
    first_facet.clear();
    count.clear();
    for (Index f = 0; f < F; ++f) {
      const Index r = find_root(parent, f);
      if (root_group[static_cast<size_t>(r)] < 0) {
        root_group[static_cast<size_t>(r)] = static_cast<Index>(first_facet.size());
        first_facet.push_back(f);
        count.push_back(0);
      }
      group_of[static_cast<size_t>(f)] = root_group[static_cast<size_t>(r)];
      ++count[static_cast<size_t>(group_of[static_cast<size_t>(f)])];
    }
    G = static_cast<Index>(first_facet.size());
    if (G < n + 1) return fail("fewer than n + 1 vertices (facets) after grouping");
    // Facets by group (a counting sort), then each group's rows: its facet's rows, or the
    // sorted union of its facets' rows.
    std::vector<Index> member_start(static_cast<size_t>(G + 1), 0);
    for (Index f = 0; f < F; ++f)
      ++member_start[static_cast<size_t>(group_of[static_cast<size_t>(f)] + 1)];
    for (Index g = 0; g < G; ++g)
      member_start[static_cast<size_t>(g + 1)] += member_start[static_cast<size_t>(g)];
    members.assign(static_cast<size_t>(F), 0);
    {
      std::vector<Index> fill(member_start.begin(), member_start.end() - 1);
      for (Index f = 0; f < F; ++f)
        members[static_cast<size_t>(
            fill[static_cast<size_t>(group_of[static_cast<size_t>(f)])]++)] = f;
    }
    group_rows.clear();
    group_rows.items.reserve(facet_rows.items.size());
    out.objects.resize(G, n);
    for (Index g = 0; g < G; ++g) {
      if (count[static_cast<size_t>(g)] == 1) {
        group_rows.push(facet_rows[static_cast<size_t>(first_facet[static_cast<size_t>(g)])]);
        out.objects.row(g) = Y.row(first_facet[static_cast<size_t>(g)]);
        continue;
      }
      gather.clear();
      for (Index q = member_start[static_cast<size_t>(g)];
           q < member_start[static_cast<size_t>(g + 1)]; ++q) {
        const auto fr = facet_rows[static_cast<size_t>(members[static_cast<size_t>(q)])];
        gather.insert(gather.end(), fr.begin(), fr.end());
      }
      std::sort(gather.begin(), gather.end());
      gather.erase(std::unique(gather.begin(), gather.end()), gather.end());
      group_rows.push(gather);
      if (!solver.solve(U, u, group_rows[static_cast<size_t>(g)], tol, out.objects.row(g)))
        return fail("the rows of a group of facets have rank < n");
    }
    if (!out.objects.allFinite()) return fail("a recomputed vertex is not finite");

    // Check 2: every row at every vertex; collect the tight rows.
    const double abs_tol =
        mode == PolarMode::facets ? tol : tol * out.objects.cwiseAbs().maxCoeff();
    tight_pairs.clear();
    tight_pairs.reserve(static_cast<size_t>(G * n));
    // The tests in terms of the products r_i·y, in one pass over them: row i is tight at
    // vertex g when r_i·y_g >= lo_i - off_g and violated when r_i·y_g > hi_i + off_g. For
    // vertices, slack (s_i - r_i·y) / |r_i| against abs_tol gives lo, hi = s_i -/+ abs_tol |r_i|
    // and off = 0; for facets, slack (s_i - r_i·y) / |y| against tol gives lo = hi = s_i and
    // off = tol |y| (+inf for y = 0, whose slack is 0 everywhere: tight, never violated).
    Vector lo(k), hi(k), off(G);
    for (Index i = 0; i < k; ++i) {
      const double band = mode == PolarMode::facets ? 0.0 : abs_tol / inv_norm(i);
      lo(i) = s(i) - band;
      hi(i) = s(i) + band;
    }
    for (Index g = 0; g < G; ++g) {
      const double ys = yscale_of(out.objects.row(g).transpose());
      off(g) = mode == PolarMode::vertices ? 0.0
               : ys > 0.0                  ? tol / ys
                                           : std::numeric_limits<double>::infinity();
    }
    // The surface test passed: the rows on qhull's hull hold at every vertex (the surface is
    // convex), and each is tight at the vertices of its facets; only the other rows are
    // evaluated. (pass 0 only: the test's facets are the groups; a merge ends it.)
    std::vector<char> on_surface;
    const bool surface = surface_test && pass == 0 && G == F;
    out.convex_surface = surface;
    Index surface_rows = 0;
    if (surface) {
      on_surface.assign(static_cast<size_t>(k), 0);
      for (Index f = 0; f < F; ++f)
        for (Index i : facet_rows[static_cast<size_t>(f)]) {
          surface_rows += !on_surface[static_cast<size_t>(i)];
          on_surface[static_cast<size_t>(i)] = 1;
          tight_pairs.emplace_back(group_of[static_cast<size_t>(f)], i);
        }
    }
    const bool off_surface = surface_rows < k;  // some row is evaluated at every vertex
    // Few rows (64 or fewer): every pair, by blocked matrix products; the tree's construction
    // would cost more than it saves (measured by instruction counts at n = 3..6).
    const bool direct = k <= 64;
    if (direct && off_surface) {
      const Index block = 512;
      Matrix P;  // block x k: the products of a block of vertices with every row
      for (Index g0 = 0; g0 < G; g0 += block) {
        const Index B = std::min(block, G - g0);
        P.noalias() = out.objects.middleRows(g0, B) * R.transpose();
        for (Index c = 0; c < B; ++c) {
          const double* pr = P.data() + c * k;
          const double o = off(g0 + c);
          for (Index i = 0; i < k; ++i) {
            if (pr[i] + o < lo(i)) continue;  // not tight
            if (surface && on_surface[static_cast<size_t>(i)]) continue;
            if (pr[i] - o > hi(i)) {
              const Vector y = out.objects.row(g0 + c).transpose();
              return fail((mode == PolarMode::facets ? "point " : "row ") + std::to_string(i) +
                          " is outside " + (mode == PolarMode::facets ? "facet " : "at vertex ") +
                          std::to_string(g0 + c) + " by " +
                          std::to_string(-slack(i, y, yscale_of(y))));
            }
            tight_pairs.emplace_back(g0 + c, i);
          }
        }
      }
    }
    // Only the vertices that a box of the tree does not rule out are evaluated (the rest
    // have r_i·y + off < lo_i <= hi_i, so they are neither tight nor violated); rows go in
    // increasing order, so each tight list comes out sorted.
    const bool any_walk = !direct && off_surface;
    const hull_check::BoxTree tree(any_walk ? out.objects : Matrix(0, n), off, 8);
    std::vector<Index> stack;
    std::vector<double> scratch;
    for (Index i = 0; i < k && any_walk; ++i) {
      if (surface && on_surface[static_cast<size_t>(i)]) continue;
      const double l = lo(i), h = hi(i);
      const double* r = R.data() + i * n;
      Index bad = -1;
      auto test = [&](Index g, double v, double o) {
        if (v + o < l) return;  // not tight
        if (v - o > h) bad = g;
        tight_pairs.emplace_back(g, i);
      };
      tree.candidates(r, l, stack, scratch, [&](Index p, double v) {
        test(tree.perm[static_cast<size_t>(p)], v, tree.offp(p));
      });
      if (bad >= 0) {
        const Vector y = out.objects.row(bad).transpose();
        return fail((mode == PolarMode::facets ? "point " : "row ") + std::to_string(i) +
                    " is outside " + (mode == PolarMode::facets ? "facet " : "at vertex ") +
                    std::to_string(bad) + " by " + std::to_string(-slack(i, y, yscale_of(y))));
      }
    }
    // The pairs come row after row: a stable counting sort by vertex gives each vertex's
    // rows in ascending order.
    out.tight.start.assign(static_cast<size_t>(G + 1), 0);
    for (const auto& [g, i] : tight_pairs) ++out.tight.start[static_cast<size_t>(g + 1)];
    for (Index g = 0; g < G; ++g)
      out.tight.start[static_cast<size_t>(g + 1)] += out.tight.start[static_cast<size_t>(g)];
    out.tight.items.resize(tight_pairs.size());
    {
      std::vector<Index> fill(out.tight.start.begin(), out.tight.start.end() - 1);
      for (const auto& [g, i] : tight_pairs)
        out.tight.items[static_cast<size_t>(fill[static_cast<size_t>(g)]++)] = i;
    }
    // With the surface test the pairs came facet by facet (each facet's rows ascending), then
    // row by row for the rows off the surface: those lists need sorting.
    if (surface && off_surface)
      for (Index g = 0; g < G; ++g)
        std::sort(out.tight.items.begin() +
                      static_cast<std::ptrdiff_t>(out.tight.start[static_cast<size_t>(g)]),
                  out.tight.items.begin() +
                      static_cast<std::ptrdiff_t>(out.tight.start[static_cast<size_t>(g + 1)]));
    for (Index g = 0; g < G; ++g)
      if (!hull_check::sorted_includes(out.tight[static_cast<size_t>(g)],
                                       group_rows[static_cast<size_t>(g)]))
        return fail(
            "a vertex row of a qhull facet is not tight at its recomputed vertex "
            "(facet " +
            std::to_string(g) + ")");

    // Distinct tight sets (check 4, first part); equal ones are merged once.
    // Sorted by the hash of the tight set; equal sets have equal hashes and are confirmed by
    // comparing the sets.
    std::vector<Entry> order(static_cast<size_t>(G));
    for (Index g = 0; g < G; ++g) {
      std::uint64_t h = 0;
      for (Index i : out.tight[static_cast<size_t>(g)]) h += word[static_cast<size_t>(i)];
      order[static_cast<size_t>(g)] = {h, g};
    }
    std::sort(order.begin(), order.end());
    bool merged = false;
    for (size_t p = 0; p < order.size(); ++p)
      for (size_t q = p + 1; q < order.size() && order[q].first == order[p].first; ++q) {
        const Index ga = order[p].second, gb = order[q].second;
        if (out.tight[static_cast<size_t>(ga)] != out.tight[static_cast<size_t>(gb)]) continue;
        if (pass > 0) return fail("two vertices (facets) have the same tight rows");
        hull_check::unite(parent, first_facet[static_cast<size_t>(ga)],
                          first_facet[static_cast<size_t>(gb)]);
        merged = true;
      }
    if (!merged) break;
  }

  // Check 1, second part: the ridges of each group form a closed cycle mod 2. Entries: the
  // (n - 2)-subsets of every ridge entry, keyed by (group, subset); every key must occur an
  // even number of times. A group of one facet with n vertices and n ridges, each n - 1 of
  // its vertices, passes trivially: n distinct (n - 1)-subsets of an n-set (distinct by the
  // first part) are all of them, the boundary of a simplex. Such groups, the common case of
  // a simple polytope (simplicial hull), are skipped.
  std::vector<Index> ridges_of(static_cast<size_t>(F), 0);
  std::vector<char> simplex_boundary(static_cast<size_t>(F), 1);
  for (Index r = 0; r < NR; ++r) {
    const Index f = hull.ridge_owner[static_cast<size_t>(r)];
    ++ridges_of[static_cast<size_t>(f)];
    const auto& fr = facet_rows[static_cast<size_t>(f)];
    if (!std::includes(fr.begin(), fr.end(), ridge_at(r), ridge_at(r) + nk))
      simplex_boundary[static_cast<size_t>(f)] = 0;
  }
  auto trivial = [&](Index f) {
    return count[static_cast<size_t>(group_of[static_cast<size_t>(f)])] == 1 &&
           static_cast<Index>(facet_rows[static_cast<size_t>(f)].size()) == n &&
           ridges_of[static_cast<size_t>(f)] == n && simplex_boundary[static_cast<size_t>(f)];
  };
  {
    std::vector<Entry> sub;
    for (Index r = 0; r < NR; ++r) {
      if (trivial(hull.ridge_owner[static_cast<size_t>(r)])) continue;
      const Index g = group_of[static_cast<size_t>(hull.ridge_owner[static_cast<size_t>(r)])];
      std::uint64_t h =
          word[static_cast<size_t>(g % k)] * 0x2545f4914f6cdd1dULL + static_cast<std::uint64_t>(g);
      for (Index j = 0; j < nk; ++j) h += word[static_cast<size_t>(ridge_at(r)[j])];
      for (Index j = 0; j < nk; ++j)
        sub.emplace_back(h - word[static_cast<size_t>(ridge_at(r)[j])], r * nk + j);
    }
    std::sort(sub.begin(), sub.end());
    auto same = [&](const Entry& a, const Entry& b) {
      const Index ra = a.second / nk, ja = a.second % nk, rb = b.second / nk, jb = b.second % nk;
      if (group_of[static_cast<size_t>(hull.ridge_owner[static_cast<size_t>(ra)])] !=
          group_of[static_cast<size_t>(hull.ridge_owner[static_cast<size_t>(rb)])])
        return false;
      for (Index p = 0, qa = 0, qb = 0; p < nk - 1; ++p, ++qa, ++qb) {
        if (qa == ja) ++qa;
        if (qb == jb) ++qb;
        if (ridge_at(ra)[qa] != ridge_at(rb)[qb]) return false;
      }
      return true;
    };
    const bool closed = hull_check::for_each_equal(
        sub, same, [](const Entry*, size_t count) { return count % 2 == 0; });
    if (!closed) return fail("the ridges of a facet do not close up (a hole in its boundary)");
  }

  // Check 3: tight rows of rank n at each vertex.
  for (Index g = 0; g < G; ++g) {
    const auto& T = out.tight[static_cast<size_t>(g)];
    const Index f0 = first_facet[static_cast<size_t>(g)];
    // A single simplicial facet whose n x n solve had rank n needs no factorisation.
    const bool known = count[static_cast<size_t>(g)] == 1 && simplex_full[static_cast<size_t>(f0)];
    if (static_cast<Index>(T.size()) < n || (!known && hull_check::rank_of(U, T, tol) < n))
      return fail("the rows tight at vertex (facet) " + std::to_string(g) + " have rank < n");
  }

  // Check 4: every edge (ridge) with exactly two ends (facets). Vertices (facets) containing
  // a set E of rows are counted in two parts: those with exactly n tight rows through the
  // hashes of their (n - 1)-subsets (the simple or simplicial case, where a row lies at many
  // vertices), and the others through per-row lists (short in degenerate cases such as
  // boxes).
  //
  // 4a. A vertex with exactly n tight rows (of rank n, check 3) is simple: each of its n
  // (n - 1)-subsets E spans an edge, which has exactly two end vertices, and no other
  // vertex contains E. So every such key must be contained in exactly two vertices; this
  // covers every edge at a simple vertex, whether qhull reported the adjacency or not.
  // 4b. For the other adjacent pairs that qhull reports: the ridge lies on both sides, and
  // the common tight rows, when they have rank n - 1, lie in exactly two vertices.
  //
  // When every vertex is a trivial group (above) with exactly n tight rows, those rows are
  // its qhull facet's, and its n ridges are all their (n - 1)-subsets: the keys of 4a are
  // then exactly the ridges, which check 1 found listed by exactly two facets each, and 4a
  // is skipped.
  bool all_simple_facets = true;
  for (Index f = 0; f < F && all_simple_facets; ++f)
    all_simple_facets =
        trivial(f) &&
        static_cast<Index>(
            out.tight[static_cast<size_t>(group_of[static_cast<size_t>(f)])].size()) == n;
  std::vector<std::vector<Index>> at_row_big(static_cast<size_t>(k));
  std::vector<Entry> keys;  // (hash, g * n + j): T_g without T_g[j]
  for (Index g = 0; g < G && !all_simple_facets; ++g) {
    const auto& T = out.tight[static_cast<size_t>(g)];
    if (static_cast<Index>(T.size()) == n) {
      std::uint64_t h = 0;
      for (Index i : T) h += word[static_cast<size_t>(i)];
      for (Index j = 0; j < n; ++j)
        keys.emplace_back(h - word[static_cast<size_t>(T[static_cast<size_t>(j)])], g * n + j);
    } else {
      for (Index i : T) at_row_big[static_cast<size_t>(i)].push_back(g);
    }
  }
  std::sort(keys.begin(), keys.end());
  auto key_equals = [&out, n, nk](Index e, const std::vector<Index>& E) {
    const auto& T = out.tight[static_cast<size_t>(e / n)];
    for (Index p = 0, q = 0; p < nk; ++p, ++q) {
      if (q == e % n) ++q;
      if (T[static_cast<size_t>(q)] != E[static_cast<size_t>(p)]) return false;
    }
    return true;
  };
  auto count_containing = [&](const std::vector<Index>& E) {
    long found = 0;
    if (static_cast<Index>(E.size()) == nk) {
      std::uint64_t h = 0;
      for (Index i : E) h += word[static_cast<size_t>(i)];
      auto it = std::lower_bound(keys.begin(), keys.end(), Entry{h, Index{-1}});
      for (; it != keys.end() && it->first == h; ++it)
        if (key_equals(it->second, E)) ++found;
    }
    Index r1 = E[0];
    for (Index i : E)
      if (at_row_big[static_cast<size_t>(i)].size() < at_row_big[static_cast<size_t>(r1)].size())
        r1 = i;
    for (Index f : at_row_big[static_cast<size_t>(r1)])
      if (hull_check::sorted_includes(out.tight[static_cast<size_t>(f)], E)) ++found;
    return found;
  };
  bool any_big = false;
  for (const auto& l : at_row_big) any_big = any_big || !l.empty();
  if (!all_simple_facets) {
    std::vector<Index> E(static_cast<size_t>(nk));
    auto key_rows = [&out, n, nk, &E](Index e) {
      const auto& T = out.tight[static_cast<size_t>(e / n)];
      for (Index p = 0, q = 0; p < nk; ++p, ++q) {
        if (q == e % n) ++q;
        E[static_cast<size_t>(p)] = T[static_cast<size_t>(q)];
      }
    };
    auto same_key = [&](const Entry& a, const Entry& b) {
      key_rows(a.second);
      return key_equals(b.second, E);
    };
    std::string why;
    const bool two_ends =
        hull_check::for_each_equal(keys, same_key, [&](const Entry* e, size_t count) {
          long ends = static_cast<long>(count);
          if (any_big) {
            key_rows(e[0].second);
            Index r1 = E[0];
            for (Index i : E)
              if (at_row_big[static_cast<size_t>(i)].size() <
                  at_row_big[static_cast<size_t>(r1)].size())
                r1 = i;
            for (Index f : at_row_big[static_cast<size_t>(r1)])
              if (hull_check::sorted_includes(out.tight[static_cast<size_t>(f)], E)) ++ends;
          }
          if (ends == 2) return true;
          why = "an edge (ridge) at vertex (facet) " + std::to_string(e[0].second / n) + " has " +
                std::to_string(ends) + " end vertices (facets), not two";
          return false;
        });
    if (!two_ends) return fail(why);
  }
  // A simple vertex: exactly n tight rows (rank n by check 3).
  auto fast = [&](Index g) {
    return static_cast<Index>(out.tight[static_cast<size_t>(g)].size()) == n;
  };
  // Adjacent groups through a ridge, and whether that ridge comes from a full-rank simplicial
  // facet (then its n - 1 rows are independent).
  struct Pair {
    Index a, b, ridge;
    bool full;
  };
  // With every vertex a simplex facet whose tight rows are its own, every ridge is n - 1 of
  // those rows on both sides and every edge is a ridge that check 1 counted: 4b has nothing
  // left to find.
  if (all_simple_facets) adjacent.clear();
  std::vector<Pair> pairs;
  for (const auto& [ra, rb] : adjacent) {
    const Index fa = hull.ridge_owner[static_cast<size_t>(ra)];
    const Index fb = hull.ridge_owner[static_cast<size_t>(rb)];
    const Index ga = group_of[static_cast<size_t>(fa)], gb = group_of[static_cast<size_t>(fb)];
    if (ga == gb) continue;
    pairs.push_back(
        {std::min(ga, gb), std::max(ga, gb), ra,
         simplex_full[static_cast<size_t>(fa)] || simplex_full[static_cast<size_t>(fb)]});
  }
  std::sort(pairs.begin(), pairs.end(), [](const Pair& x, const Pair& y) {
    return x.a != y.a ? x.a < y.a : x.b != y.b ? x.b < y.b : x.full > y.full;
  });
  std::vector<Index> E, ridge;
  for (size_t p = 0; p < pairs.size(); ++p) {
    const Pair& pr = pairs[p];
    const bool first_of_pair = p == 0 || pairs[p - 1].a != pr.a || pairs[p - 1].b != pr.b;
    const auto& Ta = out.tight[static_cast<size_t>(pr.a)];
    const auto& Tb = out.tight[static_cast<size_t>(pr.b)];
    ridge.assign(ridge_at(pr.ridge), ridge_at(pr.ridge) + nk);
    // Every ridge lies on both sides (its rows tight at both vertices).
    if (!hull_check::sorted_includes(Ta, ridge) || !hull_check::sorted_includes(Tb, ridge))
      return fail("a ridge of qhull's hull is not on both its facets");
    // Two simple vertices: their common tight rows contain the ridge (n - 1 rows) and are not
    // all n rows (the tight sets are distinct), so they are a key that 4a checked.
    if (!first_of_pair || (fast(pr.a) && fast(pr.b))) continue;
    E.clear();
    std::set_intersection(Ta.begin(), Ta.end(), Tb.begin(), Tb.end(), std::back_inserter(E));
    // E contains the ridge; equal to it and from a full-rank simplex, its rank is n - 1.
    const bool known = pr.full && static_cast<Index>(E.size()) == nk;
    const Index r = known ? nk : hull_check::rank_of(U, E, tol);
    if (r >= n)
      return fail("adjacent vertices (facets) " + std::to_string(pr.a) + " and " +
                  std::to_string(pr.b) + " coincide");
    if (r < nk) continue;  // touch in a lower face only (through a degenerate ridge)
    if (count_containing(E) != 2)
      return fail("an edge (ridge) does not have exactly two end vertices (facets)");
  }
  out.ok = true;
  return out;
}

}  // namespace corral::detail
