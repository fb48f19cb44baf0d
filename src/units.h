// src/units.h — reading quantities written with units (`13.8 kV`, `5.75 %`) into SI values.
//
// One table lists every kind of quantity the plant format knows, with the units each accepts and
// their SI factors. A bare number is read in a unit the caller names (the key's own unit, see
// PLANT-FORMAT.md "Quantities"). Ratios (%, pu) and fractions come back as plain fractions;
// angles come back in degrees, as the plant model stores them.
#ifndef OVERTONE_INTERNAL_UNITS_H_
#define OVERTONE_INTERNAL_UNITS_H_

#include <optional>
#include <span>
#include <string>
#include <string_view>

namespace overtone::internal {

enum class QuantityKind {
  kVoltage,               // V
  kApparentPower,         // VA
  kActivePower,           // W
  kReactivePower,         // var
  kRatio,                 // fraction, written in % or pu
  kLength,                // m
  kOhmPerLength,          // ohm/m
  kCapacitancePerLength,  // F/m
  kInductance,            // H
  kCapacitance,           // F
  kAngle,                 // degrees
  kFrequency,             // Hz
  kCurrent,               // A
  kFraction,              // a bare fraction (0.95) or a percent (95 %)
  kPlain,                 // a bare number, no unit
};

// A value read from text: SI (or fraction, or degrees) and the kind whose unit matched.
struct Quantity {
  double value = 0.0;
  QuantityKind kind = QuantityKind::kPlain;
};

// Reads `text` as a quantity of one of `kinds`. A bare number is read in `bare_unit`, which must be
// a unit of kinds[0] ("" for the bare fraction and plain kinds). On failure returns nothing and
// sets `*error` to a message that quotes the text and lists the units that fit.
std::optional<Quantity> ParseQuantity(std::string_view text, std::span<const QuantityKind> kinds,
                                      std::string_view bare_unit, std::string* error);

// The same for a single kind.
std::optional<Quantity> ParseQuantity(std::string_view text, QuantityKind kind,
                                      std::string_view bare_unit, std::string* error);

// The SI factor of `unit` for `kind` (1000 for kV); nothing when the kind has no such unit.
std::optional<double> UnitFactor(QuantityKind kind, std::string_view unit);

// "a voltage", "an inductance", ...: for messages.
std::string_view KindNoun(QuantityKind kind);

// The units a kind accepts, for messages and docs: "V, kV or MV"; "a bare number or %".
std::string DescribeUnits(QuantityKind kind);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_UNITS_H_
