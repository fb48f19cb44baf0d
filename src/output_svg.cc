// src/output_svg.cc — hand-written SVG charts: frequency scans (one per monitored bus) and the
// report's bar charts (THDv per bus, pcc current, drive spectra).
//
// Readable in black and white (each curve has its own dash pattern; bars over their limit are
// hatched and say "over") and in colour for the common forms of colour blindness (the Okabe-Ito
// palette); |Z| on a log scale so that the curve without capacitors and a sharp peak fit on one
// chart.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <set>
#include <sstream>

#include "output_common.h"
#include "overtone/report.h"
#include "overtone/scan.h"

namespace overtone {
namespace {

using internal::XmlEscape;

constexpr double kWidth = 760, kPlotLeft = 78, kPlotRight = 736, kPlotTop = 64,
                 kPlotBottom = 352;  // top: room for the subtitle and the order labels
constexpr double kLegendTop = 412, kLegendRow = 18;
constexpr int kMaxDecades = 6;  // lower curves are clipped this far below the highest decade

struct Style {
  const char* colour;
  const char* dash;  // "" = solid
};
constexpr Style kStyles[] = {{"#000000", ""},         {"#0072B2", "9 4"}, {"#D55E00", "2 3"},
                             {"#009E73", "10 3 2 3"}, {"#CC79A7", "5 2"}, {"#56B4E9", "1 3"}};
// Curves without capacitors and filters, one per variant, in greys.
constexpr Style kBaseStyles[] = {{"#777777", "3 3"}, {"#777777", "8 2 1 2"}, {"#aaaaaa", "1 2"}};

struct Curve {
  std::string label;
  const std::vector<double>* orders;
  const std::vector<Phasor>* impedance;
  const std::vector<ResonancePeak>* peaks;  // nullptr: none marked
  Style style;
};

std::string FileStem(const std::string& bus) { return "scan_" + internal::FileSafe(bus); }

// The curves of one bus: per variant its worst configuration, its present state and its curve
// without capacitors and filters (as many as there are styles).
std::vector<Curve> CurvesAt(const std::vector<ScanResult>& variants, const std::string& bus) {
  std::vector<Curve> curves, bases;
  std::size_t style = 0;
  for (std::size_t v = 0; v < variants.size(); ++v) {
    const ScanResult& r = variants[v];
    const auto it = std::find(r.buses.begin(), r.buses.end(), bus);
    if (it == r.buses.end()) continue;
    const int b = static_cast<int>(it - r.buses.begin());
    const std::string prefix = variants.size() > 1 ? fmt::format("[{}] ", v + 1) : "";
    const int worst = r.WorstConfigurationAt(b);
    std::vector<std::pair<int, std::string>> shown;
    if (worst >= 0)
      shown.push_back({worst, worst == r.present_configuration ? "worst, present: " : "worst: "});
    if (worst != r.present_configuration) shown.push_back({r.present_configuration, "present: "});
    for (const auto& [c, what] : shown) {
      const BusScan& s = r.at(c, b);
      if (s.impedance_ohm.empty() || style >= std::size(kStyles)) continue;
      curves.push_back({prefix + what + r.configurations[c], &r.orders, &s.impedance_ohm, &s.peaks,
                        kStyles[style++]});
    }
    if (!r.base_impedance_ohm.empty() && bases.size() < std::size(kBaseStyles)) {
      bases.push_back({prefix + "without capacitors and filters", &r.orders,
                       &r.base_impedance_ohm[b], nullptr, kBaseStyles[bases.size()]});
    }
  }
  curves.insert(curves.end(), bases.begin(), bases.end());
  return curves;
}

void WriteChart(std::ostream& out, const std::string& bus, const std::vector<Curve>& curves,
                const ScanOptions& o) {
  double z_max = 0.0, z_min = 1e300;
  for (const Curve& c : curves) {
    for (const Phasor& z : *c.impedance) {
      if (std::abs(z) > 0.0)
        z_max = std::max(z_max, std::abs(z)), z_min = std::min(z_min, std::abs(z));
    }
  }
  if (z_max <= 0.0) z_max = 1.0, z_min = 0.1;
  const int hi = static_cast<int>(std::ceil(std::log10(z_max)));
  int lo = std::max(static_cast<int>(std::floor(std::log10(z_min))), hi - kMaxDecades);
  if (lo == hi) --lo;
  const auto x_of = [&](double h) {
    return kPlotLeft + (h - o.from_order) / (o.to_order - o.from_order) * (kPlotRight - kPlotLeft);
  };
  const auto y_of = [&](double z) {
    const double d = std::clamp(std::log10(std::max(z, 1e-300)), double(lo), double(hi));
    return kPlotBottom - (d - lo) / (hi - lo) * (kPlotBottom - kPlotTop);
  };
  const double height = kLegendTop + kLegendRow * curves.size() + 16;

  fmt::print(out,
             "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{1}\" viewBox=\"0 0 "
             "{0} {1}\" "
             "font-family=\"Helvetica, Arial, sans-serif\" font-size=\"12\">\n",
             kWidth, height);
  fmt::print(out, "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n");
  fmt::print(
      out,
      "<text x=\"{}\" y=\"22\" font-size=\"15\" font-weight=\"bold\">Driving-point impedance "
      "at {}</text>\n",
      kPlotLeft, XmlEscape(bus));
  fmt::print(out,
             "<text x=\"{}\" y=\"40\" fill=\"#444444\">Characteristic orders 6k\u00b11 marked; "
             "circles: peaks (filled: high risk)</text>\n",
             kPlotLeft);

  // Grid: decades (and 2, 5 within few decades) across, orders along.
  for (int d = lo; d <= hi; ++d) {
    for (int m : {1, 2, 5}) {
      if (m != 1 && (hi - lo > 3 || d == hi)) continue;
      const double z = m * std::pow(10.0, d);
      const double y = y_of(z);
      fmt::print(out,
                 "<line x1=\"{}\" y1=\"{:.1f}\" x2=\"{}\" y2=\"{:.1f}\" stroke=\"#dddddd\"/>\n",
                 kPlotLeft, y, kPlotRight, y);
      fmt::print(out, "<text x=\"{}\" y=\"{:.1f}\" text-anchor=\"end\">{:g}</text>\n",
                 kPlotLeft - 6, y + 4, z);
    }
  }
  const double span = o.to_order - o.from_order;
  const double tick = span > 40 ? 5 : span > 16 ? 2 : span > 4 ? 1 : 0.2;
  for (double h = std::ceil(o.from_order / tick) * tick; h <= o.to_order + 1e-9; h += tick) {
    fmt::print(out, "<text x=\"{:.1f}\" y=\"{}\" text-anchor=\"middle\">{:g}</text>\n", x_of(h),
               kPlotBottom + 18, h);
  }
  for (int k = 1; 6 * k - 1 <= o.to_order; ++k) {
    for (int h : {6 * k - 1, 6 * k + 1}) {
      if (h < o.from_order || h > o.to_order) continue;
      const double x = x_of(h);
      fmt::print(out,
                 "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"#999999\" "
                 "stroke-dasharray=\"1 3\"/>\n",
                 x, kPlotTop, kPlotBottom);
      fmt::print(
          out,
          "<text x=\"{:.1f}\" y=\"{}\" text-anchor=\"middle\" fill=\"#666666\" font-size=\"10\">{}"
          "</text>\n",
          x, kPlotTop - 3, h);
    }
  }
  fmt::print(
      out,
      "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" stroke=\"#000000\"/>\n",
      kPlotLeft, kPlotTop, kPlotRight - kPlotLeft, kPlotBottom - kPlotTop);
  fmt::print(out, "<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">harmonic order h</text>\n",
             0.5 * (kPlotLeft + kPlotRight), kPlotBottom + 36);
  fmt::print(out,
             "<text transform=\"translate(20 {}) rotate(-90)\" text-anchor=\"middle\">|Z| in ohm "
             "(log scale)</text>\n",
             0.5 * (kPlotTop + kPlotBottom));

  // Curves, base first so that the others draw over it; then peaks and the legend.
  for (auto c = curves.rbegin(); c != curves.rend(); ++c) {
    fmt::print(out, "<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"1.8\"{} points=\"",
               c->style.colour,
               *c->style.dash ? fmt::format(" stroke-dasharray=\"{}\"", c->style.dash) : "");
    for (std::size_t k = 0; k < c->impedance->size(); ++k) {
      fmt::print(out, "{}{:.1f},{:.1f}", k ? " " : "", x_of((*c->orders)[k]),
                 y_of(std::abs((*c->impedance)[k])));
    }
    fmt::print(out, "\"/>\n");
  }
  // Peaks as circles (filled when high risk); their orders are listed in the legend, not beside
  // the circles, where labels of neighbouring curves would overlap.
  for (const Curve& c : curves) {
    if (!c.peaks) continue;
    for (const ResonancePeak& p : *c.peaks) {
      fmt::print(out,
                 "<circle cx=\"{:.1f}\" cy=\"{:.1f}\" r=\"4\" stroke=\"{}\" stroke-width=\"1.5\" "
                 "fill=\"{}\"/>\n",
                 x_of(p.order), y_of(p.impedance_ohm), c.style.colour,
                 p.risk == Risk::kHigh ? c.style.colour : "#ffffff");
    }
  }
  for (std::size_t k = 0; k < curves.size(); ++k) {
    const Curve& c = curves[k];
    const double y = kLegendTop + kLegendRow * k;
    fmt::print(out,
               "<line x1=\"{}\" y1=\"{:.1f}\" x2=\"{}\" y2=\"{:.1f}\" stroke=\"{}\" "
               "stroke-width=\"2\"{}/>\n",
               kPlotLeft, y - 4, kPlotLeft + 40, y - 4, c.style.colour,
               *c.style.dash ? fmt::format(" stroke-dasharray=\"{}\"", c.style.dash) : "");
    std::string peaks;
    for (const ResonancePeak& p : c.peaks ? *c.peaks : std::vector<ResonancePeak>{}) {
      peaks += fmt::format("{}{:.2f}{}", peaks.empty() ? "; peaks at " : ", ", p.order,
                           p.risk == Risk::kLow ? "" : " (" + ToString(p.risk) + ")");
    }
    fmt::print(out, "<text x=\"{}\" y=\"{:.1f}\">{}</text>\n", kPlotLeft + 50, y,
               XmlEscape(c.label + peaks));
  }
  fmt::print(out, "</svg>\n");
}

}  // namespace

namespace internal {

// Vertical bars with an optional dashed limit mark across each bar's slot.
std::string BarChartSvg(const BarChartData& c) {
  constexpr double width = 760, left = 64, right = 740, top = 44, bottom = 262;
  const auto limit = [&](std::size_t i) {
    return i < c.limits.size() ? c.limits[i] : std::nullopt;
  };
  double top_value = 1e-9;
  bool any_limit = false, any_over = false;
  for (std::size_t i = 0; i < c.values.size(); ++i) {
    top_value = std::max({top_value, c.values[i], limit(i).value_or(0.0)});
    any_limit = any_limit || limit(i).has_value();
    any_over = any_over || (limit(i) && c.values[i] > *limit(i));
  }
  // Round ticks: 1, 2, 2.5 or 5 times a power of ten, four or five of them.
  const double raw = top_value * 1.1 / 4, decade = std::pow(10.0, std::floor(std::log10(raw)));
  double tick = 10 * decade;
  for (double m : {5.0, 2.5, 2.0, 1.0}) {
    if (m * decade >= raw) tick = m * decade;
  }
  const int ticks = static_cast<int>(std::ceil(top_value * 1.1 / tick));
  top_value = ticks * tick;
  const double slot = (right - left) / std::max<std::size_t>(1, c.values.size());
  const auto y = [&](double v) { return bottom - (bottom - top) * v / top_value; };
  const std::string hatch = "over-" + c.id;
  // With many bars only some can carry a label: those with a visible value (or a violation),
  // never two side by side, so a spectrum's orders 5, 7, 11, 13 are named and empty ones are not.
  const bool crowded = c.values.size() > 26;
  std::vector<bool> labelled(c.values.size(), !crowded);
  for (std::size_t i = 0; crowded && i < c.values.size(); ++i) {
    labelled[i] = c.values[i] >= 0.01 * top_value && (i == 0 || !labelled[i - 1]);
  }
  const int height = any_limit || any_over ? 340 : 314;  // the legend row only when it has marks
  std::string s = fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{7}\" viewBox=\"0 0 {0} "
      "{7}\" "
      "font-family=\"Helvetica, Arial, sans-serif\" font-size=\"11\" role=\"img\" "
      "aria-label=\"{1}\">\n"
      "<defs><pattern id=\"{6}\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
      "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#D55E00\"/>"
      "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#000\" "
      "stroke-width=\"2\"/></pattern></defs>\n"
      "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n"
      "<text x=\"{2}\" y=\"22\" font-size=\"14\" font-weight=\"bold\">{1}</text>\n",
      width, internal::XmlEscape(c.title), left, top, bottom, right, hatch, height);
  for (int k = 0; k <= ticks; ++k) {
    const double v = tick * k;
    s += fmt::format(
        "<line x1=\"{0}\" y1=\"{1:.1f}\" x2=\"{2}\" y2=\"{1:.1f}\" stroke=\"#dddddd\"/>"
        "<text x=\"{3}\" y=\"{4:.1f}\" text-anchor=\"end\">{5:g}</text>\n",
        left, y(v), right, left - 4, y(v) + 4, v);
  }
  s += fmt::format(
      "<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"#000\"/>"
      "<line x1=\"{0}\" y1=\"{2}\" x2=\"{3}\" y2=\"{2}\" stroke=\"#000\"/>\n",
      left, top, bottom, right);
  s += fmt::format(
      "<text transform=\"translate(16 {}) rotate(-90)\" text-anchor=\"middle\">{}</text>\n",
      (top + bottom) / 2, internal::XmlEscape(c.unit));
  for (std::size_t i = 0; i < c.values.size(); ++i) {
    const double x = left + slot * i + slot * 0.15, w = slot * 0.7;
    const bool over = limit(i) && c.values[i] > *limit(i);
    s += fmt::format(
        "<rect x=\"{:.1f}\" y=\"{:.1f}\" width=\"{:.1f}\" height=\"{:.1f}\" fill=\"{}\" "
        "stroke=\"#000\" stroke-width=\"0.5\"><title>{} {:.3g}{}</title></rect>\n",
        x, y(c.values[i]), w, bottom - y(c.values[i]), over ? "url(#" + hatch + ")" : "#56B4E9",
        internal::XmlEscape(c.labels[i]), c.values[i], over ? " (over its limit)" : "");
    if (limit(i)) {
      s += fmt::format(
          "<line x1=\"{:.1f}\" y1=\"{:.1f}\" x2=\"{:.1f}\" y2=\"{:.1f}\" stroke=\"#000\" "
          "stroke-width=\"2\" stroke-dasharray=\"4 2\"/>\n",
          x - 2, y(*limit(i)), x + w + 2, y(*limit(i)));
    }
    if (over) {
      s += fmt::format(
          "<text x=\"{:.1f}\" y=\"{:.1f}\" text-anchor=\"middle\" "
          "font-weight=\"bold\">over</text>\n",
          x + w / 2, std::min(y(c.values[i]), y(*limit(i))) - 5);
    }
    if (labelled[i]) {
      s += fmt::format(
          "<text x=\"{0:.1f}\" y=\"{1}\" transform=\"rotate(-45 {0:.1f} {1})\" "
          "text-anchor=\"end\">{2}</text>\n",
          x + w / 2, bottom + 12, internal::XmlEscape(c.labels[i]));
    }
  }
  // Legend: only the marks the chart uses.
  double lx = left;
  if (any_limit) {
    s += fmt::format(
        "<line x1=\"{0}\" y1=\"325\" x2=\"{1}\" y2=\"325\" stroke=\"#000\" stroke-width=\"2\" "
        "stroke-dasharray=\"4 2\"/><text x=\"{2}\" y=\"329\">limit</text>\n",
        lx, lx + 24, lx + 30);
    lx += 80;
  }
  if (any_over) {
    s += fmt::format(
        "<rect x=\"{0}\" y=\"318\" width=\"14\" height=\"12\" fill=\"url(#{1})\" stroke=\"#000\" "
        "stroke-width=\"0.5\"/><text x=\"{2}\" y=\"329\">over its limit (hatched)</text>\n",
        lx, hatch, lx + 20);
  }
  return s + "</svg>\n";
}

std::string ScanChartSvg(const std::vector<ScanResult>& variants, const std::string& bus) {
  const std::vector<Curve> curves = CurvesAt(variants, bus);
  if (curves.empty()) return "";
  std::ostringstream out;
  WriteChart(out, bus, curves, variants.front().options);
  return out.str();
}

std::string ScanChartFileName(const std::string& bus) { return FileStem(bus) + ".svg"; }

}  // namespace internal

void WriteScanSvg(const std::vector<ScanResult>& variants, const std::string& dir) {
  std::vector<std::string> buses;
  for (const ScanResult& r : variants) {
    for (const std::string& b : r.buses) {
      if (std::find(buses.begin(), buses.end(), b) == buses.end()) buses.push_back(b);
    }
  }
  std::set<std::string> used;
  for (const std::string& bus : buses) {
    const std::string svg = internal::ScanChartSvg(variants, bus);
    if (svg.empty()) continue;
    std::string stem = FileStem(bus);
    for (int n = 2; used.count(stem); ++n) stem = FileStem(bus) + "_" + std::to_string(n);
    used.insert(stem);
    WriteFileAtomically((std::filesystem::path(dir) / (stem + ".svg")).string(),
                        [&](std::ostream& out) { out << svg; });
  }
}

}  // namespace overtone
