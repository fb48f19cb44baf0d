// tests/capacitor_duty_test.cc — IEEE Std 18 duty worked by hand, detuning and filter reactors.
#include "capacitor_duty.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <complex>
#include <numbers>
#include <tuple>

#include "models.h"

using namespace overtone;
using overtone::internal::BankDuty;
using overtone::internal::FilterDuty;

namespace {

// A 480 V, 300 kvar bank in `steps` steps, all in service, reactor lossless when present.
Capacitor Bank(int steps, double detuning) {
  Capacitor c;
  c.name = "PFC-1";
  c.bus = "MCC-1";
  c.rating_var = 300e3;
  c.rated_v = 480.0;
  c.steps = steps;
  c.steps_on = steps;
  c.detuning = detuning;
  c.x_over_r = 1e12;
  return c;
}

// Bus voltage spectrum in pu: V1 = 1 at 0 deg plus the given (order, magnitude, angle) terms.
std::vector<Phasor> Voltage(std::initializer_list<std::tuple<int, double, double>> harmonics, double v1 = 1.0) {
  std::vector<Phasor> v(14);
  v[1] = v1;
  for (auto [h, magnitude, angle_deg] : harmonics) v[h] = std::polar(magnitude, angle_deg * std::numbers::pi / 180.0);
  return v;
}

}  // namespace

TEST_CASE("IEEE 18 duty of a plain bank, worked by hand", "[capacitor_duty]") {
  // 300 kvar, 480 V bank on a 480 V bus; V1 = 1.00, V5 = 0.04, V7 = 0.03 pu, all at 0 deg.
  // Without a reactor the capacitor sees the bus voltage and, in pu of its rating, draws
  // I_h = h V_h (X_C falls as 1/h):                   (IEEE Std 18-2012 clause 5.1 quantities)
  //   Vrms  = sqrt(1 + 0.04^2 + 0.03^2)              = 1.001249 -> 100.12 %
  //   Irms  = sqrt(1 + 0.20^2 + 0.21^2)              = 1.041201 -> 104.12 %
  //   kvar  = 1*1 + 0.04*0.20 + 0.03*0.21            = 1.0143   -> 101.43 %
  //   Vpeak = 1 + 0.04 + 0.03 (all crests at t = 0)  = 1.07     -> 107 %, the arithmetic bound too.
  const Capacitor bank = Bank(1, 0.0);
  const auto d = BankDuty(bank, 480.0, Voltage({{5, 0.04, 0.0}, {7, 0.03, 0.0}}));
  REQUIRE(d);
  CHECK(d->vrms_percent == Approx(100.1249).epsilon(1e-6));
  CHECK(d->irms_percent == Approx(104.1201).epsilon(1e-6));
  CHECK(d->kvar_percent == Approx(101.43).epsilon(1e-9));
  CHECK(d->vpeak_percent == Approx(107.0).epsilon(1e-9));
  CHECK(d->vpeak_arith_percent == Approx(107.0).epsilon(1e-9));
  CHECK(d->fundamental_rise == Approx(1.0));
  CHECK_FALSE(d->reactor_irms_a);
  CHECK(d->pass);

  // The same bank in 4 steps with 2 in service: duty is per unit of the steps in service, so the
  // percentages do not change.
  Capacitor half = Bank(4, 0.0);
  half.steps_on = 2;
  const auto d2 = BankDuty(half, 480.0, Voltage({{5, 0.04, 0.0}, {7, 0.03, 0.0}}));
  REQUIRE(d2);
  CHECK(d2->irms_percent == Approx(d->irms_percent).epsilon(1e-12));
  CHECK(d2->kvar_percent == Approx(d->kvar_percent).epsilon(1e-12));
  half.steps_on = 0;
  CHECK_FALSE(BankDuty(half, 480.0, Voltage({})));
}

TEST_CASE("IEEE 18 duty behind a 7 % detuning reactor, worked by hand", "[capacitor_duty]") {
  // Per unit of the capacitor (X_C = 1), step impedance j(h p - 1/h) with p = 0.07.
  // Bus V1 = 1.00 at 0 deg, V5 = 0.04 at 180 deg.
  //   h = 1: I1 = 1 / (j(0.07 - 1)) = j1.075269; V_C1 = I1 (-j) = 1.075269 = 1/(1 - p), at 0 deg
  //   h = 5: Z = j(0.35 - 0.2) = j0.15; I5 = -0.04 / j0.15 = j0.266667; V_C5 = I5 (-j/5) = 0.053333
  //   Vrms  = sqrt(1.075269^2 + 0.053333^2)          = 1.076591 -> 107.66 %
  //   Irms  = sqrt(1.075269^2 + 0.266667^2)          = 1.107842 -> 110.78 %
  //   kvar  = 1.075269^2 + 0.266667 * 0.053333       = 1.170425 -> 117.04 %
  //   Vpeak = 1.075269 + 0.053333 (both at 0 deg)    = 1.128602 -> 112.86 %
  // The reactor carries I: 1.107842 x 300 kvar / (sqrt 3 x 480 V) = 1.107842 x 360.8439 A.
  const auto d = BankDuty(Bank(1, 0.07), 480.0, Voltage({{5, 0.04, 180.0}}));
  REQUIRE(d);
  CHECK(d->fundamental_rise == Approx(1.0 / 0.93).epsilon(1e-9));
  CHECK(d->vrms_percent == Approx(107.65907).epsilon(1e-6));
  CHECK(d->irms_percent == Approx(110.78421).epsilon(1e-6));
  CHECK(d->kvar_percent == Approx(117.04253).epsilon(1e-6));
  CHECK(d->vpeak_percent == Approx(112.86022).epsilon(1e-6));
  CHECK(d->vpeak_arith_percent == Approx(112.86022).epsilon(1e-6));
  REQUIRE(d->reactor_irms_a);
  CHECK(*d->reactor_irms_a == Approx(1.1078421 * 360.84392).epsilon(1e-6));
  CHECK(d->pass);

  // At V1 = 1.05 pu the rise puts 1.05 / 0.93 = 112.9 % on the capacitor: over the 110 % limit.
  const auto high = BankDuty(Bank(1, 0.07), 480.0, Voltage({}, 1.05));
  REQUIRE(high);
  CHECK(high->vrms_percent == Approx(112.90323).epsilon(1e-6));
  CHECK_FALSE(high->pass);
}

TEST_CASE("A detuned bank is tuned to n = 1/sqrt(p) and raises V_C1 by 1/(1-p)", "[capacitor_duty]") {
  // Common practice (filter and detuned-bank design guides): 7 % -> 3.78, 5.67 % -> 4.20,
  // 14 % -> 2.67. The step's reactance h p X_C - X_C/h changes sign there.
  for (auto [p, n] : {std::pair{0.07, 3.78}, std::pair{0.0567, 4.20}, std::pair{0.14, 2.67}}) {
    INFO("p = " << p);
    const Capacitor bank = Bank(1, p);
    const auto reactance = [&](double h) {
      return (1.0 / internal::CapacitorAdmittance(bank, 480.0, h)).imag();
    };
    CHECK(reactance(n - 0.01) < 0.0);
    CHECK(reactance(n + 0.01) > 0.0);
    const auto d = BankDuty(bank, 480.0, Voltage({}));
    REQUIRE(d);
    CHECK(d->fundamental_rise == Approx(1.0 / (1.0 - p)).epsilon(1e-9));
  }
}

TEST_CASE("A single-tuned filter's capacitor and reactor duty, worked by hand", "[capacitor_duty]") {
  // 300 kvar at 480 V tuned to 4.7, quality so high that R vanishes. Per unit of the capacitor:
  // Z(h) = j(h/n^2 - 1/h) with n^2 = 22.09.
  //   h = 1: Z = -j0.954730; I1 = j1.047416; V_C1 = 1.047416 at 0 deg
  //   h = 5 (V5 = 0.02 at 180 deg): Z = j(0.226347 - 0.2) = j0.026347;
  //          I5 = 0.759107 (at 90 deg); V_C5 = I5 / 5 = 0.151821 at 0 deg
  //   Irms  = sqrt(1.047416^2 + 0.759107^2) = 1.293570 -> 129.36 %, and the reactor carries it:
  //           1.293570 x 360.8439 A = 466.78 A
  //   Vpeak = 1.047416 + 0.151821 = 1.199237 -> 119.92 %; kvar = 1.047416^2 + 0.759107 x 0.151821
  //         = 1.212328 -> 121.23 %
  Filter f;
  f.name = "F-5";
  f.bus = "MCC-1";
  f.rating_var = 300e3;
  f.rated_v = 480.0;
  f.tuned_order = 4.7;
  f.quality = 1e12;
  const CapacitorDuty d = FilterDuty(f, 480.0, Voltage({{5, 0.02, 180.0}}));
  CHECK(d.kind == "filter");
  CHECK(d.irms_percent == Approx(129.35697).epsilon(1e-6));
  CHECK(d.vpeak_percent == Approx(119.92371).epsilon(1e-6));
  CHECK(d.kvar_percent == Approx(121.23285).epsilon(1e-6));
  REQUIRE(d.reactor_irms_a);
  CHECK(*d.reactor_irms_a == Approx(1.2935697 * 360.84392).epsilon(1e-6));
  CHECK(d.pass);
}

TEST_CASE("A high-pass filter's reactor carries the R || L share of the current", "[capacitor_duty]") {
  // Second-order high-pass: C in series with R || L, X_L = X_C / n^2, R = quality x X_0 with
  // X_0 = X_C / n (IEEE Std 1531-2020 clause 6 definitions, from memory). At the fundamental the
  // reactor current is the voltage across R || L, V Z_RL / (Z_C + Z_RL), over jX_L (divider).
  Filter f;
  f.name = "HP";
  f.bus = "B";
  f.type = FilterType::kHighPass;
  f.rating_var = 600e3;
  f.rated_v = 480.0;
  f.tuned_order = 11.0;
  f.quality = 1.5;
  const CapacitorDuty d = FilterDuty(f, 480.0, Voltage({}));
  const double xc = 480.0 * 480.0 / 600e3, xl = xc / 121.0, r = 1.5 * xc / 11.0;
  const std::complex<double> v = 480.0 / std::sqrt(3.0);
  const std::complex<double> zc(0.0, -xc), zl(0.0, xl);
  const std::complex<double> z_rl = r * zl / (r + zl);
  const std::complex<double> v_rl = v * z_rl / (zc + z_rl);
  REQUIRE(d.reactor_irms_a);
  CHECK(*d.reactor_irms_a == Approx(std::abs(v_rl / zl)).epsilon(1e-9));
}
