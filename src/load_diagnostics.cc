// src/load_diagnostics.cc — places in YAML files and near-miss names for messages.
#include "load_diagnostics.h"

#include <numeric>

namespace overtone::internal {

SourceLocation Locate(const YamlNode& node, const std::string& file) {
  return {file, node.line(), node.column()};
}

std::string FormatPlace(const SourceLocation& where) {
  return fmt::format("{}:{}:{}", where.file, where.line, where.column);
}

namespace {
char Lower(char c) { return (c >= 'A' && c <= 'Z') ? static_cast<char>(c - 'A' + 'a') : c; }
}  // namespace

size_t EditDistance(std::string_view a, std::string_view b) {
  std::vector<size_t> row(b.size() + 1);
  std::iota(row.begin(), row.end(), size_t{0});
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      const size_t substitute = diagonal + (Lower(a[i - 1]) == Lower(b[j - 1]) ? 0 : 1);
      diagonal = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, substitute});
    }
  }
  return row[b.size()];
}

}  // namespace overtone::internal
