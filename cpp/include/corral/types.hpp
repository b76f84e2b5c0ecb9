#pragma once
/// \file types.hpp
/// Dense matrix and vector types used throughout. Constraint matrices are row-major because
/// every algorithm walks rows.

#include <Eigen/Dense>

namespace corral {

using Index = Eigen::Index;
/// Row-major dense matrix: the storage of every constraint matrix.
using Matrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;
using Vector = Eigen::VectorXd;

}  // namespace corral
