// src/bridge.h — the built-in bridge model: periodic steady state of a rectifier front end and
// its line-current spectrum (internal).
//
// Units inside: the group's own per unit. Voltage unit = the rms line-to-line EMF of the source
// the bridge sees (|E| V_nom); power unit = the group's rated input power S (count x power);
// impedance unit Z_b = V^2 / S; current unit V / Z_b = S / V; time = phase angle theta = w t
// in radians, with phase a's EMF at sqrt(2/3) cos(theta). Results are returned in the same
// units; bridge_model.cc converts them to amperes in the study's frame.
#ifndef OVERTONE_INTERNAL_BRIDGE_H_
#define OVERTONE_INTERNAL_BRIDGE_H_

#include <array>
#include <complex>
#include <vector>

namespace overtone::internal {

enum class BridgeCircuit {
  kSixPulseCapacitor,  // diode bridge, optional DC choke, DC capacitor, resistive load
  kSixPulseStiff,      // diode or thyristor bridge with a ripple-free DC current
  kSinglePhase,        // diode bridge with capacitor on one line pair
};

struct BridgeParameters {
  BridgeCircuit circuit = BridgeCircuit::kSixPulseCapacitor;
  double r_supply = 0.0;   // supply (network Thevenin) resistance per phase
  double x_supply = 0.0;   // supply reactance per phase at the fundamental; > 0
  double x_reactor = 0.0;  // the group's own AC reactor per phase (lossless)
  double x_dc = 0.0;       // DC choke reactance at the fundamental (capacitor circuits)
  double b_dc = 0.0;       // DC capacitor susceptance w C at the fundamental (capacitor circuits)
  double firing_deg = 0.0; // thyristor delay angle; 0 with diodes
  bool thyristor = false;
  double power = 1.0;      // terminal input power to reach, in units of S (= loading)
};

struct BridgeWaveform {
  std::vector<double> theta;             // rad, one period
  std::vector<double> line_current;      // phase a (single-phase: the line-pair current)
  std::vector<double> terminal_voltage;  // phase a to neutral (single-phase: line to line)
  std::vector<double> dc_voltage;
};

// Where a solved circuit ended up, to start a neighbouring circuit from (fewer iterations).
struct BridgeStart {
  double level = 0.0;  // the load conductance (capacitor links) or DC current (stiff links) found
  double power = 0.0;  // the power drawn at that level
  std::array<double, 4> state = {};  // circuit states at the start of the symmetry segment
  int topology = 0;
  // The shooting Jacobian there (of the segment map less the identity, column-major), if any.
  std::array<double, 16> jacobian = {};
  bool has_jacobian = false;
  double elasticity = 1.0;  // d ln(power) / d ln(level) there, from the last secant step
};

struct BridgeSolution {
  // Rms cosine phasors of the drawn line current at orders 0..max_order, EMF frame.
  std::vector<std::complex<double>> current;
  double dc_voltage = 0.0;       // mean
  double peak_current = 0.0;     // max |line current|
  double conduction_deg = 0.0;   // per half cycle, degrees a line carries current
  double overlap_deg = 0.0;      // per commutation, stiff circuits
  double power = 0.0;            // terminal input power reached
  BridgeWaveform waveform;
  // Points of the sampled period, the grid and the switching instants: a change between two
  // neighbouring circuits tells that a pulse split, merged or overlapped between them.
  std::size_t pattern_points = 0;
  BridgeStart start;
};

// Solves the periodic steady state at the requested power: for capacitor circuits by adjusting
// the DC load resistance, for stiff circuits the DC current. Throws SolveError when the power
// cannot be reached (e.g. beyond what the supply can deliver). `from`, the end of a similar
// circuit's solve, only changes where the iterations start: the result is the same within the
// solver's tolerances (1e-7 of the power, 1e-11 of the state).
BridgeSolution SolveBridge(const BridgeParameters& p, int max_order,
                           const BridgeStart* from = nullptr);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_BRIDGE_H_
