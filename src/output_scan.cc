// src/output_scan.cc — frequency-scan results as terminal tables, JSON and CSV.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <filesystem>

#include "json_writer.h"
#include "output_common.h"
#include "overtone/report.h"
#include "overtone/scan.h"

namespace overtone {
namespace {

using internal::AngleDeg;
using internal::CsvField;
using internal::JsonWriter;

void PrintSideBySide(const std::vector<ScanResult>& variants, std::ostream& out) {
  std::vector<std::string> buses;
  for (const ScanResult& r : variants) {
    for (const std::string& b : r.buses) {
      if (std::find(buses.begin(), buses.end(), b) == buses.end()) buses.push_back(b);
    }
  }
  std::size_t w = 3;
  for (const std::string& b : buses) w = std::max(w, b.size());
  fmt::print(out, "Worst peak per bus over all step configurations, variants side by side\n{:<{}}",
             "bus", w);
  for (std::size_t v = 0; v < variants.size(); ++v) {
    fmt::print(out, "  {:>6}  {:>6}  {:<6}", fmt::format("[{}] h", v + 1), "ampl.", "risk");
  }
  fmt::print(out, "\n");
  for (const std::string& b : buses) {
    fmt::print(out, "{:<{}}", b, w);
    for (const ScanResult& r : variants) {
      const auto it = std::find(r.buses.begin(), r.buses.end(), b);
      const int b_index = static_cast<int>(it - r.buses.begin());
      const int c = it == r.buses.end() ? -1 : r.WorstConfigurationAt(b_index);
      if (c >= 0) {
        const ResonancePeak* p = r.at(c, b_index).WorstPeak();
        fmt::print(out, "  {:>6.2f}  {:>6.1f}  {:<6}", p->order, p->amplification,
                   ToString(p->risk));
      } else {
        fmt::print(out, "  {:>6}  {:>6}  {:<6}", "-", "-", it == r.buses.end() ? "n/a" : "none");
      }
    }
    fmt::print(out, "\n");
  }
  fmt::print(out, "\n");
}

// Configurations at one bus grouped by the risk and injected order of their worst peak, so that
// a bank whose steps barely move a peak takes one row, not one per step.
struct PeakGroup {
  Risk risk = Risk::kLow;
  int near_order = 0;
  int count = 0;
  double from = 0.0, to = 0.0;  // range of the peak orders
  const ResonancePeak* worst = nullptr;
  int worst_configuration = 0;
};

std::vector<PeakGroup> GroupPeaks(const ScanResult& r, int bus, int* without_peak) {
  std::vector<PeakGroup> groups;
  *without_peak = 0;
  for (int c = 0; c < static_cast<int>(r.configurations.size()); ++c) {
    const ResonancePeak* p = r.at(c, bus).WorstPeak();
    if (!p) {
      ++*without_peak;
      continue;
    }
    const int near = p->risk == Risk::kLow ? 0 : p->near_order;  // one row for all low-risk peaks
    auto g = std::find_if(groups.begin(), groups.end(), [&](const PeakGroup& x) {
      return x.risk == p->risk && x.near_order == near;
    });
    if (g == groups.end())
      g = groups.insert(groups.end(), {p->risk, near, 0, p->order, p->order, p, c});
    ++g->count;
    g->from = std::min(g->from, p->order);
    g->to = std::max(g->to, p->order);
    if (IsWorse(*p, *g->worst)) g->worst = p, g->worst_configuration = c;
  }
  std::stable_sort(groups.begin(), groups.end(), [](const PeakGroup& a, const PeakGroup& b) {
    return IsWorse(*a.worst, *b.worst);
  });
  return groups;
}

void PrintVariant(const ScanResult& r, int number, std::ostream& out) {
  fmt::print(out, "[{}] {} ({}): {} step configuration{}\n", number, r.variant, r.plant_file,
             r.configurations.size(), r.configurations.size() == 1 ? "" : "s");
  fmt::print(out, "    present: {}\n", r.configurations[r.present_configuration]);
  for (const std::string& n : r.notes) fmt::print(out, "    note: {}\n", n);
  if (r.worst_configuration < 0) {
    fmt::print(out, "    no resonance peak between orders {} and {}\n\n", r.options.from_order,
               r.options.to_order);
    return;
  }
  fmt::print(out, "    worst:   {}\n", r.configurations[r.worst_configuration]);

  std::size_t bw = 3, cw = 19;
  for (const std::string& b : r.buses) bw = std::max(bw, b.size());
  for (const std::string& c : r.configurations) cw = std::max(cw, c.size());
  fmt::print(out, "    {:<{}}  {:<6}  {:>4}  {:>7}  {:>13}  {:<{}}  {:>9}  {:>6}\n", "bus", bw,
             "risk", "near", "configs", "peak h", "worst configuration", cw, "|Z| ohm", "ampl.");
  for (std::size_t b = 0; b < r.buses.size(); ++b) {
    int without_peak = 0;
    std::string bus = r.buses[b];
    for (const PeakGroup& g : GroupPeaks(r, static_cast<int>(b), &without_peak)) {
      const std::string orders =
          g.from == g.to || fmt::format("{:.2f}", g.from) == fmt::format("{:.2f}", g.to)
              ? fmt::format("{:.2f}", g.from)
              : fmt::format("{:.2f}-{:.2f}", g.from, g.to);
      fmt::print(out, "    {:<{}}  {:<6}  {:>4}  {:>7}  {:>13}  {:<{}}  {:>9.4g}  {:>6.1f}\n", bus,
                 bw, ToString(g.risk), g.near_order > 0 ? std::to_string(g.near_order) : "-",
                 g.count, orders, r.configurations[g.worst_configuration], cw,
                 g.worst->impedance_ohm, g.worst->amplification);
      bus.clear();
    }
    if (without_peak > 0) {
      fmt::print(out, "    {:<{}}  {} configuration{} without a peak between orders {} and {}\n",
                 bus, bw, without_peak, without_peak == 1 ? "" : "s", r.options.from_order,
                 r.options.to_order);
    }
  }
  fmt::print(out, "\n");
}

void WritePoints(JsonWriter& j, const std::vector<double>& orders, const std::vector<Phasor>& z) {
  j.Key("points").BeginArray();
  for (std::size_t k = 0; k < z.size(); ++k) {
    j.BeginObject().Field("order", orders[k]).Field("impedance_ohm", std::abs(z[k]));
    j.Field("angle_deg", AngleDeg(z[k])).EndObject();
  }
  j.EndArray();
}

}  // namespace

void PrintScanTables(const std::vector<ScanResult>& variants, std::ostream& out) {
  if (variants.empty()) return;
  const ScanOptions& o = variants.front().options;
  fmt::print(out,
             "Frequency scan: orders {} to {} in steps of {}; risk band +-{} order around orders "
             "where a drive group draws 1 % or more\n\n",
             o.from_order, o.to_order, o.step, o.band);
  if (variants.size() > 1) PrintSideBySide(variants, out);
  for (std::size_t v = 0; v < variants.size(); ++v)
    PrintVariant(variants[v], static_cast<int>(v + 1), out);
  fmt::print(out, "Cautions\n");
  for (const std::string& c : StandardCautions()) fmt::print(out, "- {}\n", c);
}

void WriteScanJson(const std::vector<ScanResult>& variants, std::ostream& out) {
  JsonWriter j(out);
  j.BeginObject().Field("overtone", 1);
  if (!variants.empty()) {
    const ScanOptions& o = variants.front().options;
    j.Key("scan").BeginObject().Field("from_order", o.from_order).Field("to_order", o.to_order);
    j.Field("step", o.step).Field("band", o.band).EndObject();
  }
  j.Key("variants").BeginArray();
  for (const ScanResult& r : variants) {
    j.BeginObject().Field("name", r.variant).Field("plant_file", r.plant_file);
    j.Field("configurations", static_cast<int>(r.configurations.size()));
    j.Field("present_configuration", r.configurations[r.present_configuration]);
    if (r.worst_configuration >= 0)
      j.Field("worst_configuration", r.configurations[r.worst_configuration]);
    j.StringArray("notes", r.notes).EndObject();
  }
  j.EndArray();
  j.Key("scans").BeginArray();
  for (const ScanResult& r : variants) {
    for (const BusScan& s : r.scans) {
      j.BeginObject().Field("variant", r.variant).Field("bus", r.buses[s.bus]);
      j.Field("configuration", r.configurations[s.configuration]).Field("risk", ToString(s.risk));
      WritePoints(j, r.orders, s.impedance_ohm);
      j.Key("peaks").BeginArray();
      for (const ResonancePeak& p : s.peaks) {
        j.BeginObject();
        internal::WritePeakFields(j, p);
        j.EndObject();
      }
      j.EndArray().EndObject();
    }
  }
  j.EndArray();
  j.Key("transfers").BeginArray();
  for (const ScanResult& r : variants) {
    for (const TransferScan& t : r.transfers) {
      if (t.impedance_ohm.empty()) continue;
      j.BeginObject()
          .Field("variant", r.variant)
          .Field("configuration", r.configurations[t.configuration]);
      j.Field("from_bus", r.drive_buses[t.from_bus]).Field("to_bus", r.buses[t.to_bus]);
      WritePoints(j, r.orders, t.impedance_ohm);
      j.EndObject();
    }
  }
  j.EndArray();
  j.StringArray("cautions", StandardCautions());
  j.EndObject();
  out << '\n';
}

void WriteScanCsv(const std::vector<ScanResult>& variants, const std::string& dir) {
  const auto path = [&](const char* file) { return (std::filesystem::path(dir) / file).string(); };
  WriteFileAtomically(path("scan_points.csv"), [&](std::ostream& out) {
    out << "variant,bus,configuration,order,impedance_ohm,angle_deg,base_impedance_ohm\n";
    for (const ScanResult& r : variants) {
      for (const BusScan& s : r.scans) {
        if (s.impedance_ohm.empty()) continue;  // curve not kept
        const std::vector<Phasor>& base = r.base_impedance_ohm[s.bus];
        for (std::size_t k = 0; k < s.impedance_ohm.size(); ++k) {
          fmt::print(out, "{},{},{},{},{},{},{}\n", CsvField(r.variant), CsvField(r.buses[s.bus]),
                     CsvField(r.configurations[s.configuration]), r.orders[k],
                     std::abs(s.impedance_ohm[k]), AngleDeg(s.impedance_ohm[k]), std::abs(base[k]));
        }
      }
    }
  });
  WriteFileAtomically(path("scan_peaks.csv"), [&](std::ostream& out) {
    out << "variant,bus,configuration,order,impedance_ohm,amplification,near_order,risk\n";
    for (const ScanResult& r : variants) {
      for (const BusScan& s : r.scans) {
        for (const ResonancePeak& p : s.peaks) {
          fmt::print(out, "{},{},{},{},{},{},{},{}\n", CsvField(r.variant),
                     CsvField(r.buses[s.bus]), CsvField(r.configurations[s.configuration]), p.order,
                     p.impedance_ohm, p.amplification, p.near_order, ToString(p.risk));
        }
      }
    }
  });
  WriteFileAtomically(path("scan_transfers.csv"), [&](std::ostream& out) {
    out << "variant,configuration,from_bus,to_bus,order,impedance_ohm,angle_deg\n";
    for (const ScanResult& r : variants) {
      for (const TransferScan& t : r.transfers) {
        for (std::size_t k = 0; k < t.impedance_ohm.size(); ++k) {
          fmt::print(out, "{},{},{},{},{},{},{}\n", CsvField(r.variant),
                     CsvField(r.configurations[t.configuration]),
                     CsvField(r.drive_buses[t.from_bus]), CsvField(r.buses[t.to_bus]), r.orders[k],
                     std::abs(t.impedance_ohm[k]), AngleDeg(t.impedance_ohm[k]));
        }
      }
    }
  });
}

}  // namespace overtone
