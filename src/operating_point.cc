// src/operating_point.cc — load flow iterated with the bridge model until they agree.
#include "operating_point.h"

#include <cmath>
#include <memory>
#include <set>

#include <fmt/format.h>

#include "overtone/errors.h"
#include "parallel.h"
#include "spectra.h"

namespace overtone::internal {
namespace {

constexpr int kMaxRounds = 30;
// Agreement between the power each group draws in the load flow and in its bridge simulation,
// relative to the largest group's power: far below what changes any reported figure.
constexpr double kPowerTolerance = 1e-6;

// Constant power drawn at each bus by loads, motors and table-spectrum drive groups.
std::vector<Complex> FixedPowerDrawn(const Plant& plant, const Network& net) {
  std::vector<Complex> s(static_cast<std::size_t>(net.bus_count()));
  for (const Load& l : plant.loads) s[net.BusIndex(l.bus)] += LoadPower(l);
  for (const Motor& m : plant.motors) s[net.BusIndex(m.bus)] += MotorPower(m);
  for (const Drive& d : plant.drives) {
    if (!NeedsBridgeModel(d.front_end)) s[net.BusIndex(d.bus)] += TableDrivePower(d);
  }
  return s;
}

void NoteModelAssumptions(const Drive& d, std::vector<std::string>& warnings) {
  if (d.front_end == FrontEnd::kSinglePhase) {
    warnings.push_back(fmt::format(
        "drive '{}': single-phase units are taken as spread evenly over the three line pairs; "
        "their triplen currents cancel in the lines of this balanced model but flow in the delta "
        "windings and appear in the lines wherever the spread is uneven", d.name));
  }
  if (d.front_end == FrontEnd::kMultipulse && d.line_reactor.kind == ReactorSpec::Kind::kNone) {
    warnings.push_back(fmt::format(
        "drive '{}': no line_reactor given; the internal phase-shifting transformer is taken to "
        "have 5 % leakage reactance on the drive's rating", d.name));
  }
}

// How many distinct circuits the bridge groups are this round (exact keys).
std::size_t DistinctCircuits(const Plant& plant, const std::vector<std::size_t>& bridges,
                             const std::vector<BusSupply>& supplies, const BridgeCache& cache) {
  std::set<BridgeCache::Key> keys;
  for (std::size_t n = 0; n < bridges.size(); ++n) {
    for (const BridgeParameters& p : GroupCircuits(plant.drives[bridges[n]], supplies[n])) {
      keys.insert(cache.KeyOf(p));
    }
  }
  return keys.size();
}

}  // namespace

OperatingPoint SolveOperatingPoint(const Plant& plant, const Network& net,
                                   const StudyOptions& options, std::vector<std::string>& warnings) {
  const int max_order = plant.study.max_order;
  OperatingPoint op;
  op.drives.resize(plant.drives.size());

  std::vector<std::size_t> bridges;
  std::vector<int> bridge_buses;
  for (std::size_t k = 0; k < plant.drives.size(); ++k) {
    if (!NeedsBridgeModel(plant.drives[k].front_end)) continue;
    bridges.push_back(k);
    bridge_buses.push_back(net.BusIndex(plant.drives[k].bus));
    NoteModelAssumptions(plant.drives[k], warnings);
  }
  const std::vector<Complex> z_sc = ShortCircuitImpedances(net, bridge_buses, SourceSet::kAll);

  // Start from the rated power at a displacement factor of about 0.95 (common practice).
  std::vector<Complex> bridge_power(bridges.size());
  for (std::size_t n = 0; n < bridges.size(); ++n) {
    const Drive& d = plant.drives[bridges[n]];
    bridge_power[n] = Complex{1.0, 0.33} * (d.count * d.power_w * d.loading / kBaseVa);
  }
  const std::vector<Complex> fixed = FixedPowerDrawn(plant, net);
  // Kept across rounds: exact solutions and interpolation nodes stay valid as the supplies move.
  BridgeCache cache(max_order, options.keep_waveforms);
  const auto exact = [&](std::size_t n) {
    return plant.drives[bridges[n]].name == options.exact_drive;
  };
  std::vector<BusSupply> supplies(bridges.size());
  // Where each group's own simulations ended last round: its next ones start there.
  std::vector<std::vector<const BridgeStart*>> starts(bridges.size());
  LoadFlowSolver load_flow(net);
  for (int round = 1;; ++round) {
    std::vector<Complex> drawn = fixed;
    for (std::size_t n = 0; n < bridges.size(); ++n) drawn[bridge_buses[n]] += bridge_power[n];
    // From the last round's voltages: the powers moved little, so Newton needs fewer steps.
    op.flow = load_flow.Solve(drawn, {}, round > 1 ? &op.flow.voltage : nullptr);
    op.bridge_iterations = round;
    for (std::size_t n = 0; n < bridges.size(); ++n) {
      const Complex v1 = op.flow.voltage[bridge_buses[n]];
      const Complex i1 = bridge_power[n] == Complex{} ? Complex{} : std::conj(bridge_power[n] / v1);
      supplies[n] = {net.nominal_v(bridge_buses[n]), net.frequency_hz(), v1 + z_sc[n] * i1, z_sc[n]};
    }
    cache.set_interpolate(DistinctCircuits(plant, bridges, supplies, cache) >
                          static_cast<std::size_t>(kMaxExactCircuits));
    std::vector<GroupSpectrum> spectra(bridges.size());
    ParallelFor(static_cast<int>(bridges.size()), options.threads,
                [] { return std::make_unique<int>(0); }, [&](int&, int n) {
                  spectra[n] = ComputeGroupSpectrum(plant.drives[bridges[n]], supplies[n], cache,
                                                    exact(n), starts[n]);
                });
    double change = 0.0, scale = 0.0;
    for (std::size_t n = 0; n < bridges.size(); ++n) {
      change = std::max(change, std::abs(spectra[n].power - bridge_power[n]));
      scale = std::max(scale, std::abs(spectra[n].power));
      bridge_power[n] = spectra[n].power;
      op.drives[bridges[n]].current = std::move(spectra[n].current);
      op.drives[bridges[n]].bridge = std::move(spectra[n]);
    }
    if (change <= kPowerTolerance * scale) break;
    if (round == kMaxRounds) {
      throw SolveError(fmt::format("the load flow and the bridge model did not agree after {} rounds "
                                   "(last change {:.3g} kVA)", kMaxRounds, change * kBaseVa / 1e3));
    }
    // The next round starts where this one ended; after the last round `starts` still holds
    // what that round started from, so that the waveforms below meet its solutions.
    for (std::size_t n = 0; n < bridges.size(); ++n) starts[n] = op.drives[bridges[n]].bridge->starts;
  }

  if (options.keep_waveforms) {  // from the last round's solutions, still in the cache
    ParallelFor(static_cast<int>(bridges.size()), options.threads,
                [] { return std::make_unique<int>(0); }, [&](int&, int n) {
                  op.drives[bridges[n]].bridge->waveform =
                      GroupWaveform(plant.drives[bridges[n]], supplies[n], cache, exact(n),
                                    starts[n]);
                });
  }
  for (std::size_t k = 0; k < plant.drives.size(); ++k) {
    const Drive& d = plant.drives[k];
    if (NeedsBridgeModel(d.front_end)) continue;
    const Complex v1 = op.flow.voltage[net.BusIndex(d.bus)];
    op.drives[k].current = TableSpectrum(d, std::conj(TableDrivePower(d) / v1), max_order, warnings);
  }
  return op;
}

}  // namespace overtone::internal
