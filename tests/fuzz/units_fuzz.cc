// tests/fuzz/units_fuzz.cc — libFuzzer target: the unit parser returns a finite value or an error.
//
// Run by tools/fuzz. The first byte picks the quantity kind, the rest is the text. A value that is
// not finite, or a failure without a message, is a bug (PLANT-FORMAT.md "Quantities").
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <string_view>

#include "units.h"

using overtone::internal::ParseQuantity;
using overtone::internal::QuantityKind;

namespace {

struct KindAndBareUnit {
  QuantityKind kind;
  std::string_view bare_unit;  // the bare-number unit of PLANT-FORMAT.md "Quantities"
};

constexpr KindAndBareUnit kKinds[] = {
    {QuantityKind::kVoltage, "kV"},        {QuantityKind::kApparentPower, "kVA"},
    {QuantityKind::kActivePower, "kW"},    {QuantityKind::kReactivePower, "kvar"},
    {QuantityKind::kRatio, "%"},           {QuantityKind::kLength, "m"},
    {QuantityKind::kOhmPerLength, "ohm/km"}, {QuantityKind::kCapacitancePerLength, "uF/km"},
    {QuantityKind::kInductance, "mH"},     {QuantityKind::kCapacitance, "uF"},
    {QuantityKind::kAngle, "deg"},         {QuantityKind::kFrequency, "Hz"},
    {QuantityKind::kCurrent, "A"},         {QuantityKind::kFraction, ""},
    {QuantityKind::kPlain, ""},
};

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const KindAndBareUnit& k = kKinds[data[0] % std::size(kKinds)];
  const std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
  std::string error;
  const auto quantity = ParseQuantity(text, k.kind, k.bare_unit, &error);
  if (quantity && !std::isfinite(quantity->value)) std::abort();
  if (!quantity && error.empty()) std::abort();
  return 0;
}
