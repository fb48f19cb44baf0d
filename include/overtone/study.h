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

// Wall-clock seconds of a study's phases, for tools/bench.
struct StudyTimings {
  double operating_point_s = 0.0;  // load flow with the drive groups' spectra
  double harmonic_solves_s = 0.0;  // per-order solves, bus and branch spectra, summation
  double assessments_s = 0.0;      // pcc, capacitor duty, transformer derating, limits
  double scan_s = 0.0;             // resonance screening of the present step state
};

struct StudyOptions {
  int threads = 0;  // worker threads for the per-order solves; 0 = all cores
  bool scan = true;  // resonance screening of the present step state (`--no-scan` clears it)
  bool keep_waveforms = false;  // keep one period of each bridge group's waveforms
  // A drive group whose bridge front end is simulated on its own even where a plant's many
  // distinct circuits have the other groups' spectra interpolated (docs/bridge-model.md
  // section 10); empty for none. `overtone spectrum` names its group here.
  std::string exact_drive = {};
  StudyTimings* timings = nullptr;  // when set, filled with the phases' wall-clock times
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

// One period of a bridge group's representative circuit (for charts and CSV), study frame.
struct DriveWaveform {
  std::vector<double> theta_deg;
  std::vector<double> line_current_a;  // phase a (single-phase: one line pair's units)
  std::vector<double> voltage_v;       // at the terminal, phase a to neutral (single-phase: line to line)
  std::vector<double> dc_voltage_v;
};

struct DriveResult {
  std::string name;
  std::string bus;
  int count = 1;
  FrontEnd front_end = FrontEnd::kMeasured;
  Spectrum current_a;  // drawn from the bus (load convention)
  WaveformIndices indices;
  // From the built-in bridge model only (absent for table spectra).
  std::optional<double> vdc_v;           // mean DC-link voltage
  std::optional<double> peak_current_a;  // of the simulated line current
  std::optional<double> conduction_deg;  // per half cycle a line carries current
  std::optional<double> overlap_deg;     // commutation overlap (current-stiff bridges)
  DriveWaveform waveform;                // filled when StudyOptions::keep_waveforms
};

struct PccHarmonic {
  int order = 0;
  double amps = 0.0;
  double percent_of_il = 0.0;
  std::optional<double> limit_percent;  // of I_L; empty when the profile has no current limit here
  std::optional<bool> pass;
};

struct PccResult {
  std::string bus;
  std::optional<double> demand_current_a;  // empty when neither given nor derivable
  bool demand_current_is_default = false;
  double isc_a = 0.0;
  Spectrum current_a;  // entering the pcc from the utility side
  std::optional<double> tdd_percent;
  std::optional<double> tdd_limit_percent;  // from the limit profile, when it has current limits
  std::vector<PccHarmonic> harmonics;
};

// IEEE Std 18 duty of a capacitor bank (steps in service) or of a filter's capacitor, in percent
// of the rating of the steps in service; voltages are across the capacitor itself (behind the
// detuning or filter reactor).
struct CapacitorDuty {
  std::string name;
  std::string bus;
  std::string kind;  // "capacitor" or "filter"
  int steps_on = 1;
  int steps = 1;
  double vrms_percent = 0.0;
  double vpeak_percent = 0.0;        // waveform rebuilt with angles
  double vpeak_arith_percent = 0.0;  // arithmetic sum of the harmonic peaks (conservative bound)
  double irms_percent = 0.0;
  double kvar_percent = 0.0;         // sum over orders of V_h I_h
  double fundamental_rise = 1.0;     // |V_C1| / |V_bus1|: about 1/(1-p) behind a reactor
  std::optional<double> reactor_irms_a;  // filters and detuned banks
  bool pass = true;                  // every figure within the IEEE 18 limits
};

// IEEE Std C57.110 figures of a transformer carrying the study's non-sinusoidal current.
struct TransformerDerating {
  std::string name;
  double harmonic_loss_factor = 1.0;  // F_HL for winding eddy-current loss
  double k_factor = 1.0;              // normalised to the actual rms current: equals F_HL
  double derated_percent = 100.0;     // largest rms current of this shape, percent of rated
  double load_percent = 0.0;          // the study's rms current, percent of rated
};

// Resonance risk of a driving-point impedance peak (rule in docs/resonance.md).
enum class Risk { kLow, kMedium, kHigh };
std::string ToString(Risk risk);

// A peak of the driving-point impedance |Z(h)| at a bus.
struct ResonancePeak {
  double order = 0.0;          // fractional harmonic order
  double impedance_ohm = 0.0;  // |Z| at the peak
  double amplification = 1.0;  // |Z| over |Z| of the same network without capacitors and filters
  int near_order = 0;          // injected order (>= 1 % of a drive group) nearest the peak; 0: none
  Risk risk = Risk::kLow;
};

struct Resonance {
  std::string bus;
  std::string configuration;  // e.g. "PFC-1 6/6, PFC-2 0/4"
  ResonancePeak peak;
};

// A figure beyond its limit: `what` is thd_v, v_h<N>, tdd, i_h<N>, cap_vrms, cap_vpeak, cap_irms
// or cap_kvar; value and limit in percent (PLANT-FORMAT.md "JSON written by the commands").
struct Violation {
  std::string where;  // bus or capacitor name
  std::string what;
  double value = 0.0;
  double limit = 0.0;
};

// The voltage check of one bus against the profile's class for its nominal voltage.
struct BusLimitCheck {
  std::string bus;
  bool design_guide = false;  // an internal bus under a pcc-only profile: shown, not a violation
  double thd_percent = 0.0;
  double thd_limit_percent = 0.0;
  int worst_order = 0;  // the order closest to (or furthest over) its limit; 0: no limited order
  double worst_percent = 0.0;
  double worst_limit_percent = 0.0;
  bool pass = true;
};

// Limit assessment of a study (docs/limits.md).
struct Assessment {
  std::string profile;  // profile name, e.g. "ieee519"
  std::string title;    // e.g. "IEEE Std 519-2014"
  std::vector<BusLimitCheck> buses;
  std::vector<Violation> violations;    // the pcc (or every bus, per profile) and capacitor duty
  std::vector<Violation> design_guide;  // internal buses under a pcc-only profile
};

struct StudyResult {
  StudySettings study;
  std::vector<BusResult> buses;
  std::vector<BranchResult> branches;  // transformers, then cables, in file order
  std::vector<DriveResult> drives;
  PccResult pcc;
  std::vector<CapacitorDuty> capacitors;     // banks with steps in service, then filters
  std::vector<TransformerDerating> transformers;
  std::vector<Resonance> resonances;         // present step state, pcc and capacitor/filter buses
  Assessment assessment;
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
