// src/output_headroom.cc — the headroom table for a terminal and its JSON (docs/headroom.md).
#include <fmt/format.h>

#include <ostream>

#include "json_writer.h"
#include "overtone/headroom.h"

namespace overtone {
namespace {

// Value and limit with as many decimals (3 to 6) as it takes to show them apart.
std::string OverLimit(double value, double limit) {
  int digits = 3;
  while (digits < 6 &&
         fmt::format("{:.{}f}", value, digits) == fmt::format("{:.{}f}", limit, digits))
    ++digits;
  return fmt::format("{:.{}f} % > {:.{}f} %", value, digits, limit, digits);
}

std::string BindingText(const BusHeadroom& h) {
  if (h.capped) return "none up to the search cap";
  if (!h.binding) return "";
  if (h.binding->what == "unsolvable")
    return fmt::format("unsolvable (load flow), {}", h.binding->where);
  return fmt::format("{} at {}: {}", h.binding->what, h.binding->where,
                     OverLimit(h.binding->value, h.binding->limit));
}

}  // namespace

void PrintHeadroomTable(const HeadroomResult& r, std::ostream& out) {
  out << fmt::format("Headroom: {} — more units of {} ({}, {:g} kW each)\n\n", r.plant_name,
                     r.drive_kind, r.front_end, r.unit_kw);
  out << fmt::format("{:<14} {:>6} {:>10}  {:<48} {:>6} {:>8}\n", "bus", "units", "kW",
                     "binds first (at one unit more)", "trials", "seconds");
  bool capped = false, already = false, unsolvable = false;
  for (const BusHeadroom& h : r.buses) {
    out << fmt::format(
        "{:<14} {:>6} {:>10.1f}  {:<48} {:>6} {:>8.2f}\n", h.bus,
        h.capped ? fmt::format(">={}", h.added_units) : fmt::format("{}", h.added_units),
        h.added_kw, BindingText(h), h.studies, h.seconds);
    capped |= h.capped;
    already |= h.already_violating;
    unsolvable |= h.binding && h.binding->what == "unsolvable";
  }
  out << '\n';
  if (already) {
    out << "The plant exceeds a limit with nothing added: no headroom at any bus; the row shows "
           "the "
           "worst figure (see `overtone mitigate`).\n";
  }
  if (capped) {
    out << fmt::format(
        "No limit binds up to the search cap of {} units (--max-units) at the "
        "buses marked >=.\n",
        r.max_units);
  }
  if (unsolvable) {
    out << "unsolvable: with one unit more the load flow or the bridge model did not converge; the "
           "bus is taken as full at the last count that solved.\n";
  }
  out << "Limits: the profile's checks at the pcc, THDv and individual orders at every bus (design "
         "guide included), capacitor duty (IEEE 18) and transformer derating (IEEE C57.110).\n";
  out << "\nCautions:\n";
  for (const std::string& c : r.cautions) out << "  - " << c << '\n';
}

void WriteHeadroomJson(const HeadroomResult& r, std::ostream& out) {
  internal::JsonWriter j(out);
  j.BeginObject().Field("overtone", 1);
  j.Key("search").BeginObject();
  j.Field("drive_kind", r.drive_kind).Field("front_end", r.front_end).Field("unit_kw", r.unit_kw);
  j.Field("max_units", r.max_units).EndObject();
  j.Key("headroom").BeginArray();
  for (const BusHeadroom& h : r.buses) {
    j.BeginObject()
        .Field("bus", h.bus)
        .Field("added_units", h.added_units)
        .Field("added_kw", h.added_kw);
    if (h.binding) {
      j.Key("binding")
          .BeginObject()
          .Field("where", h.binding->where)
          .Field("what", h.binding->what);
      j.Field("value", h.binding->value).Field("limit", h.binding->limit).EndObject();
    }
    j.Field("capped", h.capped).Field("already_violating", h.already_violating);
    j.Field("trials", h.studies).EndObject();
  }
  j.EndArray();
  j.StringArray("cautions", r.cautions).EndObject();
  out << '\n';
}

}  // namespace overtone
