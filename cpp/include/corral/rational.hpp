#pragma once
/// \file rational.hpp
/// Exact rationals as returned by the exact (GMP) paths, without exposing GMP types.

#include <corral/types.hpp>

#include <string>
#include <vector>

namespace corral {

/// Exact rational number as decimal strings (numerator, denominator > 0).
struct Rational {
  std::string numerator;
  std::string denominator;
  double value = 0.0;  ///< a double within one unit in the last place (rounded toward zero)
};

/// Row-major matrix of exact rationals.
struct RationalMatrix {
  Index rows = 0;
  Index cols = 0;
  std::vector<Rational> data;  ///< row-major, rows * cols entries
  const Rational& operator()(Index i, Index j) const { return data[i * cols + j]; }
};

}  // namespace corral
