// src/summation.cc — vector, arithmetic and IEC 61000-3-6 summation of source contributions.
#include "summation.h"

#include <cmath>

namespace overtone::internal {

double SummationExponent(int h) { return h < 5 ? 1.0 : h <= 10 ? 1.4 : 2.0; }

double CombineSources(Summation rule, int h, const std::vector<std::complex<double>>& parts) {
  switch (rule) {
    case Summation::kVector: {
      std::complex<double> sum;
      for (const auto& x : parts) sum += x;
      return std::abs(sum);
    }
    case Summation::kArithmetic: {
      double sum = 0.0;
      for (const auto& x : parts) sum += std::abs(x);
      return sum;
    }
    case Summation::kIec: {
      const double alpha = SummationExponent(h);
      double sum = 0.0;
      for (const auto& x : parts) sum += std::pow(std::abs(x), alpha);
      return std::pow(sum, 1.0 / alpha);
    }
  }
  return 0.0;
}

}  // namespace overtone::internal
