// src/output_table.cc — terminal tables of a study: buses, drive groups, pcc, notes.
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>

#include "assessment.h"
#include "capacitor_duty.h"
#include "output_common.h"
#include "overtone/report.h"

namespace overtone {
namespace {

std::size_t Widest(std::size_t minimum, const auto& rows, const auto& name) {
  std::size_t w = minimum;
  for (const auto& r : rows) w = std::max(w, name(r).size());
  return w;
}

// Which IEEE 18 figures exceed their limits, e.g. "FAIL Vpeak, Irms".
std::string DutyVerdict(const CapacitorDuty& c) {
  if (c.pass) return "pass";
  std::string text = "FAIL";
  const auto flag = [&](bool over, const char* what) {
    if (over) text += (text.size() == 4 ? " " : ", ") + std::string(what);
  };
  flag(c.vrms_percent > internal::kCapVrmsLimit, "Vrms");
  flag(c.vpeak_percent > internal::kCapVpeakLimit, "Vpeak");
  flag(c.irms_percent > internal::kCapIrmsLimit, "Irms");
  flag(c.kvar_percent > internal::kCapKvarLimit, "kvar");
  return text;
}

void PrintDutyAndResonances(const StudyResult& r, std::ostream& out, bool colour) {
  if (!r.capacitors.empty()) {
    const std::size_t w = Widest(
        4, r.capacitors, [](const CapacitorDuty& c) -> const std::string& { return c.name; });
    const std::size_t bw =
        Widest(3, r.capacitors, [](const CapacitorDuty& c) -> const std::string& { return c.bus; });
    fmt::print(out,
               "\nCapacitor duty (IEEE 18, % of the steps in service; limits Vrms {}, Vpeak {}, "
               "Irms {}, kvar {})\n{:<{}}  {:<{}}  {:>6}  {:>6}  {:>7}  {:>7}  {:>6}  {:>6}  {}\n",
               internal::kCapVrmsLimit, internal::kCapVpeakLimit, internal::kCapIrmsLimit,
               internal::kCapKvarLimit, "name", w, "bus", bw, "steps", "Vrms", "Vpeak", "(arith)",
               "Irms", "kvar", "result");
    for (const CapacitorDuty& c : r.capacitors) {
      const std::string steps =
          c.kind == "filter" ? "filter" : fmt::format("{}/{}", c.steps_on, c.steps);
      fmt::print(
          out, "{:<{}}  {:<{}}  {:>6}  {:>6.1f}  {:>7.1f}  {:>7.1f}  {:>6.1f}  {:>6.1f}  {}\n",
          c.name, w, c.bus, bw, steps, c.vrms_percent, c.vpeak_percent, c.vpeak_arith_percent,
          c.irms_percent, c.kvar_percent,
          c.pass ? DutyVerdict(c) : internal::Marked(DutyVerdict(c), internal::Tone::kBad, colour));
    }
  }
  if (!r.transformers.empty()) {
    const std::size_t w =
        Widest(4, r.transformers,
               [](const TransformerDerating& t) -> const std::string& { return t.name; });
    fmt::print(out, "\nTransformers (IEEE C57.110)\n{:<{}}  {:>6}  {:>8}  {:>9}  {:>6}\n", "name",
               w, "F_HL", "K-factor", "derated %", "load %");
    for (const TransformerDerating& t : r.transformers) {
      fmt::print(out, "{:<{}}  {:>6.2f}  {:>8.2f}  {:>9.1f}  {:>6.1f}\n", t.name, w,
                 t.harmonic_loss_factor, t.k_factor, t.derated_percent, t.load_percent);
    }
  }
  if (!r.resonances.empty()) {
    const std::size_t w =
        Widest(3, r.resonances, [](const Resonance& x) -> const std::string& { return x.bus; });
    fmt::print(out, "\nResonances (present steps: {})\n{:<{}}  {:>6}  {:>9}  {:>13}  {:>4}  {}\n",
               r.resonances.front().configuration, "bus", w, "order", "|Z| ohm", "amplification",
               "near", "risk");
    for (const Resonance& x : r.resonances) {
      const ResonancePeak& p = x.peak;
      fmt::print(out, "{:<{}}  {:>6.2f}  {:>9.4g}  {:>13.1f}  {:>4}  {}\n", x.bus, w, p.order,
                 p.impedance_ohm, p.amplification,
                 p.near_order > 0 ? std::to_string(p.near_order) : "-", ToString(p.risk));
    }
  }
}

}  // namespace

bool WantColour(bool no_color) {
  return !no_color && std::getenv("NO_COLOR") == nullptr && isatty(fileno(stdout));
}

void PrintStudyTables(const StudyResult& r, std::ostream& out, bool colour) {
  fmt::print(out, "Study: {}  ({} Hz, orders 2..{}, {} summation)\n\n", r.study.name,
             r.study.frequency_hz, r.study.max_order, ToString(r.study.summation));

  const std::size_t bw =
      Widest(3, r.buses, [](const BusResult& b) -> const std::string& { return b.name; });
  fmt::print(out, "Buses\n{:<{}}  {:>7}  {:>7}  {:>7}  {}\n", "bus", bw, "kV", "V1 pu", "THDv %",
             "largest orders (% of V1)");
  for (const BusResult& b : r.buses) {
    fmt::print(out, "{:<{}}  {:>7.3f}  {:>7.4f}  {:>7.2f}  {}\n", b.name, bw, b.nominal_v / 1e3,
               b.indices.fundamental, b.indices.thd_percent,
               internal::LargestOrders(b.voltage_pu, b.indices.fundamental));
  }

  if (!r.drives.empty()) {
    const std::size_t dw =
        Widest(5, r.drives, [](const DriveResult& d) -> const std::string& { return d.name; });
    const std::size_t dbw =
        Widest(3, r.drives, [](const DriveResult& d) -> const std::string& { return d.bus; });
    fmt::print(out, "\nDrive groups\n{:<{}}  {:<{}}  {:>5}  {:<15}  {:>9}  {:>7}\n", "group", dw,
               "bus", dbw, "count", "front end", "I1 A", "THDi %");
    for (const DriveResult& d : r.drives) {
      fmt::print(out, "{:<{}}  {:<{}}  {:>5}  {:<15}  {:>9.1f}  {:>7.2f}\n", d.name, dw, d.bus, dbw,
                 d.count, ToString(d.front_end), d.indices.fundamental, d.indices.thd_percent);
    }
  }

  const PccResult& p = r.pcc;
  fmt::print(out, "\nPoint of common coupling: {}  I_sc = {:.0f} A", p.bus, p.isc_a);
  if (p.demand_current_a) {
    fmt::print(out, "  I_L = {:.1f} A{}  I_sc/I_L = {:.1f}  TDD = {:.2f} %", *p.demand_current_a,
               p.demand_current_is_default ? " (default)" : "", p.isc_a / *p.demand_current_a,
               p.tdd_percent.value_or(0.0));
  }
  fmt::print(out, "\n");
  PrintDutyAndResonances(r, out, colour);
  internal::PrintLimitTables(r, out, colour);

  if (!r.warnings.empty()) {
    fmt::print(out, "\nWarnings\n");
    for (const std::string& w : r.warnings) fmt::print(out, "- {}\n", w);
  }
  fmt::print(out, "\nCautions\n");
  for (const std::string& c : r.cautions) fmt::print(out, "- {}\n", c);
}

}  // namespace overtone

namespace overtone {

void PrintPlantSummary(const Plant& p, std::ostream& out) {
  fmt::print(out, "Plant: {}  ({})\n", p.study.name, p.source_file);
  fmt::print(out, "  {} buses, {} supplies, {} generators, {} transformers, {} cables\n",
             p.buses.size(), p.supplies.size(), p.generators.size(), p.transformers.size(),
             p.cables.size());
  fmt::print(out, "  {} capacitor banks, {} filters, {} motor groups, {} load groups\n",
             p.capacitors.size(), p.filters.size(), p.motors.size(), p.loads.size());
  std::vector<std::pair<FrontEnd, std::pair<int, double>>> by_front_end;  // units, kW at loading
  int units = 0;
  double kw = 0.0;
  for (const Drive& d : p.drives) {
    auto it = std::find_if(by_front_end.begin(), by_front_end.end(),
                           [&](const auto& e) { return e.first == d.front_end; });
    if (it == by_front_end.end())
      it = by_front_end.insert(by_front_end.end(), {d.front_end, {0, 0.0}});
    it->second.first += d.count;
    it->second.second += d.count * d.power_w * d.loading / 1e3;
    units += d.count;
    kw += d.count * d.power_w * d.loading / 1e3;
  }
  fmt::print(out, "  {} drive groups, {} units, {:.0f} kW at their loading\n", p.drives.size(),
             units, kw);
  for (const auto& [front_end, totals] : by_front_end) {
    fmt::print(out, "    {:<16} {:>6} units  {:>10.0f} kW\n", ToString(front_end), totals.first,
               totals.second);
  }
  fmt::print(out, "  study: {} Hz, orders up to {}, limits {}, {} summation\n",
             p.study.frequency_hz, p.study.max_order, p.study.limits, ToString(p.study.summation));
}

}  // namespace overtone
