// src/indices.h — distortion indices of a spectrum (internal).
#ifndef OVERTONE_INTERNAL_INDICES_H_
#define OVERTONE_INTERNAL_INDICES_H_

#include <vector>

#include "overtone/study.h"

namespace overtone::internal {

// Fundamentals at or below these carry no meaningful distortion ratio (an idle cable's
// fundamental current is round-off): THD and percentages are then reported as 0.
constexpr double kNegligibleCurrentA = 1e-6;
constexpr double kNegligibleVoltagePu = 1e-9;

// THD, rms and (unless with_peak is false) the waveform peak of the phasors by_order[1..]
// (IEEE 519-2014 clause 3). THD is 0 when the fundamental is at or below `negligible` (no NaN
// reaches a report).
WaveformIndices ComputeIndices(const std::vector<Phasor>& by_order, double negligible = 0.0,
                               bool with_peak = true);

// max over one period of |sum_h sqrt(2) |X_h| cos(h w t + theta_h)|, divided by sqrt(2).
double WaveformPeak(const std::vector<Phasor>& by_order);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_INDICES_H_
