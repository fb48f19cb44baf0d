// src/indices.cc — THD, rms and the waveform peak rebuilt with angles.
#include "indices.h"

#include <cmath>
#include <numbers>

#include <unsupported/Eigen/FFT>

namespace overtone::internal {
namespace {

// Instantaneous value / sqrt(2) at phase angle wt: sum_h Re(X_h e^{j h wt}), with e^{j h wt}
// built by repeated rotation in real arithmetic (no trigonometry per order, and none of the
// library's checked complex products).
double Sample(const std::vector<Phasor>& x, double wt) {
  const double step_re = std::cos(wt), step_im = std::sin(wt);
  double re = step_re, im = step_im;
  double v = 0.0;
  for (std::size_t h = 1; h < x.size(); ++h) {
    v += x[h].real() * re - x[h].imag() * im;
    const double next_re = re * step_re - im * step_im;
    im = re * step_im + im * step_re;
    re = next_re;
  }
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
  // Per thread: the FFT keeps its plan (twiddle factors) between calls.
  thread_local Eigen::FFT<double> fft;
  thread_local std::vector<Phasor> spectrum, samples;
  spectrum.assign(n, Phasor{});
  samples.resize(n);
  for (std::size_t h = 1; h < x.size(); ++h) spectrum[h] = x[h];
  fft.SetFlag(Eigen::FFT<double>::Unscaled);
  fft.inv(samples, spectrum);
  std::size_t best = 0;
  for (std::size_t k = 1; k < n; ++k) {
    if (std::abs(samples[k].real()) > std::abs(samples[best].real())) best = k;
  }
  const double dt = 2.0 * std::numbers::pi / static_cast<double>(n);
  double a = (static_cast<double>(best) - 1.0) * dt, b = (static_cast<double>(best) + 1.0) * dt;
  // Golden-section search keeping one interior point per step; 30 steps narrow the bracket
  // of two samples to 1e-6 of it, far below what moves the peak (flat at the maximum).
  const double g = (std::sqrt(5.0) - 1.0) / 2.0;
  double c = b - g * (b - a), d = a + g * (b - a);
  double fc = std::abs(Sample(x, c)), fd = std::abs(Sample(x, d));
  for (int it = 0; it < 30; ++it) {
    if (fc > fd) {
      b = d, d = c, fd = fc;
      c = b - g * (b - a), fc = std::abs(Sample(x, c));
    } else {
      a = c, c = d, fc = fd;
      d = a + g * (b - a), fd = std::abs(Sample(x, d));
    }
  }
  return std::max(std::abs(samples[best].real()), std::abs(Sample(x, 0.5 * (a + b))));
}

}  // namespace overtone::internal
