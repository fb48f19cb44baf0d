// src/spectra.cc — drive groups with table spectra (measured and active front ends).
#include "spectra.h"

#include <cmath>
#include <numbers>

#include <fmt/format.h>

namespace overtone::internal {

Complex TableDrivePower(const Drive& d) {
  const double p = d.count * d.power_w * d.loading / kBaseVa;
  return {p, p * std::tan(std::acos(d.displacement_pf))};
}

// A low, fixed spectrum typical of PWM active front ends with their LCL filters: current THD
// near 3 %. Common practice, from memory (manufacturers quote THDi below 5 %); not a measurement.
const std::vector<HarmonicEntry>& DefaultActiveSpectrum() {
  static const std::vector<HarmonicEntry> table = {
      {5, 2.0, 0.0, {}},  {7, 1.5, 0.0, {}},  {11, 1.0, 0.0, {}}, {13, 0.8, 0.0, {}},
      {17, 0.5, 0.0, {}}, {19, 0.4, 0.0, {}}, {23, 0.3, 0.0, {}}, {25, 0.3, 0.0, {}},
  };
  return table;
}

std::vector<Complex> TableSpectrum(const Drive& d, Complex i1, int max_order,
                                   std::vector<std::string>& warnings) {
  std::vector<Complex> current(static_cast<std::size_t>(max_order) + 1);
  current[1] = i1;
  const double theta = std::arg(i1);
  const auto& table = (d.front_end == FrontEnd::kActive && d.harmonics.empty())
                          ? DefaultActiveSpectrum() : d.harmonics;
  bool dropped_triplen = false, dropped_high = false;
  for (const HarmonicEntry& e : table) {
    if (e.order > max_order) {
      dropped_high = true;
      continue;
    }
    if (e.order % 3 == 0) {
      dropped_triplen = true;
      continue;
    }
    const double angle = e.angle_deg * std::numbers::pi / 180.0 + e.order * theta;
    current[e.order] += std::polar(std::abs(i1) * e.percent / 100.0, angle);
  }
  if (dropped_high) {
    warnings.push_back(fmt::format("drive '{}': spectrum rows above the study's max_order {} are "
                                   "ignored", d.name, max_order));
  }
  if (dropped_triplen) {
    warnings.push_back(fmt::format(
        "drive '{}': triplen orders in its spectrum are ignored (a balanced three-phase group "
        "injects no zero-sequence current; such entries come from imbalance)", d.name));
  }
  return current;
}

bool NeedsBridgeModel(FrontEnd f) { return f != FrontEnd::kMeasured && f != FrontEnd::kActive; }

}  // namespace overtone::internal
