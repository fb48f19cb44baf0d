// src/study.cc — the study pipeline: network, load flow, spectra, per-order solves, indices.
#include "overtone/study.h"

#include <cmath>
#include <numbers>
#include <queue>

#include <fmt/format.h>

#include "assessment.h"
#include "capacitor_duty.h"
#include "harmonic_solve.h"
#include "indices.h"
#include "limit_profile.h"
#include "load_flow.h"
#include "network.h"
#include "operating_point.h"
#include "overtone/errors.h"
#include "scan.h"
#include "spectra.h"
#include "summation.h"
#include "transformer_derating.h"

namespace overtone {
namespace {

using internal::Complex;
using internal::Injection;
using internal::Network;

constexpr double kDegPerRad = 180.0 / std::numbers::pi;

Spectrum Scaled(const std::vector<Complex>& pu, double scale) {
  Spectrum s;
  s.by_order.resize(pu.size());
  for (std::size_t h = 0; h < pu.size(); ++h) s.by_order[h] = pu[h] * scale;
  return s;
}

// Background EMF of a supply at order h (pu), PLANT-FORMAT.md "Conventions".
Complex BackgroundEmf(const Supply& s, int h) {
  for (const HarmonicEntry& e : s.background) {
    if (e.order != h) continue;
    return std::polar(s.voltage_pu * e.percent / 100.0,
                      (e.angle_deg + h * s.angle_deg) / kDegPerRad);
  }
  return {};
}

// A source's EMF at order h; triplen backgrounds are ignored (PLANT-FORMAT.md "Conventions").
Complex SourceEmfAt(const Network& net, const internal::SourceRef& src, int h) {
  if (h == 1) return net.SourceEmf(src);
  return src.supply && h % 3 != 0 ? BackgroundEmf(*src.supply, h) : Complex{};
}

// One harmonic source of the plant: a drive group or a supply's background, with its currents.
struct HarmonicSource {
  const Supply* background_of = nullptr;  // null: a drive group
  std::vector<std::vector<Injection>> injections;  // by order
};

// Buses reachable from `start` over branches without passing `blocked`.
bool ReachesSource(const Network& net, int start, int blocked) {
  std::vector<char> seen(static_cast<std::size_t>(net.bus_count()), 0);
  std::vector<char> has_source(seen.size(), 0);
  for (const auto& s : net.sources()) has_source[s.bus] = 1;
  std::queue<int> todo;
  todo.push(start);
  seen[start] = 1;
  seen[blocked] = 1;
  while (!todo.empty()) {
    const int bus = todo.front();
    todo.pop();
    if (has_source[bus]) return true;
    for (const auto& b : net.branches()) {
      for (auto [here, there] : {std::pair{b.from, b.to}, std::pair{b.to, b.from}}) {
        if (here == bus && !seen[there]) {
          seen[there] = 1;
          todo.push(there);
        }
      }
    }
  }
  return false;
}

std::string PccBus(const Plant& plant) {
  if (!plant.study.pcc.empty()) return plant.study.pcc;
  return !plant.supplies.empty() ? plant.supplies.front().bus : plant.generators.front().bus;
}

// Branch current at its from end at order h (pu of the from bus's base current).
Complex BranchCurrentAt(const Network& net, const internal::BranchRef& br,
                        const internal::HarmonicSolution& sol, int h) {
  const internal::BranchStamp st = net.Stamp(br, h, internal::SequenceOf(h));
  return st.yff * sol.at(h, br.from) + st.yft * sol.at(h, br.to);
}

// The current entering the pcc bus p from the utility side at order h (pu): of the whole solve,
// or of one source's own solution (then only that source's background EMF, if any, is present).
class PccMeter {
 public:
  PccMeter(const Network& net, int p) : net_(net), p_(p) {
    // The branches at the pcc that lead toward a supply without passing it.
    for (const auto& b : net.branches()) {
      if ((b.from == p || b.to == p) && ReachesSource(net, b.from == p ? b.to : b.from, p)) {
        utility_side_.push_back(&b);
      }
    }
  }

  Complex At(const internal::HarmonicSolution& sol, int h, const HarmonicSource* source = nullptr) const {
    Complex current;
    const internal::Sequence seq = internal::SequenceOf(h);
    for (const auto& s : net_.sources()) {
      if (s.bus != p_) continue;
      const bool own = !source || (source->background_of && source->background_of == s.supply);
      current += ((own ? SourceEmfAt(net_, s, h) : Complex{}) - sol.at(h, p_)) / net_.SourceImpedance(s, h);
    }
    for (const internal::BranchRef* branch : utility_side_) {
      const internal::BranchRef& b = *branch;
      const internal::BranchStamp st = net_.Stamp(b, h, seq);
      const Complex vf = sol.at(h, b.from), vt = sol.at(h, b.to);
      current -= b.from == p_ ? st.yff * vf + st.yft * vt : st.ytf * vf + st.ytt * vt;
    }
    return current;
  }

 private:
  const Network& net_;
  int p_;
  std::vector<const internal::BranchRef*> utility_side_;
};

// `current`: entering the pcc from the utility side by order, in amperes.
PccResult AssessPcc(const Plant& plant, const Network& net, Spectrum current,
                    std::vector<std::string>& warnings) {
  PccResult pcc;
  pcc.bus = PccBus(plant);
  const int p = net.BusIndex(pcc.bus);
  const int max_order = plant.study.max_order;
  const double base_a = net.BaseAmps(p);
  pcc.current_a = std::move(current);
  pcc.isc_a = base_a / std::abs(internal::ShortCircuitImpedances(net, {p}, internal::SourceSet::kSuppliesOnly)[0]);

  if (plant.study.demand_current_a) {
    pcc.demand_current_a = plant.study.demand_current_a;
  } else {
    double rated = 0.0;
    for (const Transformer& t : plant.transformers) {
      if (t.from == pcc.bus) rated += t.rating_va / (std::sqrt(3.0) * net.nominal_v(p));
    }
    if (rated > 0.0) {
      pcc.demand_current_a = rated;
      pcc.demand_current_is_default = true;
      warnings.push_back(fmt::format(
          "pcc '{}': demand_current not given; I_L = {:.1f} A is the sum of the rated currents of "
          "the transformers fed from the pcc. IEEE 519's I_L is the average maximum demand: this "
          "default overstates it and so understates TDD", pcc.bus, rated));
    } else {
      warnings.push_back(fmt::format("pcc '{}': no demand_current and no transformer fed from the "
                                     "pcc; current distortion (TDD) is left out", pcc.bus));
    }
  }
  if (pcc.demand_current_a) {
    const double il = *pcc.demand_current_a;
    double sum_sq = 0.0;
    for (int h = 2; h <= max_order; ++h) {
      const double amps = std::abs(pcc.current_a.at(h));
      sum_sq += amps * amps;
      PccHarmonic& row = pcc.harmonics.emplace_back();
      row.order = h;
      row.amps = amps;
      row.percent_of_il = 100.0 * amps / il;
    }
    pcc.tdd_percent = 100.0 * std::sqrt(sum_sq) / il;
  }
  return pcc;
}

// Non-vector summation (PLANT-FORMAT.md "Conventions"): every harmonic magnitude of buses,
// branches and the pcc current recombined from each source's own solution; angles set to 0.
void SumBySource(Summation rule, const Network& net, const PccMeter& meter, int pcc_bus,
                 const std::vector<HarmonicSource>& sources, int threads, StudyResult& result) {
  std::vector<std::vector<std::vector<Injection>>> sets;
  for (const HarmonicSource& s : sources) sets.push_back(s.injections);
  const int max_order = result.study.max_order;
  const std::vector<internal::HarmonicSolution> sols =
      internal::SolveHarmonicsBySource(net, sets, max_order, threads);
  std::vector<Complex> parts(sols.size());
  const auto combine = [&](int h, const auto& part_of) {
    for (std::size_t k = 0; k < sols.size(); ++k) parts[k] = part_of(k);
    return Complex(internal::CombineSources(rule, h, parts));
  };
  for (int h = 2; h <= max_order; ++h) {
    for (int i = 0; i < net.bus_count(); ++i) {
      result.buses[i].voltage_pu.by_order[h] = combine(h, [&](std::size_t k) { return sols[k].at(h, i); });
    }
    for (std::size_t b = 0; b < net.branches().size(); ++b) {
      const internal::BranchRef& br = net.branches()[b];
      result.branches[b].current_a.by_order[h] = net.BaseAmps(br.from) *
          combine(h, [&](std::size_t k) { return BranchCurrentAt(net, br, sols[k], h); });
    }
    result.pcc.current_a.by_order[h] = net.BaseAmps(pcc_bus) *
        combine(h, [&](std::size_t k) { return meter.At(sols[k], h, &sources[k]); });
  }
  for (BusResult& b : result.buses) {
    b.indices = internal::ComputeIndices(b.voltage_pu.by_order, internal::kNegligibleVoltagePu);
  }
  for (BranchResult& b : result.branches) {
    b.indices = internal::ComputeIndices(b.current_a.by_order, internal::kNegligibleCurrentA);
  }
}

}  // namespace

const std::vector<std::string>& StandardCautions() {
  static const std::vector<std::string> cautions = {
      "This is a screening study, not a design certification.",
      "Results are only as good as the input data: supply fault level, transformer and cable "
      "data, capacitor steps in service and drive spectra.",
      "Verify the results by measurement at the plant before and after changes.",
      "Follow the local electrical code, the utility's requirements and the judgment of a "
      "licensed professional engineer.",
  };
  return cautions;
}

StudyResult RunStudy(const Plant& plant, const StudyOptions& options) {
  const internal::LimitProfile profile = internal::LoadLimitProfile(plant.study.limits);
  const Network net(plant);
  const int max_order = plant.study.max_order;
  StudyResult result;
  result.study = plant.study;
  result.cautions = StandardCautions();

  // Fundamental operating point, with each drive group's spectrum.
  const internal::OperatingPoint op = internal::SolveOperatingPoint(plant, net, options.threads, result.warnings);
  const internal::LoadFlowResult& flow = op.flow;
  result.load_flow_iterations = flow.iterations;

  // Sources: drive groups (drawn current, so injected with a minus sign) and supply backgrounds.
  const std::size_t orders = static_cast<std::size_t>(max_order) + 1;
  std::vector<HarmonicSource> sources;
  for (std::size_t k = 0; k < plant.drives.size(); ++k) {
    const int bus = net.BusIndex(plant.drives[k].bus);
    HarmonicSource& source = sources.emplace_back();
    source.injections.resize(orders);
    for (int h = 2; h <= max_order; ++h) source.injections[h].push_back({bus, -op.drives[k].current[h]});
  }
  for (const auto& s : net.sources()) {
    if (!s.supply || s.supply->background.empty()) continue;
    HarmonicSource& source = sources.emplace_back();
    source.background_of = s.supply;
    source.injections.resize(orders);
    for (const HarmonicEntry& e : s.supply->background) {
      if (e.order > max_order) continue;
      if (e.order % 3 == 0) {
        result.warnings.push_back(fmt::format("supply '{}': triplen background order {} ignored "
                                              "(zero sequence, format 1)", s.name(), e.order));
        continue;
      }
      source.injections[e.order].push_back(
          {s.bus, BackgroundEmf(*s.supply, e.order) / net.SourceImpedance(s, e.order)});
    }
  }
  std::vector<std::vector<Injection>> injections(orders);
  for (const HarmonicSource& source : sources) {
    for (int h = 2; h <= max_order; ++h) {
      injections[h].insert(injections[h].end(), source.injections[h].begin(), source.injections[h].end());
    }
  }

  internal::HarmonicSolution sol = internal::SolveHarmonics(net, injections, max_order, options.threads);
  for (int i = 0; i < net.bus_count(); ++i) sol.voltage[static_cast<std::size_t>(sol.bus_count) + i] = flow.voltage[i];

  for (int i = 0; i < net.bus_count(); ++i) {
    BusResult b;
    b.name = net.bus(i).name;
    b.nominal_v = net.nominal_v(i);
    b.voltage_pu.by_order.resize(static_cast<std::size_t>(max_order) + 1);
    for (int h = 1; h <= max_order; ++h) b.voltage_pu.by_order[h] = sol.at(h, i);
    b.indices = internal::ComputeIndices(b.voltage_pu.by_order, internal::kNegligibleVoltagePu);
    result.buses.push_back(std::move(b));
  }
  for (const auto& br : net.branches()) {
    BranchResult r;
    r.name = br.name();
    r.kind = br.transformer ? "transformer" : "cable";
    r.from = net.bus(br.from).name;
    r.to = net.bus(br.to).name;
    std::vector<Complex> current(orders);
    for (int h = 1; h <= max_order; ++h) current[h] = BranchCurrentAt(net, br, sol, h);
    r.current_a = Scaled(current, net.BaseAmps(br.from));
    r.indices = internal::ComputeIndices(r.current_a.by_order, internal::kNegligibleCurrentA,
                                           /*with_peak=*/false);  // not reported for branches
    result.branches.push_back(std::move(r));
  }
  for (std::size_t k = 0; k < plant.drives.size(); ++k) {
    const Drive& d = plant.drives[k];
    DriveResult r;
    r.name = d.name;
    r.bus = d.bus;
    r.count = d.count;
    r.front_end = d.front_end;
    r.current_a = Scaled(op.drives[k].current, net.BaseAmps(net.BusIndex(d.bus)));
    r.indices = internal::ComputeIndices(r.current_a.by_order, internal::kNegligibleCurrentA);
    if (const auto& bridge = op.drives[k].bridge) {
      r.vdc_v = bridge->dc_voltage_v;
      r.peak_current_a = bridge->peak_current_a;
      r.conduction_deg = bridge->conduction_deg;
      r.overlap_deg = bridge->overlap_deg;
      if (options.keep_waveforms) {
        const internal::BridgeWaveform& w = bridge->waveform;
        for (double t : w.theta) r.waveform.theta_deg.push_back(t * kDegPerRad);
        r.waveform.line_current_a = w.line_current;
        r.waveform.voltage_v = w.terminal_voltage;
        r.waveform.dc_voltage_v = w.dc_voltage;
      }
    }
    result.drives.push_back(std::move(r));
  }
  const int pcc_bus = net.BusIndex(PccBus(plant));
  const PccMeter meter(net, pcc_bus);
  std::vector<Complex> pcc_current(orders);
  for (int h = 1; h <= max_order; ++h) pcc_current[h] = meter.At(sol, h);
  result.pcc.current_a = Scaled(pcc_current, net.BaseAmps(pcc_bus));
  if (plant.study.summation != Summation::kVector) {
    SumBySource(plant.study.summation, net, meter, pcc_bus, sources, options.threads, result);
  }
  result.pcc = AssessPcc(plant, net, std::move(result.pcc.current_a), result.warnings);
  // Capacitor duty, transformer derating and resonance screening (docs/resonance.md).
  result.capacitors = internal::CapacitorDuties(plant, result.buses);
  result.transformers = internal::TransformerDeratings(plant, result.branches);
  if (options.scan) result.resonances = internal::ScreenPresentState(plant, result, options.threads);
  internal::AssessLimits(profile, result);
  return result;
}

}  // namespace overtone
