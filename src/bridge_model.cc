// src/bridge_model.cc — front ends built from the bridge circuits, in the study's frame and units.
#include "bridge_model.h"

#include <cmath>
#include <numbers>
#include <stdexcept>

#include <fmt/format.h>

#include "overtone/errors.h"

namespace overtone::internal {
namespace {

constexpr double kPi = std::numbers::pi;

// Leakage reactance of a multipulse drive's internal phase-shifting transformer when no line
// reactor is given: 5 % on the drive's rating at the bus voltage, a fixed inductance like a
// line reactor given in percent (common practice, from memory).
constexpr double kMultipulseLeakage = 0.05;

// One bridge circuit of the group and what it stands for.
struct CircuitPlan {
  BridgeParameters parameters;  // on the bus voltage base (bridge_table.h)
  double rated_va = 0.0;  // the circuit's power unit S
  double phase_shift = 0.0;  // rad, internal winding shift (multipulse)
};

// A reactor of one unit in ohms: percent on the unit base V_LL^2 / power, or an inductance.
double ReactorOhms(const ReactorSpec& r, const Drive& d, double nominal_v, double frequency_hz) {
  switch (r.kind) {
    case ReactorSpec::Kind::kNone: return 0.0;
    case ReactorSpec::Kind::kFraction: return r.value * nominal_v * nominal_v / d.power_w;
    case ReactorSpec::Kind::kHenry: return 2.0 * kPi * frequency_hz * r.value;
  }
  return 0.0;
}

// Line current of a balanced three-phase front end placed in the primary frame behind a winding
// that advances positive-sequence voltage by `shift`: a time shift of the unit's waveform
// (h * shift) and the winding's own shift by sequence (IEC 60076-1; see models.cc).
Complex ThroughWinding(Complex unit_current, int h, double shift) {
  const int sequence_sign = h % 3 == 1 ? 1 : (h % 3 == 2 ? -1 : 0);
  return unit_current * std::polar(1.0, (h - sequence_sign) * shift);
}

// The group's circuits on the bus voltage base (per unit of the circuit's own power on the bus
// voltage), to be solved on the EMF |E| (bridge_table.h, OnEmfBase).
std::vector<CircuitPlan> PlanCircuits(const Drive& d, const BusSupply& bus) {
  const double group_va = d.count * d.power_w;
  const Complex z_supply_ohm = bus.impedance * BaseOhms(bus.nominal_v);
  const double omega = 2.0 * kPi * bus.frequency_hz;
  const double unit_capacitance = d.dc_capacitance_f.value_or(DefaultDcCapacitance(d, bus.nominal_v));
  const double reactor_ohm = ReactorOhms(d.line_reactor, d, bus.nominal_v, bus.frequency_hz) / d.count;
  const double choke_ohm = ReactorOhms(d.dc_choke, d, bus.nominal_v, bus.frequency_hz) / d.count;

  // `share` of the group's units in one circuit, with `supply_factor` times the supply impedance.
  const auto plan = [&](BridgeCircuit circuit, double share, double supply_factor, double loading) {
    CircuitPlan c;
    c.rated_va = group_va * share;
    const double z_base = bus.nominal_v * bus.nominal_v / c.rated_va;
    BridgeParameters& p = c.parameters;
    p.circuit = circuit;
    p.r_supply = supply_factor * z_supply_ohm.real() / z_base;
    p.x_supply = supply_factor * z_supply_ohm.imag() / z_base;
    p.x_reactor = reactor_ohm / share / z_base;
    p.x_dc = choke_ohm / share / z_base;
    p.b_dc = omega * unit_capacitance * d.count * share * z_base;
    p.power = loading;
    return c;
  };

  std::vector<CircuitPlan> plans;
  switch (d.front_end) {
    case FrontEnd::kDiodeCapacitor:
      plans.push_back(plan(BridgeCircuit::kSixPulseCapacitor, 1.0, 1.0, d.loading));
      break;
    case FrontEnd::kDiodeChoke:
    case FrontEnd::kThyristor: {
      CircuitPlan c = plan(BridgeCircuit::kSixPulseStiff, 1.0, 1.0, d.loading);
      c.parameters.thyristor = d.front_end == FrontEnd::kThyristor;
      c.parameters.firing_deg = c.parameters.thyristor ? d.firing_angle_deg : 0.0;
      if (c.parameters.firing_deg >= 90.0) {
        throw InputError(d.where, fmt::format("drive '{}': firing_angle {} deg makes the bridge invert; "
                                              "a rectifier load needs less than 90 deg",
                                              d.name, d.firing_angle_deg));
      }
      plans.push_back(c);
      break;
    }
    case FrontEnd::kSinglePhase:
      // A third of the units on each line pair; the loop holds two lines of the supply.
      plans.push_back(plan(BridgeCircuit::kSinglePhase, 1.0 / 3.0, 2.0, d.loading));
      break;
    case FrontEnd::kMultipulse: {
      // pulses / 6 six-pulse units, shifted by 60 deg / units around zero, sharing the power
      // with the `imbalance` mismatch spread evenly across them. Each unit sees the supply on its
      // own share (units x Z_sc on its base): the same per unit impedance as the whole group.
      const int units = d.pulses / 6;
      for (int k = 0; k < units; ++k) {
        const double offset = units == 1 ? 0.0 : (k - 0.5 * (units - 1)) / (units - 1);  // -1/2..1/2
        const double share = (1.0 + d.imbalance * offset) / units;
        CircuitPlan c = plan(BridgeCircuit::kSixPulseCapacitor, share, 1.0 / share, d.loading);
        if (d.line_reactor.kind == ReactorSpec::Kind::kNone) c.parameters.x_reactor = kMultipulseLeakage;
        c.phase_shift = (k - 0.5 * (units - 1)) * kPi / 3.0 / units;
        plans.push_back(c);
      }
      break;
    }
    case FrontEnd::kActive:
    case FrontEnd::kMeasured:
      throw std::logic_error("table front ends do not use the bridge model");
  }
  return plans;
}

}  // namespace

BridgeCache::Key BridgeCache::KeyOf(const BridgeParameters& p) const {
  return {static_cast<double>(p.circuit), p.r_supply, p.x_supply, p.x_reactor, p.x_dc,
          p.b_dc, p.firing_deg, p.thyristor ? 1.0 : 0.0, p.power, static_cast<double>(max_order_)};
}

const BridgeSolution& BridgeCache::SolveExactly(const BridgeParameters& p,
                                                const BridgeStart* from) {
  const std::pair<Key, const BridgeStart*> key = {KeyOf(p), from};
  {
    std::lock_guard lock(mutex_);
    if (auto it = solutions_.find(key); it != solutions_.end()) return it->second;
  }
  // Solved outside the lock; two threads meeting the same new circuit both solve it, with the
  // same result, and the first one stored is kept.
  BridgeSolution solution = SolveBridge(p, max_order_, from);
  if (!keep_waveforms_) solution.waveform = {};
  std::lock_guard lock(mutex_);
  return solutions_.emplace(key, std::move(solution)).first->second;
}

SolvedCircuit BridgeCache::Solve(const BridgeParameters& p, double emf, bool exact,
                                 const BridgeStart* previous) {
  if (interpolate_ && !exact) {
    if (std::optional<SolvedCircuit> s = table_.Interpolate(p, emf)) return *std::move(s);
  }
  // A direct solve starts from the circuit's last solution, or with the table in use from its
  // nearest node (fewer iterations either way).
  const BridgeStart* from = previous ? previous : interpolate_ ? table_.StartNear(p, emf) : nullptr;
  const BridgeSolution& s = SolveExactly(OnEmfBase(p, emf), from);
  return {s.current, s.power, s.dc_voltage, s.peak_current, s.conduction_deg, s.overlap_deg,
          keep_waveforms_ ? &s.waveform : nullptr, 1.0, false, &s.start};
}

double DefaultDcCapacitance(const Drive& d, double nominal_v) {
  const double ratio = 480.0 / nominal_v;
  return 40e-6 * (d.power_w / 1e3) * ratio * ratio;
}

std::vector<BridgeParameters> GroupCircuits(const Drive& drive, const BusSupply& supply) {
  std::vector<BridgeParameters> out;
  for (const CircuitPlan& c : PlanCircuits(drive, supply)) {
    out.push_back(OnEmfBase(c.parameters, std::abs(supply.emf)));
  }
  return out;
}

GroupSpectrum ComputeGroupSpectrum(const Drive& d, const BusSupply& bus, BridgeCache& cache,
                                   bool exact, const std::vector<const BridgeStart*>& previous) {
  const std::vector<CircuitPlan> plans = PlanCircuits(d, bus);
  const int max_order = cache.max_order();
  const double v_emf = std::abs(bus.emf) * bus.nominal_v;  // circuit voltage unit, V line-to-line
  GroupSpectrum out;
  out.current.assign(static_cast<std::size_t>(max_order) + 1, Complex{});
  const double emf_angle = std::arg(bus.emf);
  const double base_amps = kBaseVa / (std::sqrt(3.0) * bus.nominal_v);
  for (std::size_t n = 0; n < plans.size(); ++n) {
    const CircuitPlan& c = plans[n];
    const SolvedCircuit s = cache.Solve(c.parameters, std::abs(bus.emf), exact,
                                        n < previous.size() ? previous[n] : nullptr);
    const double amps_per_unit = c.rated_va / v_emf;  // circuit current unit in amperes
    out.interpolated |= s.interpolated;
    out.starts.push_back(s.start);
    for (int h = 1; h <= max_order; ++h) {
      Complex i = s.current[h] * amps_per_unit;
      if (c.parameters.circuit == BridgeCircuit::kSinglePhase) {
        // Line a carries i_ab - i_ca, and i_ca is i_ab advanced by 120 deg: triplens cancel.
        i *= 1.0 - std::polar(1.0, h * 2.0 * kPi / 3.0);
      } else {
        i = ThroughWinding(i, h, c.phase_shift);
      }
      // A balanced three-phase group draws no zero-sequence current (PLANT-FORMAT.md
      // "Conventions"); the simulation leaves only round-off at the triplens.
      if (h % 3 == 0) continue;
      out.current[h] += i * std::polar(1.0, h * emf_angle) / base_amps;
    }
    if (n == 0) {
      out.dc_voltage_v = s.dc_voltage * v_emf;
      out.peak_current_a = s.peak_current * amps_per_unit;
      out.conduction_deg = s.conduction_deg;
      out.overlap_deg = s.overlap_deg;
    }
  }
  const Complex v1 = bus.emf - bus.impedance * out.current[1];
  out.power = v1 * std::conj(out.current[1]);
  return out;
}

BridgeWaveform GroupWaveform(const Drive& d, const BusSupply& bus, BridgeCache& cache, bool exact,
                             const std::vector<const BridgeStart*>& previous) {
  const CircuitPlan c = PlanCircuits(d, bus).front();
  const SolvedCircuit s = cache.Solve(c.parameters, std::abs(bus.emf), exact,
                                      previous.empty() ? nullptr : previous.front());
  if (s.waveform == nullptr) throw std::logic_error("GroupWaveform needs a cache keeping waveforms");
  const double v_emf = std::abs(bus.emf) * bus.nominal_v;
  const double amps = s.waveform_scale * c.rated_va / v_emf;
  BridgeWaveform w = *s.waveform;
  for (double& t : w.theta) t += std::arg(bus.emf);
  for (double& i : w.line_current) i *= amps;
  for (double& v : w.terminal_voltage) v *= v_emf;
  for (double& v : w.dc_voltage) v *= v_emf;
  return w;
}

}  // namespace overtone::internal
