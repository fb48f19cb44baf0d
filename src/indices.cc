// src/indices.cc — THD, rms and the waveform peak rebuilt with angles.
#include "indices.h"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <unsupported/Eigen/FFT>

namespace overtone::internal {
namespace {

// The instantaneous value / sqrt(2) at phase angle wt, v = sum_h Re(X_h e^{j h wt}), and its first
// two derivatives in wt: v' = -sum_h h Im(X_h e^{j h wt}), v'' = -sum_h h^2 Re(X_h e^{j h wt}).
// e^{j h wt} is built by repeated rotation in real arithmetic (no trigonometry per order, and none
// of the library's checked complex products).
struct Slopes {
  double v = 0.0, dv = 0.0, d2v = 0.0;
};

Slopes Sample(const std::vector<Phasor>& x, double wt) {
  const double step_re = std::cos(wt), step_im = std::sin(wt);
  double re = step_re, im = step_im;
  Slopes s;
  for (std::size_t h = 1; h < x.size(); ++h) {
    const double real = x[h].real() * re - x[h].imag() * im;
    const double imag = x[h].real() * im + x[h].imag() * re;
    const auto order = static_cast<double>(h);
    s.v += real;
    s.dv -= order * imag;
    s.d2v -= order * order * real;
    const double next_re = re * step_re - im * step_im;
    im = re * step_im + im * step_re;
    re = next_re;
  }
  return s;
}

// max |v| near the sample wt whose sign is `sign`, the crest taken to lie within +-dt of it:
// Newton steps on v' = 0 (quadratic convergence, three or four samples from a sample at 8 points
// per period of the highest order), kept inside a bracket that each sample's slope narrows; a
// step that leaves the bracket, or a sample where v is not concave, bisects it instead.
double PolishPeak(const std::vector<Phasor>& x, double wt, double dt, double sign) {
  double lo = wt - dt, hi = wt + dt, peak = 0.0;
  for (int it = 0; it < 60 && hi - lo > 1e-9 * dt; ++it) {
    const Slopes s = Sample(x, wt);
    peak = std::max(peak, std::abs(s.v));
    const double slope = sign * s.dv, curvature = sign * s.d2v;
    (slope > 0.0 ? lo : hi) = wt;  // the crest lies uphill
    const double step = -slope / curvature;
    // Below this step the value is within |v''| step^2 / 2 (~1e-18 of it) of the crest.
    if (curvature < 0.0 && std::abs(step) < 1e-7 * dt) break;
    const bool newton = curvature < 0.0 && wt + step > lo && wt + step < hi;
    wt = newton ? wt + step : 0.5 * (lo + hi);
  }
  return peak;
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
  // Sample one period at N >= 8 points per period of the highest order with one real inverse FFT
  // of the half spectrum (it gives 2 v(2 pi n / N)), then polish the largest sample.
  std::size_t n = 64;
  while (n < 8 * x.size()) n *= 2;
  // Per thread: the FFT keeps its plan (twiddle factors) between calls.
  thread_local Eigen::FFT<double> fft;
  thread_local std::vector<Phasor> spectrum;
  thread_local std::vector<double> samples;
  spectrum.assign(n / 2 + 1, Phasor{});
  for (std::size_t h = 1; h < x.size(); ++h) spectrum[h] = x[h];
  fft.SetFlag(Eigen::FFT<double>::Unscaled);
  fft.SetFlag(Eigen::FFT<double>::HalfSpectrum);
  fft.inv(samples, spectrum, n);
  std::size_t best = 0;
  for (std::size_t k = 1; k < n; ++k) {
    if (std::abs(samples[k]) > std::abs(samples[best])) best = k;
  }
  if (samples[best] == 0.0) return 0.0;  // no waveform (an idle branch): nothing to polish
  const double dt = 2.0 * std::numbers::pi / static_cast<double>(n);
  return PolishPeak(x, static_cast<double>(best) * dt, dt, samples[best] < 0.0 ? -1.0 : 1.0);
}

}  // namespace overtone::internal
