// src/study.cc — the study pipeline: network, load flow, spectra, per-order solves, indices.
#include "overtone/study.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <memory>
#include <numbers>
#include <numeric>
#include <span>

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
#include "parallel.h"
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
  int bus = 0;                            // every source injects at one bus
  std::vector<Complex> current;           // injected there, by order (zero where none)

  // Adds the source's currents to `by_order` (orders 2 and up, none where it injects nothing).
  void AddTo(std::vector<std::vector<Injection>>& by_order) const {
    for (std::size_t h = 2; h < current.size(); ++h) {
      if (current[h] != Complex{}) by_order[h].push_back({bus, current[h]});
    }
  }
};

// For every bus, whether it reaches a supply or generator bus over branches without passing
// `blocked` (whose own sources do not count): components of the network with `blocked` removed,
// by union-find, linear in the number of branches.
std::vector<char> ReachesSourceAvoiding(const Network& net, int blocked) {
  std::vector<int> parent(static_cast<std::size_t>(net.bus_count()));
  std::iota(parent.begin(), parent.end(), 0);
  const auto root = [&parent](int i) {
    while (parent[i] != i) i = parent[i] = parent[parent[i]];  // path halving
    return i;
  };
  for (const auto& b : net.branches()) {
    if (b.from != blocked && b.to != blocked) parent[root(b.from)] = root(b.to);
  }
  std::vector<char> source_in(parent.size(), 0);
  for (const auto& s : net.sources()) {
    if (s.bus != blocked) source_in[root(s.bus)] = 1;
  }
  std::vector<char> reaches(parent.size(), 0);
  for (int i = 0; i < net.bus_count(); ++i) reaches[i] = i != blocked && source_in[root(i)];
  return reaches;
}

std::string PccBus(const Plant& plant) {
  if (!plant.study.pcc.empty()) return plant.study.pcc;
  return !plant.supplies.empty() ? plant.supplies.front().bus : plant.generators.front().bus;
}

// Branch current at its from end at order h (pu of the from bus's base current), from the bus
// voltages `v` at that order.
Complex BranchCurrentAt(const Network& net, const internal::BranchRef& br,
                        std::span<const Complex> v, int h) {
  const internal::BranchStamp st = net.Stamp(br, h, internal::SequenceOf(h));
  return st.yff * v[br.from] + st.yft * v[br.to];
}

// The current entering the pcc bus p from the utility side at order h (pu): of the whole solve,
// or of one source's own solution (then only that source's background EMF, if any, is present).
class PccMeter {
 public:
  PccMeter(const Network& net, int p) : net_(net), p_(p) {
    // The branches at the pcc that lead toward a supply without passing it.
    const std::vector<char> reaches = ReachesSourceAvoiding(net, p);
    for (const auto& b : net.branches()) {
      if ((b.from == p || b.to == p) && reaches[b.from == p ? b.to : b.from]) {
        utility_side_.push_back(&b);
      }
    }
  }

  // From the bus voltages `v` at order h.
  Complex At(std::span<const Complex> v, int h, const HarmonicSource* source = nullptr) const {
    Complex current;
    const internal::Sequence seq = internal::SequenceOf(h);
    for (const auto& s : net_.sources()) {
      if (s.bus != p_) continue;
      const bool own = !source || (source->background_of && source->background_of == s.supply);
      current += ((own ? SourceEmfAt(net_, s, h) : Complex{}) - v[p_]) / net_.SourceImpedance(s, h);
    }
    for (const internal::BranchRef* branch : utility_side_) {
      const internal::BranchRef& b = *branch;
      const internal::BranchStamp st = net_.Stamp(b, h, seq);
      const Complex vf = v[b.from], vt = v[b.to];
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
// Each source's solution at an order is folded into per-order sums of terms as soon as it is
// solved, so memory stays that of one result whatever the number of sources.
void SumBySource(Summation rule, const Network& net, const PccMeter& meter, int pcc_bus,
                 const std::vector<HarmonicSource>& sources, int threads, StudyResult& result) {
  std::vector<std::vector<std::vector<Injection>>> sets;
  for (const HarmonicSource& s : sources) s.AddTo(sets.emplace_back(s.current.size()));
  const int max_order = result.study.max_order;
  const std::size_t buses = static_cast<std::size_t>(net.bus_count()), branches = net.branches().size();
  const std::size_t row = buses + branches + 1;  // per order: buses, branches, the pcc
  std::vector<double> sums(static_cast<std::size_t>(max_order + 1) * row, 0.0);
  // Order h's row is written only by the worker solving h, sources in a fixed order.
  internal::SolveHarmonicsBySource(net, sets, max_order, threads,
      [&](int h, std::size_t k, std::span<const Complex> v) {
        double* sum = sums.data() + static_cast<std::size_t>(h) * row;
        for (std::size_t i = 0; i < buses; ++i) sum[i] += internal::SourceTerm(rule, h, v[i]);
        for (std::size_t b = 0; b < branches; ++b) {
          sum[buses + b] += internal::SourceTerm(rule, h, BranchCurrentAt(net, net.branches()[b], v, h));
        }
        sum[buses + branches] += internal::SourceTerm(rule, h, meter.At(v, h, &sources[k]));
      });
  for (int h = 2; h <= max_order; ++h) {
    const double* sum = sums.data() + static_cast<std::size_t>(h) * row;
    const auto combined = [&](std::size_t i) { return Complex(internal::CombinedMagnitude(rule, h, sum[i])); };
    for (std::size_t i = 0; i < buses; ++i) result.buses[i].voltage_pu.by_order[h] = combined(i);
    for (std::size_t b = 0; b < branches; ++b) {
      result.branches[b].current_a.by_order[h] = net.BaseAmps(net.branches()[b].from) * combined(buses + b);
    }
    result.pcc.current_a.by_order[h] = net.BaseAmps(pcc_bus) * combined(buses + branches);
  }
  for (BusResult& b : result.buses) {
    b.indices = internal::ComputeIndices(b.voltage_pu.by_order, internal::kNegligibleVoltagePu);
  }
  for (BranchResult& b : result.branches) {
    b.indices = internal::ComputeIndices(b.current_a.by_order, internal::kNegligibleCurrentA);
  }
}

// Calls fill(i) for every i in [0, count) over the threads, in chunks of consecutive items.
template <typename Fill>
void ForEachInParallel(int count, int threads, Fill fill) {
  constexpr int kChunk = 256;
  internal::ParallelFor((count + kChunk - 1) / kChunk, threads, [] { return std::make_unique<char>(); },
                        [&](char&, int chunk) {
                          const int end = std::min(count, (chunk + 1) * kChunk);
                          for (int i = chunk * kChunk; i < end; ++i) fill(i);
                        });
}

// Adds the wall-clock time since the previous lap to a field of the caller's StudyTimings.
class PhaseClock {
 public:
  explicit PhaseClock(StudyTimings* timings) : timings_(timings) {}
  void Lap(double StudyTimings::*field) {
    const auto now = std::chrono::steady_clock::now();
    if (timings_) timings_->*field += std::chrono::duration<double>(now - last_).count();
    last_ = now;
  }

 private:
  StudyTimings* timings_;
  std::chrono::steady_clock::time_point last_ = std::chrono::steady_clock::now();
};

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
  PhaseClock clock(options.timings);
  const internal::LimitProfile profile = internal::LoadLimitProfile(plant.study.limits);
  const Network net(plant);
  const int max_order = plant.study.max_order;
  StudyResult result;
  result.study = plant.study;
  result.cautions = StandardCautions();

  // Fundamental operating point, with each drive group's spectrum.
  const internal::OperatingPoint op =
      internal::SolveOperatingPoint(plant, net, options, result.warnings);
  const internal::LoadFlowResult& flow = op.flow;
  result.load_flow_iterations = flow.iterations;
  clock.Lap(&StudyTimings::operating_point_s);

  // Sources: drive groups (drawn current, so injected with a minus sign) and supply backgrounds.
  const std::size_t orders = static_cast<std::size_t>(max_order) + 1;
  std::vector<HarmonicSource> sources;
  for (std::size_t k = 0; k < plant.drives.size(); ++k) {
    HarmonicSource& source = sources.emplace_back();
    source.bus = net.BusIndex(plant.drives[k].bus);
    source.current.resize(orders);
    for (int h = 2; h <= max_order; ++h) source.current[h] = -op.drives[k].current[h];
  }
  for (const auto& s : net.sources()) {
    if (!s.supply || s.supply->background.empty()) continue;
    HarmonicSource& source = sources.emplace_back();
    source.background_of = s.supply;
    source.bus = s.bus;
    source.current.resize(orders);
    for (const HarmonicEntry& e : s.supply->background) {
      if (e.order > max_order) continue;
      if (e.order % 3 == 0) {
        result.warnings.push_back(fmt::format("supply '{}': triplen background order {} ignored "
                                              "(zero sequence, format 1)", s.name(), e.order));
        continue;
      }
      source.current[e.order] += BackgroundEmf(*s.supply, e.order) / net.SourceImpedance(s, e.order);
    }
  }
  std::vector<std::vector<Injection>> injections(orders);
  for (const HarmonicSource& source : sources) source.AddTo(injections);

  internal::HarmonicSolution sol = internal::SolveHarmonics(net, injections, max_order, options.threads);
  for (int i = 0; i < net.bus_count(); ++i) sol.voltage[static_cast<std::size_t>(sol.bus_count) + i] = flow.voltage[i];

  // Bus and branch spectra with their indices, spread over the threads: each item writes its own
  // slot only.
  result.buses.resize(static_cast<std::size_t>(net.bus_count()));
  ForEachInParallel(net.bus_count(), options.threads, [&](int i) {
    BusResult& b = result.buses[i];
    b.name = net.bus(i).name;
    b.nominal_v = net.nominal_v(i);
    b.voltage_pu.by_order.resize(static_cast<std::size_t>(max_order) + 1);
    for (int h = 1; h <= max_order; ++h) b.voltage_pu.by_order[h] = sol.at(h, i);
    b.indices = internal::ComputeIndices(b.voltage_pu.by_order, internal::kNegligibleVoltagePu);
  });
  result.branches.resize(net.branches().size());
  ForEachInParallel(static_cast<int>(net.branches().size()), options.threads, [&](int k) {
    const internal::BranchRef& br = net.branches()[k];
    BranchResult& r = result.branches[k];
    r.name = br.name();
    r.kind = br.transformer ? "transformer" : "cable";
    r.from = net.bus(br.from).name;
    r.to = net.bus(br.to).name;
    std::vector<Complex> current(orders);
    for (int h = 1; h <= max_order; ++h) current[h] = BranchCurrentAt(net, br, sol.order(h), h);
    r.current_a = Scaled(current, net.BaseAmps(br.from));
    r.indices = internal::ComputeIndices(r.current_a.by_order, internal::kNegligibleCurrentA,
                                           /*with_peak=*/false);  // not reported for branches
  });
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
  for (int h = 1; h <= max_order; ++h) pcc_current[h] = meter.At(sol.order(h), h);
  result.pcc.current_a = Scaled(pcc_current, net.BaseAmps(pcc_bus));
  if (plant.study.summation != Summation::kVector) {
    SumBySource(plant.study.summation, net, meter, pcc_bus, sources, options.threads, result);
  }
  clock.Lap(&StudyTimings::harmonic_solves_s);
  result.pcc = AssessPcc(plant, net, std::move(result.pcc.current_a), result.warnings);
  // Capacitor duty, transformer derating and resonance screening (docs/resonance.md).
  result.capacitors = internal::CapacitorDuties(plant, result.buses);
  result.transformers = internal::TransformerDeratings(plant, result.branches);
  clock.Lap(&StudyTimings::assessments_s);
  if (options.scan) result.resonances = internal::ScreenPresentState(plant, result, options.threads);
  clock.Lap(&StudyTimings::scan_s);
  internal::AssessLimits(profile, result);
  clock.Lap(&StudyTimings::assessments_s);
  return result;
}

}  // namespace overtone
