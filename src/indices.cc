// src/indices.cc — THD, rms and the waveform peak rebuilt with angles.
#include "indices.h"

#include <cmath>
#include <numbers>

namespace overtone::internal {
namespace {

// Instantaneous value / sqrt(2) at phase angle wt.
double Sample(const std::vector<Phasor>& x, double wt) {
  double v = 0.0;
  for (std::size_t h = 1; h < x.size(); ++h) v += std::abs(x[h]) * std::cos(h * wt + std::arg(x[h]));
  return v;
}

}  // namespace

WaveformIndices ComputeIndices(const std::vector<Phasor>& x, double negligible) {
  WaveformIndices r;
  double harmonic_sq = 0.0;
  for (std::size_t h = 2; h < x.size(); ++h) harmonic_sq += std::norm(x[h]);
  r.fundamental = x.size() > 1 ? std::abs(x[1]) : 0.0;
  r.rms = std::sqrt(r.fundamental * r.fundamental + harmonic_sq);
  r.thd_percent = r.fundamental > negligible ? 100.0 * std::sqrt(harmonic_sq) / r.fundamental : 0.0;
  r.peak = WaveformPeak(x);
  return r;
}

double WaveformPeak(const std::vector<Phasor>& x) {
  // Sample finely enough to resolve the highest order, then polish the best sample with a few
  // golden-section steps on |v| in the bracketing interval.
  const int samples = 16 * static_cast<int>(x.size()) + 64;
  const double dt = 2.0 * std::numbers::pi / samples;
  int best = 0;
  double best_value = -1.0;
  for (int k = 0; k < samples; ++k) {
    const double v = std::abs(Sample(x, k * dt));
    if (v > best_value) {
      best_value = v;
      best = k;
    }
  }
  double a = (best - 1) * dt, b = (best + 1) * dt;
  const double g = (std::sqrt(5.0) - 1.0) / 2.0;
  for (int it = 0; it < 40; ++it) {
    const double c = b - g * (b - a), d = a + g * (b - a);
    if (std::abs(Sample(x, c)) > std::abs(Sample(x, d))) b = d; else a = c;
  }
  return std::max(best_value, std::abs(Sample(x, 0.5 * (a + b))));
}

}  // namespace overtone::internal
