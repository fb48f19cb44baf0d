// src/units.cc — the table of quantity kinds and units, and the parser that reads `13.8 kV`.
#include "units.h"

#include <charconv>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <vector>

#include <fmt/format.h>

namespace overtone::internal {
namespace {

struct Unit {
  std::string_view symbol;  // "" = a bare number
  double factor;            // value in the stored unit = number * factor
};

struct KindSpec {
  QuantityKind kind;
  std::string_view noun;
  std::string_view example;
  std::vector<Unit> units;
};

// The one table of units. Factors are the SI prefixes (k = 1e3, M = 1e6, m = 1e-3, u = 1e-6,
// n = 1e-9); ratios are stored as fractions and angles in degrees.
const std::vector<KindSpec>& KindTable() {
  using K = QuantityKind;
  // clang-format off
  static const std::vector<KindSpec> table = {
      {K::kVoltage, "a voltage", "13.8 kV", {{"V", 1.0}, {"kV", 1e3}, {"MV", 1e6}}},
      {K::kApparentPower, "an apparent power", "1500 kVA",
       {{"VA", 1.0}, {"kVA", 1e3}, {"MVA", 1e6}}},
      {K::kActivePower, "an active power", "75 kW", {{"W", 1.0}, {"kW", 1e3}, {"MW", 1e6}}},
      {K::kReactivePower, "a reactive power", "600 kvar",
       {{"var", 1.0}, {"kvar", 1e3}, {"kVAr", 1e3}, {"kVAR", 1e3}, {"Mvar", 1e6},
        {"MVAr", 1e6}, {"MVAR", 1e6}}},
      {K::kRatio, "a percentage or per-unit value", "5.75 %", {{"%", 0.01}, {"pu", 1.0}}},
      {K::kLength, "a length", "120 m", {{"m", 1.0}, {"km", 1e3}}},
      {K::kOhmPerLength, "a resistance or reactance per length", "0.12 ohm/km",
       {{"ohm/km", 1e-3}, {"ohm/m", 1.0}}},
      {K::kCapacitancePerLength, "a capacitance per length", "0.3 uF/km",
       {{"uF/km", 1e-9}, {"nF/km", 1e-12}}},
      {K::kInductance, "an inductance", "0.5 mH", {{"H", 1.0}, {"mH", 1e-3}, {"uH", 1e-6}}},
      {K::kCapacitance, "a capacitance", "3000 uF",
       {{"F", 1.0}, {"mF", 1e-3}, {"uF", 1e-6}, {"nF", 1e-9}}},
      {K::kAngle, "an angle", "30 deg", {{"deg", 1.0}, {"rad", 180.0 / std::numbers::pi}}},
      {K::kFrequency, "a frequency", "60 Hz", {{"Hz", 1.0}}},
      {K::kCurrent, "a current", "420 A", {{"A", 1.0}, {"kA", 1e3}}},
      {K::kFraction, "a fraction", "0.95", {{"", 1.0}, {"%", 0.01}}},
      {K::kPlain, "a plain number", "10", {{"", 1.0}}},
  };
  // clang-format on
  return table;
}

const KindSpec& SpecOf(QuantityKind kind) {
  for (const KindSpec& spec : KindTable()) {
    if (spec.kind == kind) return spec;
  }
  throw std::logic_error("quantity kind missing from the unit table");
}

std::string_view Trim(std::string_view text) {
  const auto not_space = text.find_first_not_of(" \t");
  if (not_space == std::string_view::npos) return {};
  return text.substr(not_space, text.find_last_not_of(" \t") - not_space + 1);
}

bool IsDigit(char c) { return c >= '0' && c <= '9'; }

size_t CountDigits(std::string_view text, size_t from) {
  size_t end = from;
  while (end < text.size() && IsDigit(text[end])) ++end;
  return end - from;
}

// Length of the plain decimal number (sign, digits, point, exponent) that starts `text`; 0 when
// there is none. Hex, `inf` and `nan` are not plain decimals, so they end up rejected.
size_t DecimalLength(std::string_view text) {
  size_t pos = (!text.empty() && (text[0] == '+' || text[0] == '-')) ? 1 : 0;
  const size_t int_digits = CountDigits(text, pos);
  pos += int_digits;
  size_t frac_digits = 0;
  if (pos < text.size() && text[pos] == '.') {
    frac_digits = CountDigits(text, pos + 1);
    pos += 1 + frac_digits;
  }
  if (int_digits + frac_digits == 0) return 0;
  if (pos < text.size() && (text[pos] == 'e' || text[pos] == 'E')) {
    size_t exp_pos = pos + 1;
    if (exp_pos < text.size() && (text[exp_pos] == '+' || text[exp_pos] == '-')) ++exp_pos;
    const size_t exp_digits = CountDigits(text, exp_pos);
    if (exp_digits > 0) pos = exp_pos + exp_digits;
  }
  return pos;
}

std::optional<double> ToDouble(std::string_view number) {
  if (!number.empty() && number[0] == '+') number.remove_prefix(1);  // from_chars takes no '+'
  double value = 0.0;
  const auto [end, status] = std::from_chars(number.data(), number.data() + number.size(), value);
  if (status != std::errc() || end != number.data() + number.size() || !std::isfinite(value)) {
    return std::nullopt;
  }
  return value;
}

// "x, y or z".
std::string JoinAlternatives(const std::vector<std::string>& items) {
  std::string text;
  for (size_t i = 0; i < items.size(); ++i) {
    if (i > 0) text += (i + 1 == items.size()) ? " or " : ", ";
    text += items[i];
  }
  return text;
}

std::string DescribeKinds(std::span<const QuantityKind> kinds) {
  std::vector<std::string> nouns;
  for (QuantityKind kind : kinds) nouns.emplace_back(KindNoun(kind));
  return JoinAlternatives(nouns);
}

std::string DescribeUnitsOf(std::span<const QuantityKind> kinds) {
  std::vector<std::string> units;
  for (QuantityKind kind : kinds) {
    for (const Unit& unit : SpecOf(kind).units) {
      units.push_back(unit.symbol.empty() ? "a bare number" : std::string(unit.symbol));
    }
  }
  return JoinAlternatives(units);
}

bool IsKnownUnit(std::string_view symbol) {
  for (const KindSpec& spec : KindTable()) {
    if (UnitFactor(spec.kind, symbol)) return true;
  }
  return false;
}

// Message for a number whose unit fits none of `kinds`.
std::string UnitMismatch(std::string_view text, std::string_view unit,
                         std::span<const QuantityKind> kinds) {
  if (unit.starts_with(',')) {
    return fmt::format("`{}`: write the decimal separator as a point", text);
  }
  if (IsKnownUnit(unit)) {
    return fmt::format("`{}` is not {}; use {}", text, DescribeKinds(kinds),
                       DescribeUnitsOf(kinds));
  }
  return fmt::format("`{}` has an unknown unit `{}`; use {} (units are case-sensitive)", text, unit,
                     DescribeUnitsOf(kinds));
}

}  // namespace

std::optional<double> UnitFactor(QuantityKind kind, std::string_view unit) {
  for (const Unit& candidate : SpecOf(kind).units) {
    if (candidate.symbol == unit) return candidate.factor;
  }
  return std::nullopt;
}

std::string_view KindNoun(QuantityKind kind) { return SpecOf(kind).noun; }

std::string DescribeUnits(QuantityKind kind) { return DescribeUnitsOf({&kind, 1}); }

std::optional<Quantity> ParseQuantity(std::string_view text, std::span<const QuantityKind> kinds,
                                      std::string_view bare_unit, std::string* error) {
  if (kinds.empty() || !UnitFactor(kinds[0], bare_unit)) {
    throw std::logic_error("ParseQuantity: the bare unit must belong to the first kind");
  }
  const std::string_view trimmed = Trim(text);
  const std::string_view example = SpecOf(kinds[0]).example;
  if (trimmed.empty()) {
    *error = fmt::format("empty value; expected {} such as `{}`", DescribeKinds(kinds), example);
    return std::nullopt;
  }
  const size_t number_length = DecimalLength(trimmed);
  const std::string_view unit = Trim(trimmed.substr(number_length));
  const bool hex_like = number_length < trimmed.size() &&
                        (trimmed[number_length] == 'x' || trimmed[number_length] == 'X');
  if (number_length == 0 || hex_like) {
    *error = fmt::format("`{}` is not {} such as `{}`", trimmed, DescribeKinds(kinds), example);
    return std::nullopt;
  }
  const std::optional<double> number = ToDouble(trimmed.substr(0, number_length));
  if (!number) {
    *error = fmt::format("`{}` is out of range for a number", trimmed);
    return std::nullopt;
  }
  for (QuantityKind kind : kinds) {
    const std::optional<double> factor = UnitFactor(kind, unit.empty() ? bare_unit : unit);
    if (!factor || (unit.empty() && kind != kinds[0])) continue;
    const double value = *number * *factor;
    if (!std::isfinite(value)) {
      *error = fmt::format("`{}` is out of range for a number", trimmed);
      return std::nullopt;
    }
    return Quantity{value, kind};
  }
  *error = UnitMismatch(trimmed, unit, kinds);
  return std::nullopt;
}

std::optional<Quantity> ParseQuantity(std::string_view text, QuantityKind kind,
                                      std::string_view bare_unit, std::string* error) {
  return ParseQuantity(text, std::span<const QuantityKind>(&kind, 1), bare_unit, error);
}

}  // namespace overtone::internal
