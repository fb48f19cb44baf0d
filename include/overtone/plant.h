// include/overtone/plant.h — the typed plant model that the loader produces (public).
//
// Units: every physical value here is SI — volts (line-to-line unless named otherwise), amperes,
// watts, var, volt-amperes, ohms, henries, farads, metres, hertz, degrees for angles. Ratios that
// the format gives in percent or per unit are stored as plain fractions (5.75 % -> 0.0575).
// Every element keeps the place it was written (file, line, column) for later error messages.
#ifndef OVERTONE_PUBLIC_PLANT_H_
#define OVERTONE_PUBLIC_PLANT_H_

#include <optional>
#include <string>
#include <vector>

namespace overtone {

// Where a value was written: file name as given, line and column counted from 1 (0 = unknown).
struct SourceLocation {
  std::string file;
  int line = 0;
  int column = 0;
};

enum class Summation { kVector, kArithmetic, kIec };

// One row of a spectrum or background table.
struct HarmonicEntry {
  int order = 0;
  double percent = 0.0;    // percent of the fundamental (current or EMF)
  double angle_deg = 0.0;  // relative to the fundamental at 0 deg
  SourceLocation where;
};

struct StudySettings {
  std::string name;                       // default: file name without extension
  double frequency_hz = 60.0;             // 50 or 60 in practice; any value > 0 accepted
  int max_order = 50;                     // highest order solved, 2..200
  std::string pcc;                        // bus name; empty = the first supply's bus
  std::optional<double> demand_current_a; // I_L at the pcc; empty = transformer-rating default
  std::string limits = "ieee519";         // profile name or file path
  Summation summation = Summation::kVector;
  SourceLocation where;
};

struct Bus {
  std::string name;
  double nominal_v = 0.0;  // line-to-line, V
  SourceLocation where;
};

// A Thevenin source: the utility supply.
struct Supply {
  std::string name;
  std::string bus;
  double short_circuit_va = 0.0;  // three-phase fault level at nominal voltage
  double x_over_r = 10.0;
  double voltage_pu = 1.0;  // EMF magnitude, pu of the bus nominal voltage
  double angle_deg = 0.0;   // EMF angle in the study's frame
  std::vector<HarmonicEntry> background;  // percent of the fundamental EMF
  SourceLocation where;
};

// A standby or on-site generator: EMF behind R + jh*X2.
struct Generator {
  std::string name;
  std::string bus;
  double rating_va = 0.0;
  double x2_pu = 0.0;  // negative-sequence reactance on the rating
  double x_over_r = 15.0;
  double voltage_pu = 1.0;
  double angle_deg = 0.0;
  SourceLocation where;
};

// IEC vector group, e.g. Dyn11: winding letters and the clock number.
struct VectorGroup {
  std::string code;              // as written, e.g. "Dyn11"
  int clock = 0;                 // 0..11; to-side positive sequence lags by 30 deg * clock
  bool from_grounded_wye = false;  // "YN" on the high-voltage side
  bool to_grounded_wye = false;    // "yn" on the low-voltage side
  bool from_delta = false;
  bool to_delta = false;
};

struct Transformer {
  std::string name;
  std::string from;  // high-voltage side
  std::string to;
  double rating_va = 0.0;
  double impedance = 0.0;  // fraction on the rating at the from-bus voltage
  double x_over_r = 8.0;
  VectorGroup connection;
  double tap = 0.0;        // fraction: +0.025 = 2.5 % more turns on the from winding
  double eddy_loss = 0.10; // P_EC-R as a fraction of the I^2R loss (IEEE C57.110)
  SourceLocation where;
};

struct Cable {
  std::string name;
  std::string from;
  std::string to;
  double length_m = 0.0;
  double r_ohm_per_m = 0.0;
  double x_ohm_per_m = 0.0;  // at the fundamental frequency
  double c_f_per_m = 0.0;    // 0 = no shunt capacitance
  int runs = 1;
  SourceLocation where;
};

struct Capacitor {
  std::string name;
  std::string bus;
  double rating_var = 0.0;  // all steps together, three-phase, at rated_v
  double rated_v = 0.0;     // line-to-line; loader fills the bus kv when absent
  int steps = 1;
  int steps_on = 1;
  double detuning = 0.0;    // reactor X_L / X_C at the fundamental (fraction); 0 = no reactor
  double x_over_r = 50.0;   // of the detuning reactor
  SourceLocation where;
};

enum class FilterType { kSingleTuned, kHighPass };

struct Filter {
  std::string name;
  std::string bus;
  FilterType type = FilterType::kSingleTuned;
  double rating_var = 0.0;  // at rated_v
  double rated_v = 0.0;     // loader fills the bus kv when absent
  double tuned_order = 0.0;
  double quality = 40.0;    // loader sets 1.0 for high-pass when absent
  SourceLocation where;
};

struct Motor {
  std::string name;
  std::string bus;
  double rating = 0.0;         // W when rating_is_kva is false, VA when true
  bool rating_is_kva = false;
  double rated_v = 0.0;        // loader fills the bus kv when absent
  int count = 1;
  double loading = 1.0;        // fraction
  double locked_rotor_reactance_pu = 0.17;
  double x_over_r = 10.0;
  double efficiency = 0.95;
  double power_factor = 0.88;
  SourceLocation where;
};

enum class LoadModel { kParallelRL, kSeriesRL, kNone };

struct Load {
  std::string name;
  std::string bus;
  double p_w = 0.0;    // per unit of count
  double q_var = 0.0;  // per unit of count, >= 0
  int count = 1;
  LoadModel model = LoadModel::kParallelRL;
  SourceLocation where;
};

enum class FrontEnd {
  kDiodeCapacitor,
  kDiodeChoke,
  kThyristor,
  kSinglePhase,
  kMultipulse,
  kActive,
  kMeasured
};

// A reactor given either in percent of the unit's base impedance or as an inductance.
struct ReactorSpec {
  enum class Kind { kNone, kFraction, kHenry };
  Kind kind = Kind::kNone;
  double value = 0.0;  // fraction of Z_base = V_LL^2 / power, or henries
};

struct Drive {
  std::string name;
  std::string bus;
  int count = 1;
  double power_w = 0.0;  // rated input active power of one unit
  double loading = 1.0;  // fraction
  FrontEnd front_end = FrontEnd::kDiodeCapacitor;
  int pulses = 6;        // 12, 18 or 24 for multipulse
  ReactorSpec line_reactor;
  ReactorSpec dc_choke;
  std::optional<double> dc_capacitance_f;  // empty = default by rating and voltage
  double imbalance = 0.0;                  // fraction, multipulse only
  double firing_angle_deg = 0.0;           // thyristor only
  std::vector<HarmonicEntry> harmonics;    // measured and active
  double displacement_pf = 1.0;            // measured and active
  SourceLocation where;
};

struct Plant {
  std::string source_file;  // the file given on the command line
  StudySettings study;
  std::vector<Supply> supplies;
  std::vector<Generator> generators;
  std::vector<Bus> buses;
  std::vector<Transformer> transformers;
  std::vector<Cable> cables;
  std::vector<Capacitor> capacitors;
  std::vector<Filter> filters;
  std::vector<Motor> motors;
  std::vector<Load> loads;
  std::vector<Drive> drives;
};

std::string ToString(FrontEnd front_end);
std::string ToString(Summation summation);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_PLANT_H_
