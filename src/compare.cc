// src/compare.cc — `overtone compare BASE PROPOSED`: the deltas between two studies, as terminal
// tables and JSON (docs/compare.md).
#include "overtone/compare.h"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <cmath>

#include "json_writer.h"
#include "output_common.h"

namespace overtone {
namespace {

using internal::JsonWriter;
using internal::Marked;
using internal::Tone;

// Orders below this (percent) are round-off, not a "worst order" (the printed precision).
constexpr double kNegligiblePercent = 0.005;

BusFigures FiguresOf(const BusResult& b, const Assessment& a) {
  BusFigures f;
  f.thd_v_percent = b.indices.thd_percent;
  f.worst_percent = kNegligiblePercent;
  for (std::size_t h = 2; h < b.voltage_pu.by_order.size(); ++h) {
    const double percent = b.indices.fundamental > 0.0
                               ? 100.0 * std::abs(b.voltage_pu.by_order[h]) / b.indices.fundamental
                               : 0.0;
    if (percent > f.worst_percent) f.worst_percent = percent, f.worst_order = static_cast<int>(h);
  }
  if (f.worst_order == 0) f.worst_percent = 0.0;
  f.result = internal::BusVerdict(internal::FindBusCheck(a, b.name));
  return f;
}

PccFigures FiguresOf(const PccResult& p) {
  PccFigures f{p.bus, p.tdd_percent, p.tdd_limit_percent, 0, 0.0, std::nullopt};
  for (const PccHarmonic& h : p.harmonics) {
    if (h.percent_of_il > std::max(f.worst_percent_of_il, kNegligiblePercent)) {
      f.worst_order = h.order, f.worst_percent_of_il = h.percent_of_il,
      f.worst_limit_percent = h.limit_percent;
    }
  }
  return f;
}

bool SameViolation(const Violation& a, const Violation& b) {
  return a.where == b.where && a.what == b.what;
}

// Violations of `from` that `other` does not have.
std::vector<Violation> Missing(const std::vector<Violation>& from,
                               const std::vector<Violation>& other) {
  std::vector<Violation> out;
  for (const Violation& v : from) {
    if (std::none_of(other.begin(), other.end(),
                     [&](const Violation& w) { return SameViolation(v, w); })) {
      out.push_back(v);
    }
  }
  return out;
}

// The characteristic order 6k +- 1 (k >= 1) nearest a fractional order.
int NearestCharacteristic(double order) {
  int best = 5;
  for (int k = 1; 6 * k - 1 <= order + 6; ++k) {
    for (int h : {6 * k - 1, 6 * k + 1}) {
      if (std::abs(order - h) < std::abs(order - best)) best = h;
    }
  }
  return best;
}

ResonanceShift Shift(const std::string& bus, const char* change, const ResonancePeak* base,
                     const ResonancePeak* proposed) {
  ResonanceShift s;
  s.bus = bus;
  s.change = change;
  if (base) s.base = *base;
  if (proposed) s.proposed = *proposed;
  const double order = proposed ? proposed->order : base->order;
  s.characteristic_order = NearestCharacteristic(order);
  s.near_characteristic = std::abs(order - s.characteristic_order) <= kNearCharacteristic;
  return s;
}

// Peaks at each bus matched greedily, nearest first, within kPeakMatchOrders.
std::vector<ResonanceShift> ShiftsOf(const std::vector<Resonance>& base,
                                     const std::vector<Resonance>& proposed) {
  std::vector<std::string> buses;
  for (const auto* list : {&base, &proposed}) {
    for (const Resonance& r : *list) {
      if (std::find(buses.begin(), buses.end(), r.bus) == buses.end()) buses.push_back(r.bus);
    }
  }
  std::vector<ResonanceShift> shifts;
  for (const std::string& bus : buses) {
    std::vector<const ResonancePeak*> b, p;
    for (const Resonance& r : base)
      if (r.bus == bus) b.push_back(&r.peak);
    for (const Resonance& r : proposed)
      if (r.bus == bus) p.push_back(&r.peak);
    std::vector<bool> p_used(p.size(), false);
    for (const ResonancePeak* x : b) {
      int best = -1;
      for (std::size_t k = 0; k < p.size(); ++k) {
        const double d = std::abs(p[k]->order - x->order);
        if (!p_used[k] && d <= kPeakMatchOrders &&
            (best < 0 || d < std::abs(p[best]->order - x->order))) {
          best = static_cast<int>(k);
        }
      }
      if (best < 0) {
        shifts.push_back(Shift(bus, "disappeared", x, nullptr));
        continue;
      }
      p_used[best] = true;
      const ResonancePeak* y = p[best];
      if (std::abs(y->order - x->order) >= kPeakMoveOrders || y->risk != x->risk) {
        shifts.push_back(Shift(bus, "moved", x, y));
      }
    }
    for (std::size_t k = 0; k < p.size(); ++k) {
      if (!p_used[k]) shifts.push_back(Shift(bus, "appeared", nullptr, p[k]));
    }
  }
  return shifts;
}

std::string Opt(const std::optional<double>& v, int digits = 2) {
  return v ? fmt::format("{:.{}f}", *v, digits) : std::string("-");
}

std::string Worst(int order, double percent) {
  return order > 0 ? fmt::format("{}: {:.2f}", order, percent) : std::string("-");
}

// "worse" / "better" / "same" for a percentage where more is worse. Changes under 0.05 point are
// "same": well below what a meter resolves, and they would bury the changes that matter.
std::string Direction(double base, double proposed) {
  constexpr double kSamePoints = 0.05;
  if (proposed > base + kSamePoints) return "worse";
  if (proposed < base - kSamePoints) return "better";
  return "same";
}

// A change note in colour: worse ones as bad, better ones as good, the rest plain.
std::string MarkNote(const std::string& note, bool colour) {
  if (note == "now FAIL" || note == "worse") return Marked(note, Tone::kBad, colour);
  if (note == "now pass" || note == "better") return Marked(note, Tone::kGood, colour);
  return note;
}

void PrintViolationList(const char* heading, const std::vector<Violation>& list,
                        const std::string& word, Tone tone, bool colour, std::ostream& out) {
  fmt::print(out, "\n{}: {}\n", heading, list.empty() ? "none" : std::to_string(list.size()));
  if (list.empty()) return;
  std::size_t w = 5;
  for (const Violation& v : list) w = std::max(w, v.where.size());
  fmt::print(out, "  {:<{}}  {:<9}  {:>8}  {:>8}\n", "where", w, "what", "value %", "limit %");
  for (const Violation& v : list) {
    fmt::print(out, "  {:<{}}  {:<9}  {:>8.2f}  {:>8.2f}  {}\n", v.where, w, v.what, v.value,
               v.limit, Marked(word, tone, colour));
  }
}

void PrintBuses(const Comparison& c, bool colour, std::ostream& out) {
  std::size_t w = 3, rw = 12;  // bus names; results ("over (design guide)" is the longest)
  for (const BusChange& b : c.buses) {
    w = std::max(w, b.name.size());
    for (const auto* f : {&b.base, &b.proposed}) rw = std::max(rw, *f ? (*f)->result.size() : 0);
  }
  fmt::print(out, "Buses (THDv %; worst: the largest order, % of V1)\n");
  fmt::print(out, "{:<{}}  {:>7}  {:>8}  {:>7}  {:<11}  {:<11}  {:<{}}  {:<{}}  {}\n", "bus", w,
             "base", "proposed", "change", "worst base", "worst prop.", "result base", rw,
             "result prop.", rw, "note");
  for (const BusChange& b : c.buses) {
    const auto thd = [](const std::optional<BusFigures>& f) {
      return f ? std::optional<double>(f->thd_v_percent) : std::nullopt;
    };
    fmt::print(out, "{:<{}}  {:>7}  {:>8}  {:>7}  {:<11}  {:<11}  {:<{}}  {:<{}}  {}\n", b.name, w,
               Opt(thd(b.base)), Opt(thd(b.proposed)),
               b.base && b.proposed
                   ? fmt::format("{:+.2f}", b.proposed->thd_v_percent - b.base->thd_v_percent)
                   : "-",
               b.base ? Worst(b.base->worst_order, b.base->worst_percent) : "-",
               b.proposed ? Worst(b.proposed->worst_order, b.proposed->worst_percent) : "-",
               b.base ? b.base->result : "-", rw, b.proposed ? b.proposed->result : "-", rw,
               MarkNote(b.Note(), colour));
  }
}

void PrintPcc(const Comparison& c, bool colour, std::ostream& out) {
  const PccFigures &b = c.pcc_base, &p = c.pcc_proposed;
  fmt::print(out, "\nPoint of common coupling: {}{}\n", b.bus,
             b.bus == p.bus ? "" : " (base), " + p.bus + " (proposed)");
  fmt::print(out, "  {:<22}  {:>8}  {:>8}  {:>7}  {}\n", "", "base", "proposed", "change", "note");
  fmt::print(
      out, "  {:<22}  {:>8}  {:>8}  {:>7}  {}\n", "TDD %", Opt(b.tdd_percent), Opt(p.tdd_percent),
      b.tdd_percent && p.tdd_percent ? fmt::format("{:+.2f}", *p.tdd_percent - *b.tdd_percent)
                                     : "-",
      MarkNote(TddNote(b, p), colour));
  fmt::print(out, "  {:<22}  {:>8}  {:>8}\n", "TDD limit %", Opt(b.tdd_limit_percent),
             Opt(p.tdd_limit_percent));
  fmt::print(out, "  {:<22}  {:>8}  {:>8}\n", "worst order (% of I_L)",
             Worst(b.worst_order, b.worst_percent_of_il),
             Worst(p.worst_order, p.worst_percent_of_il));
}

void PrintShifts(const Comparison& c, bool colour, std::ostream& out) {
  fmt::print(out, "\nResonance shifts (present capacitor steps): {}\n",
             c.resonance_shifts.empty() ? "none" : std::to_string(c.resonance_shifts.size()));
  if (c.resonance_shifts.empty()) return;
  std::size_t w = 3;
  for (const ResonanceShift& s : c.resonance_shifts) w = std::max(w, s.bus.size());
  fmt::print(out, "  {:<{}}  {:<11}  {:>7}  {:>8}  {:<11}  {:<11}  {}\n", "bus", w, "change",
             "h base", "h prop.", "risk base", "risk prop.", "nearest 6k+-1");
  for (const ResonanceShift& s : c.resonance_shifts) {
    const bool riskier = s.proposed && (!s.base || s.proposed->risk > s.base->risk);
    fmt::print(out, "  {:<{}}  {}  {:>7}  {:>8}  {:<11}  {:<11}  {}{}\n", s.bus, w,
               riskier ? Marked(fmt::format("{:<11}", s.change), Tone::kBad, colour)
                       : fmt::format("{:<11}", s.change),
               s.base ? fmt::format("{:.2f}", s.base->order) : "-",
               s.proposed ? fmt::format("{:.2f}", s.proposed->order) : "-",
               s.base ? ToString(s.base->risk) : "-", s.proposed ? ToString(s.proposed->risk) : "-",
               s.characteristic_order, s.near_characteristic ? " (near)" : "");
  }
}

void WriteBusFigures(JsonWriter& j, const BusFigures& f, const std::string& suffix) {
  j.Field("thd_v_percent" + suffix, f.thd_v_percent);
  if (f.worst_order > 0)
    j.Field("worst_order" + suffix, f.worst_order).Field("worst_percent" + suffix, f.worst_percent);
  j.Field("result" + suffix, f.result);
}

void WritePccFigures(JsonWriter& j, const PccFigures& f, const std::string& suffix) {
  j.Field("bus" + suffix, f.bus);
  if (f.tdd_percent) j.Field("tdd_percent" + suffix, *f.tdd_percent);
  if (f.tdd_limit_percent) j.Field("tdd_limit_percent" + suffix, *f.tdd_limit_percent);
  if (f.worst_order > 0) {
    j.Field("worst_order" + suffix, f.worst_order)
        .Field("worst_percent_of_il" + suffix, f.worst_percent_of_il);
    if (f.worst_limit_percent) j.Field("worst_limit_percent" + suffix, *f.worst_limit_percent);
  }
}

void WriteViolations(JsonWriter& j, const char* key, const std::vector<Violation>& list) {
  j.Key(key).BeginArray();
  for (const Violation& v : list) {
    j.BeginObject()
        .Field("where", v.where)
        .Field("what", v.what)
        .Field("value", v.value)
        .Field("limit", v.limit)
        .EndObject();
  }
  j.EndArray();
}

void WritePeak(JsonWriter& j, const char* key, const std::optional<ResonancePeak>& p) {
  if (!p) return;
  j.Key(key).BeginObject();
  internal::WritePeakFields(j, *p);
  j.EndObject();
}

}  // namespace

std::string BusChange::Status() const {
  return base && proposed ? "both" : base ? "removed" : "added";
}

std::string BusChange::Note() const {
  if (!base || !proposed) return Status();
  if (base->result != "FAIL" && proposed->result == "FAIL") return "now FAIL";
  if (base->result == "FAIL" && proposed->result != "FAIL") return "now pass";
  return Direction(base->thd_v_percent, proposed->thd_v_percent);
}

std::string TddNote(const PccFigures& b, const PccFigures& p) {
  if (!b.tdd_percent || !p.tdd_percent) return "-";
  const bool fail_b = b.tdd_limit_percent && *b.tdd_percent > *b.tdd_limit_percent;
  const bool fail_p = p.tdd_limit_percent && *p.tdd_percent > *p.tdd_limit_percent;
  if (fail_p && !fail_b) return "now FAIL";
  if (fail_b && !fail_p) return "now pass";
  return Direction(*b.tdd_percent, *p.tdd_percent);
}

Comparison CompareStudies(const StudyResult& base, const std::string& base_file,
                          const StudyResult& proposed, const std::string& proposed_file) {
  Comparison c;
  c.base_name = base.study.name, c.base_file = base_file;
  c.proposed_name = proposed.study.name, c.proposed_file = proposed_file;
  for (const BusResult& b : base.buses)
    c.buses.push_back({b.name, FiguresOf(b, base.assessment), std::nullopt});
  for (const BusResult& p : proposed.buses) {
    auto it = std::find_if(c.buses.begin(), c.buses.end(),
                           [&](const BusChange& x) { return x.name == p.name; });
    if (it == c.buses.end())
      it = c.buses.insert(c.buses.end(), {p.name, std::nullopt, std::nullopt});
    it->proposed = FiguresOf(p, proposed.assessment);
  }
  c.pcc_base = FiguresOf(base.pcc);
  c.pcc_proposed = FiguresOf(proposed.pcc);
  const auto& vb = base.assessment.violations;
  const auto& vp = proposed.assessment.violations;
  c.new_violations = Missing(vp, vb);
  c.cleared_violations = Missing(vb, vp);
  for (const Violation& v : vb) {
    const auto w =
        std::find_if(vp.begin(), vp.end(), [&](const Violation& x) { return SameViolation(v, x); });
    if (w != vp.end())
      c.remaining_violations.push_back({v.where, v.what, v.value, w->value, w->limit});
  }
  c.resonance_shifts = ShiftsOf(base.resonances, proposed.resonances);
  if (base.assessment.profile != proposed.assessment.profile) {
    c.notes.push_back(fmt::format("the cases use different limit profiles ({} and {})",
                                  base.assessment.profile, proposed.assessment.profile));
  }
  if (base.study.summation != proposed.study.summation) {
    c.notes.push_back(fmt::format("the cases use different summation rules ({} and {})",
                                  ToString(base.study.summation),
                                  ToString(proposed.study.summation)));
  }
  if (base.pcc.bus != proposed.pcc.bus)
    c.notes.push_back("the cases have different points of common coupling");
  c.cautions = StandardCautions();
  return c;
}

void PrintComparison(const Comparison& c, std::ostream& out, bool colour) {
  fmt::print(out, "Compare\n  base:     {} ({})\n  proposed: {} ({})\n\n", c.base_name, c.base_file,
             c.proposed_name, c.proposed_file);
  PrintBuses(c, colour, out);
  PrintPcc(c, colour, out);
  PrintViolationList("New violations", c.new_violations, "new", Tone::kBad, colour, out);
  PrintViolationList("Cleared violations", c.cleared_violations, "cleared", Tone::kGood, colour,
                     out);
  if (!c.remaining_violations.empty()) {
    fmt::print(out, "\nViolations in both cases: {}\n", c.remaining_violations.size());
    std::size_t w = 5;
    for (const ViolationChange& v : c.remaining_violations) w = std::max(w, v.where.size());
    fmt::print(out, "  {:<{}}  {:<9}  {:>8}  {:>8}  {:>8}  {}\n", "where", w, "what", "base %",
               "prop. %", "limit %", "note");
    for (const ViolationChange& v : c.remaining_violations) {
      fmt::print(out, "  {:<{}}  {:<9}  {:>8.2f}  {:>8.2f}  {:>8.2f}  {}\n", v.where, w, v.what,
                 v.value_base, v.value_proposed, v.limit,
                 Direction(v.value_base, v.value_proposed));
    }
  }
  PrintShifts(c, colour, out);
  if (!c.notes.empty()) {
    fmt::print(out, "\nNotes\n");
    for (const std::string& n : c.notes) fmt::print(out, "- {}\n", n);
  }
  fmt::print(out, "\nCautions\n");
  for (const std::string& x : c.cautions) fmt::print(out, "- {}\n", x);
}

void WriteComparisonJson(const Comparison& c, std::ostream& out) {
  JsonWriter j(out);
  j.BeginObject().Field("overtone", 1);
  j.Key("base").BeginObject().Field("name", c.base_name).Field("file", c.base_file).EndObject();
  j.Key("proposed")
      .BeginObject()
      .Field("name", c.proposed_name)
      .Field("file", c.proposed_file)
      .EndObject();
  j.Key("buses").BeginArray();
  for (const BusChange& b : c.buses) {
    j.BeginObject().Field("name", b.name).Field("status", b.Status());
    if (b.base) WriteBusFigures(j, *b.base, "_base");
    if (b.proposed) WriteBusFigures(j, *b.proposed, "_proposed");
    if (b.base && b.proposed)
      j.Field("thd_v_change_percent", b.proposed->thd_v_percent - b.base->thd_v_percent);
    j.EndObject();
  }
  j.EndArray();
  j.Key("pcc").BeginObject();
  WritePccFigures(j, c.pcc_base, "_base");
  WritePccFigures(j, c.pcc_proposed, "_proposed");
  if (c.pcc_base.tdd_percent && c.pcc_proposed.tdd_percent) {
    j.Field("tdd_change_percent", *c.pcc_proposed.tdd_percent - *c.pcc_base.tdd_percent);
  }
  j.EndObject();
  WriteViolations(j, "new_violations", c.new_violations);
  WriteViolations(j, "cleared_violations", c.cleared_violations);
  j.Key("remaining_violations").BeginArray();
  for (const ViolationChange& v : c.remaining_violations) {
    j.BeginObject().Field("where", v.where).Field("what", v.what).Field("value_base", v.value_base);
    j.Field("value_proposed", v.value_proposed).Field("limit", v.limit).EndObject();
  }
  j.EndArray();
  j.Key("resonance_shifts").BeginArray();
  for (const ResonanceShift& s : c.resonance_shifts) {
    j.BeginObject().Field("bus", s.bus).Field("change", s.change);
    WritePeak(j, "base", s.base);
    WritePeak(j, "proposed", s.proposed);
    j.Field("characteristic_order", s.characteristic_order)
        .Field("near_characteristic", s.near_characteristic);
    j.EndObject();
  }
  j.EndArray();
  j.StringArray("notes", c.notes).StringArray("cautions", c.cautions);
  j.EndObject();
  out << '\n';
}

}  // namespace overtone
