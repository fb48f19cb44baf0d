// src/plant_text.cc — a plant file's bytes: reading them and checking the text before YAML parsing.
#include "plant_text.h"

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

// Deepest `[`/`{` nesting accepted. A plant file needs three levels; the limit keeps the parser's
// recursion (and the stack) small whatever the input.
constexpr int kMaxFlowDepth = 64;

// Reports the first `[` or `{` nested deeper than kMaxFlowDepth, outside quotes and comments,
// and a `,` that begins a line (or follows `---`) outside `[...]` and `{...}`: never part of a
// plant file, and yaml-cpp 0.7 loops forever on some of them (found by tools/fuzz).
bool CheckNesting(const std::string& file, std::string_view text, Diagnostics* diagnostics) {
  int depth = 0;
  int line = 1;
  int column = 0;
  size_t line_start = 0;
  char quote = 0;  // the open quote, 0 outside quotes
  bool comment = false;
  char previous = '\n';
  for (size_t pos = 0; pos < text.size(); ++pos) {
    const char c = text[pos];
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) ++column;  // UTF-8 lead bytes only
    if (c == '\n') {
      ++line;
      column = 0;
      line_start = pos + 1;
      comment = false;
    } else if (comment) {
      // nothing nests inside a comment
    } else if (quote != 0) {
      if (quote == '"' && c == '\\') {
        ++pos;  // an escaped character
        ++column;
      } else if (c == quote) {
        quote = 0;
      }
    } else if (c == '#' && (previous == ' ' || previous == '\t' || previous == '\n')) {
      comment = true;
    } else if ((c == '"' || c == '\'') &&
               std::string_view(" \t\n[{,:").find(previous) != std::string_view::npos) {
      quote = c;
    } else if (c == '[' || c == '{') {
      if (++depth > kMaxFlowDepth) {
        diagnostics->Error({file, line, column},
                           fmt::format("`{}` nests lists and mappings deeper than {} levels; a "
                                       "plant file needs three",
                                       c, kMaxFlowDepth));
        return false;
      }
    } else if ((c == ']' || c == '}') && depth > 0) {
      --depth;
    } else if (c == ',' && depth == 0) {
      std::string_view before = text.substr(line_start, pos - line_start);
      before.remove_prefix(std::min(before.find_first_not_of(' '), before.size()));
      if (before.empty() || before.starts_with("---")) {
        diagnostics->Error({file, line, column},
                           "a `,` separates entries only inside `[...]` or `{...}`");
        return false;
      }
    }
    previous = c;
  }
  return true;
}

// ---------------------------------------------------------------------------------------------

}  // namespace overtone::internal
