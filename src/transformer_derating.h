// src/transformer_derating.h — IEEE Std C57.110 harmonic loss factor, K-factor, derating (internal).
#ifndef OVERTONE_INTERNAL_TRANSFORMER_DERATING_H_
#define OVERTONE_INTERNAL_TRANSFORMER_DERATING_H_

#include <vector>

#include "overtone/plant.h"
#include "overtone/study.h"

namespace overtone::internal {

// F_HL = sum_h I_h^2 h^2 / sum_h I_h^2 over orders 1.. (index = order; index 0 unused): the winding
// eddy-current loss of this current over that of a sinusoid of the same rms (IEEE C57.110-2008
// clause 4, from memory). 1 for a sinusoid; 1 for an all-zero current.
double HarmonicLossFactor(const std::vector<Phasor>& current);

// K-factor of UL 1561 with I_h in per unit of the actual rms current: sum_h (I_h/I_rms)^2 h^2,
// which is the same number as F_HL.
double KFactor(const std::vector<Phasor>& current);

// Largest rms current of the given shape, per unit of rated: sqrt(P_LL-R / (1 + F_HL P_EC-R)) with
// P_LL-R = 1 + P_EC-R, the rated load loss in per unit of the I^2R loss (IEEE C57.110-2008
// dry-type method; clause 5, from memory).
double DeratedCurrent(double harmonic_loss_factor, double eddy_loss);

// One entry per transformer, from its branch current in a study.
std::vector<TransformerDerating> TransformerDeratings(const Plant& plant,
                                                      const std::vector<BranchResult>& branches);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_TRANSFORMER_DERATING_H_
