// src/output_drive.cc — one drive group's waveform: CSV samples and an SVG chart.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <cmath>
#include <vector>

#include "output_common.h"
#include "overtone/report.h"

namespace overtone {
namespace {

// The smallest round number (a power of ten times 1, 1.2, 1.6, 2, 3, 4, 5, 6 or 8, so that its
// quarters are round too) that is at least x (x > 0).
double NiceCeiling(double x) {
  const double decade = std::pow(10.0, std::floor(std::log10(x)));
  for (double m : {1.0, 1.2, 1.6, 2.0, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0}) {
    if (m * decade >= x * (1.0 - 1e-12)) return m * decade;
  }
  return 10.0 * decade;
}

}  // namespace

void WriteDriveWaveformCsv(const DriveWaveform& w, std::ostream& out) {
  out << "theta_deg,line_current_a,voltage_v,dc_voltage_v\n";
  for (std::size_t n = 0; n < w.theta_deg.size(); ++n) {
    fmt::print(out, "{:.4f},{:.6g},{:.6g},{:.6g}\n", w.theta_deg[n], w.line_current_a[n],
               w.voltage_v[n], w.dc_voltage_v[n]);
  }
}

// Line current (solid, left scale) over the terminal voltage (dashed, right scale), one period.
// Both scales are symmetric about zero so that the zero lines coincide. Okabe-Ito colours.
void WriteDriveWaveformSvg(const Drive& d, const DriveResult& g, std::ostream& out) {
  constexpr double kWidth = 760, kHeight = 470, kLeft = 78, kRight = 682, kTop = 62, kBottom = 362;
  constexpr const char* kCurrentColour = "#0072B2";
  constexpr const char* kVoltageColour = "#D55E00";
  const DriveWaveform& w = g.waveform;
  const bool single_phase = d.front_end == FrontEnd::kSinglePhase;
  // The period drawn from 0 to 360 deg: samples wrapped into [0, 360) and taken in order from the
  // smallest (the waveform is periodic, so this is the same period).
  const std::size_t samples = w.theta_deg.size();
  std::vector<double> wrapped(samples);
  for (std::size_t n = 0; n < samples; ++n) {
    wrapped[n] = std::fmod(w.theta_deg[n], 360.0);
    if (wrapped[n] < 0.0) wrapped[n] += 360.0;
  }
  const std::size_t first =
      static_cast<std::size_t>(std::min_element(wrapped.begin(), wrapped.end()) - wrapped.begin());
  const auto sample = [&](std::size_t k) { return (first + k) % samples; };
  constexpr double t0 = 0.0, t1 = 360.0;
  double i_max = 0.0, v_max = 0.0;
  for (double i : w.line_current_a) i_max = std::max(i_max, std::abs(i));
  for (double v : w.voltage_v) v_max = std::max(v_max, std::abs(v));
  i_max = NiceCeiling(std::max(i_max, 1e-9));
  v_max = NiceCeiling(std::max(v_max, 1e-9));
  const auto x_of = [&](double t) { return kLeft + (t - t0) / (t1 - t0) * (kRight - kLeft); };
  const auto y_of = [&](double value, double full) {
    return 0.5 * (kTop + kBottom) - value / full * 0.5 * (kBottom - kTop);
  };
  const std::string current_label =
      single_phase ? "unit current (one line pair) in A" : "line current (phase a) in A";
  const std::string voltage_label =
      single_phase ? "line-to-line voltage in V" : "phase voltage (a to neutral) in V";

  fmt::print(out,
             "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{1}\" "
             "viewBox=\"0 0 {0} {1}\" font-family=\"Helvetica, Arial, sans-serif\" "
             "font-size=\"12\">\n",
             kWidth, kHeight);
  fmt::print(out, "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n");
  fmt::print(out,
             "<text x=\"{}\" y=\"22\" font-size=\"15\" font-weight=\"bold\">"
             "{}: {}, THDi {:.1f} %</text>\n",
             kLeft, internal::XmlEscape(g.name), internal::XmlEscape(ToString(d.front_end)), g.indices.thd_percent);
  fmt::print(out, "<text x=\"{}\" y=\"40\" fill=\"#444444\">{}</text>\n", kLeft,
             internal::XmlEscape(fmt::format(
                 "bus {}, {} x {:g} kW at {:g} %; one period at the terminal{}", g.bus, g.count,
                 d.power_w / 1e3, d.loading * 100.0,
                 d.front_end == FrontEnd::kMultipulse ? ", one internal six-pulse unit" : "")));

  // Grid: every 30 deg across, quarters of each scale along.
  for (double t = t0; t <= t1; t += 30.0) {
    const double x = x_of(t);
    fmt::print(out,
               "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"#dddddd\"/>\n",
               x, kTop, kBottom);
    fmt::print(out, "<text x=\"{:.1f}\" y=\"{}\" text-anchor=\"middle\">{:g}</text>\n", x,
               kBottom + 18, t);
  }
  for (int k = -4; k <= 4; ++k) {
    const double y = y_of(k / 4.0, 1.0);
    fmt::print(out, "<line x1=\"{}\" y1=\"{:.1f}\" x2=\"{}\" y2=\"{:.1f}\" stroke=\"{}\"/>\n",
               kLeft, y, kRight, y, k == 0 ? "#999999" : "#dddddd");
    fmt::print(out, "<text x=\"{}\" y=\"{:.1f}\" text-anchor=\"end\" fill=\"{}\">{:g}</text>\n",
               kLeft - 6, y + 4, kCurrentColour, i_max * k / 4.0);
    fmt::print(out, "<text x=\"{}\" y=\"{:.1f}\" fill=\"{}\">{:g}</text>\n", kRight + 6, y + 4,
               kVoltageColour, v_max * k / 4.0);
  }
  fmt::print(
      out,
      "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" stroke=\"#000000\"/>\n",
      kLeft, kTop, kRight - kLeft, kBottom - kTop);
  fmt::print(out,
             "<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">"
             "phase angle in degrees (study frame)</text>\n",
             0.5 * (kLeft + kRight), kBottom + 36);
  fmt::print(out,
             "<text transform=\"translate(20 {}) rotate(-90)\" text-anchor=\"middle\" "
             "fill=\"{}\">{}</text>\n",
             0.5 * (kTop + kBottom), kCurrentColour, internal::XmlEscape(current_label));
  fmt::print(out,
             "<text transform=\"translate({} {}) rotate(90)\" text-anchor=\"middle\" "
             "fill=\"{}\">{}</text>\n",
             kWidth - 20, 0.5 * (kTop + kBottom), kVoltageColour, internal::XmlEscape(voltage_label));

  // Voltage first so that the current pulse draws over it.
  const auto polyline = [&](const std::vector<double>& values, double full, const char* colour,
                            const char* dash, double width) {
    fmt::print(out, "<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"{}\"{} points=\"", colour,
               width, *dash ? fmt::format(" stroke-dasharray=\"{}\"", dash) : "");
    for (std::size_t k = 0; k < samples; ++k) {
      fmt::print(out, "{}{:.1f},{:.1f}", k ? " " : "", x_of(wrapped[sample(k)]),
                 y_of(values[sample(k)], full));
    }
    fmt::print(out, "\"/>\n");
  };
  polyline(w.voltage_v, v_max, kVoltageColour, "7 4", 1.5);
  polyline(w.line_current_a, i_max, kCurrentColour, "", 2.2);

  // Legend below the axis title, then the cautions in small print.
  const double legend = kBottom + 62;
  fmt::print(
      out,
      "<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"{3}\" stroke-width=\"2.2\"/>\n",
      kLeft, legend - 4, kLeft + 40, kCurrentColour);
  fmt::print(out, "<text x=\"{}\" y=\"{}\">{} (solid, left scale); peak {:.1f} A</text>\n",
             kLeft + 50, legend, internal::XmlEscape(current_label), g.peak_current_a.value_or(0.0));
  fmt::print(
      out,
      "<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"{3}\" stroke-width=\"1.5\" "
      "stroke-dasharray=\"7 4\"/>\n",
      kLeft, legend + 14, kLeft + 40, kVoltageColour);
  fmt::print(out, "<text x=\"{}\" y=\"{}\">{} (dashed, right scale)</text>\n", kLeft + 50,
             legend + 18, internal::XmlEscape(voltage_label));
  fmt::print(out,
             "<text x=\"{}\" y=\"{}\" text-anchor=\"middle\" font-size=\"9\" fill=\"#444444\">"
             "Screening study; results depend on data quality; verify by measurement; follow local "
             "codes, the utility's requirements and a licensed engineer's judgment.</text>\n",
             0.5 * kWidth, kHeight - 10);
  fmt::print(out, "</svg>\n");
}

// ---- The command --------------------------------------------------------------------------------

// A usage error on standard error; the exit status for it.

}  // namespace overtone
