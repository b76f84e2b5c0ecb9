#pragma once
/// \file corral.hpp
/// Umbrella header: includes every public header of corral.

#include <corral/admissible.hpp>
#include <corral/certificate.hpp>
#include <corral/controllable.hpp>
#include <corral/defaults.hpp>
#include <corral/dual_mode.hpp>
#include <corral/enumeration.hpp>
#include <corral/errors.hpp>
#include <corral/lp/check.hpp>
#include <corral/lp/solver.hpp>
#include <corral/lqr.hpp>
#include <corral/options.hpp>
#include <corral/polytope.hpp>
#include <corral/polytope_queries.hpp>
#include <corral/projection.hpp>
#include <corral/rational.hpp>
#include <corral/redundancy.hpp>
#include <corral/types.hpp>
#include <corral/version.hpp>
