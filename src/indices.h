// src/indices.h — distortion indices of a spectrum (internal).
#ifndef OVERTONE_INTERNAL_INDICES_H_
#define OVERTONE_INTERNAL_INDICES_H_

#include <vector>

#include "overtone/study.h"

namespace overtone::internal {

// THD, rms and waveform peak of the phasors by_order[1..] (IEEE 519-2014 clause 3).
// THD is 0 when the fundamental is 0 (no NaN reaches a report).
WaveformIndices ComputeIndices(const std::vector<Phasor>& by_order);

// max over one period of |sum_h sqrt(2) |X_h| cos(h w t + theta_h)|, divided by sqrt(2).
double WaveformPeak(const std::vector<Phasor>& by_order);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_INDICES_H_
