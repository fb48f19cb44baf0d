// app/spectrum_command.cc — `overtone spectrum`: one drive group's current spectrum, waveform and
// chart.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <filesystem>
#include <iostream>
#include <memory>
#include <numbers>
#include <sstream>
#include <string_view>

#include "commands.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"

namespace overtone::app {
namespace {

constexpr double kDegPerRad = 180.0 / std::numbers::pi;
constexpr double kListedPercent = 0.01;  // smaller orders are round-off: left out of the table
constexpr double kPastedPercent = 0.1;   // orders in the ready-to-paste `harmonics:` block

struct Args {
  std::string plant, drive, json, waveform, svg;
};

// ---- Small helpers ------------------------------------------------------------------------------

// Angle in degrees wrapped to (-180, 180].
double Wrap(double deg) {
  double a = std::fmod(deg, 360.0);
  if (a <= -180.0) a += 360.0;
  if (a > 180.0) a -= 360.0;
  return a;
}

// Angle of order h relative to the group's fundamental current: angle_h - h angle_1, the angle a
// `measured` drive's table holds (PLANT-FORMAT.md "Conventions").
double RelativeAngle(const Spectrum& s, int h) {
  return Wrap((std::arg(s.at(h)) - h * std::arg(s.at(1))) * kDegPerRad);
}

// "; did you mean `P-101`?" for a likely slip, else the list of names (or that there are none).
std::string Suggestion(const std::string& word, const std::vector<Drive>& drives) {
  if (drives.empty()) return "; the plant has no drive groups";
  std::vector<std::string> names;
  for (const Drive& d : drives) names.push_back(d.name);
  const std::string hint = SuggestName(word, names);
  if (!hint.empty()) return hint;
  std::string list;
  for (const std::string& name : names) list += (list.empty() ? "" : ", ") + name;
  return "; the drive groups are: " + list;
}

std::string Reactor(const ReactorSpec& r) {
  switch (r.kind) {
    case ReactorSpec::Kind::kNone:
      return "none";
    case ReactorSpec::Kind::kFraction:
      return fmt::format("{:g} %", r.value * 100.0);
    case ReactorSpec::Kind::kHenry:
      return r.value < 1e-3 ? fmt::format("{:g} uH", r.value * 1e6)
                            : fmt::format("{:g} mH", r.value * 1e3);
  }
  return "";
}

bool HasBridgeModel(FrontEnd f) { return f != FrontEnd::kMeasured && f != FrontEnd::kActive; }
bool CurrentStiff(FrontEnd f) { return f == FrontEnd::kDiodeChoke || f == FrontEnd::kThyristor; }

// What the front end is, with the unit's own reactors and DC link.
std::string FrontEndText(const Drive& d, double nominal_v) {
  // The format's default DC capacitance (PLANT-FORMAT.md "drives"): 40 uF per kW at 480 V.
  const double ratio = 480.0 / nominal_v;
  const double c_uf =
      d.dc_capacitance_f ? *d.dc_capacitance_f * 1e6 : 40.0 * d.power_w / 1e3 * ratio * ratio;
  const std::string capacitor = fmt::format("DC capacitor {:.0f} uF per unit{}", c_uf,
                                            d.dc_capacitance_f ? "" : " (format default)");
  const std::string reactors =
      fmt::format("line reactor {}, DC choke {}", Reactor(d.line_reactor), Reactor(d.dc_choke));
  switch (d.front_end) {
    case FrontEnd::kDiodeCapacitor:
      return fmt::format("six-pulse diode bridge; {}; {}", reactors, capacitor);
    case FrontEnd::kDiodeChoke:
      return fmt::format("six-pulse diode bridge, current-stiff DC link; line reactor {}",
                         Reactor(d.line_reactor));
    case FrontEnd::kThyristor:
      return fmt::format(
          "six-pulse thyristor bridge, firing angle {:g} deg, current-stiff DC link; "
          "line reactor {}",
          d.firing_angle_deg, Reactor(d.line_reactor));
    case FrontEnd::kSinglePhase:
      return fmt::format(
          "single-phase diode bridges line to line, spread over the three line pairs; {}; {}",
          reactors, capacitor);
    case FrontEnd::kMultipulse:
      return fmt::format(
          "{}-pulse: {} six-pulse diode bridges behind phase-shifting windings, "
          "imbalance {:g} %; {}; {}",
          d.pulses, d.pulses / 6, d.imbalance * 100.0, reactors, capacitor);
    case FrontEnd::kActive:
      return d.harmonics.empty()
                 ? "active front end, built-in default spectrum (common practice)"
                 : fmt::format("active front end, spectrum table of {} orders", d.harmonics.size());
    case FrontEnd::kMeasured:
      return fmt::format("measured spectrum table of {} orders", d.harmonics.size());
  }
  return "";
}

// ---- Terminal report ----------------------------------------------------------------------------

void PrintReport(const Plant& plant, const Drive& d, const StudyResult& r, const DriveResult& g,
                 std::ostream& out) {
  const auto bus = std::find_if(r.buses.begin(), r.buses.end(),
                                [&](const BusResult& b) { return b.name == d.bus; });
  const Phasor v1 = bus->voltage_pu.at(1), i1 = g.current_a.at(1);
  const std::complex<double> s = std::sqrt(3.0) * bus->nominal_v * v1 * std::conj(i1);  // drawn, VA
  const double pf = std::abs(s) > 0.0 ? s.real() / std::abs(s) : 1.0;
  // Q within round-off of zero: a unity displacement factor, neither lagging nor leading.
  const double q = std::abs(s.imag()) <= 1e-6 * std::abs(s) ? 0.0 : s.imag();
  const char* sense = q > 0.0 ? " lagging" : q < 0.0 ? " leading" : "";
  const double fundamental = std::abs(i1);

  fmt::print(out, "Drive group {} at bus {}: {} x {:g} kW, {}, loading {:g} %\n", g.name, g.bus,
             g.count, d.power_w / 1e3, ToString(d.front_end), d.loading * 100.0);
  fmt::print(out, "Front end: {}\n", FrontEndText(d, bus->nominal_v));
  fmt::print(
      out,
      "Operating point: bus V1 {:.4f} pu ({:.1f} V line to line), P {:.1f} kW, Q {:.1f} kvar, "
      "displacement PF {:.4f}{}\n",
      std::abs(v1), std::abs(v1) * bus->nominal_v, s.real() / 1e3, q / 1e3, pf, sense);
  fmt::print(out, "Study: {} ({:g} Hz, orders to {})\n\n", plant.study.name,
             plant.study.frequency_hz, plant.study.max_order);

  fmt::print(out, "I1 {:.1f} A   Irms {:.1f} A   THDi {:.2f} %\n", fundamental, g.indices.rms,
             g.indices.thd_percent);
  if (g.vdc_v) {
    // Multipulse: figures of one internal unit; single-phase: of the units on one line pair.
    const bool multipulse = d.front_end == FrontEnd::kMultipulse;
    const std::string unit = multipulse ? " (one internal six-pulse unit)"
                             : d.front_end == FrontEnd::kSinglePhase
                                 ? " (the units on one line pair)"
                                 : "";
    fmt::print(out, "DC voltage (mean) {:.1f} V{}\n", *g.vdc_v, multipulse ? unit : "");
    fmt::print(out, "Peak {} current {:.1f} A{}\n",
               d.front_end == FrontEnd::kSinglePhase ? "unit" : "line",
               g.peak_current_a.value_or(0.0), unit);
    if (CurrentStiff(d.front_end)) {
      fmt::print(
          out, "Overlap angle {:.2f} deg per commutation (conduction {:.2f} deg per half cycle)\n",
          g.overlap_deg.value_or(0.0), g.conduction_deg.value_or(0.0));
    } else {
      fmt::print(out, "Conduction angle {:.2f} deg per half cycle{}\n",
                 g.conduction_deg.value_or(0.0), unit);
    }
  } else {
    fmt::print(out, "Peak line current {:.1f} A (rebuilt from the spectrum)\n",
               std::sqrt(2.0) * g.indices.peak);
    fmt::print(
        out,
        "Table front end: no waveform, DC voltage or conduction data (the built-in bridge model "
        "is not used)\n");
  }

  fmt::print(out,
             "\nSpectrum (drawn from the bus; angle relative to the group's fundamental current, "
             "angle_h - h angle_1; orders below {} % left out)\n",
             kListedPercent);
  fmt::print(out, "{:>5}  {:>10}  {:>9}  {:>9}\n", "order", "A", "% of I1", "angle deg");
  std::vector<int> pasted;
  for (int h = 1; h < static_cast<int>(g.current_a.by_order.size()); ++h) {
    const double amps = std::abs(g.current_a.at(h));
    const double percent = fundamental > 0.0 ? 100.0 * amps / fundamental : 0.0;
    if (h > 1 && percent < kListedPercent) continue;
    if (h > 1 && percent >= kPastedPercent) pasted.push_back(h);
    fmt::print(out, "{:>5}  {:>10.2f}  {:>9.2f}  {:>9.1f}\n", h, amps, percent,
               h == 1 ? 0.0 : RelativeAngle(g.current_a, h));
  }

  fmt::print(out, "\nFor a `measured` drive (orders of at least {} %):\n", kPastedPercent);
  if (q >= 0.0) {
    fmt::print(out, "    displacement_pf: {:.4f}\n", pf);
  } else {  // the format's displacement_pf is lagging (PLANT-FORMAT.md "drives")
    fmt::print(out,
               "    # displacement PF {:.4f} leading: displacement_pf takes lagging values only\n",
               pf);
  }
  fmt::print(out, "    harmonics:\n");
  for (int h : pasted) {
    fmt::print(out, "      - {{order: {}, percent: {:.2f}, angle: {:.1f} deg}}\n", h,
               100.0 * std::abs(g.current_a.at(h)) / fundamental, RelativeAngle(g.current_a, h));
  }

  const std::string tag = fmt::format("drive '{}'", g.name);
  bool heading = false;
  for (const std::string& w : r.warnings) {
    if (w.rfind(tag, 0) != 0) continue;
    if (!heading) fmt::print(out, "\nWarnings\n");
    heading = true;
    fmt::print(out, "- {}\n", w);
  }
  fmt::print(out, "\nCautions\n");
  for (const std::string& c : r.cautions) fmt::print(out, "- {}\n", c);
}

int UsageError(const std::string& message) {
  std::cerr << "error: " << message << '\n';
  return kExitBadInput;
}

// The folder an output file goes into must exist before any work is done.
bool FolderExists(const std::string& path) {
  const std::filesystem::path parent = std::filesystem::path(path).parent_path();
  return parent.empty() || std::filesystem::is_directory(parent);
}

int Run(const Args& a) {
  const Plant plant = LoadPlant(a.plant);
  const auto drive = std::find_if(plant.drives.begin(), plant.drives.end(),
                                  [&](const Drive& d) { return d.name == a.drive; });
  if (drive == plant.drives.end()) {
    return UsageError(fmt::format("--drive: no drive group named '{}' in {}{}", a.drive, a.plant,
                                  Suggestion(a.drive, plant.drives)));
  }
  if (!HasBridgeModel(drive->front_end) && (!a.waveform.empty() || !a.svg.empty())) {
    return UsageError(fmt::format(
        "drive '{}' has a {} front end (a spectrum table): there is no waveform for {}; --waveform "
        "and --svg need a built-in bridge front end",
        a.drive, ToString(drive->front_end),
        !a.waveform.empty() && !a.svg.empty() ? "--waveform and --svg"
        : !a.waveform.empty()                 ? "--waveform"
                                              : "--svg"));
  }
  using Output = std::pair<std::string, std::string>;
  for (const auto& [option, path] :
       {Output{"--json", a.json}, Output{"--waveform", a.waveform}, Output{"--svg", a.svg}}) {
    if (path == "-" && option != "--json") {
      return UsageError(
          fmt::format("{} writes a file; '-' (standard output) is for --json", option));
    }
    if (!path.empty() && path != "-" && !FolderExists(path)) {
      return UsageError(fmt::format("{} {}: the folder does not exist", option, path));
    }
  }

  StudyOptions options;
  options.scan = false;
  options.keep_waveforms = !a.waveform.empty() || !a.svg.empty();
  options.exact_drive = a.drive;  // its own simulation, also where other groups are interpolated
  const StudyResult result = RunStudy(plant, options);
  const auto group = std::find_if(result.drives.begin(), result.drives.end(),
                                  [&](const DriveResult& g) { return g.name == a.drive; });
  if (options.keep_waveforms && group->waveform.theta_deg.empty()) {
    throw std::logic_error("the bridge model returned no waveform");
  }

  // Everything is rendered before the first file is written: a failure leaves no partial output.
  const auto render = [](const auto& write) {
    std::ostringstream text;
    write(text);
    return text.str();
  };
  const std::string json =
      a.json.empty() ? "" : render([&](std::ostream& o) { WriteDriveJson(*group, o); });
  const std::string csv = a.waveform.empty() ? "" : render([&](std::ostream& o) {
    WriteDriveWaveformCsv(group->waveform, o);
  });
  const std::string svg =
      a.svg.empty() ? ""
                    : render([&](std::ostream& o) { WriteDriveWaveformSvg(*drive, *group, o); });
  for (const auto& [path, text] :
       {Output{a.json, json}, Output{a.waveform, csv}, Output{a.svg, svg}}) {
    if (path.empty() || path == "-") continue;
    WriteFileAtomically(path, [&](std::ostream& o) { o << text; });
  }
  if (a.json == "-") {
    std::cout << json;
  } else {
    PrintReport(plant, *drive, result, *group, std::cout);
  }
  return kExitOk;
}

}  // namespace

Command AddSpectrumCommand(CLI::App& app) {
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "spectrum",
      "One drive group's line-current spectrum from its front end at its operating point, "
      "with its waveform and a chart");
  cmd->add_option("PLANT", args->plant, "plant file (YAML, format 1)")->required();
  cmd->add_option("--drive", args->drive, "the drive group")->type_name("NAME")->required();
  AddJsonOption(cmd, &args->json, "the group's drive entry");
  cmd->add_option(
         "--waveform", args->waveform,
         "write one period (theta_deg, line_current_a, voltage_v, dc_voltage_v) as CSV to FILE")
      ->type_name("FILE.csv");
  cmd->add_option("--svg", args->svg,
                  "draw the line-current pulse over the terminal voltage into FILE")
      ->type_name("FILE.svg");
  return {cmd, [args]() { return Run(*args); }};
}

}  // namespace overtone::app
