// include/overtone/headroom.h — hosting capacity: how many more drives a bus takes (public).
//
// For each candidate bus, the largest number of units of an existing drive group's kind that can
// be added there, as a new group beside the existing ones, before a limit binds (docs/headroom.md).
// Every trial is a full study (spectra of all groups recomputed, no resonance scan); the unit
// count is bracketed and the bracket narrowed, by interpolation or bisection.
#ifndef OVERTONE_PUBLIC_HEADROOM_H_
#define OVERTONE_PUBLIC_HEADROOM_H_

#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "overtone/plant.h"
#include "overtone/study.h"

namespace overtone {

struct HeadroomOptions {
  std::string drive_kind;          // name of an existing drive group: its kind is what is added
  std::vector<std::string> buses;  // candidate buses; empty with all_buses = every bus of its kv
  bool all_buses = false;
  int max_units = 1000;  // search cap (units added); > 0
  int threads = 0;       // worker threads of each study; 0 = all cores
};

// A limit that binds: `what` is a study violation kind (thd_v, v_h<N>, tdd, i_h<N>, cap_vrms,
// cap_vpeak, cap_irms, cap_kvar), `tx_derating` (a transformer's rms current above its derated
// capacity) or `unsolvable` (the plant could not be solved: value and limit 0). Percent.
struct HeadroomBinding {
  std::string where;
  std::string what;
  double value = 0.0;
  double limit = 0.0;
};

struct BusHeadroom {
  std::string bus;
  int added_units = 0;                     // largest count that meets every limit
  double added_kw = 0.0;                   // added_units times the unit's rated power
  std::optional<HeadroomBinding> binding;  // at added_units + 1; empty when capped
  bool capped = false;                     // no limit bound up to max_units
  bool already_violating = false;          // a limit is exceeded with nothing added
  int studies = 0;                         // trials run
  double seconds = 0.0;                    // wall time of this bus's search
};

struct HeadroomResult {
  std::string plant_name;
  std::string drive_kind;
  std::string front_end;  // e.g. "diode-capacitor, 3 % line reactor"
  double unit_kw = 0.0;   // rated power of one unit
  int max_units = 0;
  std::vector<BusHeadroom> buses;
  std::vector<std::string> cautions;
};

// Throws InputError for an unknown drive group or bus, a bus of another nominal voltage than the
// group's, or invalid options; SolveError when the plant as given cannot be solved.
HeadroomResult RunHeadroom(const Plant& plant, const HeadroomOptions& options);

// Every limited figure of a study with its limit, whether met or not: THDv and the order nearest
// its limit at every bus (design guide included), TDD and each limited order at the pcc, IEEE 18
// capacitor duty, transformer derating (`tx_derating`: rms current against derated capacity).
std::vector<HeadroomBinding> LimitFigures(const StudyResult& result);

// A terminal table, one row per bus, then the cautions.
void PrintHeadroomTable(const HeadroomResult& result, std::ostream& out);

// {"headroom": [...], ...} of PLANT-FORMAT.md, with the search settings and cautions.
void WriteHeadroomJson(const HeadroomResult& result, std::ostream& out);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_HEADROOM_H_
