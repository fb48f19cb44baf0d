// include/overtone/compare.h — a base case against a proposed case: what changes (public).
//
// "What happens if we add these drives": per-bus and pcc deltas, new and cleared limit
// violations, and resonance peaks that moved, appeared or disappeared (docs/compare.md).
#ifndef OVERTONE_PUBLIC_COMPARE_H_
#define OVERTONE_PUBLIC_COMPARE_H_

#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "overtone/study.h"

namespace overtone {

// One case's figures at a bus; absent from a BusChange when the bus is not in that case.
struct BusFigures {
  double thd_v_percent = 0.0;
  int worst_order = 0;         // the order with the largest V_h; 0 when there is none
  double worst_percent = 0.0;  // V_h of that order, percent of V1
  std::string result;          // "pass", "FAIL", "over (design guide)" or "not checked"
};

// A bus matched by name across the two cases.
struct BusChange {
  std::string name;
  std::optional<BusFigures> base, proposed;  // one of them empty: the bus was added or removed
  std::string Status() const;                // "both", "added" or "removed"
  // In words: "added", "removed", "now FAIL", "now pass", or THDv "worse", "better", "same".
  std::string Note() const;
};

// One case's current at the pcc.
struct PccFigures {
  std::string bus;
  std::optional<double> tdd_percent, tdd_limit_percent;
  int worst_order = 0;  // the order with the largest percent of I_L; 0: none
  double worst_percent_of_il = 0.0;
  std::optional<double> worst_limit_percent;
};

// A resonance peak (present capacitor steps) that moved, appeared or disappeared at a bus.
struct ResonanceShift {
  std::string bus;
  std::string change;  // "moved", "appeared" or "disappeared"
  std::optional<ResonancePeak> base, proposed;
  int characteristic_order = 0;      // the 6k +- 1 order nearest the peak (proposed, else base)
  bool near_characteristic = false;  // within kNearCharacteristic of it
};

// A violation in both cases, with both values.
struct ViolationChange {
  std::string where, what;
  double value_base = 0.0, value_proposed = 0.0, limit = 0.0;
};

struct Comparison {
  std::string base_name, base_file, proposed_name, proposed_file;
  std::vector<BusChange> buses;  // base order, then buses only in the proposed case
  PccFigures pcc_base, pcc_proposed;
  std::vector<Violation> new_violations;      // in the proposed case only
  std::vector<Violation> cleared_violations;  // in the base case only
  std::vector<ViolationChange> remaining_violations;
  std::vector<ResonanceShift> resonance_shifts;
  std::vector<std::string> notes;     // e.g. different profiles or summation rules
  std::vector<std::string> cautions;  // StandardCautions()
};

// Peaks closer than this (orders) at the same bus are taken as the same peak, moved.
constexpr double kPeakMatchOrders = 1.0;
// A peak that moved by less than this (orders) and kept its risk is not reported.
constexpr double kPeakMoveOrders = 0.05;
// A peak this close (orders) to a characteristic order 6k +- 1 is "near" it (the scan's default
// risk band, docs/resonance.md).
constexpr double kNearCharacteristic = 0.5;

// TDD in words: "now FAIL", "now pass", "worse", "better", "same", or "-" without TDD.
std::string TddNote(const PccFigures& base, const PccFigures& proposed);

// Compares two finished studies. Buses are matched by name; violations by where and what.
Comparison CompareStudies(const StudyResult& base, const std::string& base_file,
                          const StudyResult& proposed, const std::string& proposed_file);

// Aligned terminal tables; changes are marked in words. `colour` adds ANSI colour to them.
void PrintComparison(const Comparison& c, std::ostream& out, bool colour);

// One JSON object on one line (docs/compare.md).
void WriteComparisonJson(const Comparison& c, std::ostream& out);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_COMPARE_H_
