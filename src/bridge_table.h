// src/bridge_table.h — bridge solutions interpolated between shared nodes, for plants whose many
// groups differ only in the supply impedance they see and in their loading (internal).
//
// The circuit is scale-free: with every impedance multiplied by k and the power divided by k,
// the currents divide by k and the voltages stay (bridge.h units). So a circuit on an EMF of
// e per unit of the bus voltage is the circuit on the bus voltage with its power divided by e^2
// and its currents multiplied by e^2; a current-stiff circuit, having no capacitor, can also be
// brought to unit power. The line current sees the supply and the group's own reactor in series,
// so they are lumped. What is left to vary continuously, for one kind of front end (circuit, DC
// choke and DC capacitance on the bus voltage base, firing angle), is the impedance Z in front of
// the bridge and the power P. Nodes sit on a fixed lattice in
//   u = ln(|Z| P)  (the commutation and ripple scale)   v = ln(X/R)   w = ln P
// and are solved once, the first time a point needs them, and kept for the later rounds of the
// load flow. A point is interpolated cubically in u and w and quadratically in v; where that
// stencil is not trusted, quadratically on a lattice twice as fine, then multilinearly in its
// cell of a lattice four times finer; otherwise the caller solves it directly. A stencil is trusted when all its nodes share one conduction pattern
// (the same number of switching instants per period: no pulse splits, merges or overlaps between
// them) and, for the cubic, when its two inner quadratics agree within 0.1 percentage points.
// DESIGN.md section 4 allows interpolation when a test shows its error below 0.2 percentage
// points of the fundamental: tests/bridge_table_test.cc.
#ifndef OVERTONE_INTERNAL_BRIDGE_TABLE_H_
#define OVERTONE_INTERNAL_BRIDGE_TABLE_H_

#include <array>
#include <atomic>
#include <complex>
#include <memory>
#include <mutex>
#include <optional>
#include <unordered_map>
#include <vector>

#include "bridge.h"

namespace overtone::internal {

// A bridge solution in the units of bridge.h (voltage unit: the EMF). The waveform, null unless
// waveforms are kept, is that of a solved circuit (for an interpolated point, the nearest node, whose reactor is lumped with the
// supply), its currents to be multiplied by `waveform_scale`.
struct SolvedCircuit {
  std::vector<std::complex<double>> current;  // orders 0..max_order, EMF frame
  double power = 0.0;
  double dc_voltage = 0.0;
  double peak_current = 0.0;
  double conduction_deg = 0.0;
  double overlap_deg = 0.0;
  const BridgeWaveform* waveform = nullptr;
  double waveform_scale = 1.0;
  bool interpolated = false;
  // Where its own simulation ended (null when interpolated): the start for the same circuit
  // after the supply has moved a little.
  const BridgeStart* start = nullptr;
};

// `p` on the bus voltage base, with an EMF of `emf` per unit of the bus voltage: the same circuit
// in the units of bridge.h, whose voltage unit is the EMF.
BridgeParameters OnEmfBase(BridgeParameters p, double emf);

class BridgeTable {
 public:
  // Nodes keep their waveforms only with `keep_waveforms` (a node's period is 46 kB, and a
  // large plant solves thousands of nodes).
  BridgeTable(int max_order, bool keep_waveforms);

  // The interpolated solution of `p` (bus voltage base) on EMF `emf`, or nothing where the table
  // does not serve the point (no power drawn, no supply resistance, a single-phase circuit, a
  // bare capacitor bridge on a very stiff supply, a node that cannot be solved, or no trusted
  // stencil): the caller solves it directly. Safe to call from several threads; the result
  // depends only on `p` and `emf`.
  std::optional<SolvedCircuit> Interpolate(const BridgeParameters& p, double emf);

  // Lattice steps in u, v and w (coarse lattice), chosen so that the error stays below 0.2
  // percentage points (tests/bridge_table_test.cc; docs/bridge-model.md section 10).
  static constexpr double kStepU = 0.3;
  static constexpr double kStepV = 0.5;
  static constexpr double kStepW = 0.25;
  // Lattice level l is 2^l times finer in each direction.
  static constexpr int kFinestLevel = 2;

  // The solved state of the coarse node nearest to the point, to start a direct solve of `p` on
  // EMF `emf` from (BridgeStart); null where the table does not serve the point or that node
  // failed. The node is solved if it was not yet: the choice depends only on `p` and `emf`.
  const BridgeStart* StartNear(const BridgeParameters& p, double emf);

  int solved_nodes() const;

 private:
  // The front end's fixed parameters, rounded so that groups of one kind share them.
  using Kind = std::array<double, 5>;  // circuit, thyristor, firing, x_dc, b_dc
  using Index = std::array<int, 4>;    // lattice level (0 coarse), u, v, w
  struct Node {
    std::mutex mutex;
    bool done = false;                // a thread took it on (under `mutex`)
    std::atomic<bool> ready = false;  // its numbers are in place: read without the lock
    bool failed = false;
    std::complex<double> fundamental;
    std::vector<std::complex<double>> relative;  // I_h exp(-j h arg I_1) / |I_1|, orders 0..
    double dc_voltage = 0.0, peak_current = 0.0, conduction_deg = 0.0, overlap_deg = 0.0;
    std::size_t pattern = 0;  // points of the sampled period: the grid plus switching instants
    BridgeStart start;
    BridgeWaveform waveform;
  };
  // A point in lattice units of the coarse lattice; scale-free circuits have no w.
  struct Point {
    double u, v, w;
    bool scale_free;
  };
  // Where a circuit sits in the table: its kind, its point, and the factor from the table's
  // unit-EMF (and, scale-free, unit-power) currents to the circuit's.
  struct Located {
    Kind kind;
    Point point;
    double scale = 1.0;
  };
  // The stencil's blend of the node solutions around a point, on a unit EMF and power.
  struct Blend {
    std::complex<double> fundamental;
    std::vector<std::complex<double>> relative;
    double dc_voltage = 0.0, peak_current = 0.0, conduction_deg = 0.0, overlap_deg = 0.0;
    const Node* nearest = nullptr;
  };

  // Nothing for a circuit the table never serves (no power drawn, no supply resistance, single
  // phase).
  static std::optional<Located> Locate(const BridgeParameters& p, double emf);
  // The node at `index`, solved on first use.
  const Node& Solved(const Kind& kind, Index index);
  // Fills `node` with the solution at `index`; leaves it failed where that cannot be solved.
  void SolveNode(const Kind& kind, const Index& index, Node& node);
  // Nothing where a node fails or the stencil is not trusted.
  std::optional<Blend> BlendAt(const Kind& kind, const Point& at, int level);

  int max_order_;
  bool keep_waveforms_;
  // The orders a balanced three-phase bridge draws: odd and not triplen (the even orders vanish by
  // the half-period symmetry, the triplens hold round-off). Only these are blended; the others
  // of an interpolated solution are zero.
  std::vector<std::size_t> carried_;
  struct KeyHash {
    std::size_t operator()(const std::pair<Kind, Index>& key) const;
  };
  // The nodes, spread over shards by key so that threads looking up different nodes seldom
  // wait on one lock (a blend looks up 48); nodes stay put.
  struct Shard {
    mutable std::mutex mutex;
    std::unordered_map<std::pair<Kind, Index>, std::unique_ptr<Node>, KeyHash> nodes;
  };
  static constexpr std::size_t kShards = 64;
  std::array<Shard, kShards> shards_;
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_BRIDGE_TABLE_H_
