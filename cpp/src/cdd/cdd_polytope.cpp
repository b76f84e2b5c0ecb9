// Double description, hulls and canonicalisation through cddlib (Motzkin et al. 1953; Fukuda &
// Prodon 1996), in double (ddf_*) or GMP rationals (dd_*). Every call holds the cddlib mutex.

#include <corral/detail/cdd.hpp>
#include <corral/errors.hpp>

#include <cstdlib>
#include <string>
#include <type_traits>

#include "cdd/cdd_common.hpp"

namespace corral::detail {
namespace {

// Fills rows [b_i, -a_i] (inequalities b - A x >= 0).
template <class T>
typename T::MatrixPtr h_matrix(const Matrix& A, const Vector& b) {
  const long m = static_cast<long>(A.rows()), n = static_cast<long>(A.cols());
  typename T::MatrixPtr M = T::create(m, n + 1);
  T::prepare(M, false);
  for (long i = 0; i < m; ++i) {
    T::set(M, i, 0, b(i));
    for (long j = 0; j < n; ++j) T::set(M, i, j + 1, A(i, j) == 0.0 ? 0.0 : -A(i, j));
  }
  return M;
}

template <class T>
CddGenerators generators(const Matrix& A, const Vector& b, bool rationals) {
  const long n = static_cast<long>(A.cols());
  CddGenerators out;
  auto lock = cdd_lock();
  typename T::MatrixPtr M = h_matrix<T>(A, b);
  typename T::ErrorType err = T::kNoError;
  typename T::PolyPtr poly = T::to_poly(M, &err);
  T::free_matrix(M);
  if (poly == nullptr || !T::no_error(err)) {
    if (poly) T::free_poly(poly);
    throw SolverError("cdd: double description failed on the inequalities");
  }
  typename T::MatrixPtr G = T::generators(poly);
  const long k = G->rowsize;
  long np = 0, nr = 0;
  for (long i = 0; i < k; ++i) (T::get(G, i, 0) != 0.0 ? np : nr)++;
  out.points.resize(np, n);
  out.rays.resize(nr, n);
  if (rationals) {
    out.exact_points.rows = np;
    out.exact_points.cols = n;
  }
  long ip = 0, ir = 0;
  for (long i = 0; i < k; ++i) {
    const bool is_point = T::get(G, i, 0) != 0.0;
    if (set_member(i + 1, G->linset)) out.has_lines = true;
    for (long j = 0; j < n; ++j) {
      if (is_point) out.points(ip, j) = T::get(G, i, j + 1);
      else out.rays(ir, j) = T::get(G, i, j + 1);
    }
    if (is_point && rationals) {
      if constexpr (std::is_same_v<T, CddExact>) {
        for (long j = 0; j < n; ++j)
          out.exact_points.data.push_back(to_rational(G->matrix[i][j + 1]));
      }
    }
    (is_point ? ip : ir)++;
  }
  T::free_matrix(G);
  T::free_poly(poly);
  return out;
}

template <class T>
CddHull hull(const Matrix& V) {
  const long k = static_cast<long>(V.rows()), n = static_cast<long>(V.cols());
  CddHull out;
  auto lock = cdd_lock();
  typename T::MatrixPtr M = T::create(k, n + 1);
  T::prepare(M, true);
  for (long i = 0; i < k; ++i) {
    T::set(M, i, 0, 1.0);
    for (long j = 0; j < n; ++j) T::set(M, i, j + 1, V(i, j));
  }
  typename T::ErrorType err = T::kNoError;
  typename T::PolyPtr poly = T::to_poly(M, &err);
  T::free_matrix(M);
  if (poly == nullptr || !T::no_error(err)) {
    if (poly) T::free_poly(poly);
    throw SolverError("cdd: double description failed on the points");
  }
  typename T::MatrixPtr H = T::inequalities(poly);
  const long m = H->rowsize;
  out.A.resize(m, n);
  out.b.resize(m);
  out.equality.resize(static_cast<size_t>(m));
  for (long i = 0; i < m; ++i) {
    out.b(i) = T::get(H, i, 0);
    for (long j = 0; j < n; ++j) {
      const double v = T::get(H, i, j + 1);
      out.A(i, j) = v == 0.0 ? 0.0 : -v;
    }
    out.equality[static_cast<size_t>(i)] = set_member(i + 1, H->linset) != 0;
  }
  T::free_matrix(H);
  T::free_poly(poly);
  return out;
}

// Implicit equalities (cddlib's implicit-linearity LPs), then one LP per remaining row with
// those rows as equalities.
template <class T>
CddCanonical redundancy(const Matrix& A, const Vector& b) {
  CddCanonical out;
  const long m = static_cast<long>(A.rows());
  if (m == 0) return out;
  auto lock = cdd_lock();
  typename T::MatrixPtr M = h_matrix<T>(A, b);
  typename T::ErrorType err = T::kNoError;
  set_type lin = T::implicit_linearity(M, &err);
  bool ok = lin != nullptr && T::no_error(err);
  set_type red = nullptr;
  if (ok) {
    set_copy(M->linset, lin);
    red = T::redundant_rows(M, &err);
    ok = red != nullptr && T::no_error(err);
  }
  if (ok)
    for (long i = 1; i <= m; ++i) {
      if (set_member(i, lin)) out.equalities.push_back(i - 1);
      else if (set_member(i, red)) out.redundant.push_back(i - 1);
    }
  if (lin) set_free(lin);
  if (red) set_free(red);
  T::free_matrix(M);
  if (!ok) throw SolverError("cdd: redundancy test failed");
  return out;
}

template <class T>
CddCanonical canonicalize(const Matrix& A, const Vector& b) {
  CddCanonical out;
  const long m = static_cast<long>(A.rows());
  if (m == 0) return out;
  auto lock = cdd_lock();
  typename T::MatrixPtr M = h_matrix<T>(A, b);
  set_type lin = nullptr, red = nullptr;
  typename T::RowIndex pos = nullptr;
  typename T::ErrorType err = T::kNoError;
  const bool ok = T::canonicalize(&M, &lin, &red, &pos, &err) && T::no_error(err);
  if (ok) {
    for (long i = 1; i <= m; ++i) {
      // newpos[i] > 0 is row i's new position; 0 or < 0: removed, or merged into another row.
      if (pos[i] <= 0) out.redundant.push_back(i - 1);
      else if (set_member(pos[i], M->linset)) out.equalities.push_back(i - 1);
    }
  }
  if (lin) set_free(lin);
  if (red) set_free(red);
  if (pos) std::free(pos);
  T::free_matrix(M);
  if (!ok) throw SolverError("cdd: canonicalisation failed");
  return out;
}

}  // namespace

CddGenerators cdd_generators(const Matrix& A, const Vector& b, bool exact, bool rationals) {
  if (exact) return generators<CddExact>(A, b, rationals);
  if (rationals) invalid("exact", "rational vertices need exact arithmetic");
  return generators<CddFloat>(A, b, false);
}

CddHull cdd_hull(const Matrix& V, bool exact) {
  return exact ? hull<CddExact>(V) : hull<CddFloat>(V);
}

CddCanonical cdd_redundancy(const Matrix& A, const Vector& b, bool exact) {
  return exact ? redundancy<CddExact>(A, b) : redundancy<CddFloat>(A, b);
}

CddCanonical cdd_canonicalize(const Matrix& A, const Vector& b, bool exact) {
  return exact ? canonicalize<CddExact>(A, b) : canonicalize<CddFloat>(A, b);
}

std::vector<Index> cdd_redundant_rows_via_shooting(const Matrix& A, const Vector& b) {
  std::vector<Index> out;
  if (A.rows() == 0) return out;
  auto lock = cdd_lock();
  ddf_MatrixPtr M = h_matrix<CddFloat>(A, b);
  ddf_ErrorType err = ddf_NoError;  // cddlib writes it only on failure
  set_type red = ddf_RedundantRowsViaShooting(M, &err);
  const bool ok = red != nullptr && err == ddf_NoError;
  if (ok)
    for (long i = 1; i <= M->rowsize; ++i)
      if (set_member(i, red)) out.push_back(i - 1);
  if (red) set_free(red);
  ddf_FreeMatrix(M);
  if (!ok) throw SolverError("cdd: ray-shooting redundancy test failed");
  return out;
}

}  // namespace corral::detail
