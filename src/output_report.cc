// src/output_report.cc — `overtone report`: report.md and a self-contained report.html (inline
// SVG charts), with the study's CSV tables beside them.
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <sstream>

#include <fmt/format.h>

#include "assessment.h"
#include "output_common.h"
#include "overtone/report.h"

namespace overtone {
namespace {

using internal::XmlEscape;

// A table rendered to both Markdown and HTML.
struct Table {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
};

// A titled part of the report: paragraphs, then tables, then an optional chart (SVG text).
struct Section {
  std::string title;
  std::vector<std::string> paragraphs;
  std::vector<Table> tables;
  std::string svg;
  std::string svg_file;  // the chart's file beside report.md
};

std::string F(double v, int digits = 2) { return fmt::format("{:.{}f}", v, digits); }

// Vertical bars with an optional limit marker per bar (a short black line above the bar's slot).
// Black and white readable: bars over their limit are dark and hatched, and say "over" in text.
std::string BarChart(const std::string& title, const std::string& unit, const std::vector<std::string>& labels,
                     const std::vector<double>& values, const std::vector<std::optional<double>>& limits) {
  const double width = 760, left = 60, right = 740, top = 40, bottom = 260;
  double top_value = 1e-9;
  for (std::size_t i = 0; i < values.size(); ++i) {
    top_value = std::max({top_value, values[i], limits[i].value_or(0.0)});
  }
  top_value *= 1.15;
  const double slot = (right - left) / std::max<std::size_t>(1, values.size());
  const auto y = [&](double v) { return bottom - (bottom - top) * v / top_value; };
  std::string s = fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"340\" viewBox=\"0 0 {0} 340\" "
      "font-family=\"sans-serif\" font-size=\"11\" role=\"img\" aria-label=\"{1}\">\n"
      "<defs><pattern id=\"over\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
      "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#D55E00\"/>"
      "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#000\" stroke-width=\"2\"/></pattern></defs>\n"
      "<text x=\"{2}\" y=\"20\" font-size=\"14\" font-weight=\"bold\">{1}</text>\n"
      "<line x1=\"{2}\" y1=\"{3}\" x2=\"{2}\" y2=\"{4}\" stroke=\"#000\"/>\n"
      "<line x1=\"{2}\" y1=\"{4}\" x2=\"{5}\" y2=\"{4}\" stroke=\"#000\"/>\n",
      width, XmlEscape(title), left, top, bottom, right);
  for (int k = 0; k <= 4; ++k) {
    const double v = top_value * k / 4;
    s += fmt::format("<text x=\"{}\" y=\"{:.1f}\" text-anchor=\"end\">{:.3g}</text>\n", left - 4, y(v) + 4, v);
  }
  s += fmt::format("<text x=\"14\" y=\"{}\" transform=\"rotate(-90 14 {})\" text-anchor=\"middle\">{}</text>\n",
                   (top + bottom) / 2, (top + bottom) / 2, XmlEscape(unit));
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double x = left + slot * i + slot * 0.15, w = slot * 0.7;
    const bool over = limits[i] && values[i] > *limits[i];
    s += fmt::format("<rect x=\"{:.1f}\" y=\"{:.1f}\" width=\"{:.1f}\" height=\"{:.1f}\" fill=\"{}\" "
                     "stroke=\"#000\" stroke-width=\"0.5\"><title>{} {:.3g}{}</title></rect>\n",
                     x, y(values[i]), w, bottom - y(values[i]), over ? "url(#over)" : "#56B4E9",
                     XmlEscape(labels[i]), values[i], over ? " (over its limit)" : "");
    if (limits[i]) {
      s += fmt::format("<line x1=\"{:.1f}\" y1=\"{:.1f}\" x2=\"{:.1f}\" y2=\"{:.1f}\" stroke=\"#000\" "
                       "stroke-width=\"2\" stroke-dasharray=\"4 2\"/>\n", x - 2, y(*limits[i]), x + w + 2, y(*limits[i]));
    }
    if (over) s += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" text-anchor=\"middle\">over</text>\n", x + w / 2, y(values[i]) - 4);
    if (values.size() <= 24 || i % 2 == 0) {
      s += fmt::format("<text x=\"{0:.1f}\" y=\"{1}\" transform=\"rotate(-45 {0:.1f} {1})\" text-anchor=\"end\">{2}</text>\n",
                       x + w / 2, bottom + 12, XmlEscape(labels[i]));
    }
  }
  s += fmt::format("<line x1=\"{0}\" y1=\"325\" x2=\"{1}\" y2=\"325\" stroke=\"#000\" stroke-width=\"2\" "
                   "stroke-dasharray=\"4 2\"/><text x=\"{2}\" y=\"329\">limit</text>"
                   "<rect x=\"{3}\" y=\"318\" width=\"12\" height=\"10\" fill=\"url(#over)\"/>"
                   "<text x=\"{4}\" y=\"327\">over its limit</text>\n</svg>\n",
                   left, left + 24, left + 30, left + 80, left + 96);
  return s;
}

Section Summary(const Plant& plant, const StudyResult& r) {
  Section s{"Summary", {}, {}, "", ""};
  const Assessment& a = r.assessment;
  s.paragraphs.push_back(fmt::format(
      "Plant file `{}`; {} Hz, orders 2 to {}; {} summation; limits: {} (`{}`); point of common "
      "coupling: {}.", plant.source_file, r.study.frequency_hz, r.study.max_order,
      ToString(r.study.summation), a.title, a.profile, r.pcc.bus));
  s.paragraphs.push_back(a.violations.empty()
      ? "Result: no limit violations."
      : fmt::format("Result: {} limit violation(s); see \"Violations\".", a.violations.size()));
  s.paragraphs.push_back("Cautions: " + fmt::format("{}", fmt::join(r.cautions, " ")));
  return s;
}

Section Inputs(const Plant& p) {
  Section s{"Inputs", {}, {}, "", ""};
  Table sup{{"supply", "bus", "short circuit MVA", "X/R", "background"}, {}};
  for (const Supply& x : p.supplies) {
    std::string bg;
    for (const HarmonicEntry& e : x.background) bg += fmt::format("{}{}: {} %", bg.empty() ? "" : ", ", e.order, e.percent);
    sup.rows.push_back({x.name, x.bus, F(x.short_circuit_va / 1e6, 1), F(x.x_over_r, 1), bg.empty() ? "none" : bg});
  }
  Table tx{{"transformer", "from", "to", "kVA", "Z %", "connection"}, {}};
  for (const Transformer& t : p.transformers) {
    tx.rows.push_back({t.name, t.from, t.to, F(t.rating_va / 1e3, 0), F(100 * t.impedance), t.connection.code});
  }
  Table cap{{"capacitor bank", "bus", "kvar", "steps on", "detuning"}, {}};
  for (const Capacitor& c : p.capacitors) {
    cap.rows.push_back({c.name, c.bus, F(c.rating_var / 1e3, 0), fmt::format("{}/{}", c.steps_on, c.steps),
                        c.detuning > 0 ? F(100 * c.detuning, 1) + " %" : "none"});
  }
  Table dr{{"drive group", "bus", "units", "kW each", "front end"}, {}};
  for (const Drive& d : p.drives) {
    dr.rows.push_back({d.name, d.bus, std::to_string(d.count), F(d.power_w / 1e3, 0), ToString(d.front_end)});
  }
  for (Table* t : {&sup, &tx, &cap, &dr}) {
    if (!t->rows.empty()) s.tables.push_back(std::move(*t));
  }
  return s;
}

Section Buses(const StudyResult& r) {
  Section s{"Bus voltage distortion", {}, {}, "", "thdv.svg"};
  s.paragraphs.push_back(r.assessment.profile == "ieee519"
      ? "IEEE 519 applies at the point of common coupling; other buses are compared with the same "
        "table as a design guide only."
      : "The profile's levels apply at every bus.");
  Table t{{"bus", "kV", "V1 pu", "THDv %", "limit %", "order nearest its limit", "V_h %", "limit %", "result"}, {}};
  std::vector<std::string> labels;
  std::vector<double> values;
  std::vector<std::optional<double>> limits;
  for (const BusResult& b : r.buses) {
    const auto c = std::find_if(r.assessment.buses.begin(), r.assessment.buses.end(),
                                [&](const BusLimitCheck& x) { return x.bus == b.name; });
    const bool checked = c != r.assessment.buses.end();
    t.rows.push_back({b.name, F(b.nominal_v / 1e3, 3), F(b.indices.fundamental, 4), F(b.indices.thd_percent),
                      checked ? F(c->thd_limit_percent) : "-", checked ? std::to_string(c->worst_order) : "-",
                      checked ? F(c->worst_percent) : "-", checked ? F(c->worst_limit_percent) : "-",
                      !checked ? "not checked" : c->pass ? "pass" : c->design_guide ? "over (design guide)" : "FAIL"});
    labels.push_back(b.name);
    values.push_back(b.indices.thd_percent);
    limits.push_back(checked ? std::optional<double>(c->thd_limit_percent) : std::nullopt);
  }
  s.tables.push_back(std::move(t));
  s.svg = BarChart("THDv per bus against its limit", "THDv %", labels, values, limits);
  return s;
}

Section Pcc(const StudyResult& r) {
  Section s{"Current at the point of common coupling", {}, {}, "", ""};
  const PccResult& p = r.pcc;
  if (!p.demand_current_a) {
    s.paragraphs.push_back("No demand current: TDD and the current limits are not assessed.");
    return s;
  }
  s.paragraphs.push_back(fmt::format("Bus {}: I_sc = {:.0f} A, I_L = {:.1f} A, I_sc/I_L = {:.1f}, TDD = {:.2f} %{}.",
      p.bus, p.isc_a, *p.demand_current_a, p.isc_a / *p.demand_current_a, p.tdd_percent.value_or(0.0),
      p.tdd_limit_percent ? fmt::format(" (limit {:.2f} %)", *p.tdd_limit_percent) : ""));
  if (p.demand_current_is_default) {
    s.paragraphs.push_back("I_L is the default (the sum of the rated currents of the transformers fed "
                           "from the pcc), not the average maximum demand current: it overstates I_L "
                           "and so understates TDD and every percentage of I_L.");
  }
  Table t{{"order", "A", "% of I_L", "limit %", "result"}, {}};
  std::vector<std::string> labels;
  std::vector<double> values;
  std::vector<std::optional<double>> limits;
  for (const PccHarmonic& h : p.harmonics) {
    labels.push_back(std::to_string(h.order));
    values.push_back(h.percent_of_il);
    limits.push_back(h.limit_percent);
    if (h.amps < 1e-6) continue;
    t.rows.push_back({std::to_string(h.order), F(h.amps), F(h.percent_of_il),
                      h.limit_percent ? F(*h.limit_percent) : "-", !h.pass ? "-" : *h.pass ? "pass" : "FAIL"});
  }
  s.tables.push_back(std::move(t));
  s.svg = BarChart("Current at the pcc by order against its limits", "% of I_L", labels, values, limits);
  s.svg_file = "pcc_current.svg";
  return s;
}

Table ViolationTable(const std::vector<Violation>& list) {
  Table t{{"where", "what", "value %", "limit %"}, {}};
  for (const Violation& v : list) t.rows.push_back({v.where, v.what, F(v.value), F(v.limit)});
  return t;
}

Section Findings(const StudyResult& r) {
  Section s{"Violations", {}, {}, "", ""};
  if (r.assessment.violations.empty()) s.paragraphs.push_back("None.");
  else s.tables.push_back(ViolationTable(r.assessment.violations));
  if (!r.assessment.design_guide.empty()) {
    s.paragraphs.push_back("Design guide (internal buses, not violations): the second table.");
    s.tables.push_back(ViolationTable(r.assessment.design_guide));
  }
  return s;
}

Section Equipment(const StudyResult& r) {
  Section s{"Drive groups, capacitor duty, transformers, resonances", {}, {}, "", ""};
  Table d{{"drive group", "bus", "units", "front end", "I1 A", "THDi %"}, {}};
  for (const DriveResult& x : r.drives) {
    d.rows.push_back({x.name, x.bus, std::to_string(x.count), ToString(x.front_end), F(x.indices.fundamental, 1), F(x.indices.thd_percent)});
  }
  Table c{{"capacitor", "bus", "Vrms %", "Vpeak %", "Irms %", "kvar %", "IEEE 18"}, {}};
  for (const CapacitorDuty& x : r.capacitors) {
    c.rows.push_back({x.name, x.bus, F(x.vrms_percent, 1), F(x.vpeak_percent, 1), F(x.irms_percent, 1), F(x.kvar_percent, 1), x.pass ? "pass" : "FAIL"});
  }
  Table t{{"transformer", "F_HL", "K-factor", "derated %", "load %"}, {}};
  for (const TransformerDerating& x : r.transformers) {
    t.rows.push_back({x.name, F(x.harmonic_loss_factor), F(x.k_factor), F(x.derated_percent, 1), F(x.load_percent, 1)});
  }
  Table z{{"bus", "configuration", "order", "|Z| ohm", "amplification", "risk"}, {}};
  for (const Resonance& x : r.resonances) {
    z.rows.push_back({x.bus, x.configuration, F(x.peak.order), fmt::format("{:.4g}", x.peak.impedance_ohm), F(x.peak.amplification, 1), ToString(x.peak.risk)});
  }
  for (Table* x : {&d, &c, &t, &z}) {
    if (!x->rows.empty()) s.tables.push_back(std::move(*x));
  }
  return s;
}

Section Method(const StudyResult& r) {
  Section s{"Method and references", {}, {}, "", ""};
  s.paragraphs = {
      "Fundamental load flow, drive spectra (computed bridge model or tables), one nodal solve per "
      "harmonic order; " + ToString(r.study.summation) + " summation of the sources (docs/summation.md).",
      "Limits: " + r.assessment.title + " (docs/limits.md). IEEE Std 519-2014 (harmonic control), "
      "IEC 61000-2-4 (compatibility levels in industrial plants), IEC TR 61000-3-6 (summation law), "
      "IEEE Std 18 (shunt capacitors), IEEE Std C57.110 (transformer derating).",
      "Short-time statistics (3 s and 10 min values) are out of scope: one steady operating point is "
      "compared with the tables."};
  for (const std::string& w : r.warnings) s.paragraphs.push_back("Warning: " + w);
  return s;
}

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
    if (!s.svg.empty()) md += "![" + s.title + "](" + s.svg_file + ")\n";
  }
  return md;
}

std::string Html(const std::string& title, const std::vector<Section>& sections) {
  std::string h = "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>" + XmlEscape(title) +
      "</title>\n<style>body{font-family:sans-serif;max-width:60rem;margin:2rem auto;color:#111}"
      "table{border-collapse:collapse;margin:0.5rem 0 1rem}th,td{border:1px solid #777;padding:2px 6px;"
      "text-align:left}th{background:#e8e8e8}h2{border-bottom:2px solid #111;break-after:avoid}"
      "svg{max-width:100%;height:auto;break-inside:avoid}@media print{body{margin:0}}</style></head><body>\n";
  h += "<h1>" + XmlEscape(title) + "</h1>\n";
  for (const Section& s : sections) {
    h += "<h2>" + XmlEscape(s.title) + "</h2>\n";
    for (const std::string& p : s.paragraphs) h += "<p>" + XmlEscape(p) + "</p>\n";
    for (const Table& t : s.tables) {
      h += "<table><tr>";
      for (const auto& x : t.header) h += "<th>" + XmlEscape(x) + "</th>";
      h += "</tr>\n";
      for (const auto& row : t.rows) {
        h += "<tr>";
        for (const auto& x : row) h += "<td>" + XmlEscape(x) + "</td>";
        h += "</tr>\n";
      }
      h += "</table>\n";
    }
    h += s.svg;
  }
  return h + "</body></html>\n";
}

}  // namespace

void WriteReport(const Plant& plant, const StudyResult& r, const std::string& dir) {
  const std::vector<Section> sections = {Summary(plant, r), Inputs(plant), Buses(r), Pcc(r),
                                         Findings(r), Equipment(r), Method(r)};
  const std::string title = "Harmonic study: " + r.study.name;
  const std::string md = Markdown(title, sections), html = Html(title, sections);
  WriteStudyCsv(r, dir);  // creates the directory
  const std::filesystem::path d(dir);
  for (const Section& s : sections) {
    if (!s.svg.empty()) WriteFileAtomically((d / s.svg_file).string(), [&](std::ostream& o) { o << s.svg; });
  }
  WriteFileAtomically((d / "report.md").string(), [&](std::ostream& o) { o << md; });
  WriteFileAtomically((d / "report.html").string(), [&](std::ostream& o) { o << html; });
}

}  // namespace overtone
