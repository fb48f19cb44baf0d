// include/overtone/study.h — run a harmonic study of a plant and read its results (public).
//
// Results are in SI and per unit as named: bus voltages in pu of the bus's nominal line-to-line
// voltage (phase a to neutral, rms cosine phasors), currents in amperes (line currents of phase a).
// Angles are in the study's frame (PLANT-FORMAT.md "Conventions").
#ifndef OVERTONE_PUBLIC_STUDY_H_
#define OVERTONE_PUBLIC_STUDY_H_

#include <complex>
#include <optional>
#include <string>
#include <vector>

#include "overtone/plant.h"

namespace overtone {

using Phasor = std::complex<double>;

struct StudyOptions {
  int threads = 0;  // worker threads for the per-order solves; 0 = all cores
};

// A quantity at every order 1..max_order; index 0 is unused so that at(h) reads naturally.
struct Spectrum {
  std::vector<Phasor> by_order;  // size max_order + 1
  Phasor at(int h) const { return by_order[static_cast<std::size_t>(h)]; }
};

// Distortion figures of one waveform (IEEE 519-2014 clause 3 definitions).
struct WaveformIndices {
  double fundamental = 0.0;  // |X_1|
  double rms = 0.0;          // sqrt(sum |X_h|^2), h = 1..max_order
  double thd_percent = 0.0;  // sqrt(sum_{h>=2} |X_h|^2) / |X_1| * 100
  double peak = 0.0;         // max |x(t)| / sqrt(2), rebuilt with angles (same scale as rms)
};

struct BusResult {
  std::string name;
  double nominal_v = 0.0;
  Spectrum voltage_pu;
  WaveformIndices indices;  // in pu
};

struct BranchResult {
  std::string name;
  std::string kind;  // "transformer" or "cable"
  std::string from;
  std::string to;
  Spectrum current_a;  // at the from end, toward to
  WaveformIndices indices;
};

struct DriveResult {
  std::string name;
  std::string bus;
  int count = 1;
  FrontEnd front_end = FrontEnd::kMeasured;
  Spectrum current_a;  // drawn from the bus (load convention)
  WaveformIndices indices;
};

struct PccHarmonic {
  int order = 0;
  double amps = 0.0;
  double percent_of_il = 0.0;
};

struct PccResult {
  std::string bus;
  std::optional<double> demand_current_a;  // empty when neither given nor derivable
  bool demand_current_is_default = false;
  double isc_a = 0.0;
  Spectrum current_a;  // entering the pcc from the utility side
  std::optional<double> tdd_percent;
  std::vector<PccHarmonic> harmonics;
};

struct StudyResult {
  StudySettings study;
  std::vector<BusResult> buses;
  std::vector<BranchResult> branches;  // transformers, then cables, in file order
  std::vector<DriveResult> drives;
  PccResult pcc;
  int load_flow_iterations = 0;
  std::vector<std::string> warnings;
  std::vector<std::string> cautions;
};

// Solves the fundamental load flow and every harmonic order. Throws InputError for plants that
// the available models cannot represent, SolveError when the plant cannot be solved.
StudyResult RunStudy(const Plant& plant, const StudyOptions& options = {});

// The cautions every report carries.
const std::vector<std::string>& StandardCautions();

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_STUDY_H_
