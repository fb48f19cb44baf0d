// src/output_json.cc — the study's JSON document (PLANT-FORMAT.md "JSON written by the commands").
#include <algorithm>
#include <cmath>
#include <memory>
#include <numbers>
#include <string>
#include <vector>

#include "indices.h"
#include "json_writer.h"
#include "output_common.h"
#include "overtone/report.h"
#include "parallel.h"

namespace overtone {
namespace {

using internal::JsonWriter;
using internal::AngleDeg;
double PercentOf(double magnitude, double fundamental, double negligible) {
  return fundamental > negligible ? 100.0 * magnitude / fundamental : 0.0;
}

// Orders 2..max_order; `amps` adds the magnitude in amperes (currents); `angles` is false for
// non-vector summation, whose magnitudes have no angle (PLANT-FORMAT.md "Conventions").
void WriteHarmonics(JsonWriter& j, const Spectrum& s, bool amps, bool angles = true) {
  const double fundamental = std::abs(s.at(1));
  const double negligible = amps ? internal::kNegligibleCurrentA : internal::kNegligibleVoltagePu;
  j.Key("harmonics").BeginArray();
  for (std::size_t h = 2; h < s.by_order.size(); ++h) {
    const Phasor x = s.by_order[h];
    const double magnitude = std::abs(x);
    j.BeginObject().Field("order", static_cast<int>(h));
    if (amps) j.Field("amps", magnitude);
    j.Field("percent", PercentOf(magnitude, fundamental, negligible));
    if (angles) j.Field("angle_deg", AngleDeg(x));
    j.EndObject();
  }
  j.EndArray();
}

void WriteCurrentSummary(JsonWriter& j, const Spectrum& s, const WaveformIndices& ix) {
  j.Field("i1_a", std::abs(s.at(1))).Field("i1_angle_deg", AngleDeg(s.at(1)));
  j.Field("thd_i_percent", ix.thd_percent);
}

void WritePcc(JsonWriter& j, const PccResult& pcc) {
  j.Key("pcc").BeginObject().Field("bus", pcc.bus);
  if (pcc.demand_current_a) {
    j.Field("demand_current_a", *pcc.demand_current_a);
    j.Field("demand_current_is_default", pcc.demand_current_is_default);
  }
  j.Field("isc_a", pcc.isc_a);
  if (pcc.demand_current_a) j.Field("isc_over_il", pcc.isc_a / *pcc.demand_current_a);
  if (pcc.tdd_percent) j.Field("tdd_percent", *pcc.tdd_percent);
  if (pcc.tdd_limit_percent) j.Field("tdd_limit_percent", *pcc.tdd_limit_percent);
  j.Key("harmonics").BeginArray();
  for (const PccHarmonic& h : pcc.harmonics) {
    j.BeginObject().Field("order", h.order).Field("amps", h.amps);
    j.Field("percent_of_il", h.percent_of_il);
    if (h.limit_percent) j.Field("limit_percent", *h.limit_percent).Field("pass", *h.pass);
    j.EndObject();
  }
  j.EndArray().EndObject();
}

void WriteViolations(JsonWriter& j, const char* key, const std::vector<Violation>& list) {
  j.Key(key).BeginArray();
  for (const Violation& v : list) {
    j.BeginObject().Field("where", v.where).Field("what", v.what).Field("value", v.value);
    j.Field("limit", v.limit).EndObject();
  }
  j.EndArray();
}

void WriteAssessment(JsonWriter& j, const Assessment& a) {
  j.Key("assessment").BeginObject().Field("profile", a.profile).Field("title", a.title);
  WriteViolations(j, "violations", a.violations);
  WriteViolations(j, "design_guide", a.design_guide);
  j.EndObject();
}

// IEEE 18 duty, C57.110 derating and the present state's resonance peaks.
void WriteDutyAndResonances(JsonWriter& j, const StudyResult& r) {
  j.Key("capacitors").BeginArray();
  for (const CapacitorDuty& c : r.capacitors) {
    j.BeginObject().Field("name", c.name).Field("bus", c.bus).Field("kind", c.kind);
    j.Field("steps_on", c.steps_on).Field("steps", c.steps);
    j.Field("vrms_percent", c.vrms_percent).Field("vpeak_percent", c.vpeak_percent);
    j.Field("vpeak_arith_percent", c.vpeak_arith_percent).Field("irms_percent", c.irms_percent);
    j.Field("kvar_percent", c.kvar_percent).Field("fundamental_rise", c.fundamental_rise);
    if (c.reactor_irms_a) j.Field("reactor_irms_a", *c.reactor_irms_a);
    j.Field("pass", c.pass).EndObject();
  }
  j.EndArray();
  j.Key("transformers").BeginArray();
  for (const TransformerDerating& t : r.transformers) {
    j.BeginObject().Field("name", t.name).Field("harmonic_loss_factor", t.harmonic_loss_factor);
    j.Field("k_factor", t.k_factor).Field("derated_percent", t.derated_percent);
    j.Field("load_percent", t.load_percent).EndObject();
  }
  j.EndArray();
  j.Key("resonances").BeginArray();
  for (const Resonance& res : r.resonances) {
    j.BeginObject().Field("bus", res.bus).Field("configuration", res.configuration);
    internal::WritePeakFields(j, res.peak);
    j.EndObject();
  }
  j.EndArray();
}

// One `drives` entry. The peak is the simulated one for bridge front ends, else the peak of the
// waveform rebuilt from the spectrum.
// The array items write_item(writer, i) for i < count: blocks of items are formatted on
// `threads` threads, a few blocks at a time, and written in order, the same bytes as on one.
template <typename WriteItem>
void WriteItems(JsonWriter& j, std::size_t count, int threads, WriteItem write_item) {
  constexpr std::size_t kBlock = 256;
  const std::size_t blocks = (count + kBlock - 1) / kBlock;
  const std::size_t wave = 4 * static_cast<std::size_t>(internal::ResolveThreads(threads, 2));
  std::vector<std::string> text(wave);
  for (std::size_t first = 0; first < blocks; first += wave) {
    const std::size_t n = std::min(wave, blocks - first);
    internal::ParallelFor(static_cast<int>(n), threads, [] { return std::make_unique<int>(0); },
                          [&](int&, int b) {
                            text[b].clear();  // its capacity serves the next wave
                            JsonWriter block(text[b]);
                            block.BeginArray();
                            const std::size_t begin = (first + b) * kBlock;
                            for (std::size_t i = begin; i < std::min(count, begin + kBlock); ++i) {
                              write_item(block, i);
                            }
                            block.EndArray();
                          });
    for (std::size_t b = 0; b < n; ++b) {
      j.Values(std::string_view(text[b]).substr(1, text[b].size() - 2));  // less [ and ]
    }
  }
}

void WriteDrive(JsonWriter& j, const DriveResult& d) {
  j.BeginObject().Field("name", d.name).Field("bus", d.bus).Field("count", d.count);
  j.Field("front_end", ToString(d.front_end));
  WriteCurrentSummary(j, d.current_a, d.indices);
  if (d.vdc_v) j.Field("vdc_v", *d.vdc_v);
  j.Field("ipeak_a", d.peak_current_a.value_or(std::sqrt(2.0) * d.indices.peak));
  if (d.conduction_deg) j.Field("conduction_deg", *d.conduction_deg);
  if (d.overlap_deg) j.Field("overlap_deg", *d.overlap_deg);
  WriteHarmonics(j, d.current_a, true);
  j.EndObject();
}

}  // namespace

void WriteDriveJson(const DriveResult& drive, std::ostream& out) {
  JsonWriter j(out);
  WriteDrive(j, drive);
  out << '\n';
}

void WriteStudyJson(const StudyResult& r, std::ostream& out, int threads) {
  JsonWriter j(out);
  j.BeginObject().Field("overtone", 1);
  j.Key("study").BeginObject().Field("name", r.study.name).Field("frequency_hz", r.study.frequency_hz);
  j.Field("max_order", r.study.max_order).Field("summation", ToString(r.study.summation)).EndObject();

  const bool vector = r.study.summation == Summation::kVector;
  j.Key("buses").BeginArray();
  WriteItems(j, r.buses.size(), threads, [&](JsonWriter& w, std::size_t i) {
    const BusResult& b = r.buses[i];
    w.BeginObject().Field("name", b.name).Field("kv", b.nominal_v / 1e3);
    w.Field("v1_pu", b.indices.fundamental).Field("v1_angle_deg", AngleDeg(b.voltage_pu.at(1)));
    w.Field("thd_v_percent", b.indices.thd_percent).Field("vrms_pu", b.indices.rms);
    w.Field("vpeak_pu", b.indices.peak);
    WriteHarmonics(w, b.voltage_pu, false, vector);
    w.EndObject();
  });
  j.EndArray();

  j.Key("branches").BeginArray();
  WriteItems(j, r.branches.size(), threads, [&](JsonWriter& w, std::size_t i) {
    const BranchResult& b = r.branches[i];
    w.BeginObject().Field("name", b.name).Field("kind", b.kind).Field("from", b.from).Field("to", b.to);
    WriteCurrentSummary(w, b.current_a, b.indices);
    w.Field("irms_a", b.indices.rms);
    WriteHarmonics(w, b.current_a, true, vector);
    w.EndObject();
  });
  j.EndArray();

  j.Key("drives").BeginArray();
  WriteItems(j, r.drives.size(), threads,
             [&](JsonWriter& w, std::size_t i) { WriteDrive(w, r.drives[i]); });
  j.EndArray();

  WritePcc(j, r.pcc);
  WriteDutyAndResonances(j, r);
  WriteAssessment(j, r.assessment);
  j.StringArray("warnings", r.warnings);
  j.StringArray("cautions", r.cautions);
  j.EndObject();
  out << '\n';
}

}  // namespace overtone
