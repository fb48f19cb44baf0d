// src/mapping_reader.h — reads the keys of one YAML mapping through its key table, with located messages (internal).
#ifndef OVERTONE_INTERNAL_MAPPING_READER_H_
#define OVERTONE_INTERNAL_MAPPING_READER_H_

#include <array>
#include <cmath>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include <fmt/format.h>
#include "yaml_tree.h"

#include "load_diagnostics.h"
#include "plant_keys.h"
#include "units.h"

namespace overtone::internal {

// MappingReader: reads the keys of one mapping through its key table.

// One key of a mapping, its value, and the file it was written in. The key's text lives in the
// YAML tree and the file name in storage that outlives the entry (RawPlant::files), so an entry
// costs no allocation.
struct Entry {
  std::string_view key;
  YamlNode key_node;
  YamlNode value;
  const std::string* file;

  SourceLocation KeyWhere() const { return Locate(key_node, *file); }
  // An empty value's place is wherever the parser noticed it was empty; its key's is clearer.
  SourceLocation ValueWhere() const { return value.IsNull() ? KeyWhere() : Locate(value, *file); }
};

// The keys of `map` in order; a key written twice is reported and its second value dropped.
// `file` must outlive the entries.
std::vector<Entry> MapEntries(const YamlNode& map, const std::string& file,
                              Diagnostics* diagnostics);


class MappingReader {
 public:
  // `noun` names the mapping in messages ("transformer"); its `name`, when readable, is added.
  // `node` places the mapping (an undefined node for line 0); `file` must outlive the reader.
  MappingReader(std::vector<Entry> entries, const YamlNode& node, const std::string& file,
                std::string_view noun, std::span<const KeySpec> specs, Diagnostics* diagnostics)
      : entries_(std::move(entries)),
        node_(node),
        file_(&file),
        noun_(noun),
        specs_(specs),
        diagnostics_(diagnostics) {}

  // Built on request: most mappings never need their place.
  SourceLocation where() const { return Locate(node_, *file_); }
  const YamlNode& node() const { return node_; }
  const std::string& file() const { return *file_; }
  std::string_view noun() const { return noun_; }
  // "transformer `T1`" when the name is readable, else the noun; for messages only.
  std::string title() const {
    const Entry* name = Find("name");
    return (name && name->value.IsScalar() && !name->value.Scalar().empty())
               ? fmt::format("{} `{}`", noun_, name->value.Scalar())
               : std::string(noun_);
  }
  bool Has(std::string_view key) const { return Find(key) != nullptr; }
  const std::string& FileOf(std::string_view key) const {
    const Entry* entry = Find(key);
    return entry ? *entry->file : *file_;
  }

  // Reports unknown keys (with the nearest known key) and missing required keys.
  void CheckKeys() {
    for (const Entry& entry : entries_) {
      if (!SpecsOf(entry.key).empty()) continue;
      std::vector<std::string_view> known;  // table order, each key once
      for (const KeySpec& spec : specs_) {
        if (std::ranges::find(known, spec.key) == known.end()) known.push_back(spec.key);
      }
      std::string hint = DidYouMean(entry.key, known);
      if (hint.empty()) hint = fmt::format("; known keys: {}", JoinNames(known));
      diagnostics_->Error(entry.KeyWhere(),
                          fmt::format("unknown key `{}` in {}{}", entry.key, title(), hint));
    }
    for (const KeySpec& spec : specs_) {
      if (spec.need == kRequired && !Has(spec.key)) {
        diagnostics_->Error(where(), fmt::format("{} is missing `{}`", title(), spec.key));
      }
    }
  }

  // Reports `message` at the value of `key` (at the mapping when the key is absent).
  void Error(std::string_view key, std::string message) {
    const Entry* entry = Find(key);
    diagnostics_->Error(entry ? entry->ValueWhere() : where(), std::move(message));
  }

  // A single non-empty value as written (in the YAML tree, which outlives the reader); nothing
  // when absent (or bad, which is reported).
  std::optional<std::string_view> Text(std::string_view key) {
    const Entry* entry = Find(key);
    if (!entry) return std::nullopt;
    if (!entry->value.IsScalar()) {
      Error(key, entry->value.IsNull() ? fmt::format("`{}` has no value", key)
                                       : fmt::format("`{}` must be a single value, not {}", key,
                                                     ShapeOf(entry->value)));
      return std::nullopt;
    }
    const std::string_view text = entry->value.Scalar();
    if (text.find_first_not_of(" \t") == std::string::npos) {
      Error(key, fmt::format("`{}` is empty", key));
      return std::nullopt;
    }
    return text;
  }

  // A quantity in one of the kinds the table gives this key, checked against that kind's range.
  std::optional<Quantity> QuantityOf(std::string_view key) {
    RequireType(key, ValueType::kQuantity, ValueType::kInteger);
    const std::optional<std::string_view> text = Text(key);
    if (!text) return std::nullopt;
    const std::span<const KeySpec> specs = SpecsOf(key);
    std::array<QuantityKind, kMaxRowsPerKey> kinds{};
    for (size_t row = 0; row < specs.size(); ++row) kinds[row] = specs[row].kind;
    std::string error;
    const std::optional<Quantity> quantity = internal::ParseQuantity(
        *text, std::span(kinds).first(specs.size()), specs.front().unit, &error);
    if (!quantity) {
      Error(key, fmt::format("{}: {}", key, error));
      return std::nullopt;
    }
    for (const KeySpec& spec : specs) {
      if (spec.kind != quantity->kind) continue;
      const std::string problem = RangeProblem(spec, quantity->value);
      if (problem.empty()) return quantity;
      Error(key, fmt::format("{} must be {}; got `{}`{}", key, problem, *text,
                             spec.kind == K::kFraction && quantity->value > 1
                                 ? " (write a fraction, 0.95, or a percent, 95 %)"
                                 : ""));
    }
    return std::nullopt;
  }

  std::optional<double> Number(std::string_view key) {
    const std::optional<Quantity> quantity = QuantityOf(key);
    if (!quantity) return std::nullopt;
    return quantity->value;
  }

  std::optional<int> Integer(std::string_view key) {
    const std::optional<double> value = Number(key);
    if (!value) return std::nullopt;
    if (std::abs(*value) > 1e9 || *value != std::floor(*value)) {
      Error(key, fmt::format("{} must be a whole number; got `{}`", key, *Text(key)));
      return std::nullopt;
    }
    return static_cast<int>(*value);
  }

  // The list under `key`; an empty node when absent, empty or not a list (reported).
  YamlNode List(std::string_view key) {
    RequireType(key, ValueType::kList, ValueType::kList);
    return Container(key, /*want_list=*/true);
  }
  YamlNode Mapping(std::string_view key) {
    RequireType(key, ValueType::kMapping, ValueType::kMapping);
    return Container(key, /*want_list=*/false);
  }

  template <typename T>
  std::optional<T> Choose(std::string_view key, const Choices<T>& choices) {
    const std::optional<std::string_view> text = Text(key);
    if (!text) return std::nullopt;
    for (const Choice<T>& choice : choices) {
      if (choice.text == *text) return choice.value;
    }
    std::vector<std::string_view> names;
    for (const Choice<T>& choice : choices) names.push_back(choice.text);
    Error(key, fmt::format("{} `{}` is not one of {}{}", key, *text, JoinNames(names),
                           DidYouMean(*text, names)));
    return std::nullopt;
  }

  // Read(key, &field): overwrite the field (holding its default) when the key is present and good.
  void Read(std::string_view key, double* out) {
    if (const std::optional<double> value = Number(key)) *out = *value;
  }
  void Read(std::string_view key, std::optional<double>* out) {
    if (const std::optional<double> value = Number(key)) *out = *value;
  }
  void Read(std::string_view key, int* out) {
    if (const std::optional<int> value = Integer(key)) *out = *value;
  }
  void Read(std::string_view key, std::string* out) {
    if (const std::optional<std::string_view> value = Text(key)) *out = *value;
  }
  template <typename T>
  void Read(std::string_view key, const Choices<T>& choices, T* out) {
    if (const std::optional<T> value = Choose(key, choices)) *out = *value;
  }

 private:
  const Entry* Find(std::string_view key) const {
    const auto found = std::ranges::find(entries_, key, &Entry::key);
    return found == entries_.end() ? nullptr : &*found;
  }

  // A read that does not match the key table is a bug in this file, not in the input.
  void RequireType(std::string_view key, ValueType type, ValueType other_type) const {
    const std::span<const KeySpec> rows = SpecsOf(key);
    if (rows.empty() || (rows[0].type != type && rows[0].type != other_type)) {
      throw std::logic_error(fmt::format("key `{}` read against its table", key));
    }
  }

  // The rows of `key`, adjacent in every table (checked in plant_keys.h); empty when unknown.
  std::span<const KeySpec> SpecsOf(std::string_view key) const {
    const auto first = std::ranges::find(specs_, key, &KeySpec::key);
    auto last = first;
    while (last != specs_.end() && last->key == key) ++last;
    return {first, last};
  }

  // "" when `value` (stored unit) lies in the spec's range, else "above 0 kvar" and the like.
  static std::string RangeProblem(const KeySpec& spec, double value) {
    const double shown = value / internal::UnitFactor(spec.kind, spec.unit).value_or(1.0);
    const Range& range = spec.range;
    const std::string_view space = spec.unit.empty() ? "" : " ";
    const std::string_view unit = spec.unit;
    if (range.lo_bracket == '(' ? shown <= range.lo : shown < range.lo) {
      return fmt::format("{} {}{}{}", range.lo_bracket == '(' ? "above" : "at least", range.lo,
                         space, unit);
    }
    if (range.hi_bracket == ')' ? shown >= range.hi : shown > range.hi) {
      return fmt::format("{} {}{}{}", range.hi_bracket == ')' ? "below" : "at most", range.hi,
                         space, unit);
    }
    return "";
  }

  YamlNode Container(std::string_view key, bool want_list) {
    const Entry* entry = Find(key);
    if (!entry || entry->value.IsNull()) return YamlNode();
    if (want_list ? entry->value.IsSequence() : entry->value.IsMap()) return entry->value;
    Error(key, want_list ? fmt::format("`{}` must be a list (`- ...` lines or `[a, b]`), not {}",
                                       key, ShapeOf(entry->value))
                         : fmt::format("`{}` must be a mapping of keys, not {}", key,
                                       ShapeOf(entry->value)));
    return YamlNode();
  }

  std::vector<Entry> entries_;
  YamlNode node_;
  const std::string* file_;
  std::string_view noun_;
  std::span<const KeySpec> specs_;
  Diagnostics* diagnostics_;
};

// A reader for an element or table row; nothing when `node` is not a mapping (reported).
// `file` must outlive the reader.
std::optional<MappingReader> ReadMapping(const YamlNode& node, const std::string& file,
                                         std::string_view noun, std::span<const KeySpec> specs,
                                         Diagnostics* diagnostics);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_MAPPING_READER_H_
