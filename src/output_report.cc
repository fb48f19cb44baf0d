// src/output_report.cc — `overtone report`: report.md and a self-contained report.html (inline
// SVG charts), with each chart and the study's CSV tables beside them (docs/report.md).
//
// The report is a list of sections (kSections below), each a function of the report's inputs;
// a new section is one more function and one more entry in that list.
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <set>

#include "assessment.h"
#include "output_common.h"
#include "output_mitigation.h"
#include "overtone/report.h"

namespace overtone {
namespace {

using internal::BarChartData;
using internal::BarChartSvg;
using internal::XmlEscape;
using Section = internal::ReportSection;
using Table = internal::ReportTable;

// A section, or nothing when it has nothing to show (e.g. no base case to compare with).
using SectionWriter = std::optional<Section> (*)(const ReportInputs&);

std::string F(double v, int digits = 2) { return fmt::format("{:.{}f}", v, digits); }
std::string F(const std::optional<double>& v, int digits = 2) { return v ? F(*v, digits) : "-"; }

std::optional<Section> Summary(const ReportInputs& in) {
  const StudyResult& r = in.result;
  const Assessment& a = r.assessment;
  Section s{"Summary", {}, {}, {}};
  s.paragraphs.push_back(fmt::format(
      "Plant file `{}`; {} Hz, orders 2 to {}; {} summation; limits: {} (`{}`); point of common "
      "coupling: {}.",
      in.plant->source_file, r.study.frequency_hz, r.study.max_order, ToString(r.study.summation),
      a.title, a.profile, r.pcc.bus));
  s.paragraphs.push_back(
      a.violations.empty()
          ? "Result: no limit violations."
          : fmt::format("Result: {} limit violation(s); see \"Violations\".", a.violations.size()));
  if (in.comparison) {
    const Comparison& c = *in.comparison;
    s.paragraphs.push_back(
        fmt::format("Against the base case `{}`: {} new violation(s), {} cleared; see \"Comparison "
                    "with the base case\".",
                    c.base_file, c.new_violations.size(), c.cleared_violations.size()));
  }
  s.paragraphs.push_back("Cautions: " + fmt::format("{}", fmt::join(r.cautions, " ")));
  return s;
}

std::optional<Section> Inputs(const ReportInputs& in) {
  const Plant& p = *in.plant;
  Section s{"Inputs", {}, {}, {}};
  Table sup{{"supply", "bus", "short circuit MVA", "X/R", "background"}, {}};
  for (const Supply& x : p.supplies) {
    std::string bg;
    for (const HarmonicEntry& e : x.background)
      bg += fmt::format("{}{}: {} %", bg.empty() ? "" : ", ", e.order, e.percent);
    sup.rows.push_back({x.name, x.bus, F(x.short_circuit_va / 1e6, 1), F(x.x_over_r, 1),
                        bg.empty() ? "none" : bg});
  }
  Table tx{{"transformer", "from", "to", "kVA", "Z %", "connection"}, {}};
  for (const Transformer& t : p.transformers) {
    tx.rows.push_back(
        {t.name, t.from, t.to, F(t.rating_va / 1e3, 0), F(100 * t.impedance), t.connection.code});
  }
  Table cap{{"capacitor bank", "bus", "kvar", "steps on", "detuning"}, {}};
  for (const Capacitor& c : p.capacitors) {
    cap.rows.push_back({c.name, c.bus, F(c.rating_var / 1e3, 0),
                        fmt::format("{}/{}", c.steps_on, c.steps),
                        c.detuning > 0 ? F(100 * c.detuning, 1) + " %" : "none"});
  }
  Table dr{{"drive group", "bus", "units", "kW each", "front end"}, {}};
  for (const Drive& d : p.drives) {
    dr.rows.push_back({d.name, d.bus, std::to_string(d.count),
                       fmt::format("{:.3g}", d.power_w / 1e3), ToString(d.front_end)});
  }
  for (Table* t : {&sup, &tx, &cap, &dr}) {
    if (!t->rows.empty()) s.tables.push_back(std::move(*t));
  }
  return s;
}

std::optional<Section> BusDistortion(const ReportInputs& in) {
  const StudyResult& r = in.result;
  Section s{"Bus voltage distortion", {}, {}, {}};
  s.paragraphs.push_back(r.assessment.profile == "ieee519"
                             ? "IEEE 519 applies at the point of common coupling; other buses are "
                               "compared with the same "
                               "table as a design guide only."
                             : "The profile's levels apply at every bus.");
  Table t{{"bus", "kV", "V1 pu", "THDv %", "limit %", "order nearest its limit", "V_h %", "limit %",
           "result"},
          {}};
  BarChartData chart{"thdv", "THDv per bus against its limit", "THDv %", {}, {}, {}};
  for (const BusResult& b : r.buses) {
    const BusLimitCheck* c = internal::FindBusCheck(r.assessment, b.name);
    t.rows.push_back({b.name, F(b.nominal_v / 1e3, 3), F(b.indices.fundamental, 4),
                      F(b.indices.thd_percent), c ? F(c->thd_limit_percent) : "-",
                      c ? std::to_string(c->worst_order) : "-", c ? F(c->worst_percent) : "-",
                      c ? F(c->worst_limit_percent) : "-", internal::BusVerdict(c)});
    chart.labels.push_back(b.name);
    chart.values.push_back(b.indices.thd_percent);
    chart.limits.push_back(c ? std::optional<double>(c->thd_limit_percent) : std::nullopt);
  }
  s.tables.push_back(std::move(t));
  s.charts.push_back({BarChartSvg(chart), "thdv.svg"});
  return s;
}

std::optional<Section> PccCurrent(const ReportInputs& in) {
  const PccResult& p = in.result.pcc;
  Section s{"Current at the point of common coupling", {}, {}, {}};
  if (!p.demand_current_a) {
    s.paragraphs.push_back("No demand current: TDD and the current limits are not assessed.");
    return s;
  }
  s.paragraphs.push_back(fmt::format(
      "Bus {}: I_sc = {:.0f} A, I_L = {:.1f} A, I_sc/I_L = {:.1f}, TDD = {:.2f} %{}.", p.bus,
      p.isc_a, *p.demand_current_a, p.isc_a / *p.demand_current_a, p.tdd_percent.value_or(0.0),
      p.tdd_limit_percent ? fmt::format(" (limit {:.2f} %)", *p.tdd_limit_percent) : ""));
  if (p.demand_current_is_default) {
    s.paragraphs.push_back(
        "I_L is the default (the sum of the rated currents of the transformers fed "
        "from the pcc), not the average maximum demand current: it overstates I_L "
        "and so understates TDD and every percentage of I_L.");
  }
  Table t{{"order", "A", "% of I_L", "limit %", "result"}, {}};
  BarChartData chart{"pcc", "Current at the pcc by order against its limits", "% of I_L", {}, {},
                     {}};
  for (const PccHarmonic& h : p.harmonics) {
    chart.labels.push_back(std::to_string(h.order));
    chart.values.push_back(h.percent_of_il);
    chart.limits.push_back(h.limit_percent);
    if (h.amps < 1e-6) continue;
    t.rows.push_back({std::to_string(h.order), F(h.amps), F(h.percent_of_il), F(h.limit_percent),
                      !h.pass   ? "-"
                      : *h.pass ? "pass"
                                : "FAIL"});
  }
  s.tables.push_back(std::move(t));
  s.charts.push_back({BarChartSvg(chart), "pcc_current.svg"});
  return s;
}

Table ViolationTable(const std::vector<Violation>& list, const std::string& caption = "") {
  Table t{{"where", "what", "value %", "limit %"}, {}, caption};
  for (const Violation& v : list) t.rows.push_back({v.where, v.what, F(v.value), F(v.limit)});
  return t;
}

std::optional<Section> Violations(const ReportInputs& in) {
  const Assessment& a = in.result.assessment;
  Section s{"Violations", {}, {}, {}};
  if (a.violations.empty())
    s.paragraphs.push_back("None.");
  else
    s.tables.push_back(ViolationTable(a.violations));
  if (!a.design_guide.empty()) {
    s.tables.push_back(
        ViolationTable(a.design_guide, "Design guide (internal buses; not violations)"));
  }
  return s;
}

// Materially different (docs/summation.md): by more than 0.5 percentage point or more than 10 %
// of the chosen rule's value; differences under 0.05 point (below the report's precision) never.
bool DiffersMaterially(double chosen, double other) {
  const double d = std::abs(other - chosen);
  return d >= 0.05 && (d > 0.5 || d > 0.1 * std::abs(chosen));
}

std::optional<Section> SummationRules(const ReportInputs& in) {
  if (in.other_summations.empty()) return std::nullopt;
  const StudyResult& r = in.result;
  std::vector<const StudyResult*> cases = {&r};  // the chosen rule first, then the other two
  for (const StudyResult& x : in.other_summations) cases.push_back(&x);
  Section s{"Summation rules compared", {}, {}, {}};
  s.paragraphs.push_back(fmt::format(
      "The study uses {} summation (docs/summation.md). The other rules are shown where they "
      "differ "
      "materially from it: by more than 0.5 percentage point, or by more than 10 % of the chosen "
      "rule's value (differences under 0.05 point never count).",
      ToString(r.study.summation)));
  std::vector<std::string> header = {"where", "figure"};
  for (const StudyResult* c : cases) {
    header.push_back(ToString(c->study.summation) + (c == &r ? " (chosen) %" : " %"));
  }
  header.push_back("differs materially");
  Table t{header, {}};
  const auto add_row = [&](const std::string& where, const std::string& figure,
                           const auto& value_of) {
    std::vector<std::optional<double>> values;
    std::string material;  // the rules that differ materially from the chosen one
    for (const StudyResult* c : cases) values.push_back(value_of(*c));
    for (std::size_t k = 1; k < values.size(); ++k) {
      if (values[0] && values[k] && DiffersMaterially(*values[0], *values[k])) {
        material += (material.empty() ? "" : ", ") + ToString(cases[k]->study.summation);
      }
    }
    if (material.empty()) return;
    std::vector<std::string> row = {where, figure};
    for (const auto& v : values) row.push_back(F(v));
    row.push_back(material);
    t.rows.push_back(std::move(row));
  };
  for (std::size_t b = 0; b < r.buses.size(); ++b) {
    add_row(r.buses[b].name, "THDv", [&](const StudyResult& c) {
      return std::optional<double>(c.buses[b].indices.thd_percent);
    });
  }
  add_row(r.pcc.bus, "TDD", [](const StudyResult& c) { return c.pcc.tdd_percent; });
  if (t.rows.empty()) {
    s.paragraphs.push_back(
        "The other two rules agree with the chosen one at every bus and for TDD.");
  } else {
    s.tables.push_back(std::move(t));
  }
  std::string counts;
  for (const StudyResult* c : cases) {
    counts += fmt::format("{}{}: {}", counts.empty() ? "" : "; ", ToString(c->study.summation),
                          c->assessment.violations.size());
  }
  s.paragraphs.push_back("Limit violations under each rule: " + counts + ".");
  return s;
}

std::optional<Section> DriveGroups(const ReportInputs& in) {
  const StudyResult& r = in.result;
  if (r.drives.empty()) return std::nullopt;
  Section s{"Drive groups", {}, {}, {}};
  s.paragraphs.push_back(
      "Each group's own current (all its units together), before it combines with "
      "the other sources; the charts show its spectrum in percent of its fundamental.");
  Table t{
      {"drive group", "bus", "units", "front end", "I1 A", "THDi %", "largest orders (% of I1)"},
      {}};
  std::set<std::string> files;
  for (std::size_t k = 0; k < r.drives.size(); ++k) {
    const DriveResult& d = r.drives[k];
    t.rows.push_back({d.name, d.bus, std::to_string(d.count), ToString(d.front_end),
                      F(d.indices.fundamental, 1), F(d.indices.thd_percent),
                      internal::LargestOrders(d.current_a, d.indices.fundamental, ", ")});
    // Orders 2 to the last one at 0.1 % or more: the tail of a spectrum would only be empty bars.
    BarChartData chart{fmt::format("drive{}", k),
                       fmt::format("Drive group {} at {}: current by order", d.name, d.bus),
                       "% of I1",
                       {},
                       {},
                       {}};
    int last = 2;
    for (std::size_t h = 2; h < d.current_a.by_order.size(); ++h) {
      if (100.0 * std::abs(d.current_a.by_order[h]) >= 0.1 * d.indices.fundamental)
        last = static_cast<int>(h);
    }
    for (int h = 2; h <= last; ++h) {
      chart.labels.push_back(std::to_string(h));
      chart.values.push_back(d.indices.fundamental > 0.0
                                 ? 100.0 * std::abs(d.current_a.at(h)) / d.indices.fundamental
                                 : 0.0);
    }
    std::string file = "drive_" + internal::FileSafe(d.name) + ".svg";
    for (int n = 2; files.count(file); ++n)
      file = fmt::format("drive_{}_{}.svg", internal::FileSafe(d.name), n);
    files.insert(file);
    s.charts.push_back({BarChartSvg(chart), file});
  }
  s.tables.insert(s.tables.begin(), std::move(t));
  return s;
}

std::optional<Section> CapacitorsAndTransformers(const ReportInputs& in) {
  const StudyResult& r = in.result;
  if (r.capacitors.empty() && r.transformers.empty()) return std::nullopt;
  Section s{"Capacitor duty and transformer derating", {}, {}, {}};
  Table c{{"capacitor", "bus", "Vrms %", "Vpeak %", "Irms %", "kvar %", "IEEE 18"},
          {},
          "Capacitor duty, percent of the rating of the steps in service (IEEE Std 18)"};
  for (const CapacitorDuty& x : r.capacitors) {
    c.rows.push_back({x.name, x.bus, F(x.vrms_percent, 1), F(x.vpeak_percent, 1),
                      F(x.irms_percent, 1), F(x.kvar_percent, 1), x.pass ? "pass" : "FAIL"});
  }
  Table t{{"transformer", "F_HL", "K-factor", "derated %", "load %"},
          {},
          "Transformer derating (IEEE Std C57.110)"};
  for (const TransformerDerating& x : r.transformers) {
    t.rows.push_back({x.name, F(x.harmonic_loss_factor), F(x.k_factor), F(x.derated_percent, 1),
                      F(x.load_percent, 1)});
  }
  for (Table* x : {&c, &t}) {
    if (!x->rows.empty()) s.tables.push_back(std::move(*x));
  }
  return s;
}

std::optional<Section> Resonances(const ReportInputs& in) {
  const StudyResult& r = in.result;
  Section s{"Resonances", {}, {}, {}};
  Table z{{"bus", "configuration", "order", "|Z| ohm", "amplification", "near", "risk"}, {}};
  for (const Resonance& x : r.resonances) {
    z.rows.push_back({x.bus, x.configuration, F(x.peak.order),
                      fmt::format("{:.4g}", x.peak.impedance_ohm), F(x.peak.amplification, 1),
                      x.peak.near_order > 0 ? std::to_string(x.peak.near_order) : "-",
                      ToString(x.peak.risk)});
  }
  if (z.rows.empty())
    s.paragraphs.push_back("No impedance peak with the present capacitor steps.");
  else
    s.tables.push_back(std::move(z));
  if (in.scans.empty()) return s;
  s.paragraphs.push_back(
      "Impedance scans at the pcc and at every capacitor or filter bus: the present "
      "capacitor steps, the worst step configuration and the network without "
      "capacitors and filters; the characteristic orders 5, 7, 11, 13, ... are marked "
      "(docs/resonance.md).");
  std::set<std::string> files;
  for (const std::string& bus : in.scans.front().buses) {
    std::string svg = internal::ScanChartSvg(in.scans, bus);
    if (svg.empty()) continue;
    std::string file = internal::ScanChartFileName(bus);
    for (int n = 2; files.count(file); ++n)
      file = fmt::format("scan_{}_{}.svg", internal::FileSafe(bus), n);
    files.insert(file);
    s.charts.push_back({std::move(svg), file});
  }
  return s;
}

std::optional<Section> ComparisonWithBase(const ReportInputs& in) {
  if (!in.comparison) return std::nullopt;
  const Comparison& c = *in.comparison;
  Section s{"Comparison with the base case", {}, {}, {}};
  s.paragraphs.push_back(
      fmt::format("Base case: {} (`{}`). This report's case: {} (`{}`). Buses are "
                  "matched by name (docs/compare.md).",
                  c.base_name, c.base_file, c.proposed_name, c.proposed_file));
  Table b{
      {"bus", "THDv base %", "THDv proposed %", "change", "result base", "result proposed", "note"},
      {},
      "Bus voltage distortion"};
  for (const BusChange& x : c.buses) {
    b.rows.push_back(
        {x.name, x.base ? F(x.base->thd_v_percent) : "-",
         x.proposed ? F(x.proposed->thd_v_percent) : "-",
         x.base && x.proposed
             ? fmt::format("{:+.2f}", x.proposed->thd_v_percent - x.base->thd_v_percent)
             : "-",
         x.base ? x.base->result : "-", x.proposed ? x.proposed->result : "-", x.Note()});
  }
  s.tables.push_back(std::move(b));
  const PccFigures &pb = c.pcc_base, &pp = c.pcc_proposed;
  s.tables.push_back(Table{
      {"pcc", "TDD base %", "TDD proposed %", "limit base %", "limit proposed %", "note"},
      {{pb.bus == pp.bus ? pb.bus : pb.bus + " / " + pp.bus, F(pb.tdd_percent), F(pp.tdd_percent),
        F(pb.tdd_limit_percent), F(pp.tdd_limit_percent), TddNote(pb, pp)}}});
  const auto count = [](std::size_t n) { return n == 0 ? std::string("none") : std::to_string(n); };
  s.paragraphs.push_back(
      fmt::format("New violations: {}; cleared violations: {}; resonance shifts "
                  "(present capacitor steps): {}.",
                  count(c.new_violations.size()), count(c.cleared_violations.size()),
                  count(c.resonance_shifts.size())));
  if (!c.new_violations.empty())
    s.tables.push_back(ViolationTable(c.new_violations, "New violations"));
  if (!c.cleared_violations.empty())
    s.tables.push_back(ViolationTable(c.cleared_violations, "Cleared violations"));
  if (!c.remaining_violations.empty()) {
    Table v{{"where", "what", "base %", "proposed %", "limit %"}, {}, "Violations in both cases"};
    for (const ViolationChange& x : c.remaining_violations) {
      v.rows.push_back({x.where, x.what, F(x.value_base), F(x.value_proposed), F(x.limit)});
    }
    s.tables.push_back(std::move(v));
  }
  if (!c.resonance_shifts.empty()) {
    Table z{{"bus", "change", "order base", "order proposed", "risk base", "risk proposed",
             "nearest 6k±1"},
            {},
            "Resonance shifts (present capacitor steps)"};
    for (const ResonanceShift& x : c.resonance_shifts) {
      z.rows.push_back(
          {x.bus, x.change, x.base ? F(x.base->order) : "-",
           x.proposed ? F(x.proposed->order) : "-", x.base ? ToString(x.base->risk) : "-",
           x.proposed ? ToString(x.proposed->risk) : "-",
           fmt::format("{}{}", x.characteristic_order, x.near_characteristic ? " (near)" : "")});
    }
    s.tables.push_back(std::move(z));
  }
  for (const std::string& n : c.notes) s.paragraphs.push_back("Note: " + n + ".");
  return s;
}

std::optional<Section> Method(const ReportInputs& in) {
  const StudyResult& r = in.result;
  Section s{"Method and references", {}, {}, {}};
  s.paragraphs = {
      "Fundamental load flow, drive spectra (computed bridge model or tables), one nodal solve per "
      "harmonic order; " +
          ToString(r.study.summation) + " summation of the sources (docs/summation.md).",
      "Limits: " + r.assessment.title +
          " (docs/limits.md). IEEE Std 519-2014 (harmonic control), "
          "IEC 61000-2-4 (compatibility levels in industrial plants), IEC TR 61000-3-6 (summation "
          "law), "
          "IEEE Std 18 (shunt capacitors), IEEE Std C57.110 (transformer derating).",
      "Short-time statistics (3 s and 10 min values) are out of scope: one steady operating point "
      "is "
      "compared with the tables."};
  for (const std::string& w : r.warnings) s.paragraphs.push_back("Warning: " + w);
  return s;
}

// The report's sections, in order. A new section is one function above and one entry here.
// The ranked mitigation options, with `--mitigate` (src/output_mitigation.cc, docs/mitigate.md).
std::optional<Section> MitigationOptions(const ReportInputs& in) {
  if (!in.mitigation) return std::nullopt;
  return internal::MitigationSection(*in.mitigation);
}

constexpr SectionWriter kSections[] = {Summary,        Inputs,      BusDistortion,
                                       PccCurrent,     Violations,  ComparisonWithBase,
                                       SummationRules, DriveGroups, CapacitorsAndTransformers,
                                       Resonances,     MitigationOptions,
                                       Method};

std::string Markdown(const std::string& title, const std::vector<Section>& sections) {
  const auto cell = [](const std::string& x) {
    std::string out;
    for (char c : x) out += c == '|' ? std::string("\\|") : std::string(1, c);
    return out;
  };
  std::string md = "# " + title + "\n";
  for (const Section& s : sections) {
    md += "\n## " + s.title + "\n\n";
    for (const std::string& p : s.paragraphs) md += p + "\n\n";
    for (const Table& t : s.tables) {
      if (!t.caption.empty()) md += "**" + t.caption + "**\n\n";
      md += "|";
      for (const auto& h : t.header) md += fmt::format(" {} |", cell(h));
      md += "\n|";
      for (std::size_t i = 0; i < t.header.size(); ++i) md += "---|";
      md += "\n";
      for (const auto& row : t.rows) {
        md += "|";
        for (const auto& x : row) md += fmt::format(" {} |", cell(x));
        md += "\n";
      }
      md += "\n";
    }
    for (const internal::ReportChart& c : s.charts) md += "![" + s.title + "](" + c.file + ")\n\n";
  }
  return md;
}

// Our house style: a dark rule under the title, compact tables with zebra rows, verdict words
// in bold; charts keep their own black-and-white-safe marks. Prints on A4 and Letter.
constexpr const char* kStyle =
    "body{font-family:'Helvetica Neue',Helvetica,Arial,sans-serif;max-width:62rem;margin:2rem auto;"
    "padding:0 1rem;color:#1a1a1a;line-height:1.4}"
    "h1{font-size:1.6rem;border-bottom:4px solid #1a1a1a;padding-bottom:.3rem}"
    "h2{font-size:1.2rem;border-bottom:1px solid #1a1a1a;margin-top:2rem;break-after:avoid}"
    ".caption{font-weight:bold;margin:.8rem 0 .2rem;break-after:avoid}"
    "table{border-collapse:collapse;margin:.4rem 0 1rem;font-size:.85rem}"
    "th,td{border:1px solid #888;padding:2px 6px;text-align:left;vertical-align:top}"
    "th{background:#e4e4e4}tr:nth-child(even) td{background:#f6f6f6}"
    "td.bad{font-weight:bold}figure{margin:.5rem 0 1.5rem;break-inside:avoid}"
    "svg{max-width:100%;height:auto}"
    "@media print{body{margin:0;max-width:none;font-size:10pt}tr{break-inside:avoid}"
    "h2{break-before:auto}}";

// Cells that carry a failing verdict are bold, so they stand out in black and white too.
bool IsBadWord(const std::string& x) {
  return x == "FAIL" || x == "now FAIL" || x == "worse" || x.rfind("over", 0) == 0;
}

// `file names` of the Markdown text as <code> in the HTML.
std::string CodeSpans(const std::string& text) {
  std::string out;
  bool open = false;
  for (char c : text) {
    if (c == '`')
      out += (open = !open) ? "<code>" : "</code>";
    else
      out += c;
  }
  return open ? text : out;  // an unpaired backtick: leave the text as it is
}

std::string Html(const std::string& title, const std::vector<Section>& sections) {
  std::string h = "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>" +
                  XmlEscape(title) + "</title>\n<style>" + kStyle + "</style></head><body>\n";
  h += "<h1>" + XmlEscape(title) + "</h1>\n";
  for (const Section& s : sections) {
    h += "<section>\n<h2>" + XmlEscape(s.title) + "</h2>\n";
    for (const std::string& p : s.paragraphs) h += "<p>" + CodeSpans(XmlEscape(p)) + "</p>\n";
    for (const Table& t : s.tables) {
      if (!t.caption.empty()) h += "<p class=\"caption\">" + XmlEscape(t.caption) + "</p>\n";
      h += "<table><thead><tr>";  // a thead repeats on every printed page the table spans
      for (const auto& x : t.header) h += "<th>" + XmlEscape(x) + "</th>";
      h += "</tr></thead><tbody>\n";
      for (const auto& row : t.rows) {
        h += "<tr>";
        for (const auto& x : row)
          h += (IsBadWord(x) ? "<td class=\"bad\">" : "<td>") + XmlEscape(x) + "</td>";
        h += "</tr>\n";
      }
      h += "</tbody></table>\n";
    }
    for (const internal::ReportChart& c : s.charts) h += "<figure>\n" + c.svg + "</figure>\n";
    h += "</section>\n";
  }
  return h + "</body></html>\n";
}

}  // namespace

ReportInputs PrepareReport(const Plant& plant, const StudyOptions& options, const Plant* base) {
  ReportInputs in;
  in.plant = &plant;
  in.result = RunStudy(plant, options);
  StudyOptions quiet = options;
  quiet.scan = false;  // the other rules only change magnitudes, not the network
  for (Summation rule : {Summation::kVector, Summation::kArithmetic, Summation::kIec}) {
    if (rule == plant.study.summation) continue;
    Plant other = plant;
    other.study.summation = rule;
    in.other_summations.push_back(RunStudy(other, quiet));
  }
  ScanOptions scan;
  scan.to_order = std::max(2, plant.study.max_order);
  scan.threads = options.threads;
  in.scans.push_back(RunScan(plant, scan));
  if (base) {
    const StudyResult b = RunStudy(*base, options);
    in.comparison = CompareStudies(b, base->source_file, in.result, plant.source_file);
  }
  return in;
}

void WriteReport(const ReportInputs& in, const std::string& dir) {
  std::vector<Section> sections;
  for (SectionWriter write : kSections) {
    if (std::optional<Section> s = write(in)) sections.push_back(std::move(*s));
  }
  const std::string title = "Harmonic study: " + in.result.study.name;
  const std::string md = Markdown(title, sections), html = Html(title, sections);
  WriteStudyCsv(in.result, dir);  // creates the directory
  const std::filesystem::path d(dir);
  for (const Section& s : sections) {
    for (const internal::ReportChart& c : s.charts) {
      WriteFileAtomically((d / c.file).string(), [&](std::ostream& o) { o << c.svg; });
    }
  }
  WriteFileAtomically((d / "report.md").string(), [&](std::ostream& o) { o << md; });
  WriteFileAtomically((d / "report.html").string(), [&](std::ostream& o) { o << html; });
}

}  // namespace overtone
