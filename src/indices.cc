// src/indices.cc — THD, rms and the waveform peak rebuilt with angles.
#include "indices.h"

#include <cmath>
#include <numbers>

#include <unsupported/Eigen/FFT>

namespace overtone::internal {
namespace {

// Instantaneous value / sqrt(2) at phase angle wt: sum_h Re(X_h e^{j h wt}), with e^{j h wt}
// built by repeated multiplication (no trigonometry per order).
double Sample(const std::vector<Phasor>& x, double wt) {
  const Phasor step = std::polar(1.0, wt);
  Phasor rotation = step;
  double v = 0.0;
  for (std::size_t h = 1; h < x.size(); ++h, rotation *= step) v += (x[h] * rotation).real();
  return v;
}

}  // namespace

WaveformIndices ComputeIndices(const std::vector<Phasor>& x, double negligible, bool with_peak) {
  WaveformIndices r;
  double harmonic_sq = 0.0;
  for (std::size_t h = 2; h < x.size(); ++h) harmonic_sq += std::norm(x[h]);
  r.fundamental = x.size() > 1 ? std::abs(x[1]) : 0.0;
  r.rms = std::sqrt(r.fundamental * r.fundamental + harmonic_sq);
  r.thd_percent = r.fundamental > negligible ? 100.0 * std::sqrt(harmonic_sq) / r.fundamental : 0.0;
  if (with_peak) r.peak = WaveformPeak(x);
  return r;
}

double WaveformPeak(const std::vector<Phasor>& x) {
  // Sample one period at N >= 8 points per period of the highest order with one inverse FFT
  // (v(theta_n) = Re sum_h X_h e^{j 2 pi h n / N}), then polish the largest sample with
  // golden-section steps on |v| between its neighbours.
  std::size_t n = 64;
  while (n < 8 * x.size()) n *= 2;
  std::vector<Phasor> spectrum(n), samples(n);
  for (std::size_t h = 1; h < x.size(); ++h) spectrum[h] = x[h];
  Eigen::FFT<double> fft;
  fft.SetFlag(Eigen::FFT<double>::Unscaled);
  fft.inv(samples, spectrum);
  std::size_t best = 0;
  for (std::size_t k = 1; k < n; ++k) {
    if (std::abs(samples[k].real()) > std::abs(samples[best].real())) best = k;
  }
  const double dt = 2.0 * std::numbers::pi / static_cast<double>(n);
  double a = (static_cast<double>(best) - 1.0) * dt, b = (static_cast<double>(best) + 1.0) * dt;
  const double g = (std::sqrt(5.0) - 1.0) / 2.0;
  for (int it = 0; it < 40; ++it) {
    const double c = b - g * (b - a), d = a + g * (b - a);
    if (std::abs(Sample(x, c)) > std::abs(Sample(x, d))) b = d; else a = c;
  }
  return std::max(std::abs(samples[best].real()), std::abs(Sample(x, 0.5 * (a + b))));
}

}  // namespace overtone::internal
