#pragma once
/// \file errors.hpp
/// The exception hierarchy. Misuse (bad shapes, NaN, unknown names) is an exception; a numerical
/// outcome (infeasible, unbounded, not converged) is a status in a result. Python sees the same
/// classes: corral.CorralError and its subclasses (InvalidInputError is also a ValueError).

#include <stdexcept>
#include <string>

namespace corral {

/// Base of every exception the library throws on purpose.
class CorralError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// An argument is malformed: wrong shape, NaN or inf, unknown name, out of range. The message
/// names the argument and says what is wrong with it.
class InvalidInputError : public CorralError {
 public:
  using CorralError::CorralError;
};

/// A routine that needs a bounded set was given an unbounded one.
class UnboundedSetError : public CorralError {
 public:
  using CorralError::CorralError;
};

/// The conditions for finite determination fail; the message gives the condition and numbers.
class NotFinitelyDeterminedError : public CorralError {
 public:
  using CorralError::CorralError;
};

/// A solver failed in a way that no fallback could repair.
class SolverError : public CorralError {
 public:
  using CorralError::CorralError;
};

namespace detail {
/// Throws InvalidInputError("<argument>: <problem>").
[[noreturn]] inline void invalid(const std::string& argument, const std::string& problem) {
  throw InvalidInputError(argument + ": " + problem);
}
}  // namespace detail

}  // namespace corral
