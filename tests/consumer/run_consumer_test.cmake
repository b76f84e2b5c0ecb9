# Installs a corral build tree into a fresh prefix, then configures, builds and runs the
# consumer project of this folder against that prefix. Run by CTest (tests/cpp/CMakeLists.txt):
#
#   cmake -DCORRAL_BUILD_DIR=<build tree> -DCONSUMER_SOURCE_DIR=<this folder>
#         -DWORK_DIR=<scratch folder> [-DCONFIG=Release] [-DGENERATOR=Ninja]
#         [-DMAKE_PROGRAM=...] [-DCXX_COMPILER=...] -P run_consumer_test.cmake
#
# WORK_DIR is wiped first; the prefix is WORK_DIR/prefix, the consumer's build WORK_DIR/build.
cmake_minimum_required(VERSION 3.20)

foreach(var CORRAL_BUILD_DIR CONSUMER_SOURCE_DIR WORK_DIR)
  if(NOT DEFINED ${var} OR "${${var}}" STREQUAL "")
    message(FATAL_ERROR "run_consumer_test.cmake: -D${var}=... is required")
  endif()
endforeach()
if(NOT CONFIG)
  set(CONFIG Release)
endif()

set(prefix "${WORK_DIR}/prefix")
set(build "${WORK_DIR}/build")
file(REMOVE_RECURSE "${WORK_DIR}")
file(MAKE_DIRECTORY "${WORK_DIR}")

# Runs one step; stops the test with its output when the step fails.
function(run_step what)
  execute_process(COMMAND ${ARGN} RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
  if(NOT rc EQUAL 0)
    message(FATAL_ERROR "consumer test: ${what} failed (${rc})\n${out}\n${err}")
  endif()
  message(STATUS "consumer test: ${what}: ok")
  set(step_output "${out}" PARENT_SCOPE)
endfunction()

run_step("cmake --install into ${prefix}"
         "${CMAKE_COMMAND}" --install "${CORRAL_BUILD_DIR}" --prefix "${prefix}" --config "${CONFIG}")

foreach(f include/corral/corral.hpp include/corral/version.hpp)
  if(NOT EXISTS "${prefix}/${f}")
    message(FATAL_ERROR "consumer test: the install has no ${f}")
  endif()
endforeach()

set(configure_args -S "${CONSUMER_SOURCE_DIR}" -B "${build}" "-DCMAKE_PREFIX_PATH=${prefix}"
    "-DCMAKE_BUILD_TYPE=${CONFIG}")
if(GENERATOR)
  list(APPEND configure_args -G "${GENERATOR}")
endif()
if(MAKE_PROGRAM)
  list(APPEND configure_args "-DCMAKE_MAKE_PROGRAM=${MAKE_PROGRAM}")
endif()
if(CXX_COMPILER)
  list(APPEND configure_args "-DCMAKE_CXX_COMPILER=${CXX_COMPILER}")
endif()
run_step("configure the consumer project" "${CMAKE_COMMAND}" ${configure_args})

# The package must come from the fresh prefix, not from a copy installed elsewhere.
file(STRINGS "${build}/CMakeCache.txt" corral_dir_line REGEX "^corral_DIR:")
string(REGEX REPLACE "^corral_DIR:[A-Z]+=" "" corral_dir "${corral_dir_line}")
file(REAL_PATH "${prefix}" real_prefix)
if(EXISTS "${corral_dir}")
  file(REAL_PATH "${corral_dir}" corral_dir)
endif()
string(FIND "${corral_dir}" "${real_prefix}/" at)
if(NOT at EQUAL 0)
  message(FATAL_ERROR "consumer test: found corral in '${corral_dir}', not under '${prefix}'")
endif()

run_step("build the consumer project"
         "${CMAKE_COMMAND}" --build "${build}" --config "${CONFIG}" --parallel 2)

find_program(consumer_exe corral_consumer PATHS "${build}" "${build}/${CONFIG}" NO_DEFAULT_PATH)
if(NOT consumer_exe)
  message(FATAL_ERROR "consumer test: no corral_consumer executable in ${build}")
endif()
run_step("run corral_consumer" "${consumer_exe}")
message(STATUS "${step_output}")
