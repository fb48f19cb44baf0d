// src/errors.cc — formatting of input diagnostics.
#include "overtone/errors.h"

#include <fmt/format.h>

namespace overtone {
namespace {

std::string JoinDiagnostics(const std::vector<Diagnostic>& diagnostics) {
  std::string text;
  for (const Diagnostic& d : diagnostics) {
    if (!text.empty()) text += '\n';
    text += FormatDiagnostic(d);
  }
  return text;
}

}  // namespace

std::string FormatDiagnostic(const Diagnostic& d) {
  if (d.where.file.empty()) return fmt::format("error: {}", d.message);
  if (d.where.line <= 0) return fmt::format("{}: error: {}", d.where.file, d.message);
  return fmt::format("{}:{}:{}: error: {}", d.where.file, d.where.line, d.where.column, d.message);
}

InputError::InputError(std::vector<Diagnostic> diagnostics)
    : std::runtime_error(JoinDiagnostics(diagnostics)), diagnostics_(std::move(diagnostics)) {}

InputError::InputError(const SourceLocation& where, const std::string& message)
    : InputError(std::vector<Diagnostic>{{where, message}}) {}

}  // namespace overtone
