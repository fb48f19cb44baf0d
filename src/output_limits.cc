// src/output_limits.cc — the terminal "Limits" section of a study (docs/limits.md).
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>

#include "assessment.h"
#include "output_common.h"

namespace overtone::internal {
namespace {

void PrintViolations(const char* heading, const std::vector<Violation>& list, std::ostream& out) {
  if (list.empty()) return;
  std::size_t w = 5;
  for (const Violation& v : list) w = std::max(w, v.where.size());
  fmt::print(out, "\n{}\n{:<{}}  {:<9}  {:>8}  {:>8}\n", heading, "where", w, "what", "value %",
             "limit %");
  for (const Violation& v : list) {
    fmt::print(out, "{:<{}}  {:<9}  {:>8.2f}  {:>8.2f}\n", v.where, w, v.what, v.value, v.limit);
  }
}

}  // namespace

void PrintLimitTables(const StudyResult& r, std::ostream& out, bool colour) {
  const auto verdict = [&](const std::string& word) {
    return word == "pass" ? word : Marked(word, Tone::kBad, colour);
  };
  const Assessment& a = r.assessment;
  fmt::print(out, "\nLimits ({}, profile {})\n", a.title, a.profile);
  if (!a.buses.empty()) {
    std::size_t w = 3;
    for (const BusLimitCheck& c : a.buses) w = std::max(w, c.bus.size());
    fmt::print(out, "{:<{}}  {:<12}  {:>7}  {:>7}  {:>5}  {:>7}  {:>7}  {}\n", "bus", w,
               "applies as", "THDv %", "limit", "order", "V_h %", "limit", "result");
    for (const BusLimitCheck& c : a.buses) {
      const std::string role = c.bus == r.pcc.bus ? "pcc"
                               : c.design_guide   ? "design guide"
                                                  : "limit";
      fmt::print(out, "{:<{}}  {:<12}  {:>7.2f}  {:>7.2f}  {:>5}  {:>7.2f}  {:>7.2f}  {}\n", c.bus,
                 w, role, c.thd_percent, c.thd_limit_percent, c.worst_order, c.worst_percent,
                 c.worst_limit_percent, verdict(BusVerdict(&c)));
    }
    fmt::print(out, "(order: the order nearest its limit)\n");
  }
  const PccResult& p = r.pcc;
  if (p.tdd_limit_percent) {
    const PccHarmonic* worst = nullptr;
    for (const PccHarmonic& h : p.harmonics) {
      if (h.limit_percent && (!worst || h.percent_of_il / *h.limit_percent >
                                            worst->percent_of_il / *worst->limit_percent)) {
        worst = &h;
      }
    }
    fmt::print(out, "pcc current at {}: TDD {:.2f} % (limit {:.2f}) {}", p.bus, *p.tdd_percent,
               *p.tdd_limit_percent,
               verdict(*p.tdd_percent > *p.tdd_limit_percent ? "FAIL" : "pass"));
    if (worst) {
      fmt::print(out, "; order {} {:.2f} % of I_L (limit {:.2f}) {}", worst->order,
                 worst->percent_of_il, *worst->limit_percent,
                 verdict(worst->pass.value_or(true) ? "pass" : "FAIL"));
    }
    fmt::print(out, "\n");
    if (p.demand_current_is_default) {
      fmt::print(out,
                 "  I_L is the default (transformer ratings), not the average maximum demand: "
                 "TDD and the current checks are understated\n");
    }
  } else if (!p.demand_current_a) {
    fmt::print(out, "pcc current: not checked (no demand_current)\n");
  } else {
    fmt::print(out, "pcc current: the profile has no current limits\n");
  }
  if (a.violations.empty()) {
    fmt::print(out, "Violations: none\n");
  } else {
    PrintViolations("Violations", a.violations, out);
  }
  PrintViolations("Design guide only (internal buses; not violations)", a.design_guide, out);
}

}  // namespace overtone::internal
