// src/headroom.cc — hosting capacity: bracketing and bisection on the added unit count.
//
// Method in docs/headroom.md. Each trial is a study of the plant with one new group of `count`
// units of the named kind at the candidate bus; the spectra of every group are recomputed, since
// the new group changes the impedance the others commutate against. The search assumes that the
// worst limit ratio rises with the count (more units, more distortion), the common case; a count
// that passes above a failing one is not looked for.
#include "overtone/headroom.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>

#include "capacitor_duty.h"
#include "overtone/errors.h"

namespace overtone {
namespace {

constexpr double kUnsolvable = std::numeric_limits<double>::infinity();

double Ratio(const HeadroomBinding& b) { return b.limit > 0.0 ? b.value / b.limit : kUnsolvable; }

// The worst figure (largest value over limit); empty when nothing is limited.
std::optional<HeadroomBinding> Worst(const std::vector<HeadroomBinding>& figures) {
  std::optional<HeadroomBinding> worst;
  for (const HeadroomBinding& b : figures) {
    if (!worst || Ratio(b) > Ratio(*worst)) worst = b;
  }
  return worst;
}

// A name for the added group that no element of the plant uses yet.
std::string AddedGroupName(const Plant& plant, const std::string& kind) {
  auto taken = [&](const std::string& name) {
    return std::ranges::any_of(plant.drives, [&](const Drive& d) { return d.name == name; });
  };
  std::string name = kind + "-ADDED";
  for (int k = 2; taken(name); ++k) name = fmt::format("{}-ADDED-{}", kind, k);
  return name;
}

// One trial: every limited figure's ratio value / limit, and the worst figure.
struct Trial {
  int units = 0;
  std::optional<HeadroomBinding> worst;
  double ratio = 0.0;  // the worst ratio: 0 when nothing is limited, infinity when unsolvable
  std::vector<double> ratios;  // per figure, in LimitFigures order (the same for every trial)
  bool passes() const { return ratio <= 1.0; }
};

Trial Judge(int units, const StudyResult& result) {
  Trial t;
  t.units = units;
  const std::vector<HeadroomBinding> figures = LimitFigures(result);
  t.worst = Worst(figures);
  t.ratio = t.worst ? Ratio(*t.worst) : 0.0;
  for (const HeadroomBinding& f : figures) t.ratios.push_back(Ratio(f));
  return t;
}

// Where the first figure reaches its limit on straight lines through two trials; empty when
// no figure rises.
std::optional<double> PredictedCrossing(const Trial& a, const Trial& b) {
  if (a.ratios.size() != b.ratios.size() || a.units == b.units) return std::nullopt;
  std::optional<double> first;
  for (std::size_t i = 0; i < a.ratios.size(); ++i) {
    const double slope = (b.ratios[i] - a.ratios[i]) / (b.units - a.units);
    if (!std::isfinite(slope) || slope <= 0.0) continue;
    const double at = b.units + (1.0 - b.ratios[i]) / slope;
    if (!first || at < *first) first = at;
  }
  return first;
}

class Search {
 public:
  Search(const Plant& plant, const Drive& kind, const HeadroomOptions& options)
      : plant_(plant),
        kind_(kind),
        options_(options),
        added_name_(AddedGroupName(plant, kind.name)) {}

  // Studies the plant with `units` added at `bus`. An unsolvable plant binds ("unsolvable").
  Trial Run(const std::string& bus, int units) {
    ++studies_;
    Plant trial = plant_;
    Drive& added = trial.drives.emplace_back(kind_);
    added.name = added_name_;
    added.bus = bus;
    added.count = units;
    try {
      return Judge(units,
                   RunStudy(trial, StudyOptions{.threads = options_.threads, .scan = false}));
    } catch (const SolveError&) {
      return Trial{units, HeadroomBinding{bus, "unsolvable", 0.0, 0.0}, kUnsolvable, {}};
    }
  }

  // Bracketing, then narrowing the bracket [last count that passed, first that failed]. Each
  // step aims at ratio 1 by straight-line inter- or extrapolation of the ratio through the two
  // latest trials, figure by figure (they grow nearly linearly with the count), kept inside the
  // bracket and growing at most sixteenfold while no count has failed; when a step does not
  // halve the bracket, the next one bisects. A bus costs a handful of studies.
  BusHeadroom AtBus(const std::string& bus, const Trial& base) {
    const auto start = std::chrono::steady_clock::now();
    studies_ = 0;
    Trial pass = base;
    std::optional<Trial> fail;
    Trial previous = base;
    int next = 1;
    bool bisect = false;
    while (true) {
      const Trial t = Run(bus, next);
      const int width_before = fail ? fail->units - pass.units : 0;
      const Trial last = previous;
      previous = t;
      if (t.passes())
        pass = t;
      else
        fail = t;
      if (!fail && pass.units == options_.max_units) break;
      if (fail && fail->units - pass.units <= 1) break;
      bisect = fail && width_before > 0 && 2 * (fail->units - pass.units) > width_before;
      next = NextCount(last, t, pass, fail, bisect);
    }
    BusHeadroom h;
    h.bus = bus;
    h.added_units = pass.units;
    h.added_kw = pass.units * kind_.power_w / 1e3;
    h.capped = !fail;
    if (fail) h.binding = fail->worst;
    h.studies = studies_;
    h.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    return h;
  }

 private:
  int NextCount(const Trial& a, const Trial& b, const Trial& pass, const std::optional<Trial>& fail,
                bool bisect) const {
    const int hi =
        fail ? fail->units - 1 : std::min(16 * std::max(pass.units, 1), options_.max_units);
    const int lo = pass.units + 1;
    if (bisect && fail) return pass.units + (fail->units - pass.units) / 2;
    const double aim = PredictedCrossing(a, b).value_or(2.0 * b.units);  // else doubling
    // Just below the crossing when it is above the last pass: the following trial then sits on
    // the other side and closes the bracket.
    const int count = static_cast<int>(std::floor(std::min(aim, 1e9)));
    return std::clamp(count, lo, std::max(lo, hi));
  }

  const Plant& plant_;
  const Drive& kind_;
  const HeadroomOptions& options_;
  std::string added_name_;
  int studies_ = 0;
};

std::string DescribeKind(const Drive& d) {
  std::string text = ToString(d.front_end);
  if (d.front_end == FrontEnd::kMultipulse) text += fmt::format(" ({} pulses)", d.pulses);
  auto reactor = [](const ReactorSpec& r, const char* what) -> std::string {
    if (r.kind == ReactorSpec::Kind::kFraction && r.value > 0)
      return fmt::format(", {:g} % {}", 100 * r.value, what);
    if (r.kind == ReactorSpec::Kind::kHenry && r.value > 0)
      return fmt::format(", {:g} mH {}", 1e3 * r.value, what);
    return "";
  };
  return text + reactor(d.line_reactor, "line reactor") + reactor(d.dc_choke, "DC choke");
}

const Drive& FindKind(const Plant& plant, const std::string& name) {
  for (const Drive& d : plant.drives) {
    if (d.name == name) return d;
  }
  std::string names;
  for (const Drive& d : plant.drives) names += (names.empty() ? "" : ", ") + d.name;
  throw InputError(SourceLocation{}, fmt::format("--drive-kind: no drive group named '{}' in {} "
                                                 "(groups: {})",
                                                 name, plant.source_file, names));
}

double NominalV(const Plant& plant, const std::string& bus) {
  for (const Bus& b : plant.buses) {
    if (b.name == bus) return b.nominal_v;
  }
  return 0.0;
}

// The candidate buses, checked: each must exist and share the group's nominal voltage (the kind
// includes the units' rated voltage).
std::vector<std::string> CandidateBuses(const Plant& plant, const Drive& kind,
                                        const HeadroomOptions& o) {
  const double kv = NominalV(plant, kind.bus);
  std::vector<std::string> buses;
  std::vector<Diagnostic> problems;
  auto problem = [&](std::string message) {
    Diagnostic d;
    d.message = std::move(message);
    problems.push_back(std::move(d));
  };
  if (o.all_buses == !o.buses.empty()) {
    throw InputError(SourceLocation{},
                     "give the candidate buses with --bus BUS (repeatable) or --all-buses, "
                     "not both and not neither");
  }
  if (o.max_units < 1) throw InputError(SourceLocation{}, "--max-units must be at least 1");
  if (o.all_buses) {
    for (const Bus& b : plant.buses) {
      if (b.nominal_v == kv) buses.push_back(b.name);
    }
    return buses;
  }
  for (const std::string& name : o.buses) {
    const double v = NominalV(plant, name);
    if (v == 0.0) {
      problem(fmt::format("--bus: no bus named '{}' in {}", name, plant.source_file));
    } else if (v != kv) {
      problem(
          fmt::format("--bus {}: a {:g} kV bus, but drive group '{}' is at a {:g} kV "
                      "bus; its units are added only at buses of their own voltage",
                      name, v / 1e3, kind.name, kv / 1e3));
    } else if (std::ranges::find(buses, name) == buses.end()) {
      buses.push_back(name);
    }
  }
  if (!problems.empty()) throw InputError(problems);
  return buses;
}

}  // namespace

std::vector<HeadroomBinding> LimitFigures(const StudyResult& result) {
  std::vector<HeadroomBinding> figures;
  // Voltage at every bus, design guide included: THDv and the order nearest its limit.
  for (const BusLimitCheck& b : result.assessment.buses) {
    figures.push_back({b.bus, "thd_v", b.thd_percent, b.thd_limit_percent});
    if (b.worst_order > 0) {
      figures.push_back(
          {b.bus, fmt::format("v_h{}", b.worst_order), b.worst_percent, b.worst_limit_percent});
    }
  }
  const PccResult& pcc = result.pcc;
  if (pcc.tdd_percent && pcc.tdd_limit_percent) {
    figures.push_back({pcc.bus, "tdd", *pcc.tdd_percent, *pcc.tdd_limit_percent});
  }
  for (const PccHarmonic& h : pcc.harmonics) {
    if (h.limit_percent)
      figures.push_back(
          {pcc.bus, fmt::format("i_h{}", h.order), h.percent_of_il, *h.limit_percent});
  }
  // IEEE Std 18 duty of every bank and filter capacitor in service.
  for (const CapacitorDuty& c : result.capacitors) {
    figures.push_back({c.name, "cap_vrms", c.vrms_percent, internal::kCapVrmsLimit});
    figures.push_back({c.name, "cap_vpeak", c.vpeak_percent, internal::kCapVpeakLimit});
    figures.push_back({c.name, "cap_irms", c.irms_percent, internal::kCapIrmsLimit});
    figures.push_back({c.name, "cap_kvar", c.kvar_percent, internal::kCapKvarLimit});
  }
  // IEEE C57.110: a transformer binds when its rms current exceeds the largest rms current of
  // the same harmonic content it can carry without exceeding its rated winding losses.
  for (const TransformerDerating& t : result.transformers) {
    figures.push_back({t.name, "tx_derating", t.load_percent, t.derated_percent});
  }
  // Anything else the assessment flags (none today; kept so that a new check binds too).
  for (const Violation& v : result.assessment.violations)
    figures.push_back({v.where, v.what, v.value, v.limit});
  return figures;
}

HeadroomResult RunHeadroom(const Plant& plant, const HeadroomOptions& options) {
  const Drive& kind = FindKind(plant, options.drive_kind);
  const std::vector<std::string> buses = CandidateBuses(plant, kind, options);
  HeadroomResult result;
  result.plant_name = plant.study.name;
  result.drive_kind = kind.name;
  result.front_end = DescribeKind(kind);
  result.unit_kw = kind.power_w / 1e3;
  result.max_units = options.max_units;
  result.cautions = StandardCautions();

  // With nothing added: a plant that cannot be solved stops here (SolveError); one that already
  // exceeds a limit has no headroom anywhere.
  const Trial base =
      Judge(0, RunStudy(plant, StudyOptions{.threads = options.threads, .scan = false}));
  Search search(plant, kind, options);
  for (const std::string& bus : buses) {
    if (base.passes()) {
      result.buses.push_back(search.AtBus(bus, base));
      continue;
    }
    BusHeadroom h;
    h.bus = bus;
    h.binding = base.worst;
    h.already_violating = true;
    h.studies = 1;
    result.buses.push_back(h);
  }
  return result;
}

}  // namespace overtone
