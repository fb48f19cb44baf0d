// src/mitigate.cc — standard mitigations as option plant files, studied and ranked.
//
// Method, definitions and sources in docs/mitigate.md. Every option is the text of a plant file
// that `extends` the original; it is loaded from that text (so what is studied is exactly what is
// written) and studied with the resonance screening of its present step state.
#include "overtone/mitigate.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <complex>
#include <filesystem>
#include <map>
#include <numbers>

#include "mitigate_yaml.h"
#include "overtone/errors.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/scan.h"

namespace overtone {
namespace {

namespace fs = std::filesystem;

// Units of equipment per option kind (our rough weights, docs/mitigate.md): one per drive group
// fitted with reactors, per bank detuned, per filter; two per group whose front end is replaced;
// a quarter for a step-state change, which is a controller setting rather than hardware.
constexpr double kUnitsPerReactorGroup = 1.0;
constexpr double kUnitsPerConversion = 2.0;
constexpr double kUnitsPerDetunedBank = 1.0;
constexpr double kUnitsPerFilter = 1.0;
constexpr double kUnitsPerStepChange = 0.25;

// A proposed change before it is studied: the sections it writes, in YAML.
struct Change {
  std::string name, kind, stem, size;
  double units = 1.0;
  std::string drives, capacitors, filters;  // list items of each section
  std::vector<std::string> remove;          // inherited elements dropped
};

// Sum over the findings of (value / limit - 1): how far the plant is over, as one number.
double ViolationSum(const std::vector<Violation>& list) {
  double sum = 0.0;
  for (const Violation& v : list) {
    if (v.limit > 0.0) sum += std::max(0.0, v.value / v.limit - 1.0);
  }
  return sum;
}

std::string FileStem(std::string text) {
  for (char& c : text) {
    if (!std::isalnum(static_cast<unsigned char>(c)) && c != '-') c = '-';
  }
  return text;
}

bool IsSixPulseBridge(FrontEnd f) {
  return f == FrontEnd::kDiodeCapacitor || f == FrontEnd::kDiodeChoke || f == FrontEnd::kThyristor;
}

bool HasReactor(const ReactorSpec& r) {
  return r.kind != ReactorSpec::Kind::kNone && r.value > 0.0;
}

std::string GroupSize(const Drive& d) {
  return fmt::format("{} x {:g} kW", d.count, d.power_w / 1e3);
}

std::string Units(int count) { return fmt::format("{} unit{}", count, count == 1 ? "" : "s"); }

// Harmonic apparent power of each group, sqrt(3) V_nom I_h,rms (orders 2 and up), in VA.
double HarmonicVa(const DriveResult& d, const StudyResult& r) {
  double sum = 0.0;
  for (std::size_t h = 2; h < d.current_a.by_order.size(); ++h)
    sum += std::norm(d.current_a.by_order[h]);
  for (const BusResult& b : r.buses) {
    if (b.name == d.bus) return std::numbers::sqrt3 * b.nominal_v * std::sqrt(sum);
  }
  return 0.0;
}

// The groups worth changing: harmonic apparent power at least 20 % of the largest group's (our
// cut, to keep the list to changes that can matter; docs/mitigate.md).
std::vector<Drive> MainSources(const Plant& plant, const StudyResult& r) {
  double largest = 0.0;
  for (const DriveResult& d : r.drives) largest = std::max(largest, HarmonicVa(d, r));
  std::vector<Drive> main;
  for (std::size_t k = 0; k < plant.drives.size() && k < r.drives.size(); ++k) {
    if (HarmonicVa(r.drives[k], r) >= 0.2 * largest) main.push_back(plant.drives[k]);
  }
  return main;
}

// 3 % and 5 % line reactors on bridge groups without one; DC chokes of the same sizes on
// capacitor-fed six-pulse groups without one (the usual catalogue sizes).
void ReactorChanges(const std::vector<Drive>& groups, std::vector<Change>& out) {
  // One option: `reactor` of the group set to `percent`, named by `what` and `kind`.
  const auto add = [&out](const Drive& d, ReactorSpec Drive::*reactor, double percent,
                          std::string_view what, std::string_view kind) {
    Drive changed = d;
    changed.*reactor = {ReactorSpec::Kind::kFraction, percent / 100.0};
    out.push_back({fmt::format("{:g} % {}s on {}", percent, what, d.name), std::string(kind),
                   fmt::format("{}-{:g}pct-{}", kind, percent, d.name),
                   fmt::format("{:g} % {}, {}", percent, what, GroupSize(d)), kUnitsPerReactorGroup,
                   internal::DriveYaml(changed), "", "", {}});
  };
  for (const Drive& d : groups) {
    const bool bridge = IsSixPulseBridge(d.front_end) || d.front_end == FrontEnd::kSinglePhase;
    for (double percent : {3.0, 5.0}) {
      if (bridge && !HasReactor(d.line_reactor)) {
        add(d, &Drive::line_reactor, percent, "line reactor", "line-reactor");
      }
      if (d.front_end == FrontEnd::kDiodeCapacitor && !HasReactor(d.dc_choke)) {
        add(d, &Drive::dc_choke, percent, "DC choke", "dc-choke");
      }
    }
  }
}

// Six-pulse groups (built-in or measured) replaced by 12- or 18-pulse or active front ends.
void ConversionChanges(const std::vector<Drive>& groups, std::vector<Change>& out) {
  for (const Drive& d : groups) {
    if (!IsSixPulseBridge(d.front_end) && d.front_end != FrontEnd::kMeasured) continue;
    for (int pulses : {12, 18}) {
      Drive changed = d;
      changed.front_end = FrontEnd::kMultipulse;
      changed.pulses = pulses;
      changed.harmonics.clear();
      if (d.front_end == FrontEnd::kMeasured) changed.dc_capacitance_f.reset();
      out.push_back({fmt::format("{}-pulse front ends for {}", pulses, d.name),
                     "multipulse",
                     fmt::format("multipulse-{}-{}", pulses, d.name),
                     fmt::format("{} converted to {}-pulse ({:g} kW)", Units(d.count), pulses,
                                 d.count * d.power_w / 1e3),
                     kUnitsPerConversion,
                     internal::DriveYaml(changed),
                     "",
                     "",
                     {}});
    }
    Drive changed = d;
    changed.front_end = FrontEnd::kActive;
    changed.harmonics.clear();  // the built-in low spectrum (docs/bridge-model.md)
    changed.displacement_pf = 1.0;
    changed.line_reactor = {};
    changed.dc_choke = {};
    changed.dc_capacitance_f.reset();
    out.push_back(
        {fmt::format("active front ends for {}", d.name),
         "active-front-end",
         fmt::format("active-front-end-{}", d.name),
         fmt::format("{} converted to active ({:g} kW)", Units(d.count), d.count * d.power_w / 1e3),
         kUnitsPerConversion,
         internal::DriveYaml(changed),
         "",
         "",
         {}});
  }
}

// Rounds a voltage up to the next multiple of 25 V (capacitor units come in such steps).
double RoundUpVolts(double v) { return std::ceil(v / 25.0 - 1e-9) * 25.0; }

// Detuning reactors of p = 7 % and 14 % on banks without them: series tuning at h = 1/sqrt(p)
// (3.78 and 2.67; the series-resonance condition h^2 X_L = X_C). The capacitor voltage rises by
// 1/(1 - p), so the units are re-rated to at least V_bus/(1 - p) and their rating chosen to keep
// the bank's fundamental kvar at the bus, Q_bus = Q_C(V_bus)/(1 - p) (common practice).
void DetuningChanges(const Plant& plant, std::vector<Change>& out) {
  for (const Capacitor& c : plant.capacitors) {
    if (c.detuning > 0.0) continue;
    double bus_v = c.rated_v;
    for (const Bus& b : plant.buses) {
      if (b.name == c.bus) bus_v = b.nominal_v;
    }
    const double q_bus = c.rating_var * std::pow(bus_v / c.rated_v, 2);
    for (double p : {0.07, 0.14}) {
      Capacitor changed = c;
      changed.detuning = p;
      changed.rated_v = std::max(c.rated_v, RoundUpVolts(bus_v / (1.0 - p)));
      changed.rating_var = q_bus * (1.0 - p) * std::pow(changed.rated_v / bus_v, 2);
      out.push_back({fmt::format("{:g} % detuning reactors on {}", 100 * p, c.name),
                     "detuning",
                     fmt::format("detuning-{:g}pct-{}", 100 * p, c.name),
                     fmt::format("{:g} % reactors (tuned {:.2f}), {:.0f} kvar, {:g} V units",
                                 100 * p, 1.0 / std::sqrt(p), q_bus / 1e3, changed.rated_v),
                     kUnitsPerDetunedBank,
                     "",
                     internal::CapacitorYaml(changed),
                     "",
                     {}});
    }
  }
}

// A bank is involved when its duty fails, its bus has a finding, or its bus has a resonance
// peak of medium or high risk in the present step state.
bool Involved(const Capacitor& c, const StudyResult& r) {
  auto here = [&](const std::string& where) { return where == c.name || where == c.bus; };
  for (const auto* list : {&r.assessment.violations, &r.assessment.design_guide}) {
    if (std::ranges::any_of(*list, [&](const Violation& v) { return here(v.where); })) return true;
  }
  return std::ranges::any_of(r.resonances, [&](const Resonance& res) {
    return res.bus == c.bus && res.peak.risk != Risk::kLow;
  });
}

// Every other step state of each involved bank (an automatic controller's setting).
void StepChanges(const Plant& plant, const StudyResult& base, std::vector<Change>& out) {
  for (const Capacitor& c : plant.capacitors) {
    if (!Involved(c, base)) continue;
    for (int k = 0; k <= c.steps; ++k) {
      if (k == c.steps_on) continue;
      Capacitor changed = c;
      changed.steps_on = k;
      out.push_back({fmt::format("{} at {}/{} steps", c.name, k, c.steps),
                     "capacitor-steps",
                     fmt::format("steps-{}-{}of{}", c.name, k, c.steps),
                     fmt::format("{}/{} steps ({:.0f} kvar rated)", k, c.steps,
                                 c.rating_var / 1e3 * k / c.steps),
                     kUnitsPerStepChange,
                     "",
                     internal::CapacitorYaml(changed),
                     "",
                     {}});
    }
  }
}

// Where the single-tuned filter goes and what it is tuned for.
struct FilterSite {
  std::string bus;
  int order = 5;            // dominant characteristic order there
  double reactive_var = 0;  // reactive power drawn through the transformer feeding the bus
  double transformer_va = 0;
};

constexpr int kCharacteristicOrders[] = {5, 7, 11, 13};

// The transformer whose current at a characteristic order is the largest share of its rated
// current feeds the chosen bus (its `to` side); without transformers, the bus where the drive
// groups inject the most current at such an order.
// The order a filter is tuned for: the lowest characteristic order that carries at least half
// the largest of the drive groups' injections (harmonic VA, sqrt 3 V_nom |I_h|, summed over the
// groups; index as kCharacteristicOrders). The injections, not the network's currents, since a
// resonance amplifies one order in the network. A single-tuned filter forms a parallel resonance
// with the supply below its tuning, so a filter tuned above a strong lower order would put that
// resonance on it (common practice: tune to the lowest significant order first).
int FilterOrder(const std::array<double, 4>& currents) {
  const double largest = *std::ranges::max_element(currents);
  for (std::size_t k = 0; k < currents.size(); ++k) {
    if (currents[k] >= 0.5 * largest) return kCharacteristicOrders[k];
  }
  return kCharacteristicOrders[0];
}

std::array<double, 4> InjectedVa(const StudyResult& r) {
  std::array<double, 4> va{};
  for (const DriveResult& d : r.drives) {
    if (static_cast<int>(d.current_a.by_order.size()) <= 13) continue;
    double v = 0.0;
    for (const BusResult& b : r.buses) {
      if (b.name == d.bus) v = b.nominal_v;
    }
    for (std::size_t k = 0; k < va.size(); ++k) {
      va[k] += std::numbers::sqrt3 * v * std::abs(d.current_a.at(kCharacteristicOrders[k]));
    }
  }
  return va;
}

std::optional<FilterSite> ChooseFilterSite(const Plant& plant, const StudyResult& r) {
  const int order = FilterOrder(InjectedVa(r));
  std::optional<FilterSite> site;
  double best = 0.0;
  for (const Transformer& t : plant.transformers) {
    const BranchResult* br = nullptr;
    for (const BranchResult& b : r.branches) {
      if (b.name == t.name) br = &b;
    }
    const BusResult* from = nullptr;
    for (const BusResult& b : r.buses) {
      if (b.name == t.from) from = &b;
    }
    if (!br || !from || static_cast<int>(br->current_a.by_order.size()) <= 13) continue;
    const double rated_a = t.rating_va / (std::numbers::sqrt3 * from->nominal_v);
    std::array<double, 4> shares{};
    for (std::size_t k = 0; k < shares.size(); ++k) {
      shares[k] = std::abs(br->current_a.at(kCharacteristicOrders[k])) / rated_a;
    }
    const double largest = *std::ranges::max_element(shares);
    if (largest <= best) continue;
    best = largest;
    // S = 3 V_phase conj(I) at the from end, V in volts phase to neutral.
    const Phasor v = from->voltage_pu.at(1) * from->nominal_v / std::numbers::sqrt3;
    const double q = 3.0 * std::imag(v * std::conj(br->current_a.at(1)));
    site = FilterSite{t.to, order, std::max(0.0, q), t.rating_va};
  }
  if (site) return site;
  // Without transformers: the bus where the drive groups inject the most.
  std::map<std::string, std::array<double, 4>> by_bus;
  for (const DriveResult& d : r.drives) {
    if (static_cast<int>(d.current_a.by_order.size()) <= 13) continue;
    for (std::size_t k = 0; k < 4; ++k)
      by_bus[d.bus][k] += std::abs(d.current_a.at(kCharacteristicOrders[k]));
  }
  for (const auto& [bus, currents] : by_bus) {
    const double largest = *std::ranges::max_element(currents);
    if (largest <= best) continue;
    best = largest;
    site = FilterSite{bus, order, 0.0, 0.0};
  }
  return site;
}

// The single-tuned filter for a site, `scale` times the base size (docs/mitigate.md):
// tuned 0.3 of an order below its order (FilterOrder: 4.7th for the 5th), so that tolerances and
// capacitance loss (which raise the tuning) do not move it onto the order; effective kvar at the
// bus Q = half the reactive power drawn through the transformer, at least 10 % of its rating
// (without a transformer: a quarter of the drive kW at the bus), and at least the kvar of the
// undetuned banks it replaces at that bus (a bank left beside a tuned filter would resonate with
// the filter's reactor below the tuning), rounded up to 25 kvar; capacitor units rated
// V_bus n^2/(n^2 - 1) plus 10 %, rounded up to 25 V.
struct SizedFilter {
  Filter filter;
  std::vector<std::string> replaces;  // undetuned banks at the bus
};

SizedFilter SizeFilter(const Plant& plant, const FilterSite& site, double scale) {
  double bus_v = 0.0;
  for (const Bus& b : plant.buses) {
    if (b.name == site.bus) bus_v = b.nominal_v;
  }
  SizedFilter sized;
  double q = std::max(0.5 * site.reactive_var, 0.1 * site.transformer_va);
  if (site.transformer_va == 0.0) {
    for (const Drive& d : plant.drives) {
      if (d.bus == site.bus) q += 0.25 * d.count * d.power_w;
    }
  }
  double replaced_var = 0.0;
  for (const Capacitor& c : plant.capacitors) {
    if (c.bus != site.bus || c.detuning > 0.0) continue;
    sized.replaces.push_back(c.name);
    replaced_var += c.rating_var * std::pow(bus_v / c.rated_v, 2) * c.steps_on / c.steps;
  }
  q = std::ceil(scale * std::max(q, replaced_var) / 25e3 - 1e-9) * 25e3;
  Filter& f = sized.filter;
  f.bus = site.bus;
  f.type = FilterType::kSingleTuned;
  f.tuned_order = site.order - 0.3;
  const double n2 = f.tuned_order * f.tuned_order;
  f.rated_v = RoundUpVolts(1.1 * bus_v * n2 / (n2 - 1.0));
  // X_C - X_L = V_bus^2 / Q with X_L = X_C / n^2, and the rating at rated_v is rated_v^2 / X_C.
  const double xc = bus_v * bus_v / q * n2 / (n2 - 1.0);
  f.rating_var = f.rated_v * f.rated_v / xc;
  f.quality = 40.0;
  auto taken = [&](const std::string& n) {
    if (std::ranges::find(sized.replaces, n) != sized.replaces.end()) return false;
    return std::ranges::any_of(plant.filters, [&](const Filter& x) { return x.name == n; }) ||
           std::ranges::any_of(plant.capacitors, [&](const Capacitor& x) { return x.name == n; }) ||
           std::ranges::any_of(plant.drives, [&](const Drive& x) { return x.name == n; });
  };
  f.name = "F-" + site.bus;
  for (int k = 2; taken(f.name); ++k) f.name = fmt::format("F-{}-{}", site.bus, k);
  return sized;
}

Change FilterChange(const SizedFilter& sized, double bus_v) {
  const Filter& f = sized.filter;
  const double n2 = f.tuned_order * f.tuned_order;
  const double q_bus = f.rating_var * std::pow(bus_v / f.rated_v, 2) * n2 / (n2 - 1.0);
  std::string size = fmt::format("{:.0f} kvar at {:g} V, tuned {:g}, {:g} V units", q_bus / 1e3,
                                 bus_v, f.tuned_order, f.rated_v);
  if (!sized.replaces.empty())
    size += fmt::format(", replaces {}", fmt::join(sized.replaces, ", "));
  Change c{fmt::format("single-tuned filter {:g} at {}", f.tuned_order, f.bus),
           "filter",
           fmt::format("filter-{}", f.bus),
           size,
           kUnitsPerFilter,
           "",
           "",
           internal::FilterYaml(f),
           {}};
  c.remove = sized.replaces;
  return c;
}

class Evaluator {
 public:
  Evaluator(const Plant& plant, const MitigateOptions& options, double base_violation)
      : plant_(plant), options_(options), base_violation_(base_violation) {
    const fs::path original = fs::absolute(plant.source_file).lexically_normal();
    const fs::path dir =
        fs::absolute(options.out_dir.empty() ? "." : options.out_dir).lexically_normal();
    extends_ = original.lexically_relative(dir).generic_string();
    dir_ = dir;
  }

  MitigationOption Evaluate(const Change& c, StudyResult* study = nullptr) const {
    MitigationOption o;
    o.name = c.name;
    o.kind = c.kind;
    o.plant_file = FileStem(c.stem) + ".yaml";
    o.size = c.size;
    o.equipment_units = c.units;
    o.plant_text = Text(c, o.plant_file);
    try {
      const Plant changed = LoadPlantFromString(o.plant_text, (dir_ / o.plant_file).string());
      StudyResult r = RunStudy(changed, StudyOptions{.threads = options_.threads});
      o.figures = FiguresOf(r);
      o.score = (base_violation_ - o.figures.violation) / base_violation_ / c.units;
      if (study) *study = std::move(r);
    } catch (const SolveError& e) {
      o.solved = false;
      o.failure = e.what();
    }
    return o;
  }

 private:
  std::string Text(const Change& c, const std::string& file) const {
    std::string t = fmt::format(
        "# {} — {}.\n"
        "# A mitigation option written by `overtone mitigate`; size: {}.\n"
        "# A screening study only: results depend on the quality of the data; verify by\n"
        "# measurement, and follow the local code, the utility's requirements and a licensed\n"
        "# engineer's judgment.\n"
        "overtone: 1\nextends: {}\nstudy:\n  name: {}\n",
        file, c.name, c.size, internal::YamlQuoted(extends_),
        internal::YamlQuoted(plant_.study.name + " — " + c.name));
    if (!c.remove.empty()) {
      t += "remove:\n";
      for (const std::string& name : c.remove) t += "  - " + internal::YamlQuoted(name) + "\n";
    }
    if (!c.drives.empty()) t += "drives:\n" + c.drives;
    if (!c.capacitors.empty()) t += "capacitors:\n" + c.capacitors;
    if (!c.filters.empty()) t += "filters:\n" + c.filters;
    return t;
  }

  const Plant& plant_;
  const MitigateOptions& options_;
  double base_violation_;
  std::string extends_;
  fs::path dir_;
};

// The filter option: the base size, enlarged by half at a time (at most three times) while the
// filter's own capacitor duty fails IEEE 18 (docs/mitigate.md).
std::optional<MitigationOption> FilterOption(const Plant& plant, const StudyResult& base,
                                             const Evaluator& evaluator) {
  const std::optional<FilterSite> site = ChooseFilterSite(plant, base);
  if (!site) return std::nullopt;
  double bus_v = 0.0;
  for (const Bus& b : plant.buses) {
    if (b.name == site->bus) bus_v = b.nominal_v;
  }
  MitigationOption option;
  double scale = 1.0;
  for (int attempt = 0; attempt < 4; ++attempt, scale *= 1.5) {
    const SizedFilter sized = SizeFilter(plant, *site, scale);
    StudyResult r;
    option = evaluator.Evaluate(FilterChange(sized, bus_v), &r);
    if (!option.solved) break;
    const auto duty = std::ranges::find(r.capacitors, sized.filter.name, &CapacitorDuty::name);
    if (duty == r.capacitors.end() || duty->pass) break;
  }
  return option;
}

}  // namespace

MitigationFigures FiguresOf(const StudyResult& r) {
  MitigationFigures f;
  for (const BusResult& b : r.buses) {
    if (f.worst_thd_v_bus.empty() || b.indices.thd_percent > f.worst_thd_v_percent) {
      f.worst_thd_v_percent = b.indices.thd_percent;
      f.worst_thd_v_bus = b.name;
    }
  }
  f.pcc_tdd_percent = r.pcc.tdd_percent;
  f.capacitors_pass = std::ranges::all_of(r.capacitors, &CapacitorDuty::pass);
  const Resonance* worst = nullptr;
  for (const Resonance& res : r.resonances) {
    if (!worst || IsWorse(res.peak, worst->peak)) worst = &res;
  }
  if (worst) {
    f.resonance_risk = worst->peak.risk;
    f.resonance = fmt::format(
        "{} {:.2f}{}, x{:.1f}", worst->bus, worst->peak.order,
        worst->peak.near_order > 0 ? fmt::format(" (near {})", worst->peak.near_order) : "",
        worst->peak.amplification);
  }
  f.meets_profile = r.assessment.violations.empty();
  f.meets_design_guide = r.assessment.design_guide.empty();
  f.violation = ViolationSum(r.assessment.violations) + ViolationSum(r.assessment.design_guide);
  return f;
}

MitigationResult EvaluateMitigations(const Plant& plant, const MitigateOptions& options) {
  MitigationResult result;
  result.plant_name = plant.study.name;
  result.plant_file = plant.source_file;
  result.cautions = StandardCautions();
  const StudyResult base = RunStudy(plant, StudyOptions{.threads = options.threads});
  result.base = FiguresOf(base);
  result.violations = base.assessment.violations;
  result.violations.insert(result.violations.end(), base.assessment.design_guide.begin(),
                           base.assessment.design_guide.end());
  if (!result.needed()) return result;

  std::vector<Change> changes;
  const std::vector<Drive> groups = MainSources(plant, base);
  ReactorChanges(groups, changes);
  ConversionChanges(groups, changes);
  DetuningChanges(plant, changes);
  StepChanges(plant, base, changes);
  const Evaluator evaluator(plant, options, result.base.violation);
  for (const Change& c : changes) result.options.push_back(evaluator.Evaluate(c));
  if (std::optional<MitigationOption> filter = FilterOption(plant, base, evaluator)) {
    result.options.push_back(std::move(*filter));
  }
  // Tiers: profile and design guide met, profile met, neither; then by score.
  const auto tier = [](const MitigationOption& o) {
    return o.figures.meets_profile ? (o.figures.meets_design_guide ? 2 : 1) : 0;
  };
  std::ranges::stable_sort(result.options,
                           [&](const MitigationOption& a, const MitigationOption& b) {
                             if (a.solved != b.solved) return a.solved;
                             if (tier(a) != tier(b)) return tier(a) > tier(b);
                             if (a.score != b.score) return a.score > b.score;
                             return a.figures.violation < b.figures.violation;
                           });
  if (std::ranges::none_of(result.options, [](const MitigationOption& o) {
        return o.figures.meets_profile && o.figures.meets_design_guide && o.solved;
      })) {
    result.notes.push_back(
        "No single option removes every finding: combine the best ones in one "
        "plant file (each option file shows its change) and study it.");
  }
  if (std::ranges::any_of(result.options,
                          [](const MitigationOption& o) { return o.kind == "capacitor-steps"; })) {
    result.notes.push_back(
        "Fewer capacitor steps in service lower the power factor: check the "
        "utility's power-factor requirement before choosing a step option.");
  }
  return result;
}

void WriteMitigationPlantFiles(const MitigationResult& result, const std::string& dir) {
  if (result.options.empty()) return;
  fs::create_directories(dir);
  for (const MitigationOption& o : result.options) {
    WriteFileAtomically((fs::path(dir) / o.plant_file).string(),
                        [&](std::ostream& out) { out << o.plant_text; });
  }
}

}  // namespace overtone
