# Finds the system libraries corral uses and gives each an imported target.
# Included by the build and by the installed package config, so both resolve them alike.
# cddlib: only libcddgmp is linked. It provides the GMP-rational dd_* and the floating-point
# ddf_* functions; linking libcdd as well would bind a second set of dd_* symbols silently.
# qhull: only the reentrant libqhull_r (headers in libqhull_r/), never the non-reentrant
# libqhull, whose qh_* symbols have the same names with global state.
include(CMakeFindDependencyMacro)
find_dependency(Eigen3 3.3 CONFIG)
find_dependency(Threads)

if(NOT TARGET corral::glpk)
  find_path(CORRAL_GLPK_INCLUDE_DIR glpk.h)
  find_library(CORRAL_GLPK_LIBRARY NAMES glpk)
  find_path(CORRAL_CDD_INCLUDE_DIR cdd.h PATH_SUFFIXES cddlib cdd)
  find_library(CORRAL_CDDGMP_LIBRARY NAMES cddgmp)
  find_path(CORRAL_GMP_INCLUDE_DIR gmp.h)
  find_library(CORRAL_GMP_LIBRARY NAMES gmp)
  foreach(var CORRAL_GLPK_INCLUDE_DIR CORRAL_GLPK_LIBRARY CORRAL_CDD_INCLUDE_DIR
              CORRAL_CDDGMP_LIBRARY CORRAL_GMP_INCLUDE_DIR CORRAL_GMP_LIBRARY)
    if(NOT ${var})
      message(FATAL_ERROR "corral: ${var} not found (Debian: libglpk-dev libcdd-dev libgmp-dev; "
                          "or run scripts/bootstrap)")
    endif()
  endforeach()
  add_library(corral::glpk UNKNOWN IMPORTED)
  set_target_properties(corral::glpk PROPERTIES IMPORTED_LOCATION "${CORRAL_GLPK_LIBRARY}"
                        INTERFACE_INCLUDE_DIRECTORIES "${CORRAL_GLPK_INCLUDE_DIR}")
  add_library(corral::gmp UNKNOWN IMPORTED)
  set_target_properties(corral::gmp PROPERTIES IMPORTED_LOCATION "${CORRAL_GMP_LIBRARY}"
                        INTERFACE_INCLUDE_DIRECTORIES "${CORRAL_GMP_INCLUDE_DIR}")
  add_library(corral::cddgmp UNKNOWN IMPORTED)
  set_target_properties(corral::cddgmp PROPERTIES IMPORTED_LOCATION "${CORRAL_CDDGMP_LIBRARY}"
                        INTERFACE_INCLUDE_DIRECTORIES "${CORRAL_CDD_INCLUDE_DIR}"
                        INTERFACE_COMPILE_DEFINITIONS "GMPRATIONAL"
                        INTERFACE_LINK_LIBRARIES corral::gmp)
endif()

if(NOT TARGET corral::qhull_r)
  find_path(CORRAL_QHULL_INCLUDE_DIR libqhull_r/libqhull_r.h)
  find_library(CORRAL_QHULL_R_LIBRARY NAMES qhull_r)
  foreach(var CORRAL_QHULL_INCLUDE_DIR CORRAL_QHULL_R_LIBRARY)
    if(NOT ${var})
      message(FATAL_ERROR "corral: ${var} not found (Debian: libqhull-dev; "
                          "or run scripts/bootstrap)")
    endif()
  endforeach()
  add_library(corral::qhull_r UNKNOWN IMPORTED)
  set_target_properties(corral::qhull_r PROPERTIES IMPORTED_LOCATION "${CORRAL_QHULL_R_LIBRARY}"
                        INTERFACE_INCLUDE_DIRECTORIES "${CORRAL_QHULL_INCLUDE_DIR}")
endif()
