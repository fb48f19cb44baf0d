// src/assessment.h — a study's results against a limit profile and IEEE 18 duty (internal).
#ifndef OVERTONE_INTERNAL_ASSESSMENT_H_
#define OVERTONE_INTERNAL_ASSESSMENT_H_

#include <ostream>

#include "limit_profile.h"
#include "overtone/study.h"

namespace overtone::internal {

// Fills result.assessment and the limits of result.pcc from the profile: voltage limits at the
// pcc (or every bus, as the profile says; elsewhere a design guide), TDD and individual current
// limits at the pcc when the profile has them and I_L is known, capacitor duty (IEEE 18).
void AssessLimits(const LimitProfile& profile, StudyResult& result);

// The terminal "Limits" section: bus checks, pcc current, violations, design guide; failures in
// words, and in colour when `colour`.
void PrintLimitTables(const StudyResult& result, std::ostream& out, bool colour = false);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_ASSESSMENT_H_
