// tests/bridge_test.cc — the bridge model against textbook closed forms.
#include "bridge.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

using namespace overtone::internal;
constexpr double kPi = std::numbers::pi;

namespace {

BridgeParameters Stiff(double x, double firing_deg, double power) {
  BridgeParameters p;
  p.circuit = BridgeCircuit::kSixPulseStiff;
  p.x_supply = x;
  p.firing_deg = firing_deg;
  p.thyristor = firing_deg > 0.0;
  p.power = power;
  return p;
}

}  // namespace

TEST_CASE("A current-stiff bridge on a stiff supply draws 120-degree blocks", "[bridge]") {
  // Mohan, Undeland & Robbins, "Power Electronics" 3rd ed., section 5-6 (idealised three-phase
  // rectifier): I_h = I_1 / h for h = 6k +- 1, I_1 = (sqrt 6 / pi) I_d, V_d0 = (3 sqrt 2 / pi) V_LL
  // = 1.35 V_LL, and the block's Fourier series cos x - cos 5x / 5 + cos 7x / 7 - ...
  const BridgeSolution s = SolveBridge(Stiff(1e-5, 0.0, 1.0), 25);
  const double i1 = std::abs(s.current[1]);
  for (int h : {5, 7, 11, 13, 17, 19, 23, 25}) {
    INFO("order " << h);
    CHECK(std::abs(s.current[h]) / i1 == Approx(1.0 / h).epsilon(2e-3));
  }
  for (int h : {2, 3, 4, 6, 9, 15}) CHECK(std::abs(s.current[h]) / i1 < 1e-3);
  const double i_d = s.power / s.dc_voltage;
  CHECK(s.dc_voltage == Approx(3.0 * std::sqrt(2.0) / kPi).epsilon(1e-3));
  CHECK(i1 == Approx(std::sqrt(6.0) / kPi * i_d).epsilon(1e-3));
  // Phase pattern: with I_1 at 0 deg, the 5th and 11th sit at 180 deg, the 7th and 13th at 0:
  // angle(I_h) - h angle(I_1).
  const double a1 = std::arg(s.current[1]);
  for (int h : {5, 7, 11, 13}) {
    const double rel = std::remainder(std::arg(s.current[h]) - h * a1, 2.0 * kPi);
    CHECK(std::abs(std::abs(rel) - (h % 6 == 5 ? kPi : 0.0)) < 0.02);
  }
  CHECK(s.conduction_deg == Approx(120.0).margin(0.5));
}

TEST_CASE("Commutation overlap lowers the DC voltage as the textbook says", "[bridge]") {
  // Mohan et al., sections 5-6-2 and 6-4-2: V_d = 1.35 V_LL cos(alpha) - (3 w L_s / pi) I_d and
  // cos(alpha + u) = cos(alpha) - 2 w L_s I_d / (sqrt 2 V_LL).
  for (double alpha : {0.0, 30.0}) {
    const double x = 0.08;
    const BridgeSolution s = SolveBridge(Stiff(x, alpha, 0.8), 13);
    const double i_d = s.power / s.dc_voltage;
    const double a = alpha * kPi / 180.0;
    INFO("alpha " << alpha);
    CHECK(s.dc_voltage ==
          Approx(3.0 * std::sqrt(2.0) / kPi * std::cos(a) - 3.0 * x / kPi * i_d).epsilon(2e-3));
    const double u = std::acos(std::cos(a) - 2.0 * x * i_d / std::sqrt(2.0)) - a;
    CHECK(s.overlap_deg == Approx(u * 180.0 / kPi).margin(0.3));
  }
}

TEST_CASE("A capacitor bridge at very light load charges to the line-to-line peak", "[bridge]") {
  // Mohan et al., section 5-6-3: with negligible load current V_d -> sqrt(2) V_LL.
  BridgeParameters p;
  p.x_supply = 0.01;
  p.b_dc = 2.0 * kPi * 60.0 * 3000e-6 * (480.0 * 480.0 / 75e3);
  p.power = 0.002;
  const BridgeSolution s = SolveBridge(p, 25);
  CHECK(s.dc_voltage == Approx(std::sqrt(2.0)).epsilon(5e-3));
  CHECK(s.power == Approx(0.002).epsilon(1e-5));
}

TEST_CASE("More AC inductance lowers the peak, widens the pulse and lowers THDi", "[bridge]") {
  // Common practice (drive application guides): a line reactor flattens a capacitor bridge's
  // current pulses. Trends only.
  BridgeParameters p;
  p.x_supply = 0.005;
  p.b_dc = 2.0 * kPi * 60.0 * 40e-6 * (480.0 * 480.0 / 1e3);
  p.power = 1.0;
  double last_peak = 1e9, last_width = 0.0, last_thd = 1e9;
  for (double reactor : {0.0, 0.03, 0.05}) {
    p.x_reactor = reactor;
    const BridgeSolution s = SolveBridge(p, 50);
    double h2 = 0.0;
    for (int h = 2; h <= 50; ++h) h2 += std::norm(s.current[h]);
    const double thd = std::sqrt(h2) / std::abs(s.current[1]);
    INFO("reactor " << reactor << " peak " << s.peak_current << " width " << s.conduction_deg << " thd " << thd);
    CHECK(s.peak_current < last_peak);
    CHECK(s.conduction_deg > last_width);
    CHECK(thd < last_thd);
    last_peak = s.peak_current;
    last_width = s.conduction_deg;
    last_thd = thd;
  }
}
