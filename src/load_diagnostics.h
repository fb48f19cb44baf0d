// src/load_diagnostics.h — located problems of a plant file, collected and thrown together, and
// "did you mean" hints (internal).
#ifndef OVERTONE_INTERNAL_LOAD_DIAGNOSTICS_H_
#define OVERTONE_INTERNAL_LOAD_DIAGNOSTICS_H_

#include <algorithm>
#include <limits>
#include <string>
#include <string_view>
#include <tuple>
#include <vector>

#include <fmt/format.h>
#include "yaml_tree.h"

#include "overtone/errors.h"
#include "overtone/plant.h"

namespace overtone::internal {

// Collects problems; thrown together, ordered by file (first mentioned first), line and column.
class Diagnostics {
 public:
  void Error(SourceLocation where, std::string message) {
    list_.push_back({std::move(where), std::move(message)});
  }
  bool empty() const { return list_.empty(); }

  [[noreturn]] void Throw() {
    std::vector<std::string> files;
    for (const Diagnostic& d : list_) {
      if (std::ranges::find(files, d.where.file) == files.end()) files.push_back(d.where.file);
    }
    const auto key = [&files](const Diagnostic& d) {
      const auto rank = std::ranges::find(files, d.where.file) - files.begin();
      return std::make_tuple(rank, d.where.line, d.where.column);
    };
    std::ranges::stable_sort(
        list_, [&key](const Diagnostic& a, const Diagnostic& b) { return key(a) < key(b); });
    throw InputError(std::move(list_));
  }

 private:
  std::vector<Diagnostic> list_;
};

// Where `node` starts in `file` (1-based line and column).
SourceLocation Locate(const YamlNode& node, const std::string& file);
// "file:line:col" of a place, for messages that point at another place.
std::string FormatPlace(const SourceLocation& where);
// Levenshtein distance, ignoring letter case (a wrong case is the commonest slip).
size_t EditDistance(std::string_view a, std::string_view b);

// "; did you mean `x_over_r`?" when one of `names` is a likely slip for `word`: a few letters
// off, or the only name that `word` begins (`diode-cap` for `diode-capacitor`).
template <typename Names>
std::string DidYouMean(std::string_view word, const Names& names) {
  std::string_view best;
  size_t best_distance = std::numeric_limits<size_t>::max();
  std::vector<std::string_view> extensions;
  for (const auto& name : names) {
    const std::string_view candidate = name;
    const size_t distance = EditDistance(word, candidate);
    if (distance < best_distance) {
      best = candidate;
      best_distance = distance;
    }
    if (word.size() >= 3 && candidate.size() > word.size() &&
        EditDistance(word, candidate.substr(0, word.size())) == 0) {
      extensions.push_back(candidate);
    }
  }
  const size_t allowed = std::max<size_t>(1, word.size() / 3);
  if (best.empty() || best_distance > allowed) {
    if (extensions.size() != 1) return "";
    best = extensions[0];
  }
  return fmt::format("; did you mean `{}`?", best);
}

template <typename Names>
std::string JoinNames(const Names& names) {
  std::string text;
  for (const auto& name : names) {
    if (!text.empty()) text += ", ";
    text += name;
  }
  return text;
}

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_LOAD_DIAGNOSTICS_H_
