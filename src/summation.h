// src/summation.h — combining the contributions of several harmonic sources (internal).
#ifndef OVERTONE_INTERNAL_SUMMATION_H_
#define OVERTONE_INTERNAL_SUMMATION_H_

#include <complex>
#include <vector>

#include "overtone/plant.h"

namespace overtone::internal {

// IEC 61000-3-6 summation exponent alpha at order h: 1 below the 5th, 1.4 from 5 to 10, 2 above.
double SummationExponent(int h);

// Non-vector rules add one term per source and close the sum at the end, so contributions can be
// accumulated one source at a time: SourceTerm is |x| (arithmetic) or |x|^alpha (iec), and
// CombinedMagnitude turns the sum of terms into the magnitude (itself, or its 1/alpha power).
double SourceTerm(Summation rule, int h, std::complex<double> x);
double CombinedMagnitude(Summation rule, int h, double sum_of_terms);

// The magnitude of order h from each source's phasor: |sum| (vector), sum |x| (arithmetic), or
// (sum |x|^alpha)^(1/alpha) (iec).
double CombineSources(Summation rule, int h, const std::vector<std::complex<double>>& parts);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SUMMATION_H_
