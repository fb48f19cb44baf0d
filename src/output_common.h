// src/output_common.h — small pieces shared by the report writers (internal).
#ifndef OVERTONE_INTERNAL_OUTPUT_COMMON_H_
#define OVERTONE_INTERNAL_OUTPUT_COMMON_H_

#include <cmath>
#include <numbers>
#include <string>

#include "json_writer.h"
#include "overtone/study.h"

namespace overtone::internal {

// Angle in degrees; a zero phasor has angle 0 (PLANT-FORMAT.md "Conventions").
inline double AngleDeg(Phasor x) { return x == Phasor{} ? 0.0 : std::arg(x) * 180.0 / std::numbers::pi; }

// Text for XML and HTML content and attribute values.
inline std::string XmlEscape(const std::string& s) {
  std::string out;
  for (char c : s) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += c;
    }
  }
  return out;
}

// RFC 4180 quoting for names that hold a comma, quote or line break.
inline std::string CsvField(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string q = "\"";
  for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + '"';
}

// The fields of a resonance peak, as in the format page's `resonances` and scan `peaks`.
inline void WritePeakFields(JsonWriter& j, const ResonancePeak& p) {
  j.Field("order", p.order).Field("impedance_ohm", p.impedance_ohm);
  j.Field("amplification", p.amplification);
  if (p.near_order > 0) j.Field("near_order", p.near_order);
  j.Field("risk", ToString(p.risk));
}

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_OUTPUT_COMMON_H_
