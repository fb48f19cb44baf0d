// src/output_mitigation.cc — mitigation options as a terminal table, JSON, Markdown and HTML.
#include "output_mitigation.h"

#include <fmt/format.h>

#include <ostream>

#include "json_writer.h"
#include "output_common.h"
#include "overtone/mitigate.h"

namespace overtone {
namespace {

std::string Tdd(const MitigationFigures& f) {
  return f.pcc_tdd_percent ? fmt::format("{:.2f}", *f.pcc_tdd_percent) : "-";
}

std::string Meets(const MitigationFigures& f) {
  if (f.meets_profile && f.meets_design_guide) return "yes";
  return f.meets_profile ? "profile" : "no";
}

// One row of cells per option, shared by the terminal, Markdown and HTML tables.
const std::vector<std::string> kHeader = {
    "rank", "option", "meets", "worst THDv %", "TDD %", "capacitors", "resonance", "size", "score"};

std::vector<std::string> Cells(int rank, const MitigationOption& o) {
  if (!o.solved)
    return {fmt::format("{}", rank), o.name, "unsolved", "-", "-", "-", "-", o.size, "-"};
  const MitigationFigures& f = o.figures;
  return {fmt::format("{}", rank),
          o.name,
          Meets(f),
          fmt::format("{:.2f} ({})", f.worst_thd_v_percent, f.worst_thd_v_bus),
          Tdd(f),
          f.capacitors_pass ? "pass" : "FAIL",
          ToString(f.resonance_risk),
          o.size,
          fmt::format("{:.3f}", o.score)};
}

std::string BaseLine(const MitigationResult& r) {
  const MitigationFigures& b = r.base;
  return fmt::format(
      "As given: worst THDv {:.2f} % at {}, TDD {} %, capacitors {}, resonance risk {}{}; "
      "violation sum {:.3f} over {} finding(s).",
      b.worst_thd_v_percent, b.worst_thd_v_bus, Tdd(b), b.capacitors_pass ? "pass" : "FAIL",
      ToString(b.resonance_risk), b.resonance.empty() ? "" : " (" + b.resonance + ")", b.violation,
      r.violations.size());
}

const char* kDefinitions =
    "meets: yes = profile and design guide met, profile = profile met but an internal bus is over "
    "its design guide, no = a profile limit is exceeded. score = share of the violation sum "
    "removed "
    "per unit of equipment changed (violation sum: sum of value/limit - 1 over every finding; "
    "units: "
    "1 per drive group fitted with reactors, bank detuned or filter; 2 per group converted; 0.25 "
    "per "
    "step-state change).";

}  // namespace

void PrintMitigationTable(const MitigationResult& r, std::ostream& out) {
  out << fmt::format("Mitigation options: {}\n{}\n\n", r.plant_name, BaseLine(r));
  if (!r.needed()) {
    out << "The plant meets its limit profile and design guide: nothing to mitigate.\n";
  } else {
    std::vector<std::vector<std::string>> rows = {kHeader};
    for (std::size_t i = 0; i < r.options.size(); ++i)
      rows.push_back(Cells(static_cast<int>(i) + 1, r.options[i]));
    std::vector<std::size_t> width(kHeader.size(), 0);
    for (const auto& row : rows) {
      for (std::size_t c = 0; c < row.size(); ++c) width[c] = std::max(width[c], row[c].size());
    }
    for (const auto& row : rows) {
      std::string line;
      for (std::size_t c = 0; c < row.size(); ++c) {
        const bool numeric = c == 0 || c == 4 || c == 8;
        line += numeric ? fmt::format("{:>{}}  ", row[c], width[c])
                        : fmt::format("{:<{}}  ", row[c], width[c]);
      }
      while (!line.empty() && line.back() == ' ') line.pop_back();
      out << line << '\n';
    }
    out << '\n' << kDefinitions << '\n';
    for (const MitigationOption& o : r.options) {
      if (!o.solved) out << fmt::format("unsolved: {}: {}\n", o.name, o.failure);
    }
  }
  for (const std::string& n : r.notes) out << n << '\n';
  out << "\nCautions\n";
  for (const std::string& c : r.cautions) out << "- " << c << '\n';
}

void WriteMitigationJson(const MitigationResult& r, std::ostream& out) {
  internal::JsonWriter j(out);
  j.BeginObject().Field("overtone", 1).Field("plant", r.plant_name);
  auto figures = [&](const MitigationFigures& f) {
    j.Field("meets_profile", f.meets_profile).Field("meets_design_guide", f.meets_design_guide);
    j.Field("worst_thd_v_percent", f.worst_thd_v_percent)
        .Field("worst_thd_v_bus", f.worst_thd_v_bus);
    if (f.pcc_tdd_percent) j.Field("pcc_tdd_percent", *f.pcc_tdd_percent);
    j.Field("capacitors_pass", f.capacitors_pass)
        .Field("resonance_risk", ToString(f.resonance_risk));
    j.Field("violation_sum", f.violation);
  };
  j.Key("as_given").BeginObject();
  figures(r.base);
  j.Key("violations").BeginArray();
  for (const Violation& v : r.violations) {
    j.BeginObject().Field("where", v.where).Field("what", v.what).Field("value", v.value);
    j.Field("limit", v.limit).EndObject();
  }
  j.EndArray().EndObject();
  j.Key("options").BeginArray();
  for (const MitigationOption& o : r.options) {
    j.BeginObject().Field("name", o.name).Field("kind", o.kind).Field("plant_file", o.plant_file);
    j.Field("solved", o.solved);
    if (o.solved)
      figures(o.figures);
    else
      j.Field("failure", o.failure);
    j.Field("size", o.size).Field("equipment_units", o.equipment_units).Field("score", o.score);
    j.EndObject();
  }
  j.EndArray();
  j.StringArray("notes", r.notes).StringArray("cautions", r.cautions).EndObject();
  out << '\n';
}

namespace internal {

ReportSection MitigationSection(const MitigationResult& r) {
  ReportSection s{"Mitigation options", {BaseLine(r)}, {}, {}};
  if (!r.needed()) {
    s.paragraphs.push_back(
        "The plant meets its limit profile and design guide: nothing to mitigate.");
    return s;
  }
  ReportTable t{kHeader, {}, "Options, best first (each a plant file in `mitigation/`)"};
  for (std::size_t i = 0; i < r.options.size(); ++i)
    t.rows.push_back(Cells(static_cast<int>(i) + 1, r.options[i]));
  s.tables.push_back(std::move(t));
  s.paragraphs.push_back(kDefinitions);
  for (const std::string& n : r.notes) s.paragraphs.push_back(n);
  return s;
}

}  // namespace internal

}  // namespace overtone
