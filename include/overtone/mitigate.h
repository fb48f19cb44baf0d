// include/overtone/mitigate.h — standard mitigations of a plant that exceeds its limits (public).
//
// Each option is a concrete change written as a plant file that `extends` the original: line
// reactors or DC chokes, conversion to multipulse or active front ends, detuning reactors on
// capacitor banks, a single-tuned filter, capacitor step states. Each is studied (with the
// resonance screening of its present step state) and scored by the share of the violation it
// removes per unit of equipment changed (docs/mitigate.md).
#ifndef OVERTONE_PUBLIC_MITIGATE_H_
#define OVERTONE_PUBLIC_MITIGATE_H_

#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "overtone/plant.h"
#include "overtone/study.h"

namespace overtone {

struct MitigateOptions {
  std::string out_dir;  // where the option files go; their `extends` path is relative to it
  int threads = 0;      // worker threads of each study; 0 = all cores
};

// The figures of one study that the options are compared by.
struct MitigationFigures {
  double worst_thd_v_percent = 0.0;
  std::string worst_thd_v_bus;
  std::optional<double> pcc_tdd_percent;
  bool capacitors_pass = true;       // IEEE 18 duty of every bank and filter in service
  Risk resonance_risk = Risk::kLow;  // worst peak of the present step state
  std::string resonance;             // that peak, e.g. "USS-D 6.93 (near 7), x12.4"
  bool meets_profile = true;         // no violation of the limit profile
  bool meets_design_guide = true;    // no design-guide finding at internal buses
  double violation = 0.0;  // sum of (value / limit - 1) over violations and design-guide findings
};

struct MitigationOption {
  std::string name;              // e.g. "5 % line reactors on VFD-D1-NEW"
  std::string kind;              // line-reactor, dc-choke, multipulse, active-front-end, detuning,
                                 // filter, capacitor-steps
  std::string plant_file;        // file name inside the output folder
  std::string plant_text;        // its content (YAML, extends the original)
  std::string size;              // rough size, e.g. "5 % reactors, 2 x 160 kW"
  double equipment_units = 1.0;  // units of equipment changed (docs/mitigate.md)
  bool solved = true;  // false: the changed plant could not be solved (reason in `failure`)
  std::string failure;
  MitigationFigures figures;
  double score = 0.0;  // share of the violation removed per unit of equipment
};

struct MitigationResult {
  std::string plant_name;
  std::string plant_file;
  MitigationFigures base;                 // the plant as given
  std::vector<Violation> violations;      // of the plant as given: profile, then design guide
  std::vector<MitigationOption> options;  // best first; empty when nothing is over its limit
  std::vector<std::string> notes;
  std::vector<std::string> cautions;
  bool needed() const { return base.violation > 0.0; }
};

// Studies the plant (with resonance screening) and, when a limit is exceeded, every option.
// Throws SolveError when the plant as given cannot be solved; an option that cannot be solved is
// kept, marked unsolved, ranked last.
MitigationResult EvaluateMitigations(const Plant& plant, const MitigateOptions& options);

// The figures of a study (exposed for tests and the report).
MitigationFigures FiguresOf(const StudyResult& result);

// Writes every option's plant file into `dir` (created if needed), each atomically.
void WriteMitigationPlantFiles(const MitigationResult& result, const std::string& dir);

// An aligned table, best first, with the plant's own figures above it, notes and cautions.
void PrintMitigationTable(const MitigationResult& result, std::ostream& out);

// {"options": [...]} of PLANT-FORMAT.md, with the plant's own figures, notes and cautions.
void WriteMitigationJson(const MitigationResult& result, std::ostream& out);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_MITIGATE_H_
