// src/plant_text.cc — a YAML file of the project: its bytes, checks of its text, its one document.
#include "plant_text.h"

#include <array>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>

#include <fmt/format.h>

namespace overtone::internal {

namespace fs = std::filesystem;

// A path written in `naming_file`, made usable from the working directory.
std::string ResolvePath(const std::string& naming_file, const std::string& path) {
  if (fs::path(path).is_absolute()) return path;
  return (fs::path(naming_file).parent_path() / path).lexically_normal().string();
}

// Largest plant file read (bytes); far above any real plant, below a runaway device or log.
constexpr size_t kMaxFileBytes = size_t{64} << 20;

std::optional<std::string> ReadTextFile(const std::string& path, std::string* error) {
  std::error_code code;
  if (fs::is_directory(path, code)) {
    *error = "it is a directory";
    return std::nullopt;
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    *error = std::strerror(errno);
    return std::nullopt;
  }
  // Read in blocks up to a cap, so that a device such as /dev/zero is refused, not read forever.
  std::string text;
  if (const auto size = fs::file_size(path, code); !code && size <= kMaxFileBytes) {
    text.reserve(size);  // one allocation for a regular file
  }
  std::array<char, 1 << 16> block;
  while (in.read(block.data(), block.size()) || in.gcount() > 0) {
    text.append(block.data(), static_cast<size_t>(in.gcount()));
    if (text.size() > kMaxFileBytes) {
      *error = fmt::format("it is larger than {} MB; a plant file is a few kilobytes",
                           kMaxFileBytes >> 20);
      return std::nullopt;
    }
  }
  if (in.bad()) {
    *error = "read failed";
    return std::nullopt;
  }
  return text;
}

// ---------------------------------------------------------------------------------------------
// Text checks before YAML parsing: non-UTF-8 bytes and tab indentation both make the parser fail
// with a confusing message, so they are found first, each with its place.

// Length of the well-formed UTF-8 sequence at `pos`, 0 when ill-formed (Unicode Standard,
// table 3-7 "Well-Formed UTF-8 Byte Sequences").
size_t Utf8Length(std::string_view text, size_t pos) {
  const auto byte = [&text](size_t i) { return static_cast<unsigned char>(text[i]); };
  const unsigned char lead = byte(pos);
  if (lead < 0x80) return 1;
  size_t length = 0;
  unsigned char second_lo = 0x80;
  unsigned char second_hi = 0xBF;
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3;
    if (lead == 0xE0) second_lo = 0xA0;
    if (lead == 0xED) second_hi = 0x9F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4;
    if (lead == 0xF0) second_lo = 0x90;
    if (lead == 0xF4) second_hi = 0x8F;
  } else {
    return 0;
  }
  if (pos + length > text.size()) return 0;
  if (byte(pos + 1) < second_lo || byte(pos + 1) > second_hi) return 0;
  for (size_t i = 2; i < length; ++i) {
    if ((byte(pos + i) & 0xC0) != 0x80) return 0;
  }
  return length;
}

// Reports the first byte that is not UTF-8 and every line indented with a tab.
bool CheckText(const std::string& file, std::string_view text, Diagnostics* diagnostics) {
  bool ok = true;
  int line = 1;
  int column = 1;
  bool in_indent = true;
  int tab_column = 0;  // first tab in this line's indentation, 0 = none
  for (size_t pos = 0; pos < text.size();) {
    const size_t length = Utf8Length(text, pos);
    if (length == 0) {
      diagnostics->Error({file, line, column},
                         fmt::format("byte 0x{:02X} is not UTF-8; save the file as UTF-8",
                                     static_cast<unsigned char>(text[pos])));
      return false;
    }
    const char c = text[pos];
    if (static_cast<unsigned char>(c) < 0x20 && c != '\n' && c != '\t' && c != '\r') {
      diagnostics->Error({file, line, column},
                         fmt::format("control character 0x{:02X} is not allowed in a plant file",
                                     static_cast<unsigned char>(c)));
      return false;
    }
    pos += length;
    if (c == '\n') {
      ++line;
      column = 1;
      in_indent = true;
      tab_column = 0;
      continue;
    }
    if (in_indent && c == '\t' && tab_column == 0) tab_column = column;
    if (in_indent && c != ' ' && c != '\t' && c != '\r') {
      in_indent = false;
      if (tab_column > 0 && c != '#') {
        diagnostics->Error({file, line, tab_column},
                           "tab in indentation; YAML indents with spaces");
        ok = false;
      }
    }
    ++column;
  }
  return ok;
}

// Deepest nesting of lists and mappings read. A plant file needs four levels; the limit refuses
// files that are not the project's before they cost memory.
constexpr int kMaxDepth = 64;

std::optional<YamlDocument> ParseYamlText(const std::string& file, std::string_view text,
                                          YamlFileKind kind, Diagnostics* diagnostics) {
  if (!CheckText(file, text, diagnostics)) return std::nullopt;
  YamlProblem problem;
  std::optional<YamlDocument> parsed = YamlDocument::Parse(text, kMaxDepth, &problem);
  if (!parsed) {
    diagnostics->Error({file, problem.line, problem.column},
                       problem.kind == YamlProblem::Kind::kTooDeep
                           ? fmt::format("{}; a {} file needs a few", problem.message, kind.noun)
                           : fmt::format("YAML syntax error: {}", problem.message));
    return std::nullopt;
  }
  const std::vector<YamlNode>& documents = parsed->documents();
  if (documents.empty() || documents[0].IsNull()) {
    diagnostics->Error({file, 1, 1}, fmt::format("the file is empty; a {} file starts with `{}`",
                                                 kind.noun, kind.first_line));
    return std::nullopt;
  }
  if (documents.size() > 1 && !documents[1].IsNull()) {
    diagnostics->Error(Locate(documents[1], file),
                       fmt::format("a second YAML document starts here; a {} file holds one",
                                   kind.noun));
    return std::nullopt;
  }
  if (!documents[0].IsMap()) {
    diagnostics->Error(Locate(documents[0], file),
                       fmt::format("a {} file is a mapping of keys (`{}` ...), not {}", kind.noun,
                                   kind.first_line, ShapeOf(documents[0])));
    return std::nullopt;
  }
  return parsed;
}

YamlDocument ReadYamlFile(const std::string& path, YamlFileKind kind) {
  std::string error;
  const std::optional<std::string> text = ReadTextFile(path, &error);
  if (!text) {
    throw InputError({path, 0, 0}, fmt::format("cannot read the {} file: {}", kind.noun, error));
  }
  Diagnostics diagnostics;
  std::optional<YamlDocument> document = ParseYamlText(path, *text, kind, &diagnostics);
  if (!document) diagnostics.Throw();
  return std::move(*document);
}

// ---------------------------------------------------------------------------------------------

}  // namespace overtone::internal
