#pragma once
// Small builders shared by the C++ tests: matrices and vectors from brace lists, stacking,
// reproducible random numbers.

#include <corral/types.hpp>

#include <algorithm>
#include <cstdint>
#include <initializer_list>
#include <random>

namespace corral::test {

inline Matrix rows(std::initializer_list<std::initializer_list<double>> init) {
  const Index m = static_cast<Index>(init.size());
  const Index n = m > 0 ? static_cast<Index>(init.begin()->size()) : 0;
  Matrix A(m, n);
  Index i = 0;
  for (const auto& r : init) {
    Index j = 0;
    for (double v : r) A(i, j++) = v;
    ++i;
  }
  return A;
}

inline Vector vec(std::initializer_list<double> init) {
  Vector v(static_cast<Index>(init.size()));
  Index i = 0;
  for (double x : init) v(i++) = x;
  return v;
}

inline Matrix vstack(const Matrix& A, const Matrix& B) {
  Matrix C(A.rows() + B.rows(), std::max(A.cols(), B.cols()));
  C << A, B;
  return C;
}

inline Vector vstack(const Vector& a, const Vector& b) {
  Vector c(a.size() + b.size());
  c << a, b;
  return c;
}

// Uniform numbers from std::mt19937 directly (its output is fully specified by the standard,
// unlike the standard distributions), so random test data are the same with every library.
class Rng {
 public:
  explicit Rng(std::uint32_t seed) : gen_(seed) {}
  double uniform(double lo, double hi) {
    return lo + (hi - lo) * (static_cast<double>(gen_()) / 4294967296.0);
  }
  Index index(Index n) { return static_cast<Index>(gen_() % static_cast<std::uint32_t>(n)); }
  // An integer in [lo, hi].
  int integer(int lo, int hi) { return lo + static_cast<int>(index(hi - lo + 1)); }
  bool chance(double p) { return uniform(0.0, 1.0) < p; }
  Vector vector(Index n, double lo, double hi) {
    Vector v(n);
    for (Index i = 0; i < n; ++i) v(i) = uniform(lo, hi);
    return v;
  }
  Vector integers(Index n, int lo, int hi) {
    Vector v(n);
    for (Index i = 0; i < n; ++i) v(i) = integer(lo, hi);
    return v;
  }
  Matrix matrix(Index m, Index n, double lo, double hi) {
    Matrix M(m, n);
    for (Index i = 0; i < m; ++i)
      for (Index j = 0; j < n; ++j) M(i, j) = uniform(lo, hi);
    return M;
  }

 private:
  std::mt19937 gen_;
};

}  // namespace corral::test
