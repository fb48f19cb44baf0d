// src/plant_text.h — reading a plant file's bytes and checking its text before YAML parsing (internal).
#ifndef OVERTONE_INTERNAL_PLANT_TEXT_H_
#define OVERTONE_INTERNAL_PLANT_TEXT_H_

#include <optional>
#include <string>
#include <string_view>

#include "load_diagnostics.h"

namespace overtone::internal {

// A path written in `naming_file`, made usable from the working directory.
std::string ResolvePath(const std::string& naming_file, const std::string& path);

// The whole file, or nothing with `*error` set (missing, unreadable, a directory, too large).
std::optional<std::string> ReadTextFile(const std::string& path, std::string* error);

// Non-UTF-8 bytes and tab indentation, each reported with its place; false when any was found.
bool CheckText(const std::string& file, std::string_view text, Diagnostics* diagnostics);

// Flow collections nested deeper than the parser can take safely; false when found (reported).
bool CheckNesting(const std::string& file, std::string_view text, Diagnostics* diagnostics);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PLANT_TEXT_H_
