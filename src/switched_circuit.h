// src/switched_circuit.h — exact time-domain simulation of piecewise-linear switched circuits
// (internal).
//
// Time is the fundamental phase angle theta = w t in radians. The state z holds the circuit's
// inductor currents and capacitor voltages plus a unit oscillator (cos theta, sin theta), so the
// sinusoidal sources are part of an autonomous linear system z' = A z within each topology.
// Across a grid step the exact propagator expm(A d) is used (cached per topology); a switching
// instant is where a switching function g(z) = G_k z rises through zero, located to round-off
// inside the step by safeguarded Newton iterations on the exact trajectory expm(A tau) z, whose
// points are summed as Taylor series in short substeps (matrix-vector products only).
#ifndef OVERTONE_INTERNAL_SWITCHED_CIRCUIT_H_
#define OVERTONE_INTERNAL_SWITCHED_CIRCUIT_H_

#include <functional>
#include <unordered_map>
#include <vector>

#include <Eigen/Dense>

namespace overtone::internal {

constexpr int kStateSize = 6;  // up to four circuit states, then cos theta, sin theta
constexpr int kCos = 4;
constexpr int kSin = 5;
using StateVector = Eigen::Matrix<double, kStateSize, 1>;
using StateMatrix = Eigen::Matrix<double, kStateSize, kStateSize>;
using SwitchingRow = Eigen::Matrix<double, 1, kStateSize>;

// One topology: its dynamics and the switching functions that leave it.
struct Topology {
  StateMatrix a = StateMatrix::Zero();
  std::vector<SwitchingRow> switching;  // leave when switching[k] * z rises through 0
  std::vector<int> next;                // topology entered when row k fires
  // Rows that fire only on a crossing inside a step, never because they are already positive
  // (timed events such as thyristor gate pulses, written as sin(theta - theta_gate)).
  std::vector<bool> edge_only;
  SwitchingRow output = SwitchingRow::Zero();  // the circuit's reported voltage (e.g. DC side)
  void Add(const SwitchingRow& row, int to, bool edge = false) {
    switching.push_back(row);
    next.push_back(to);
    edge_only.push_back(edge);
  }
};

class SwitchedCircuit {
 public:
  virtual ~SwitchedCircuit() = default;
  virtual Topology Build(int topology) const = 0;
  // Makes z consistent with a topology just entered (e.g. currents of open branches exactly 0).
  virtual void Enter(int topology, StateVector& z) const = 0;
};

class Simulator {
 public:
  // `step` is the grid spacing in radians.
  Simulator(const SwitchedCircuit& circuit, double step);

  using SampleFn = std::function<void(const StateVector&, int)>;
  // Called at a switching instant, `offset` radians into the current step, with the state and
  // topology just before the switch.
  using SwitchFn = std::function<void(double offset, const StateVector&, int)>;

  // Advances (z, topology) by `steps` grid steps, calling `sample` after each one.
  void Run(StateVector& z, int& topology, int steps, const SampleFn& sample = nullptr,
           const SwitchFn& on_switch = nullptr);

  // Applies every switching function already positive at z (e.g. at the start).
  void Settle(StateVector& z, int& topology);

  const Topology& TopologyOf(int topology) { return Get(topology).topology; }

 private:
  struct Cached {
    Topology topology;
    StateMatrix step;  // expm(a * step_)
    double norm;       // |a|_1
  };
  const Cached& Get(int topology);
  void Advance(StateVector& z, int& topology, const SwitchFn& on_switch);

  const SwitchedCircuit& circuit_;
  double step_;
  std::unordered_map<int, Cached> cache_;
  int last_id_ = 0;
  const Cached* last_ = nullptr;  // the entry of topology last_id_
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SWITCHED_CIRCUIT_H_
