#pragma once
/// \file detail/validate.hpp
/// Input validation shared by every public routine: each failure throws InvalidInputError
/// whose message names the argument.

#include <corral/errors.hpp>
#include <corral/types.hpp>

#include <cmath>
#include <string>

namespace corral::detail {

/// Throws unless every entry of `M` is finite.
template <class Derived>
void require_finite(const Eigen::DenseBase<Derived>& M, const std::string& name) {
  for (Index i = 0; i < M.rows(); ++i)
    for (Index j = 0; j < M.cols(); ++j)
      if (!std::isfinite(M(i, j))) {
        std::string where = M.cols() == 1
                                ? "entry " + std::to_string(i)
                                : "row " + std::to_string(i) + ", column " + std::to_string(j);
        invalid(name, std::string(std::isnan(M(i, j)) ? "NaN" : "inf") + " at " + where);
      }
}

/// Throws unless `v` has length `n`.
inline void require_length(const Vector& v, Index n, const std::string& name,
                           const std::string& what) {
  if (v.size() != n)
    invalid(name, "has length " + std::to_string(v.size()) + ", expected " + std::to_string(n) +
                      " (" + what + ")");
}

/// Throws unless `M` is n x n.
inline void require_square(const Matrix& M, Index n, const std::string& name) {
  if (M.rows() != n || M.cols() != n)
    invalid(name, "must be " + std::to_string(n) + " x " + std::to_string(n) + ", got " +
                      std::to_string(M.rows()) + " x " + std::to_string(M.cols()));
}

}  // namespace corral::detail
