// tests/indices_test.cc — THD, rms and peak definitions.
#include "indices.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

using overtone::Phasor;
using overtone::internal::ComputeIndices;

TEST_CASE("THD is the rms of the harmonics over the fundamental", "[indices]") {
  // IEEE Std 519-2014 clause 3.1 (total harmonic distortion): 3 % and 4 % give 5 %.
  std::vector<Phasor> v(51);
  v[1] = 1.0;
  v[5] = std::polar(0.03, 1.0);
  v[7] = std::polar(0.04, -2.0);
  const auto ix = ComputeIndices(v, 0.0);
  CHECK(ix.thd_percent == Approx(5.0));
  CHECK(ix.rms == Approx(std::sqrt(1.0 + 0.0025)));
}

TEST_CASE("The waveform peak adds harmonics in phase at the crest", "[indices]") {
  // cos x + 0.2 cos 5x peaks at x = 0 with 1.2 (closed form); with the 5th shifted by 180 deg
  // the crest flattens to 1 - 0.2 at x = 0 and the peak moves (value checked against dense
  // sampling of the same expression).
  std::vector<Phasor> v(8);
  v[1] = 1.0;
  v[5] = 0.2;
  CHECK(ComputeIndices(v, 0.0).peak == Approx(1.2).epsilon(1e-9));
  v[5] = -0.2;
  double dense = 0.0;
  for (int k = 0; k < 200000; ++k) {
    const double x = 2.0 * std::numbers::pi * k / 200000;
    dense = std::max(dense, std::abs(std::cos(x) - 0.2 * std::cos(5 * x)));
  }
  CHECK(ComputeIndices(v, 0.0).peak == Approx(dense).epsilon(1e-7));
}

TEST_CASE("A flat-topped wave peaks off its axis where the closed form says", "[indices]") {
  // v(x) = cos x - a cos 3x with a > 1/9 (textbook closed form: dv/dx = 0 with the triple-angle
  // identity sin 3x = 3 sin x - 4 sin^3 x gives cos^2 x = (1 + 3a) / (12a), and there
  // v = (2/3)(1 + 3a) cos x). Shifting time by x0 (X_h e^{j h x0}) moves the crest between the
  // sample points without changing its height, so the polish, not the sampling, is checked.
  const double a = 0.2;
  const double crest = 2.0 / 3.0 * (1.0 + 3.0 * a) * std::sqrt((1.0 + 3.0 * a) / (12.0 * a));
  for (double x0 : {0.0, 0.1234, 1.0, 2.5}) {
    std::vector<Phasor> v(4);
    v[1] = std::polar(1.0, x0);
    v[3] = std::polar(-a, 3.0 * x0);
    CHECK(ComputeIndices(v, 0.0).peak == Approx(crest).epsilon(1e-12));
  }
}

TEST_CASE("A zero fundamental gives zero THD, not NaN", "[indices]") {
  std::vector<Phasor> v(10);
  v[5] = 0.1;
  CHECK(ComputeIndices(v, 0.0).thd_percent == 0.0);
}
