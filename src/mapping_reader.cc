// src/mapping_reader.cc — the keys of a YAML mapping, and a reader for one element.
#include "mapping_reader.h"

#include <algorithm>

namespace overtone::internal {

std::vector<Entry> MapEntries(const YamlNode& map, const std::string& file,
                              Diagnostics* diagnostics) {
  std::vector<Entry> entries;
  entries.reserve(map.size());
  for (std::size_t pair = 0; pair < map.size(); ++pair) {
    const YamlNode key = map.Key(pair);
    if (!key.IsScalar()) {
      diagnostics->Error(Locate(key, file), "a key must be a plain word such as `kv`");
      continue;
    }
    const auto first = std::ranges::find(entries, key.Scalar(), &Entry::key);
    if (first != entries.end()) {
      diagnostics->Error(Locate(key, file), fmt::format("`{}` is given twice; first at line {}",
                                                        key.Scalar(), first->KeyWhere().line));
      continue;
    }
    entries.push_back({key.Scalar(), key, map.Value(pair), &file});
  }
  return entries;
}

std::optional<MappingReader> ReadMapping(const YamlNode& node, const std::string& file,
                                         std::string_view noun, std::span<const KeySpec> specs,
                                         Diagnostics* diagnostics) {
  if (!node.IsMap()) {
    diagnostics->Error(Locate(node, file),
                       fmt::format("a {} must be a mapping of keys, not {}", noun, ShapeOf(node)));
    return std::nullopt;
  }
  MappingReader reader(MapEntries(node, file, diagnostics), node, file, noun, specs, diagnostics);
  reader.CheckKeys();
  return reader;
}

// ---------------------------------------------------------------------------------------------

}  // namespace overtone::internal
