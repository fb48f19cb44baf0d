// src/bridge_model.h — from a drive group and the network at its bus to the group's line-current
// spectrum (internal). Builds the bridge circuits of bridge.h for each front end: six-pulse
// diode-capacitor, current-stiff diode and thyristor bridges, single-phase units spread over the
// three line pairs, and multipulse units behind internal phase-shifting windings.
#ifndef OVERTONE_INTERNAL_BRIDGE_MODEL_H_
#define OVERTONE_INTERNAL_BRIDGE_MODEL_H_

#include <array>
#include <map>
#include <mutex>
#include <string>
#include <vector>

#include "bridge.h"
#include "bridge_table.h"
#include "models.h"
#include "overtone/plant.h"

namespace overtone::internal {

// What the network presents at the group's bus (per unit on kBaseVa and the bus voltage).
struct BusSupply {
  double nominal_v = 0.0;
  double frequency_hz = 60.0;
  Complex emf;        // Thevenin EMF, study frame: bus V1 + Z_sc I1 of the group itself
  Complex impedance;  // Thevenin impedance at the fundamental, shunt elements excluded
};

struct GroupSpectrum {
  std::vector<Complex> current;  // drawn, pu of the bus base current, orders 0..max_order, study frame
  Complex power;                 // fundamental S = V1 conj(I1) drawn at the terminal, pu on kBaseVa
  double dc_voltage_v = 0.0;
  double peak_current_a = 0.0;
  double conduction_deg = 0.0;
  double overlap_deg = 0.0;
  bool interpolated = false;  // from the interpolation nodes rather than its own simulation
  // Per circuit of the group, where its own simulation ended (null when interpolated): passed
  // back in the next load-flow round, it starts there.
  std::vector<const BridgeStart*> starts;
  // One period of a representative unit circuit, in amperes and volts, study frame angles
  // (GroupWaveform; left empty by ComputeGroupSpectrum).
  BridgeWaveform waveform;
};

// Default DC-link capacitance of one unit: 40 uF per kW at 480 V, scaled by (480 V / V_LL)^2
// (PLANT-FORMAT.md; common practice, from memory).
double DefaultDcCapacitance(const Drive& drive, double nominal_v);

// Bridge solutions are exact (one simulation per distinct circuit) while the plant has at most
// this many distinct circuits; beyond, they are interpolated between shared nodes where that
// is accurate (bridge_table.h). Small plants, the textbook checks and `overtone spectrum` on
// them stay exact.
constexpr int kMaxExactCircuits = 32;

// Shares the solutions of identical circuits: a plant's many identical groups on buses with the
// same supply impedance simulate once. The key is every parameter of the per-unit circuit.
// With interpolation on, circuits come from a BridgeTable wherever it serves them. Solutions are
// kept for the cache's lifetime (across load-flow rounds). Safe to share between threads.
class BridgeCache {
 public:
  using Key = std::array<double, 10>;
  // Solutions keep one period of their waveforms only with `keep_waveforms` (GroupWaveform).
  BridgeCache(int max_order, bool keep_waveforms)
      : max_order_(max_order), keep_waveforms_(keep_waveforms), table_(max_order, keep_waveforms) {}

  // The exact key of a circuit in bridge.h units.
  Key KeyOf(const BridgeParameters& p) const;
  void set_interpolate(bool on) { interpolate_ = on; }
  // `p` on the bus voltage base, on an EMF of `emf` per unit of the bus voltage; `exact` asks
  // for its own simulation even with interpolation on. A simulation starts from `previous` (the
  // same circuit's last solution) when given, else from the table's nearest node.
  SolvedCircuit Solve(const BridgeParameters& p, double emf, bool exact,
                      const BridgeStart* previous = nullptr);
  int max_order() const { return max_order_; }
  const BridgeTable& table() const { return table_; }

 private:
  const BridgeSolution& SolveExactly(const BridgeParameters& p, const BridgeStart* from);

  int max_order_;
  bool keep_waveforms_;
  bool interpolate_ = false;
  BridgeTable table_;
  std::mutex mutex_;
  // By circuit and start: the start moves a solution within the solver's tolerances, so one
  // circuit met from two starts (not expected) keeps both, whichever thread comes first.
  std::map<std::pair<Key, const BridgeStart*>, BridgeSolution> solutions_;  // nodes stay put
};

// The circuits that stand for the group against `supply`, in bridge.h units (their exact keys
// tell how many distinct circuits a plant has).
std::vector<BridgeParameters> GroupCircuits(const Drive& drive, const BusSupply& supply);

// Simulates the group's front end against `supply` (with `exact`, by its own simulation even
// where the cache interpolates), its circuits starting from `previous` (GroupSpectrum::starts of
// the last round) where given. Throws SolveError when the operating point cannot be reached,
// InputError for a combination the model refuses (e.g. firing angle >= 90).
GroupSpectrum ComputeGroupSpectrum(const Drive& drive, const BusSupply& supply, BridgeCache& cache,
                                   bool exact, const std::vector<const BridgeStart*>& previous = {});

// One period of the group's representative unit circuit against `supply`, in amperes and volts,
// study frame angles: kept apart from the spectrum since only charts and CSV files need it.
// The cache must keep waveforms.
BridgeWaveform GroupWaveform(const Drive& drive, const BusSupply& supply, BridgeCache& cache,
                             bool exact, const std::vector<const BridgeStart*>& previous = {});

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_BRIDGE_MODEL_H_
