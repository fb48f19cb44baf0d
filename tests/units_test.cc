// tests/units_test.cc — quantities with units: every unit of the table, bare numbers, bad text.
//
// Unit spellings and bare-number units: PLANT-FORMAT.md "Quantities". Factors: the SI prefixes
// (BIPM SI Brochure, 9th edition, table 7: k = 1e3, M = 1e6, m = 1e-3, u = 1e-6, n = 1e-9).
#include "units.h"

#include <array>
#include <numbers>
#include <optional>
#include <string>

#include <catch2/catch.hpp>

namespace overtone::internal {
namespace {

using K = QuantityKind;

// The value of `text` read as `kind`, with `bare_unit` for a bare number; fails the test on error.
double Parse(const std::string& text, QuantityKind kind, std::string_view bare_unit) {
  std::string error;
  const std::optional<Quantity> quantity = ParseQuantity(text, kind, bare_unit, &error);
  INFO(text << ": " << error);
  REQUIRE(quantity.has_value());
  CHECK(quantity->kind == kind);
  return quantity->value;
}

// The error message for `text`, which must fail to parse as `kind`.
std::string Problem(const std::string& text, QuantityKind kind, std::string_view bare_unit) {
  std::string error;
  const std::optional<Quantity> quantity = ParseQuantity(text, kind, bare_unit, &error);
  INFO(text);
  CHECK_FALSE(quantity.has_value());
  return error;
}

TEST_CASE("every unit of the format converts to SI", "[units]") {
  struct Case {
    const char* text;
    QuantityKind kind;
    const char* bare_unit;  // any unit of the kind; unused here, the text carries its unit
    double si;
  };
  // PLANT-FORMAT.md "Quantities" lists the spellings; the factors are the SI prefixes.
  const std::array cases = {
      Case{"13.8 kV", K::kVoltage, "kV", 13800.0},
      Case{"480 V", K::kVoltage, "kV", 480.0},
      Case{"1500 kVA", K::kApparentPower, "kVA", 1.5e6},
      Case{"2.5 MVA", K::kApparentPower, "kVA", 2.5e6},
      Case{"600 kvar", K::kReactivePower, "kvar", 6e5},
      Case{"600 kVAr", K::kReactivePower, "kvar", 6e5},
      Case{"600 kVAR", K::kReactivePower, "kvar", 6e5},
      Case{"75 kW", K::kActivePower, "kW", 75e3},
      Case{"5.75 %", K::kRatio, "%", 0.0575},
      Case{"0.17 pu", K::kRatio, "%", 0.17},
      Case{"120 m", K::kLength, "m", 120.0},
      Case{"0.35 km", K::kLength, "m", 350.0},
      Case{"0.12 ohm/km", K::kOhmPerLength, "ohm/km", 1.2e-4},
      Case{"0.3 uF/km", K::kCapacitancePerLength, "uF/km", 3e-10},
      Case{"0.5 mH", K::kInductance, "mH", 5e-4},
      Case{"20 uH", K::kInductance, "mH", 2e-5},
      Case{"3000 uF", K::kCapacitance, "uF", 3e-3},
      Case{"30 deg", K::kAngle, "deg", 30.0},
      Case{"60 Hz", K::kFrequency, "Hz", 60.0},
      Case{"420 A", K::kCurrent, "A", 420.0},
      // Extra units of this implementation, same prefixes.
      Case{"0.1 MV", K::kVoltage, "kV", 1e5},
      Case{"2 MW", K::kActivePower, "kW", 2e6},
      Case{"3 Mvar", K::kReactivePower, "kvar", 3e6},
      Case{"0.2 ohm/m", K::kOhmPerLength, "ohm/km", 0.2},
      Case{"250 nF/km", K::kCapacitancePerLength, "uF/km", 2.5e-10},
      Case{"1 H", K::kInductance, "mH", 1.0},
      Case{"2 mF", K::kCapacitance, "uF", 2e-3},
      Case{"1.2 kA", K::kCurrent, "A", 1200.0},
  };
  for (const Case& c : cases) {
    CHECK(Parse(c.text, c.kind, c.bare_unit) == Approx(c.si).epsilon(1e-12));
  }
}

TEST_CASE("the space before the unit is optional", "[units]") {
  // PLANT-FORMAT.md "Quantities": "a space before the unit is optional".
  CHECK(Parse("13.8kV", K::kVoltage, "kV") == Approx(13800.0));
  CHECK(Parse("5.75%", K::kRatio, "%") == Approx(0.0575));
  CHECK(Parse("0.5mH", K::kInductance, "mH") == Approx(5e-4));
}

TEST_CASE("a bare number is read in the key's own unit", "[units]") {
  // PLANT-FORMAT.md "Quantities" table: kv in kV, short_circuit in MVA, rating (transformer) in
  // kVA, q in kvar, impedance in %, voltage in pu, length in m, r in ohm/km, c in uF/km,
  // dc_capacitance in uF, angle in deg, frequency in Hz, demand_current in A.
  CHECK(Parse("13.8", K::kVoltage, "kV") == Approx(13800.0));
  CHECK(Parse("250", K::kApparentPower, "MVA") == Approx(2.5e8));
  CHECK(Parse("2000", K::kApparentPower, "kVA") == Approx(2e6));
  CHECK(Parse("100", K::kReactivePower, "kvar") == Approx(1e5));
  CHECK(Parse("5.75", K::kRatio, "%") == Approx(0.0575));
  CHECK(Parse("1.05", K::kRatio, "pu") == Approx(1.05));
  CHECK(Parse("120", K::kLength, "m") == Approx(120.0));
  CHECK(Parse("0.12", K::kOhmPerLength, "ohm/km") == Approx(1.2e-4));
  CHECK(Parse("0.3", K::kCapacitancePerLength, "uF/km") == Approx(3e-10));
  CHECK(Parse("3000", K::kCapacitance, "uF") == Approx(3e-3));
  CHECK(Parse("-30", K::kAngle, "deg") == Approx(-30.0));
  CHECK(Parse("50", K::kFrequency, "Hz") == Approx(50.0));
  CHECK(Parse("420", K::kCurrent, "A") == Approx(420.0));
}

TEST_CASE("fractions take a bare fraction or a percent", "[units]") {
  // PLANT-FORMAT.md "Quantities": efficiency "a fraction (0.95) or a percent (95 %)".
  CHECK(Parse("0.95", K::kFraction, "") == Approx(0.95));
  CHECK(Parse("95 %", K::kFraction, "") == Approx(0.95));
  CHECK(Problem("0.95 pu", K::kFraction, "") ==
        "`0.95 pu` is not a fraction; use a bare number or %");
}

TEST_CASE("plain numbers take no unit", "[units]") {
  // PLANT-FORMAT.md "Quantities": x_over_r, quality, count ... are plain numbers.
  CHECK(Parse("40", K::kPlain, "") == Approx(40.0));
  CHECK(Parse("1e3", K::kPlain, "") == Approx(1000.0));
  CHECK(Problem("40 %", K::kPlain, "") == "`40 %` is not a plain number; use a bare number");
}

TEST_CASE("radians convert to degrees", "[units]") {
  // pi rad = 180 deg (definition of the radian).
  CHECK(Parse("3.141592653589793 rad", K::kAngle, "deg") == Approx(180.0));
  CHECK(Parse(" 45 deg ", K::kAngle, "deg") == Approx(45.0));
}

TEST_CASE("signs and exponents are read", "[units]") {
  // Plain decimal notation with an optional sign and exponent (common practice).
  CHECK(Parse("-2.5 %", K::kRatio, "%") == Approx(-0.025));
  CHECK(Parse("+2.5 %", K::kRatio, "%") == Approx(0.025));
  CHECK(Parse("1.38e1 kV", K::kVoltage, "kV") == Approx(13800.0));
  CHECK(Parse(".5 km", K::kLength, "m") == Approx(500.0));
}

TEST_CASE("a unit that does not fit the key is an error naming the units that do", "[units]") {
  // PLANT-FORMAT.md "Quantities": "A unit that does not fit the key (`13.8 kW` for a voltage) is
  // an error."
  CHECK(Problem("13.8 kW", K::kVoltage, "kV") == "`13.8 kW` is not a voltage; use V, kV or MV");
  CHECK(Problem("600 kVA", K::kReactivePower, "kvar") ==
        "`600 kVA` is not a reactive power; use var, kvar, kVAr, kVAR, Mvar, MVAr or MVAR");
  CHECK(Problem("5 pu", K::kLength, "m") == "`5 pu` is not a length; use m or km");
}

TEST_CASE("unit spellings are case-sensitive", "[units]") {
  // PLANT-FORMAT.md "Quantities": "unit spellings are case-sensitive as written here".
  CHECK(Problem("13.8 kv", K::kVoltage, "kV") ==
        "`13.8 kv` has an unknown unit `kv`; use V, kV or MV (units are case-sensitive)");
  CHECK(Problem("600 KVAR", K::kReactivePower, "kvar").find("unknown unit `KVAR`") !=
        std::string::npos);
  CHECK(Problem("60 hz", K::kFrequency, "Hz").find("unknown unit `hz`") != std::string::npos);
}

TEST_CASE("not-a-number, infinities, hex and empty text are rejected", "[units]") {
  for (const char* text : {"nan", "NaN", ".nan", "inf", "-inf", ".inf", "abc", "kV", "-", "."}) {
    CHECK(Problem(text, K::kVoltage, "kV").find("is not a voltage such as `13.8 kV`") !=
          std::string::npos);
  }
  CHECK(Problem("0x1A", K::kVoltage, "kV") == "`0x1A` is not a voltage such as `13.8 kV`");
  CHECK(Problem("", K::kVoltage, "kV") == "empty value; expected a voltage such as `13.8 kV`");
  CHECK(Problem("   ", K::kVoltage, "kV") == "empty value; expected a voltage such as `13.8 kV`");
  CHECK(Problem("1e999 kV", K::kVoltage, "kV") == "`1e999 kV` is out of range for a number");
  CHECK(Problem("1,5 kV", K::kVoltage, "kV") == "`1,5 kV`: write the decimal separator as a point");
}

TEST_CASE("a key may accept two kinds; a bare number takes the first", "[units]") {
  // PLANT-FORMAT.md: a motor rating is kW or kVA; line_reactor is % or an inductance.
  const std::array rating = {K::kActivePower, K::kApparentPower};
  std::string error;
  const auto kw = ParseQuantity("250 kW", rating, "kW", &error);
  const auto kva = ParseQuantity("300 kVA", rating, "kW", &error);
  const auto bare = ParseQuantity("250", rating, "kW", &error);
  REQUIRE(kw);
  REQUIRE(kva);
  REQUIRE(bare);
  CHECK(kw->kind == K::kActivePower);
  CHECK(kva->kind == K::kApparentPower);
  CHECK(kva->value == Approx(3e5));
  CHECK(bare->kind == K::kActivePower);
  CHECK(bare->value == Approx(2.5e5));
  CHECK_FALSE(ParseQuantity("250 kvar", rating, "kW", &error));
  CHECK(error ==
        "`250 kvar` is not an active power or an apparent power; use W, kW, MW, VA, kVA "
        "or MVA");

  const std::array reactor = {K::kRatio, K::kInductance};
  const auto percent = ParseQuantity("3 %", reactor, "%", &error);
  const auto henry = ParseQuantity("0.5 mH", reactor, "%", &error);
  REQUIRE(percent);
  REQUIRE(henry);
  CHECK(percent->kind == K::kRatio);
  CHECK(percent->value == Approx(0.03));
  CHECK(henry->kind == K::kInductance);
  CHECK(henry->value == Approx(5e-4));
}

TEST_CASE("unit factors and descriptions come from the one table", "[units]") {
  CHECK(UnitFactor(K::kVoltage, "kV") == Approx(1e3));
  CHECK(UnitFactor(K::kRatio, "%") == Approx(0.01));
  CHECK_FALSE(UnitFactor(K::kVoltage, "kW").has_value());
  CHECK(DescribeUnits(K::kInductance) == "H, mH or uH");
  CHECK(DescribeUnits(K::kFraction) == "a bare number or %");
  CHECK(KindNoun(K::kCurrent) == "a current");
}

}  // namespace
}  // namespace overtone::internal
