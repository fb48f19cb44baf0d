// src/mitigate_yaml.cc — plant elements written back as format-1 YAML (PLANT-FORMAT.md keys).
#include "mitigate_yaml.h"

#include <fmt/format.h>

namespace overtone::internal {
namespace {

// Ten significant digits: reads back within 1e-10 of the model's value, without binary noise.
std::string Num(double v) { return fmt::format("{:.10g}", v); }

std::string Percent(double fraction) { return Num(100.0 * fraction) + " %"; }

std::string Reactor(const ReactorSpec& r) {
  return r.kind == ReactorSpec::Kind::kHenry ? Num(1e3 * r.value) + " mH" : Percent(r.value);
}

}  // namespace

std::string YamlQuoted(const std::string& text) {
  std::string out = "\"";
  for (char c : text) {
    if (c == '"' || c == '\\') out += '\\';
    out += c;
  }
  return out + '"';
}

std::string DriveYaml(const Drive& d) {
  std::string y = fmt::format("  - name: {}\n    bus: {}\n    count: {}\n    power: {} kW\n",
                              YamlQuoted(d.name), YamlQuoted(d.bus), d.count, Num(d.power_w / 1e3));
  y += fmt::format("    loading: {}\n    front_end: {}\n", Percent(d.loading),
                   ToString(d.front_end));
  const bool table = d.front_end == FrontEnd::kMeasured || d.front_end == FrontEnd::kActive;
  if (d.front_end == FrontEnd::kMultipulse) {
    y += fmt::format("    pulses: {}\n", d.pulses);
    if (d.imbalance > 0.0) y += fmt::format("    imbalance: {}\n", Percent(d.imbalance));
  }
  if (d.front_end == FrontEnd::kThyristor)
    y += fmt::format("    firing_angle: {} deg\n", Num(d.firing_angle_deg));
  if (d.front_end != FrontEnd::kMeasured) {
    if (d.line_reactor.kind != ReactorSpec::Kind::kNone)
      y += "    line_reactor: " + Reactor(d.line_reactor) + "\n";
    if (d.dc_choke.kind != ReactorSpec::Kind::kNone)
      y += "    dc_choke: " + Reactor(d.dc_choke) + "\n";
    if (d.dc_capacitance_f)
      y += fmt::format("    dc_capacitance: {} uF\n", Num(*d.dc_capacitance_f * 1e6));
  }
  if (table) {
    y += fmt::format("    displacement_pf: {}\n", Num(d.displacement_pf));
    if (!d.harmonics.empty()) {
      y += "    harmonics:\n";
      for (const HarmonicEntry& e : d.harmonics) {
        y += fmt::format("      - {{order: {}, percent: {}, angle: {} deg}}\n", e.order,
                         Num(e.percent), Num(e.angle_deg));
      }
    }
  }
  return y;
}

std::string CapacitorYaml(const Capacitor& c) {
  std::string y =
      fmt::format("  - {{name: {}, bus: {}, rating: {} kvar, kv: {} kV, steps: {}, steps_on: {}",
                  YamlQuoted(c.name), YamlQuoted(c.bus), Num(c.rating_var / 1e3),
                  Num(c.rated_v / 1e3), c.steps, c.steps_on);
  if (c.detuning > 0.0)
    y += fmt::format(", detuning: {}, x_over_r: {}", Percent(c.detuning), Num(c.x_over_r));
  return y + "}\n";
}

std::string FilterYaml(const Filter& f) {
  return fmt::format(
      "  - {{name: {}, bus: {}, type: {}, rating: {} kvar, kv: {} kV, tuned_order: {}, "
      "quality: {}}}\n",
      YamlQuoted(f.name), YamlQuoted(f.bus),
      f.type == FilterType::kSingleTuned ? "single-tuned" : "high-pass", Num(f.rating_var / 1e3),
      Num(f.rated_v / 1e3), Num(f.tuned_order), Num(f.quality));
}

}  // namespace overtone::internal
