// src/output_common.h — small pieces shared by the report writers (internal).
#ifndef OVERTONE_INTERNAL_OUTPUT_COMMON_H_
#define OVERTONE_INTERNAL_OUTPUT_COMMON_H_

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <numbers>
#include <optional>
#include <string>
#include <vector>

#include "json_writer.h"
#include "overtone/scan.h"
#include "overtone/study.h"

namespace overtone::internal {

// Angle in degrees; a zero phasor has angle 0 (PLANT-FORMAT.md "Conventions").
inline double AngleDeg(Phasor x) {
  return x == Phasor{} ? 0.0 : std::arg(x) * 180.0 / std::numbers::pi;
}

// Text for XML and HTML content and attribute values.
inline std::string XmlEscape(const std::string& s) {
  std::string out;
  for (char c : s) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

// A name made safe for a file name: letters, digits, '.', '_' and '-' kept, anything else '_'.
inline std::string FileSafe(const std::string& name) {
  std::string out;
  for (char c : name)
    out +=
        std::isalnum(static_cast<unsigned char>(c)) || c == '.' || c == '-' || c == '_' ? c : '_';
  return out;
}

// RFC 4180 quoting for names that hold a comma, quote or line break.
inline std::string CsvField(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string q = "\"";
  for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + '"';
}

// " 5: 3.20   7: 2.10  11: 0.90": the three largest harmonic orders in percent of the fundamental.
inline std::string LargestOrders(const Spectrum& s, double fundamental,
                                 const char* separator = "  ") {
  if (fundamental <= 0.0) return "";
  std::vector<int> orders;
  for (std::size_t h = 2; h < s.by_order.size(); ++h) {
    if (std::abs(s.by_order[h]) > 0.0) orders.push_back(static_cast<int>(h));
  }
  const auto larger = [&](int a, int b) {
    const double ma = std::abs(s.at(a)), mb = std::abs(s.at(b));
    return ma != mb ? ma > mb : a < b;
  };
  const std::size_t shown = std::min<std::size_t>(3, orders.size());
  std::partial_sort(orders.begin(), orders.begin() + static_cast<std::ptrdiff_t>(shown),
                    orders.end(), larger);
  std::string text;
  for (std::size_t k = 0; k < shown; ++k) {
    text += fmt::format("{}{:>2}: {:.2f}", k ? separator : "", orders[k],
                        100.0 * std::abs(s.at(orders[k])) / fundamental);
  }
  return text;
}

// The verdict of a bus's voltage check in words; `check` nullptr when the bus was not checked.
inline std::string BusVerdict(const BusLimitCheck* check) {
  if (!check) return "not checked";
  return check->pass ? "pass" : check->design_guide ? "over (design guide)" : "FAIL";
}

// The limit check of a bus by name, nullptr when the assessment has none.
inline const BusLimitCheck* FindBusCheck(const Assessment& a, const std::string& bus) {
  for (const BusLimitCheck& c : a.buses) {
    if (c.bus == bus) return &c;
  }
  return nullptr;
}

// A word of terminal output, in ANSI colour when `colour`; the word itself carries the meaning,
// so output without colour (a pipe, `--no-color`, black-and-white print) loses nothing.
enum class Tone { kBad, kGood };
inline std::string Marked(const std::string& word, Tone tone, bool colour) {
  if (!colour) return word;
  // 256-colour codes near Okabe-Ito vermillion and blue, bold: readable for common colour
  // blindness.
  return (tone == Tone::kBad ? "\x1b[1;38;5;166m" : "\x1b[1;38;5;32m") + word + "\x1b[0m";
}

// The fields of a resonance peak, as in the format page's `resonances` and scan `peaks`.
inline void WritePeakFields(JsonWriter& j, const ResonancePeak& p) {
  j.Field("order", p.order).Field("impedance_ohm", p.impedance_ohm);
  j.Field("amplification", p.amplification);
  if (p.near_order > 0) j.Field("near_order", p.near_order);
  j.Field("risk", ToString(p.risk));
}

// A table of the report, rendered to both Markdown and HTML.
struct ReportTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::string caption = "";  // shown above the table; empty for none
};

// A chart of the report: inline in the HTML, a file beside report.md.
struct ReportChart {
  std::string svg;
  std::string file;  // e.g. "thdv.svg"
};

// A titled part of the report: paragraphs, then tables, then charts (src/output_report.cc).
struct ReportSection {
  std::string title;
  std::vector<std::string> paragraphs;
  std::vector<ReportTable> tables;
  std::vector<ReportChart> charts;
};

// A bar chart: one bar per label, each with an optional limit mark (src/output_svg.cc).
struct BarChartData {
  std::string id;  // unique within one page: names the chart's hatch pattern
  std::string title;
  std::string unit;
  std::vector<std::string> labels;
  std::vector<double> values;
  std::vector<std::optional<double>> limits;  // one per bar, or empty for none
};
std::string BarChartSvg(const BarChartData& chart);

// The frequency-scan chart of one monitored bus (what `overtone scan --svg` writes for it), and
// the file name it is written under; empty when no variant has a curve there.
std::string ScanChartSvg(const std::vector<ScanResult>& variants, const std::string& bus);
std::string ScanChartFileName(const std::string& bus);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_OUTPUT_COMMON_H_
