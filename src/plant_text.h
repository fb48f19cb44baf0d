// src/plant_text.h — reading a YAML file of the project: its bytes, checks of its text, its one document (internal).
#ifndef OVERTONE_INTERNAL_PLANT_TEXT_H_
#define OVERTONE_INTERNAL_PLANT_TEXT_H_

#include <optional>
#include <string>
#include <string_view>

#include "load_diagnostics.h"
#include "yaml_tree.h"

namespace overtone::internal {

// A path written in `naming_file`, made usable from the working directory.
std::string ResolvePath(const std::string& naming_file, const std::string& path);

// The whole file, or nothing with `*error` set (missing, unreadable, a directory, too large).
std::optional<std::string> ReadTextFile(const std::string& path, std::string* error);

// Non-UTF-8 bytes and tab indentation, each reported with its place; false when any was found.
bool CheckText(const std::string& file, std::string_view text, Diagnostics* diagnostics);

// What a YAML file of the project holds, for messages: {"plant", "overtone: 1"}.
struct YamlFileKind {
  std::string_view noun;
  std::string_view first_line;
};

// The one document of `text` (the content of `file`), whose root is a mapping; nothing when the
// text is not usable (non-UTF-8 bytes, tab indentation, not YAML, empty, two documents, not a
// mapping), every problem reported.
std::optional<YamlDocument> ParseYamlText(const std::string& file, std::string_view text,
                                          YamlFileKind kind, Diagnostics* diagnostics);

// The same for the file at `path`; throws InputError with the problems.
YamlDocument ReadYamlFile(const std::string& path, YamlFileKind kind);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PLANT_TEXT_H_
