// src/loader.cc — reads a format-1 plant file (YAML) into the typed Plant, checking every value.
//
// Three stages. (1) PlantFileReader reads each file (encoding, YAML syntax, format version) and
// merges it with the file it `extends` into a RawPlant, where every element keeps its YAML node
// and the file it was written in, so later messages point at the right file. (2) PlantBuilder
// converts the raw elements through one key table per section (units, physical ranges, required
// keys) and checks references and names. (3) Whole-plant checks: islands without a source.
// Problems are collected in Diagnostics and thrown together as one InputError.
#include "overtone/load.h"

#include <algorithm>
#include <array>
#include <cerrno>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>
#include <numeric>
#include <optional>
#include <set>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <tuple>
#include <unordered_map>
#include <utility>
#include <vector>

#include <fmt/format.h>
#include <yaml-cpp/depthguard.h>
#include <yaml-cpp/yaml.h>

#include "overtone/errors.h"
#include "overtone/plant.h"
#include "units.h"

namespace overtone {
namespace {

namespace fs = std::filesystem;
using internal::Quantity;
using internal::QuantityKind;

// ---------------------------------------------------------------------------------------------
// Diagnostics and small text helpers

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

SourceLocation Locate(const YAML::Node& node, const std::string& file) {
  const YAML::Mark mark = node.Mark();
  if (mark.is_null()) return {file, 0, 0};
  return {file, mark.line + 1, mark.column + 1};
}

std::string FormatPlace(const SourceLocation& where) {
  return fmt::format("{}:{}:{}", where.file, where.line, where.column);
}

char Lower(char c) { return (c >= 'A' && c <= 'Z') ? static_cast<char>(c - 'A' + 'a') : c; }

// Levenshtein distance, ignoring letter case (a wrong case is the commonest slip).
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
// Key tables: every key a mapping accepts, how its value is read, and its physical range.
//
// Ranges are written in the key's own unit (the unit of a bare number), '(' ')' open and '[' ']'
// closed, as in mathematics. They are wide enough for any real plant and narrow enough to catch a
// wrong unit or a slipped digit; docs/plant-format.md lists them for users (change both together).

constexpr double kInf = std::numeric_limits<double>::infinity();

struct Range {
  char lo_bracket = '[';
  double lo = -kInf;
  double hi = kInf;
  char hi_bracket = ']';
};

constexpr Range Interval(char lo_bracket, double lo, double hi, char hi_bracket) {
  return {lo_bracket, lo, hi, hi_bracket};
}

enum class ValueType { kText, kQuantity, kInteger, kList, kMapping };
enum Need { kOptional, kRequired };

struct KeySpec {
  std::string_view key;
  ValueType type = ValueType::kText;
  QuantityKind kind = QuantityKind::kPlain;
  std::string_view unit;  // unit of a bare number and of `range`
  Range range;
  Need need = kOptional;
};

constexpr KeySpec TextKey(std::string_view key, Need need = kOptional) {
  return {key, ValueType::kText, QuantityKind::kPlain, "", {}, need};
}
constexpr KeySpec NumberKey(std::string_view key, QuantityKind kind, std::string_view unit,
                            Range range, Need need = kOptional) {
  return {key, ValueType::kQuantity, kind, unit, range, need};
}
constexpr KeySpec IntegerKey(std::string_view key, Range range, Need need = kOptional) {
  return {key, ValueType::kInteger, QuantityKind::kPlain, "", range, need};
}
constexpr KeySpec ListKey(std::string_view key) {
  return {key, ValueType::kList, QuantityKind::kPlain, "", {}, kOptional};
}
constexpr KeySpec MappingKey(std::string_view key) {
  return {key, ValueType::kMapping, QuantityKind::kPlain, "", {}, kOptional};
}

using K = QuantityKind;

// A key listed twice takes either kind; a bare number is read in the first row's unit.
// clang-format off
constexpr KeySpec kTopKeys[] = {
    IntegerKey("overtone", {}), TextKey("extends"),       ListKey("remove"),
    MappingKey("study"),        ListKey("supplies"),      ListKey("generators"),
    ListKey("buses"),           ListKey("transformers"),  ListKey("cables"),
    ListKey("capacitors"),      ListKey("filters"),       ListKey("motors"),
    ListKey("loads"),           ListKey("drives"),
};
// clang-format on

constexpr KeySpec kStudyKeys[] = {
    TextKey("name"),
    NumberKey("frequency", K::kFrequency, "Hz", Interval('[', 1, 1000, ']')),
    IntegerKey("max_order", Interval('[', 2, 200, ']')),
    TextKey("pcc"),
    NumberKey("demand_current", K::kCurrent, "A", Interval('(', 0, 1e6, ']')),
    TextKey("limits"),
    TextKey("summation"),
};

constexpr Range kXOverR = Interval('(', 0, 200, ']');
constexpr Range kAngle = Interval('[', -360, 360, ']');
constexpr Range kUnitCount = Interval('[', 1, 100000, ']');
constexpr Range kFractionRange = Interval('(', 0, 1, ']');
constexpr Range kBusVoltage = Interval('(', 0, 1000, ']');  // kV

constexpr KeySpec kHarmonicKeys[] = {
    IntegerKey("order", Interval('[', 2, 200, ']'), kRequired),
    NumberKey("percent", K::kRatio, "%", Interval('[', 0, 100, ']'), kRequired),
    NumberKey("angle", K::kAngle, "deg", kAngle),
};

constexpr KeySpec kSupplyKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    NumberKey("short_circuit", K::kApparentPower, "MVA", Interval('(', 0, 100000, ']'), kRequired),
    NumberKey("x_over_r", K::kPlain, "", kXOverR),
    NumberKey("voltage", K::kRatio, "pu", Interval('[', 0.5, 1.5, ']')),
    NumberKey("angle", K::kAngle, "deg", kAngle),
    ListKey("background"),
};

constexpr KeySpec kGeneratorKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    NumberKey("rating", K::kApparentPower, "kVA", Interval('(', 0, 2e6, ']'), kRequired),
    NumberKey("x2", K::kRatio, "pu", Interval('(', 0, 1, ']'), kRequired),
    NumberKey("x_over_r", K::kPlain, "", kXOverR),
    NumberKey("voltage", K::kRatio, "pu", Interval('[', 0.5, 1.5, ']')),
    NumberKey("angle", K::kAngle, "deg", kAngle),
};

constexpr KeySpec kBusKeys[] = {
    TextKey("name", kRequired),
    NumberKey("kv", K::kVoltage, "kV", kBusVoltage, kRequired),
};

constexpr KeySpec kTransformerKeys[] = {
    TextKey("name", kRequired),
    TextKey("from", kRequired),
    TextKey("to", kRequired),
    NumberKey("rating", K::kApparentPower, "kVA", Interval('(', 0, 2e6, ']'), kRequired),
    NumberKey("impedance", K::kRatio, "%", Interval('(', 0, 50, ']'), kRequired),
    NumberKey("x_over_r", K::kPlain, "", kXOverR),
    TextKey("connection", kRequired),
    NumberKey("tap", K::kRatio, "%", Interval('[', -20, 20, ']')),
    NumberKey("eddy_loss", K::kRatio, "%", Interval('[', 0, 500, ']')),
};

constexpr KeySpec kCableKeys[] = {
    TextKey("name", kRequired),
    TextKey("from", kRequired),
    TextKey("to", kRequired),
    NumberKey("length", K::kLength, "m", Interval('(', 0, 100000, ']'), kRequired),
    NumberKey("r", K::kOhmPerLength, "ohm/km", Interval('(', 0, 100, ']'), kRequired),
    NumberKey("x", K::kOhmPerLength, "ohm/km", Interval('[', 0, 100, ']'), kRequired),
    NumberKey("c", K::kCapacitancePerLength, "uF/km", Interval('[', 0, 10, ']')),
    IntegerKey("runs", Interval('[', 1, 100, ']')),
};

constexpr KeySpec kCapacitorKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    NumberKey("rating", K::kReactivePower, "kvar", Interval('(', 0, 1e6, ']'), kRequired),
    NumberKey("kv", K::kVoltage, "kV", kBusVoltage),
    IntegerKey("steps", Interval('[', 1, 100, ']')),
    IntegerKey("steps_on", Interval('[', 0, 100, ']')),
    NumberKey("detuning", K::kRatio, "%", Interval('(', 0, 50, ')')),
    NumberKey("tuned_order", K::kPlain, "", Interval('[', 1.5, 50, ']')),
    NumberKey("x_over_r", K::kPlain, "", kXOverR),
};

constexpr KeySpec kFilterKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    TextKey("type"),
    NumberKey("rating", K::kReactivePower, "kvar", Interval('(', 0, 1e6, ']'), kRequired),
    NumberKey("kv", K::kVoltage, "kV", kBusVoltage),
    NumberKey("tuned_order", K::kPlain, "", Interval('(', 1, 200, ')'), kRequired),
    NumberKey("quality", K::kPlain, "", Interval('(', 0, 1000, ']')),
};

constexpr KeySpec kMotorKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    NumberKey("rating", K::kActivePower, "kW", Interval('(', 0, 100000, ']'), kRequired),
    NumberKey("rating", K::kApparentPower, "kVA", Interval('(', 0, 100000, ']')),
    NumberKey("kv", K::kVoltage, "kV", kBusVoltage),
    IntegerKey("count", kUnitCount),
    NumberKey("loading", K::kRatio, "%", Interval('[', 0, 200, ']')),
    NumberKey("locked_rotor_reactance", K::kRatio, "pu", Interval('(', 0, 1, ']')),
    NumberKey("x_over_r", K::kPlain, "", kXOverR),
    NumberKey("efficiency", K::kFraction, "", kFractionRange),
    NumberKey("power_factor", K::kFraction, "", kFractionRange),
};

constexpr KeySpec kLoadKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    NumberKey("p", K::kActivePower, "kW", Interval('(', 0, 1e6, ']'), kRequired),
    NumberKey("q", K::kReactivePower, "kvar", Interval('[', 0, 1e6, ']')),
    IntegerKey("count", kUnitCount),
    TextKey("model"),
};

constexpr Range kReactorPercent = Interval('[', 0, 50, ']');
constexpr Range kReactorMilliHenry = Interval('[', 0, 1000, ']');

constexpr KeySpec kDriveKeys[] = {
    TextKey("name", kRequired),
    TextKey("bus", kRequired),
    IntegerKey("count", kUnitCount),
    NumberKey("power", K::kActivePower, "kW", Interval('(', 0, 100000, ']'), kRequired),
    NumberKey("loading", K::kRatio, "%", Interval('(', 0, 200, ']')),
    TextKey("front_end", kRequired),
    IntegerKey("pulses", Interval('[', 12, 24, ']')),
    NumberKey("line_reactor", K::kRatio, "%", kReactorPercent),
    NumberKey("line_reactor", K::kInductance, "mH", kReactorMilliHenry),
    NumberKey("dc_choke", K::kRatio, "%", kReactorPercent),
    NumberKey("dc_choke", K::kInductance, "mH", kReactorMilliHenry),
    NumberKey("dc_capacitance", K::kCapacitance, "uF", Interval('(', 0, 1e6, ']')),
    NumberKey("imbalance", K::kRatio, "%", Interval('[', 0, 20, ']')),
    NumberKey("firing_angle", K::kAngle, "deg", Interval('[', 0, 90, ')')),
    ListKey("harmonics"),
    NumberKey("displacement_pf", K::kFraction, "", kFractionRange),
};

// Which drive keys apply to which front ends (PLANT-FORMAT.md "drives").
constexpr unsigned Bit(FrontEnd front_end) { return 1u << static_cast<unsigned>(front_end); }
constexpr unsigned kAllFrontEnds = (Bit(FrontEnd::kMeasured) << 1) - 1;  // kMeasured is last
constexpr unsigned kTableFrontEnds = Bit(FrontEnd::kMeasured) | Bit(FrontEnd::kActive);
constexpr std::string_view kMeasuredIncludesIt =
    " (a measured spectrum already includes the drive's reactors and DC link)";

struct FrontEndRule {
  std::string_view key;
  unsigned allowed;
  unsigned required;
  std::string_view why_not;  // appended when the key is given where it does not apply
};

constexpr FrontEndRule kFrontEndRules[] = {
    {"pulses", Bit(FrontEnd::kMultipulse), Bit(FrontEnd::kMultipulse), ""},
    {"imbalance", Bit(FrontEnd::kMultipulse), 0, ""},
    {"firing_angle", Bit(FrontEnd::kThyristor), Bit(FrontEnd::kThyristor), ""},
    {"harmonics", kTableFrontEnds, Bit(FrontEnd::kMeasured), ""},
    {"displacement_pf", kTableFrontEnds, 0, ""},
    {"line_reactor", kAllFrontEnds & ~Bit(FrontEnd::kMeasured), 0, kMeasuredIncludesIt},
    {"dc_choke", kAllFrontEnds & ~Bit(FrontEnd::kMeasured), 0, kMeasuredIncludesIt},
    {"dc_capacitance", kAllFrontEnds & ~Bit(FrontEnd::kMeasured), 0, kMeasuredIncludesIt},
};

template <typename T>
struct Choice {
  std::string text;
  T value;
};
template <typename T>
using Choices = std::vector<Choice<T>>;

// Choices spelled by ToString (src/plant.cc, the one place those spellings live), for an enum
// numbered 0..last.
template <typename T>
Choices<T> ChoicesByToString(T last) {
  Choices<T> choices;
  for (int i = 0; i <= static_cast<int>(last); ++i) {
    choices.push_back({ToString(static_cast<T>(i)), static_cast<T>(i)});
  }
  return choices;
}

const Choices<FrontEnd>& FrontEndChoices() {
  static const Choices<FrontEnd> choices = ChoicesByToString(FrontEnd::kMeasured);
  return choices;
}

const Choices<Summation>& SummationChoices() {
  static const Choices<Summation> choices = ChoicesByToString(Summation::kIec);
  return choices;
}

const Choices<FilterType>& FilterTypeChoices() {
  static const Choices<FilterType> choices = {{"single-tuned", FilterType::kSingleTuned},
                                              {"high-pass", FilterType::kHighPass}};
  return choices;
}

const Choices<LoadModel>& LoadModelChoices() {
  static const Choices<LoadModel> choices = {{"parallel-rl", LoadModel::kParallelRL},
                                             {"series-rl", LoadModel::kSeriesRL},
                                             {"none", LoadModel::kNone}};
  return choices;
}

constexpr std::string_view kLimitProfiles[] = {"ieee519", "iec61000-2-4-class1",
                                               "iec61000-2-4-class2", "iec61000-2-4-class3"};

// ---------------------------------------------------------------------------------------------
// MappingReader: reads the keys of one mapping through its key table.

// A YAML node that can be stored in containers. YAML::Node's own assignment writes into the node
// it refers to (and so into the document), which would corrupt inherited content when elements
// are replaced or removed; this handle's assignment re-points the handle instead.
class NodeRef : public YAML::Node {
 public:
  NodeRef(const YAML::Node& node) : YAML::Node(node) {}  // NOLINT: implicit by design
  NodeRef(const NodeRef& other) = default;
  NodeRef& operator=(const NodeRef& other) {
    reset(other);
    return *this;
  }
};

// One key of a mapping, its value, and the file it was written in.
struct Entry {
  std::string key;
  NodeRef key_node;
  NodeRef value;
  std::string file;

  SourceLocation KeyWhere() const { return Locate(key_node, file); }
  // An empty value has no place of its own in yaml-cpp, so it takes its key's.
  SourceLocation ValueWhere() const { return value.IsNull() ? KeyWhere() : Locate(value, file); }
};

// The keys of `map` in order; a key written twice is reported and its second value dropped.
std::vector<Entry> MapEntries(const YAML::Node& map, const std::string& file,
                              Diagnostics* diagnostics) {
  std::vector<Entry> entries;
  for (const auto& item : map) {
    const YAML::Node& key = item.first;
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
    entries.push_back({key.Scalar(), key, item.second, file});
  }
  return entries;
}

std::string_view ShapeOf(const YAML::Node& node) {
  if (node.IsSequence()) return "a list";
  if (node.IsMap()) return "a mapping";
  if (node.IsNull()) return "empty";
  return "a single value";
}

class MappingReader {
 public:
  // `noun` names the mapping in messages ("transformer"); its `name`, when readable, is added.
  MappingReader(std::vector<Entry> entries, SourceLocation where, std::string_view noun,
                std::span<const KeySpec> specs, Diagnostics* diagnostics)
      : entries_(std::move(entries)),
        where_(std::move(where)),
        noun_(noun),
        specs_(specs),
        diagnostics_(diagnostics) {
    const Entry* name = Find("name");
    title_ = (name && name->value.IsScalar() && !name->value.Scalar().empty())
                 ? fmt::format("{} `{}`", noun, name->value.Scalar())
                 : std::string(noun);
  }

  const SourceLocation& where() const { return where_; }
  std::string_view noun() const { return noun_; }
  const std::string& title() const { return title_; }
  bool Has(std::string_view key) const { return Find(key) != nullptr; }
  std::string FileOf(std::string_view key) const {
    const Entry* entry = Find(key);
    return entry ? entry->file : where_.file;
  }

  // Reports unknown keys (with the nearest known key) and missing required keys.
  void CheckKeys() {
    std::vector<std::string_view> known;  // table order, each key once
    for (const KeySpec& spec : specs_) {
      if (std::ranges::find(known, spec.key) == known.end()) known.push_back(spec.key);
    }
    for (const Entry& entry : entries_) {
      if (std::ranges::find(known, entry.key) != known.end()) continue;
      std::string hint = DidYouMean(entry.key, known);
      if (hint.empty()) hint = fmt::format("; known keys: {}", JoinNames(known));
      diagnostics_->Error(entry.KeyWhere(),
                          fmt::format("unknown key `{}` in {}{}", entry.key, title_, hint));
    }
    for (const KeySpec& spec : specs_) {
      if (spec.need == kRequired && !Has(spec.key)) {
        diagnostics_->Error(where_, fmt::format("{} is missing `{}`", title_, spec.key));
      }
    }
  }

  // Reports `message` at the value of `key` (at the mapping when the key is absent).
  void Error(std::string_view key, std::string message) {
    const Entry* entry = Find(key);
    diagnostics_->Error(entry ? entry->ValueWhere() : where_, std::move(message));
  }

  // A single non-empty value as written; nothing when absent (or bad, which is reported).
  std::optional<std::string> Text(std::string_view key) {
    const Entry* entry = Find(key);
    if (!entry) return std::nullopt;
    if (!entry->value.IsScalar()) {
      Error(key, entry->value.IsNull() ? fmt::format("`{}` has no value", key)
                                       : fmt::format("`{}` must be a single value, not {}", key,
                                                     ShapeOf(entry->value)));
      return std::nullopt;
    }
    const std::string& text = entry->value.Scalar();
    if (text.find_first_not_of(" \t") == std::string::npos) {
      Error(key, fmt::format("`{}` is empty", key));
      return std::nullopt;
    }
    return text;
  }

  // A quantity in one of the kinds the table gives this key, checked against that kind's range.
  std::optional<Quantity> QuantityOf(std::string_view key) {
    RequireType(key, ValueType::kQuantity, ValueType::kInteger);
    const std::optional<std::string> text = Text(key);
    if (!text) return std::nullopt;
    std::vector<QuantityKind> kinds;
    for (const KeySpec* spec : SpecsOf(key)) kinds.push_back(spec->kind);
    std::string error;
    const std::optional<Quantity> quantity =
        internal::ParseQuantity(*text, kinds, SpecsOf(key).front()->unit, &error);
    if (!quantity) {
      Error(key, fmt::format("{}: {}", key, error));
      return std::nullopt;
    }
    for (const KeySpec* spec : SpecsOf(key)) {
      if (spec->kind != quantity->kind) continue;
      const std::string problem = RangeProblem(*spec, quantity->value);
      if (problem.empty()) return quantity;
      Error(key, fmt::format("{} must be {}; got `{}`{}", key, problem, *text,
                             spec->kind == K::kFraction && quantity->value > 1
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
  YAML::Node List(std::string_view key) {
    RequireType(key, ValueType::kList, ValueType::kList);
    return Container(key, /*want_list=*/true);
  }
  YAML::Node Mapping(std::string_view key) {
    RequireType(key, ValueType::kMapping, ValueType::kMapping);
    return Container(key, /*want_list=*/false);
  }

  template <typename T>
  std::optional<T> Choose(std::string_view key, const Choices<T>& choices) {
    const std::optional<std::string> text = Text(key);
    if (!text) return std::nullopt;
    std::vector<std::string_view> names;
    for (const Choice<T>& choice : choices) {
      if (choice.text == *text) return choice.value;
      names.push_back(choice.text);
    }
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
    if (std::optional<std::string> value = Text(key)) *out = std::move(*value);
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
    const std::vector<const KeySpec*> rows = SpecsOf(key);
    if (rows.empty() || (rows[0]->type != type && rows[0]->type != other_type)) {
      throw std::logic_error(fmt::format("key `{}` read against its table", key));
    }
  }

  std::vector<const KeySpec*> SpecsOf(std::string_view key) const {
    std::vector<const KeySpec*> rows;
    for (const KeySpec& spec : specs_) {
      if (spec.key == key) rows.push_back(&spec);
    }
    return rows;
  }

  // "" when `value` (stored unit) lies in the spec's range, else "above 0 kvar" and the like.
  static std::string RangeProblem(const KeySpec& spec, double value) {
    const double shown = value / internal::UnitFactor(spec.kind, spec.unit).value_or(1.0);
    const Range& range = spec.range;
    const std::string unit = spec.unit.empty() ? "" : fmt::format(" {}", spec.unit);
    if (range.lo_bracket == '(' ? shown <= range.lo : shown < range.lo) {
      return fmt::format("{} {}{}", range.lo_bracket == '(' ? "above" : "at least", range.lo, unit);
    }
    if (range.hi_bracket == ')' ? shown >= range.hi : shown > range.hi) {
      return fmt::format("{} {}{}", range.hi_bracket == ')' ? "below" : "at most", range.hi, unit);
    }
    return "";
  }

  YAML::Node Container(std::string_view key, bool want_list) {
    const Entry* entry = Find(key);
    if (!entry || entry->value.IsNull()) return YAML::Node();
    if (want_list ? entry->value.IsSequence() : entry->value.IsMap()) return entry->value;
    Error(key, want_list ? fmt::format("`{}` must be a list (`- ...` lines or `[a, b]`), not {}",
                                       key, ShapeOf(entry->value))
                         : fmt::format("`{}` must be a mapping of keys, not {}", key,
                                       ShapeOf(entry->value)));
    return YAML::Node();
  }

  std::vector<Entry> entries_;
  SourceLocation where_;
  std::string_view noun_;
  std::string title_;  // "transformer `T1`"
  std::span<const KeySpec> specs_;
  Diagnostics* diagnostics_;
};

// A reader for an element or table row; nothing when `node` is not a mapping (reported).
std::optional<MappingReader> ReadMapping(const YAML::Node& node, const std::string& file,
                                         std::string_view noun, std::span<const KeySpec> specs,
                                         Diagnostics* diagnostics) {
  if (!node.IsMap()) {
    diagnostics->Error(Locate(node, file),
                       fmt::format("a {} must be a mapping of keys, not {}", noun, ShapeOf(node)));
    return std::nullopt;
  }
  MappingReader reader(MapEntries(node, file, diagnostics), Locate(node, file), noun, specs,
                       diagnostics);
  reader.CheckKeys();
  return reader;
}

// ---------------------------------------------------------------------------------------------
// Stage 1: files, `extends` and `remove`, merged into a RawPlant.

enum Section {
  kSupplies,
  kGenerators,
  kBuses,
  kTransformers,
  kCables,
  kCapacitors,
  kFilters,
  kMotors,
  kLoads,
  kDrives,
  kSectionCount
};

struct SectionInfo {
  std::string_view key;
  std::string_view noun;
  std::span<const KeySpec> keys;
};

// In the order of PLANT-FORMAT.md; buses come before everything that needs their voltage.
// clang-format off
constexpr SectionInfo kSections[kSectionCount] = {
    {"supplies", "supply", kSupplyKeys},
    {"generators", "generator", kGeneratorKeys},
    {"buses", "bus", kBusKeys},
    {"transformers", "transformer", kTransformerKeys},
    {"cables", "cable", kCableKeys},
    {"capacitors", "capacitor", kCapacitorKeys},
    {"filters", "filter", kFilterKeys},
    {"motors", "motor", kMotorKeys},
    {"loads", "load", kLoadKeys},
    {"drives", "drive", kDriveKeys},
};
// clang-format on

struct RawElement {
  std::string name;  // empty when missing or malformed (reported when the element is read)
  NodeRef node;
  std::string file;
};

struct RawPlant {
  SourceLocation top_where;  // the root file's top-level mapping
  std::vector<Entry> study;  // merged key by key; each entry keeps its own file
  SourceLocation study_where;
  std::array<std::vector<RawElement>, kSectionCount> sections;
};

std::string ElementName(const YAML::Node& node) {
  if (!node.IsMap()) return "";
  for (const auto& item : node) {
    if (item.first.IsScalar() && item.first.Scalar() == "name") {
      return item.second.IsScalar() ? item.second.Scalar() : "";
    }
  }
  return "";
}

fs::path Canonical(const std::string& path) {
  std::error_code code;
  fs::path canonical = fs::weakly_canonical(path, code);
  return code ? fs::absolute(path).lexically_normal() : canonical;
}

class PlantFileReader {
 public:
  explicit PlantFileReader(Diagnostics* diagnostics) : diagnostics_(diagnostics) {}

  // The content of `file` merged over the files it extends; nothing when a file cannot be used
  // at all (unreadable, not YAML, wrong version, cyclic `extends`).
  std::optional<RawPlant> Read(const std::string& file, const std::string& text) {
    chain_.push_back({file, Canonical(file)});
    std::optional<RawPlant> plant = ReadOne(file, text);
    chain_.pop_back();
    return plant;
  }

 private:
  struct ChainLink {
    std::string name;  // as written (resolved against the naming file)
    fs::path canonical;
  };

  std::optional<RawPlant> ReadOne(const std::string& file, const std::string& text) {
    const std::optional<YAML::Node> root = Parse(file, text);
    if (!root) return std::nullopt;
    MappingReader top(MapEntries(*root, file, diagnostics_), Locate(*root, file), "the plant file",
                      kTopKeys, diagnostics_);
    if (!CheckVersion(top)) return std::nullopt;
    top.CheckKeys();
    RawPlant plant;
    if (top.Has("extends")) {
      std::optional<RawPlant> base = ReadBase(top);
      if (!base) return std::nullopt;
      plant = std::move(*base);
    }
    plant.top_where = top.where();
    RemoveInherited(top, &plant);
    MergeStudy(top, &plant);
    MergeSections(top, &plant);
    return plant;
  }

  std::optional<YAML::Node> Parse(const std::string& file, const std::string& text) {
    if (!CheckText(file, text, diagnostics_)) return std::nullopt;
    if (!CheckNesting(file, text, diagnostics_)) return std::nullopt;
    std::vector<YAML::Node> documents;
    try {
      documents = YAML::LoadAll(text);
    } catch (const YAML::DeepRecursion& e) {
      diagnostics_->Error({file, e.mark.line + 1, e.mark.column + 1},
                          "the YAML nests too deeply here; a plant file needs three levels");
      return std::nullopt;
    } catch (const YAML::Exception& e) {
      const SourceLocation where = e.mark.is_null()
                                       ? SourceLocation{file, 0, 0}
                                       : SourceLocation{file, e.mark.line + 1, e.mark.column + 1};
      diagnostics_->Error(where, fmt::format("YAML syntax error: {}", e.msg));
      return std::nullopt;
    }
    if (documents.empty() || documents[0].IsNull()) {
      diagnostics_->Error({file, 1, 1},
                          "the file is empty; a plant file starts with `overtone: 1`");
      return std::nullopt;
    }
    if (documents.size() > 1 && !documents[1].IsNull()) {
      diagnostics_->Error(Locate(documents[1], file),
                          "a second YAML document starts here; a plant file holds one");
      return std::nullopt;
    }
    if (!documents[0].IsMap()) {
      diagnostics_->Error(Locate(documents[0], file),
                          fmt::format("a plant file is a mapping of keys (`overtone: 1`, "
                                      "`buses:` ...), not {}",
                                      ShapeOf(documents[0])));
      return std::nullopt;
    }
    return documents[0];
  }

  bool CheckVersion(MappingReader& top) {
    if (!top.Has("overtone")) {
      diagnostics_->Error(top.where(),
                          "missing `overtone: 1` (the format version) at the top of the file");
      return false;
    }
    const std::optional<int> version = top.Integer("overtone");
    if (!version) return false;
    if (*version != 1) {
      top.Error(
          "overtone",
          fmt::format("format version {} is not supported; this build reads format 1", *version));
      return false;
    }
    return true;
  }

  std::optional<RawPlant> ReadBase(MappingReader& top) {
    const std::optional<std::string> written = top.Text("extends");
    if (!written) return std::nullopt;
    const std::string path = ResolvePath(top.FileOf("extends"), *written);
    const fs::path canonical = Canonical(path);
    const auto repeat = std::ranges::find(chain_, canonical, &ChainLink::canonical);
    if (repeat != chain_.end()) {
      std::vector<std::string> cycle;
      for (auto link = repeat; link != chain_.end(); ++link) cycle.push_back(link->name);
      cycle.push_back(path);
      std::string arrows;
      for (const std::string& name : cycle) arrows += (arrows.empty() ? "" : " -> ") + name;
      top.Error("extends", fmt::format("`extends` makes a cycle: {}", arrows));
      return std::nullopt;
    }
    std::string error;
    const std::optional<std::string> text = ReadTextFile(path, &error);
    if (!text) {
      top.Error("extends", fmt::format("cannot read `{}`: {}", path, error));
      return std::nullopt;
    }
    return Read(path, *text);
  }

  void RemoveInherited(MappingReader& top, RawPlant* plant) {
    const YAML::Node names = top.List("remove");
    if (names.size() == 0) return;
    if (!top.Has("extends")) {
      top.Error("remove", "`remove` drops inherited elements, but this file has no `extends`");
      return;
    }
    const std::string file = top.FileOf("remove");
    for (const YAML::Node& item : names) {
      if (!item.IsScalar()) {
        diagnostics_->Error(Locate(item, file), "each entry of `remove` must be a name");
        continue;
      }
      if (!EraseInherited(item.Scalar(), plant)) {
        diagnostics_->Error(Locate(item, file),
                            fmt::format("`{}` is not inherited, so it cannot be removed{}",
                                        item.Scalar(), DidYouMean(item.Scalar(), Names(*plant))));
      }
    }
  }

  static bool EraseInherited(const std::string& name, RawPlant* plant) {
    for (std::vector<RawElement>& elements : plant->sections) {
      const auto found = std::ranges::find(elements, name, &RawElement::name);
      if (found != elements.end()) {
        elements.erase(found);
        return true;
      }
    }
    return false;
  }

  static std::vector<std::string> Names(const RawPlant& plant) {
    std::vector<std::string> names;
    for (const std::vector<RawElement>& elements : plant.sections) {
      for (const RawElement& element : elements) names.push_back(element.name);
    }
    return names;
  }

  // `study` merges key by key: a key written here replaces the inherited one.
  void MergeStudy(MappingReader& top, RawPlant* plant) {
    const YAML::Node study = top.Mapping("study");
    if (!study.IsMap()) return;
    const std::string file = top.FileOf("study");
    plant->study_where = Locate(study, file);
    for (Entry& entry : MapEntries(study, file, diagnostics_)) {
      const auto inherited = std::ranges::find(plant->study, entry.key, &Entry::key);
      if (inherited != plant->study.end()) {
        *inherited = std::move(entry);
      } else {
        plant->study.push_back(std::move(entry));
      }
    }
  }

  // An element whose name matches an inherited element of its section replaces it in place; the
  // rest are appended. A name written twice in this file is left for the duplicate-name check.
  void MergeSections(MappingReader& top, RawPlant* plant) {
    for (size_t section = 0; section < kSectionCount; ++section) {
      const std::string_view key = kSections[section].key;
      const YAML::Node list = top.List(key);
      std::vector<RawElement>& elements = plant->sections[section];
      const size_t inherited = elements.size();
      std::vector<bool> replaced(inherited, false);
      for (const YAML::Node& node : list) {
        RawElement element{ElementName(node), node, top.FileOf(key)};
        size_t slot = 0;
        while (slot < inherited &&
               (replaced[slot] || element.name.empty() || elements[slot].name != element.name)) {
          ++slot;
        }
        if (slot < inherited) {
          elements[slot] = std::move(element);
          replaced[slot] = true;
        } else {
          elements.push_back(std::move(element));
        }
      }
    }
  }

  Diagnostics* diagnostics_;
  std::vector<ChainLink> chain_;  // files being read, outermost first, for cycle detection
};

// ---------------------------------------------------------------------------------------------
// Vector groups (IEC 60076-1 notation): high-voltage winding in capitals, low-voltage winding in
// small letters, N/n for an accessible neutral, then the clock number.

struct Winding {
  char letter = 0;  // 'D', 'Y' or 'Z' (upper case here)
  bool neutral = false;
};

// Reads "D", "YN", "zn" ... at the front of `code`, in the case `upper` asks for.
std::optional<Winding> TakeWinding(std::string_view* code, bool upper) {
  const std::string_view letters = upper ? "DYZ" : "dyz";
  if (code->empty() || letters.find(code->front()) == std::string_view::npos) return std::nullopt;
  Winding winding{static_cast<char>(upper ? code->front() : code->front() - 'a' + 'A'), false};
  code->remove_prefix(1);
  const char neutral = upper ? 'N' : 'n';
  if (winding.letter != 'D' && !code->empty() && code->front() == neutral) {
    winding.neutral = true;
    code->remove_prefix(1);
  }
  return winding;
}

std::optional<VectorGroup> ParseVectorGroup(const std::string& code, std::string* error) {
  std::string_view rest = code;
  const std::optional<Winding> from = TakeWinding(&rest, true);
  const std::optional<Winding> to = TakeWinding(&rest, false);
  const bool digits = !rest.empty() && rest.size() <= 2 &&
                      std::ranges::all_of(rest, [](char c) { return c >= '0' && c <= '9'; }) &&
                      !(rest.size() == 2 && rest[0] == '0');
  if (!from || !to || !digits) {
    *error = fmt::format(
        "`{}` is not a vector group: write the high-voltage winding (D, Y, YN, Z, ZN), the "
        "low-voltage winding (d, y, yn, z, zn) and the clock number, e.g. `Dyn11`",
        code);
    return std::nullopt;
  }
  const int clock = std::stoi(std::string(rest));
  if (clock > 11) {
    *error = fmt::format("`{}`: the clock number must be 0 to 11", code);
    return std::nullopt;
  }
  // A wye winding against a delta or zigzag winding shifts by an odd multiple of 30 deg; equal
  // kinds by an even multiple (IEC 60076-1 vector groups: Dyn11, Yd1, Yzn11 odd; Dd0, Yy0, Dz0).
  const bool odd_shift = (from->letter == 'Y') != (to->letter == 'Y');
  if ((clock % 2 == 1) != odd_shift) {
    *error = fmt::format("`{}` is not a possible vector group: {}", code,
                         odd_shift ? "a wye winding against a delta or zigzag winding shifts "
                                     "by an odd clock number (1, 5, 7, 11)"
                                   : "wye against wye, or delta/zigzag against delta/zigzag, "
                                     "shifts by an even clock number (0, 2, 4, 6, 8, 10)");
    return std::nullopt;
  }
  VectorGroup group;
  group.code = code;
  group.clock = clock;
  group.from_grounded_wye = from->letter == 'Y' && from->neutral;
  group.to_grounded_wye = to->letter == 'Y' && to->neutral;
  group.from_delta = from->letter == 'D';
  group.to_delta = to->letter == 'D';
  return group;
}

// ---------------------------------------------------------------------------------------------
// Stage 2: RawPlant -> Plant.

class PlantBuilder {
 public:
  PlantBuilder(std::string file_name, Diagnostics* diagnostics)
      : file_name_(std::move(file_name)), diagnostics_(diagnostics) {}

  Plant Build(const RawPlant& raw) {
    plant_.source_file = file_name_;
    for (const RawElement& bus : raw.sections[kBuses]) {
      if (!bus.name.empty()) bus_names_.insert(bus.name);
    }
    ReadStudy(raw);
    ReadSection(raw, kSupplies, &plant_.supplies, &PlantBuilder::ReadSupply);
    ReadSection(raw, kGenerators, &plant_.generators, &PlantBuilder::ReadGenerator);
    ReadSection(raw, kBuses, &plant_.buses, &PlantBuilder::ReadBus);
    ReadSection(raw, kTransformers, &plant_.transformers, &PlantBuilder::ReadTransformer);
    ReadSection(raw, kCables, &plant_.cables, &PlantBuilder::ReadCable);
    ReadSection(raw, kCapacitors, &plant_.capacitors, &PlantBuilder::ReadCapacitor);
    ReadSection(raw, kFilters, &plant_.filters, &PlantBuilder::ReadFilter);
    ReadSection(raw, kMotors, &plant_.motors, &PlantBuilder::ReadMotor);
    ReadSection(raw, kLoads, &plant_.loads, &PlantBuilder::ReadLoad);
    ReadSection(raw, kDrives, &plant_.drives, &PlantBuilder::ReadDrive);
    CheckSources(raw.top_where);
    return std::move(plant_);
  }

 private:
  struct NameUse {
    SourceLocation where;
    std::string_view noun;
  };

  template <typename T>
  void ReadSection(const RawPlant& raw, Section section, std::vector<T>* out,
                   T (PlantBuilder::*read)(MappingReader&)) {
    const SectionInfo& info = kSections[section];
    for (const RawElement& element : raw.sections[section]) {
      std::optional<MappingReader> reader =
          ReadMapping(element.node, element.file, info.noun, info.keys, diagnostics_);
      if (reader) {
        out->push_back((this->*read)(*reader));
      } else {
        topology_unsure_ = true;
      }
    }
  }

  void ReadStudy(const RawPlant& raw) {
    StudySettings& study = plant_.study;
    study.where = raw.study_where.file.empty() ? SourceLocation{file_name_, 0, 0} : raw.study_where;
    MappingReader r(raw.study, study.where, "study", kStudyKeys, diagnostics_);
    r.CheckKeys();
    study.name = fs::path(file_name_).stem().string();
    r.Read("name", &study.name);
    r.Read("frequency", &study.frequency_hz);
    r.Read("max_order", &study.max_order);
    if (r.Has("pcc")) study.pcc = ReadBusName(r, "pcc");
    r.Read("demand_current", &study.demand_current_a);
    ReadLimits(r);
    r.Read("summation", SummationChoices(), &study.summation);
  }

  // A built-in profile name, or a profile file (relative to the file naming it) that must exist.
  void ReadLimits(MappingReader& r) {
    const std::optional<std::string> limits = r.Text("limits");
    if (!limits) return;
    if (std::ranges::find(kLimitProfiles, *limits) != std::end(kLimitProfiles)) {
      plant_.study.limits = *limits;
      return;
    }
    const std::string path = ResolvePath(r.FileOf("limits"), *limits);
    std::error_code code;
    if (fs::is_regular_file(path, code)) {
      plant_.study.limits = path;
      return;
    }
    r.Error(
        "limits",
        fmt::format("limits `{}` is neither a built-in profile ({}) nor an existing file "
                    "(looked for `{}`){}",
                    *limits, JoinNames(kLimitProfiles), path, DidYouMean(*limits, kLimitProfiles)));
  }

  // The element's name, which must be unique across the whole plant, buses included.
  std::string ReadName(MappingReader& r) {
    std::optional<std::string> name = r.Text("name");
    if (!name) return "";
    const auto [first, fresh] = names_.try_emplace(*name, NameUse{r.where(), r.noun()});
    if (!fresh) {
      r.Error("name", fmt::format("name `{}` is already used by the {} at {}", *name,
                                  first->second.noun, FormatPlace(first->second.where)));
    }
    return std::move(*name);
  }

  std::string ReadBusName(MappingReader& r, std::string_view key) {
    std::optional<std::string> bus = r.Text(key);
    if (!bus) {
      topology_unsure_ = true;
      return "";
    }
    if (!bus_names_.contains(*bus)) {
      r.Error(key, fmt::format("unknown bus `{}`{}", *bus, DidYouMean(*bus, bus_names_)));
      topology_unsure_ = true;
    }
    return std::move(*bus);
  }

  double BusVolts(const std::string& bus) const {
    const auto found = bus_volts_.find(bus);
    return found == bus_volts_.end() ? 0.0 : found->second;
  }

  // `kv` of equipment at a bus: the bus kv by default. A rated voltage beyond 0.5..2 times the
  // bus voltage is almost always a V/kV slip, so it is an error.
  double RatedVolts(MappingReader& r, const std::string& bus) {
    const double bus_volts = BusVolts(bus);
    const std::optional<double> rated = r.Number("kv");
    if (!rated) return bus_volts;
    if (bus_volts > 0 && (*rated < 0.5 * bus_volts || *rated > 2.0 * bus_volts)) {
      r.Error("kv", fmt::format("kv {:g} kV is far from the {:g} kV of bus `{}`; a rated voltage "
                                "lies within 0.5 to 2 times its bus voltage",
                                *rated / 1e3, bus_volts / 1e3, bus));
    }
    return *rated;
  }

  std::vector<HarmonicEntry> ReadHarmonics(MappingReader& r, std::string_view key) {
    std::vector<HarmonicEntry> table;
    const YAML::Node rows = r.List(key);
    const std::string file = r.FileOf(key);
    for (const YAML::Node& node : rows) {
      std::optional<MappingReader> row =
          ReadMapping(node, file, "harmonic entry", kHarmonicKeys, diagnostics_);
      if (!row) continue;
      HarmonicEntry entry;
      entry.where = row->where();
      row->Read("order", &entry.order);
      if (const std::optional<double> fraction = row->Number("percent")) {
        entry.percent = *fraction * 100.0;
      }
      row->Read("angle", &entry.angle_deg);
      CheckOrder(*row, entry, table);
      table.push_back(entry);
    }
    return table;
  }

  void CheckOrder(MappingReader& row, const HarmonicEntry& entry,
                  const std::vector<HarmonicEntry>& earlier) {
    const auto same = std::ranges::find(earlier, entry.order, &HarmonicEntry::order);
    if (entry.order > 0 && same != earlier.end()) {
      row.Error("order", fmt::format("order {} is listed twice; first at line {}", entry.order,
                                     same->where.line));
    }
  }

  Supply ReadSupply(MappingReader& r) {
    Supply supply;
    supply.where = r.where();
    supply.name = ReadName(r);
    supply.bus = ReadBusName(r, "bus");
    r.Read("short_circuit", &supply.short_circuit_va);
    r.Read("x_over_r", &supply.x_over_r);
    r.Read("voltage", &supply.voltage_pu);
    r.Read("angle", &supply.angle_deg);
    supply.background = ReadHarmonics(r, "background");
    return supply;
  }

  Generator ReadGenerator(MappingReader& r) {
    Generator generator;
    generator.where = r.where();
    generator.name = ReadName(r);
    generator.bus = ReadBusName(r, "bus");
    r.Read("rating", &generator.rating_va);
    r.Read("x2", &generator.x2_pu);
    r.Read("x_over_r", &generator.x_over_r);
    r.Read("voltage", &generator.voltage_pu);
    r.Read("angle", &generator.angle_deg);
    return generator;
  }

  Bus ReadBus(MappingReader& r) {
    Bus bus;
    bus.where = r.where();
    bus.name = ReadName(r);
    r.Read("kv", &bus.nominal_v);
    bus_volts_.try_emplace(bus.name, bus.nominal_v);
    return bus;
  }

  void CheckBranchEnds(MappingReader& r, const std::string& from, const std::string& to) {
    if (!from.empty() && from == to) {
      r.Error("to", fmt::format("{} connects bus `{}` to itself", r.title(), from));
    }
  }

  Transformer ReadTransformer(MappingReader& r) {
    Transformer transformer;
    transformer.where = r.where();
    transformer.name = ReadName(r);
    transformer.from = ReadBusName(r, "from");
    transformer.to = ReadBusName(r, "to");
    r.Read("rating", &transformer.rating_va);
    r.Read("impedance", &transformer.impedance);
    r.Read("x_over_r", &transformer.x_over_r);
    if (const std::optional<std::string> code = r.Text("connection")) {
      std::string error;
      if (std::optional<VectorGroup> group = ParseVectorGroup(*code, &error)) {
        transformer.connection = std::move(*group);
      } else {
        r.Error("connection", fmt::format("connection: {}", error));
      }
    }
    r.Read("tap", &transformer.tap);
    r.Read("eddy_loss", &transformer.eddy_loss);
    CheckBranchEnds(r, transformer.from, transformer.to);
    CheckHighVoltageSide(r, transformer);
    return transformer;
  }

  void CheckHighVoltageSide(MappingReader& r, const Transformer& transformer) {
    const double from_volts = BusVolts(transformer.from);
    const double to_volts = BusVolts(transformer.to);
    if (from_volts > 0 && to_volts > 0 && from_volts < to_volts) {
      r.Error("from", fmt::format("transformer `{}` is upside down: `from` bus `{}` ({:g} kV) is "
                                  "below `to` bus `{}` ({:g} kV); `from` is the high-voltage side",
                                  transformer.name, transformer.from, from_volts / 1e3,
                                  transformer.to, to_volts / 1e3));
    }
  }

  Cable ReadCable(MappingReader& r) {
    Cable cable;
    cable.where = r.where();
    cable.name = ReadName(r);
    cable.from = ReadBusName(r, "from");
    cable.to = ReadBusName(r, "to");
    r.Read("length", &cable.length_m);
    r.Read("r", &cable.r_ohm_per_m);
    r.Read("x", &cable.x_ohm_per_m);
    r.Read("c", &cable.c_f_per_m);
    r.Read("runs", &cable.runs);
    CheckBranchEnds(r, cable.from, cable.to);
    return cable;
  }

  Capacitor ReadCapacitor(MappingReader& r) {
    Capacitor capacitor;
    capacitor.where = r.where();
    capacitor.name = ReadName(r);
    capacitor.bus = ReadBusName(r, "bus");
    r.Read("rating", &capacitor.rating_var);
    capacitor.rated_v = RatedVolts(r, capacitor.bus);
    r.Read("steps", &capacitor.steps);
    capacitor.steps_on = capacitor.steps;
    r.Read("steps_on", &capacitor.steps_on);
    if (capacitor.steps_on > capacitor.steps) {
      r.Error("steps_on", fmt::format("steps_on {} is more than the {} steps of the bank",
                                      capacitor.steps_on, capacitor.steps));
    }
    ReadDetuning(r, &capacitor.detuning);
    r.Read("x_over_r", &capacitor.x_over_r);
    return capacitor;
  }

  // `detuning` p or `tuned_order` h_t, stored as p = 1 / h_t^2 (X_L = X_C / h_t^2 at the
  // fundamental puts the series resonance at h_t).
  void ReadDetuning(MappingReader& r, double* detuning) {
    if (r.Has("detuning") && r.Has("tuned_order")) {
      r.Error("tuned_order",
              "give `detuning` or `tuned_order`, not both (one follows from the "
              "other: detuning = 1 / tuned_order^2)");
      return;
    }
    r.Read("detuning", detuning);
    if (const std::optional<double> order = r.Number("tuned_order")) {
      *detuning = 1.0 / (*order * *order);
    }
  }

  Filter ReadFilter(MappingReader& r) {
    Filter filter;
    filter.where = r.where();
    filter.name = ReadName(r);
    filter.bus = ReadBusName(r, "bus");
    r.Read("type", FilterTypeChoices(), &filter.type);
    r.Read("rating", &filter.rating_var);
    filter.rated_v = RatedVolts(r, filter.bus);
    r.Read("tuned_order", &filter.tuned_order);
    filter.quality = filter.type == FilterType::kHighPass ? 1.0 : 40.0;
    r.Read("quality", &filter.quality);
    return filter;
  }

  Motor ReadMotor(MappingReader& r) {
    Motor motor;
    motor.where = r.where();
    motor.name = ReadName(r);
    motor.bus = ReadBusName(r, "bus");
    if (const std::optional<Quantity> rating = r.QuantityOf("rating")) {
      motor.rating = rating->value;
      motor.rating_is_kva = rating->kind == QuantityKind::kApparentPower;
    }
    motor.rated_v = RatedVolts(r, motor.bus);
    r.Read("count", &motor.count);
    r.Read("loading", &motor.loading);
    r.Read("locked_rotor_reactance", &motor.locked_rotor_reactance_pu);
    r.Read("x_over_r", &motor.x_over_r);
    r.Read("efficiency", &motor.efficiency);
    r.Read("power_factor", &motor.power_factor);
    return motor;
  }

  Load ReadLoad(MappingReader& r) {
    Load load;
    load.where = r.where();
    load.name = ReadName(r);
    load.bus = ReadBusName(r, "bus");
    r.Read("p", &load.p_w);
    r.Read("q", &load.q_var);
    r.Read("count", &load.count);
    r.Read("model", LoadModelChoices(), &load.model);
    return load;
  }

  Drive ReadDrive(MappingReader& r) {
    Drive drive;
    drive.where = r.where();
    drive.name = ReadName(r);
    drive.bus = ReadBusName(r, "bus");
    r.Read("count", &drive.count);
    r.Read("power", &drive.power_w);
    r.Read("loading", &drive.loading);
    if (const std::optional<FrontEnd> front_end = r.Choose("front_end", FrontEndChoices())) {
      drive.front_end = *front_end;
      CheckFrontEndKeys(r, *front_end);
    }
    if (const std::optional<int> pulses = r.Integer("pulses")) {
      if (*pulses % 6 != 0) {
        r.Error("pulses", fmt::format("pulses must be 12, 18 or 24; got {}", *pulses));
      }
      drive.pulses = *pulses;
    }
    drive.line_reactor = ReadReactor(r, "line_reactor");
    drive.dc_choke = ReadReactor(r, "dc_choke");
    r.Read("dc_capacitance", &drive.dc_capacitance_f);
    r.Read("imbalance", &drive.imbalance);
    r.Read("firing_angle", &drive.firing_angle_deg);
    drive.harmonics = ReadHarmonics(r, "harmonics");
    r.Read("displacement_pf", &drive.displacement_pf);
    return drive;
  }

  static ReactorSpec ReadReactor(MappingReader& r, std::string_view key) {
    ReactorSpec reactor;
    if (const std::optional<Quantity> value = r.QuantityOf(key)) {
      reactor.kind = value->kind == QuantityKind::kInductance ? ReactorSpec::Kind::kHenry
                                                              : ReactorSpec::Kind::kFraction;
      reactor.value = value->value;
    }
    return reactor;
  }

  void CheckFrontEndKeys(MappingReader& r, FrontEnd front_end) {
    const std::string name = ToString(front_end);
    for (const FrontEndRule& rule : kFrontEndRules) {
      if (r.Has(rule.key) && !(rule.allowed & Bit(front_end))) {
        r.Error(rule.key, fmt::format("`{}` does not apply to front_end `{}`{}", rule.key, name,
                                      rule.why_not));
      }
      if (!r.Has(rule.key) && (rule.required & Bit(front_end))) {
        r.Error("front_end", fmt::format("front_end `{}` needs `{}`", name, rule.key));
      }
    }
  }

  // Every bus must reach a supply or generator through transformers and cables. After a bad bus
  // reference the network is not known well enough to judge, and the check would only echo it.
  void CheckSources(const SourceLocation& top_where) {
    if (plant_.buses.empty()) {
      diagnostics_->Error(top_where, "the plant has no buses");
      return;
    }
    if (plant_.supplies.empty() && plant_.generators.empty()) {
      diagnostics_->Error(top_where, "the plant has no supply or generator");
      return;
    }
    if (!topology_unsure_) CheckIslands();
  }

  void CheckIslands() {
    std::unordered_map<std::string, size_t> index;
    for (size_t i = 0; i < plant_.buses.size(); ++i) index.try_emplace(plant_.buses[i].name, i);
    std::vector<size_t> parent(plant_.buses.size());
    std::iota(parent.begin(), parent.end(), size_t{0});
    const auto root = [&parent](size_t i) {
      while (parent[i] != i) i = parent[i] = parent[parent[i]];
      return i;
    };
    const auto join = [&](const std::string& a, const std::string& b) {
      if (index.contains(a) && index.contains(b)) parent[root(index[a])] = root(index[b]);
    };
    for (const Transformer& t : plant_.transformers) join(t.from, t.to);
    for (const Cable& c : plant_.cables) join(c.from, c.to);
    std::vector<bool> fed(parent.size(), false);
    const auto feed = [&](const std::string& bus) {
      if (index.contains(bus)) fed[root(index[bus])] = true;
    };
    for (const Supply& s : plant_.supplies) feed(s.bus);
    for (const Generator& g : plant_.generators) feed(g.bus);
    std::unordered_map<size_t, std::vector<std::string>> islands;
    std::vector<size_t> first_bus;  // of each island, in the order buses were written
    for (size_t i = 0; i < parent.size(); ++i) {
      const size_t island = root(i);
      if (fed[island] || plant_.buses[i].name.empty()) continue;  // unnamed: reported already
      if (islands[island].empty()) first_bus.push_back(i);
      islands[island].push_back(plant_.buses[i].name);
    }
    for (size_t i : first_bus) ReportIsland(plant_.buses[i], islands[root(i)]);
  }

  void ReportIsland(const Bus& bus, const std::vector<std::string>& members) {
    std::string listed;
    for (size_t i = 0; i < members.size() && i < 4; ++i) {
      listed += (i ? ", " : "") + members[i];
    }
    if (members.size() > 4) listed += ", ...";
    diagnostics_->Error(
        bus.where, fmt::format("bus `{}` is in an island with no supply or generator ({} bus{}: "
                               "{}); connect it by a transformer or cable, or remove it",
                               bus.name, members.size(), members.size() == 1 ? "" : "es", listed));
  }

  std::string file_name_;
  Diagnostics* diagnostics_;
  Plant plant_;
  std::set<std::string> bus_names_;  // every bus written, for references
  std::unordered_map<std::string, double> bus_volts_;
  std::unordered_map<std::string, NameUse> names_;
  bool topology_unsure_ = false;  // a bus reference or element could not be read
};

}  // namespace

Plant LoadPlantFromString(const std::string& text, const std::string& file_name) {
  Diagnostics diagnostics;
  std::optional<RawPlant> raw = PlantFileReader(&diagnostics).Read(file_name, text);
  if (!raw) diagnostics.Throw();
  Plant plant = PlantBuilder(file_name, &diagnostics).Build(*raw);
  if (!diagnostics.empty()) diagnostics.Throw();
  return plant;
}

Plant LoadPlant(const std::string& path) {
  std::string error;
  const std::optional<std::string> text = ReadTextFile(path, &error);
  if (!text) throw InputError({path, 0, 0}, fmt::format("cannot read the plant file: {}", error));
  return LoadPlantFromString(*text, path);
}

}  // namespace overtone
