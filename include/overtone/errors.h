// include/overtone/errors.h — the two kinds of failure a user can meet (public).
//
// InputError: the plant file (or a command-line value) is wrong; exit status 2. It carries every
// problem found, each with its place, printed as `file:line:col: error: message`.
// SolveError: the input is valid but the plant cannot be solved (load flow did not converge,
// singular network); exit status 4.
#ifndef OVERTONE_PUBLIC_ERRORS_H_
#define OVERTONE_PUBLIC_ERRORS_H_

#include <stdexcept>
#include <string>
#include <vector>

#include "overtone/plant.h"

namespace overtone {

struct Diagnostic {
  SourceLocation where;
  std::string message;
};

// `file:line:col: error: message` (line and column left out when unknown).
std::string FormatDiagnostic(const Diagnostic& diagnostic);

class InputError : public std::runtime_error {
 public:
  explicit InputError(std::vector<Diagnostic> diagnostics);
  InputError(const SourceLocation& where, const std::string& message);
  const std::vector<Diagnostic>& diagnostics() const { return diagnostics_; }

 private:
  std::vector<Diagnostic> diagnostics_;
};

class SolveError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_ERRORS_H_
