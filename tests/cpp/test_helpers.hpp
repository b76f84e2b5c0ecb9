#pragma once
// Small builders shared by the C++ tests: matrices and vectors from brace lists, stacking.

#include <corral/types.hpp>

#include <algorithm>
#include <initializer_list>

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

}  // namespace corral::test
