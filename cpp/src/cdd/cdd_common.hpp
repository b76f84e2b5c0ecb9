#pragma once
// cddlib access shared by every file that calls it:
// - only libcddgmp is linked; it provides dd_* in GMP rationals (GMPRATIONAL) and ddf_* in double;
// - <gmp.h> comes before the extern "C" block with cddlib's headers;
// - dd_set_global_constants() and ddf_set_global_constants() run once;
// - cddlib has global state, so every call goes through one mutex (callers release the Python
//   GIL before taking it, and never call back into Python while holding it).

#include <mutex>
#include <string>

#include <corral/rational.hpp>

#include <gmp.h>
extern "C" {
#include <cddlib/setoper.h>
#include <cddlib/cdd.h>
#include <cddlib/cdd_f.h>
}

namespace corral::detail {

/// Takes the cddlib mutex, initialising cddlib's global constants on first use.
inline std::unique_lock<std::mutex> cdd_lock() {
  static std::mutex mutex;
  static std::once_flag once;
  std::unique_lock<std::mutex> lock(mutex);
  std::call_once(once, [] {
    dd_set_global_constants();
    ddf_set_global_constants();
  });
  return lock;
}

/// Exact value of q as decimal strings, with a double (mpq_get_d: rounded toward zero).
inline Rational to_rational(const mpq_t q) {
  Rational r;
  char* num = mpz_get_str(nullptr, 10, mpq_numref(q));
  char* den = mpz_get_str(nullptr, 10, mpq_denref(q));
  r.numerator = num;
  r.denominator = den;
  void (*freefunc)(void*, size_t);
  mp_get_memory_functions(nullptr, nullptr, &freefunc);
  freefunc(num, std::char_traits<char>::length(num) + 1);
  freefunc(den, std::char_traits<char>::length(den) + 1);
  r.value = mpq_get_d(q);
  return r;
}

// The two cddlib number types have parallel APIs with prefixes dd_ (GMP rational) and ddf_
// (double); one traits struct per type lets each algorithm be written once.
#define CORRAL_CDD_TRAITS(NAME, P, NUMBER)                                                        \
  struct NAME {                                                                                   \
    using MatrixPtr = P##_MatrixPtr;                                                              \
    using LPPtr = P##_LPPtr;                                                                      \
    using PolyPtr = P##_PolyhedraPtr;                                                             \
    using ErrorType = P##_ErrorType;                                                              \
    using RowIndex = P##_rowindex;                                                                \
    static constexpr ErrorType kNoError = P##_NoError; /* cddlib writes errors only on failure */ \
    static MatrixPtr create(long rows, long cols) { return P##_CreateMatrix(rows, cols); }        \
    static void free_matrix(MatrixPtr M) { P##_FreeMatrix(M); }                                   \
    static void prepare(MatrixPtr M, bool generators) {                                           \
      M->representation = generators ? P##_Generator : P##_Inequality;                            \
      M->numbtype = NUMBER;                                                                       \
    }                                                                                             \
    static void prepare_lp(MatrixPtr M) {                                                         \
      prepare(M, false);                                                                          \
      M->objective = P##_LPmax;                                                                   \
    }                                                                                             \
    static void set(MatrixPtr M, long i, long j, double v) { P##_set_d(M->matrix[i][j], v); }     \
    static double get(MatrixPtr M, long i, long j) { return P##_get_d(M->matrix[i][j]); }         \
    static void set_obj(MatrixPtr M, long j, double v) { P##_set_d(M->rowvec[j], v); }            \
    static LPPtr to_lp(MatrixPtr M, ErrorType* err) { return P##_Matrix2LP(M, err); }             \
    static bool solve(LPPtr lp, ErrorType* err) {                                                 \
      return P##_LPSolve(lp, P##_DualSimplex, err) != 0;                                          \
    }                                                                                             \
    static void free_lp(LPPtr lp) { P##_FreeLPData(lp); }                                         \
    static bool no_error(ErrorType e) { return e == P##_NoError; }                                \
    static bool optimal(LPPtr lp) { return lp->LPS == P##_Optimal; }                              \
    static bool infeasible(LPPtr lp) {                                                            \
      return lp->LPS == P##_Inconsistent || lp->LPS == P##_StrucInconsistent;                     \
    }                                                                                             \
    static bool unbounded(LPPtr lp) {                                                             \
      return lp->LPS == P##_DualInconsistent || lp->LPS == P##_StrucDualInconsistent ||           \
             lp->LPS == P##_Unbounded;                                                            \
    }                                                                                             \
    static double sol(LPPtr lp, long j) { return P##_get_d(lp->sol[j]); }                         \
    static double dsol(LPPtr lp, long j) { return P##_get_d(lp->dsol[j]); }                       \
    static long nbindex(LPPtr lp, long j) { return lp->nbindex[j]; }                              \
    static long pivots(LPPtr lp) { return lp->total_pivots; }                                     \
    static PolyPtr to_poly(MatrixPtr M, ErrorType* err) { return P##_DDMatrix2Poly(M, err); }     \
    static void free_poly(PolyPtr p) { P##_FreePolyhedra(p); }                                    \
    static MatrixPtr generators(PolyPtr p) { return P##_CopyGenerators(p); }                      \
    static MatrixPtr inequalities(PolyPtr p) { return P##_CopyInequalities(p); }                  \
    static bool canonicalize(MatrixPtr* M, set_type* lin, set_type* red, RowIndex* pos,           \
                             ErrorType* err) {                                                    \
      return P##_MatrixCanonicalize(M, lin, red, pos, err) != 0;                                  \
    }                                                                                             \
    static set_type implicit_linearity(MatrixPtr M, ErrorType* err) {                             \
      return P##_ImplicitLinearityRows(M, err);                                                   \
    }                                                                                             \
    static set_type redundant_rows(MatrixPtr M, ErrorType* err) {                                 \
      return P##_RedundantRows(M, err);                                                           \
    }                                                                                             \
  };

CORRAL_CDD_TRAITS(CddExact, dd, dd_Rational)
CORRAL_CDD_TRAITS(CddFloat, ddf, ddf_Real)
#undef CORRAL_CDD_TRAITS

}  // namespace corral::detail
