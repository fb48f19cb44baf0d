// src/summation.cc — vector, arithmetic and IEC 61000-3-6 summation of source contributions.
#include "summation.h"

#include <cmath>

namespace overtone::internal {

double SummationExponent(int h) { return h < 5 ? 1.0 : h <= 10 ? 1.4 : 2.0; }

double SourceTerm(Summation rule, int h, std::complex<double> x) {
  return rule == Summation::kIec ? std::pow(std::abs(x), SummationExponent(h)) : std::abs(x);
}

double CombinedMagnitude(Summation rule, int h, double sum_of_terms) {
  return rule == Summation::kIec ? std::pow(sum_of_terms, 1.0 / SummationExponent(h)) : sum_of_terms;
}

double CombineSources(Summation rule, int h, const std::vector<std::complex<double>>& parts) {
  if (rule == Summation::kVector) {
    std::complex<double> sum;
    for (const auto& x : parts) sum += x;
    return std::abs(sum);
  }
  double sum = 0.0;
  for (const auto& x : parts) sum += SourceTerm(rule, h, x);
  return CombinedMagnitude(rule, h, sum);
}

}  // namespace overtone::internal
