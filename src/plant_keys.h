// src/plant_keys.h — the key tables of the plant format: every key a mapping accepts, its unit and range (internal).
#ifndef OVERTONE_INTERNAL_PLANT_KEYS_H_
#define OVERTONE_INTERNAL_PLANT_KEYS_H_

#include <cstddef>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "overtone/plant.h"
#include "units.h"

namespace overtone::internal {

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

using K = QuantityKind;  // keeps the tables readable

// A key listed twice (on adjacent rows) takes either kind; a bare number is read in the first
// row's unit.
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

// MappingReader finds a key's rows as one run of the table, and parses at most this many kinds.
constexpr size_t kMaxRowsPerKey = 2;

constexpr bool RowsOfEachKeyAdjacent(std::span<const KeySpec> table) {
  for (size_t first = 0; first < table.size();) {
    size_t last = first;
    while (last < table.size() && table[last].key == table[first].key) ++last;
    if (last - first > kMaxRowsPerKey) return false;
    for (size_t later = last; later < table.size(); ++later) {
      if (table[later].key == table[first].key) return false;
    }
    first = last;
  }
  return true;
}

static_assert(RowsOfEachKeyAdjacent(kTopKeys) && RowsOfEachKeyAdjacent(kStudyKeys) &&
              RowsOfEachKeyAdjacent(kHarmonicKeys) && RowsOfEachKeyAdjacent(kSupplyKeys) &&
              RowsOfEachKeyAdjacent(kGeneratorKeys) && RowsOfEachKeyAdjacent(kBusKeys) &&
              RowsOfEachKeyAdjacent(kTransformerKeys) && RowsOfEachKeyAdjacent(kCableKeys) &&
              RowsOfEachKeyAdjacent(kCapacitorKeys) && RowsOfEachKeyAdjacent(kFilterKeys) &&
              RowsOfEachKeyAdjacent(kMotorKeys) && RowsOfEachKeyAdjacent(kLoadKeys) &&
              RowsOfEachKeyAdjacent(kDriveKeys));

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

inline const Choices<FrontEnd>& FrontEndChoices() {
  static const Choices<FrontEnd> choices = ChoicesByToString(FrontEnd::kMeasured);
  return choices;
}

inline const Choices<Summation>& SummationChoices() {
  static const Choices<Summation> choices = ChoicesByToString(Summation::kIec);
  return choices;
}

inline const Choices<FilterType>& FilterTypeChoices() {
  static const Choices<FilterType> choices = {{"single-tuned", FilterType::kSingleTuned},
                                              {"high-pass", FilterType::kHighPass}};
  return choices;
}

inline const Choices<LoadModel>& LoadModelChoices() {
  static const Choices<LoadModel> choices = {{"parallel-rl", LoadModel::kParallelRL},
                                             {"series-rl", LoadModel::kSeriesRL},
                                             {"none", LoadModel::kNone}};
  return choices;
}

constexpr std::string_view kLimitProfiles[] = {"ieee519", "iec61000-2-4-class1",
                                               "iec61000-2-4-class2", "iec61000-2-4-class3"};

// ---------------------------------------------------------------------------------------------

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PLANT_KEYS_H_
