// src/output_csv.cc — the study's tables as CSV files, one row per bus, order, drive or branch.
#include <cmath>
#include <filesystem>
#include <numbers>

#include <fmt/format.h>
#include <fmt/ostream.h>

#include "output_common.h"
#include "overtone/report.h"

namespace overtone {
namespace {

using internal::AngleDeg;
using internal::CsvField;

void WriteTable(const std::string& dir, const std::string& file,
                const std::function<void(std::ostream&)>& rows) {
  WriteFileAtomically((std::filesystem::path(dir) / file).string(), rows);
}

}  // namespace

void WriteStudyCsv(const StudyResult& r, const std::string& dir) {
  WriteTable(dir, "buses.csv", [&](std::ostream& out) {
    out << "bus,kv,v1_pu,v1_angle_deg,thd_v_percent,vrms_pu,vpeak_pu\n";
    for (const BusResult& b : r.buses) {
      fmt::print(out, "{},{},{},{},{},{},{}\n", CsvField(b.name), b.nominal_v / 1e3,
                 b.indices.fundamental, AngleDeg(b.voltage_pu.at(1)), b.indices.thd_percent,
                 b.indices.rms, b.indices.peak);
    }
  });
  WriteTable(dir, "bus_harmonics.csv", [&](std::ostream& out) {
    out << "bus,order,percent,angle_deg\n";
    for (const BusResult& b : r.buses) {
      for (std::size_t h = 2; h < b.voltage_pu.by_order.size(); ++h) {
        const Phasor v = b.voltage_pu.by_order[h];
        const double percent = b.indices.fundamental > 0 ? 100.0 * std::abs(v) / b.indices.fundamental : 0.0;
        // Non-vector summation has magnitudes only: the angle is left empty.
        const std::string angle = r.study.summation == Summation::kVector ? fmt::format("{}", AngleDeg(v)) : "";
        fmt::print(out, "{},{},{},{}\n", CsvField(b.name), h, percent, angle);
      }
    }
  });
  WriteTable(dir, "drives.csv", [&](std::ostream& out) {
    out << "drive,bus,count,front_end,i1_a,i1_angle_deg,thd_i_percent,irms_a,ipeak_a\n";
    for (const DriveResult& d : r.drives) {
      fmt::print(out, "{},{},{},{},{},{},{},{},{}\n", CsvField(d.name), CsvField(d.bus), d.count,
                 ToString(d.front_end), d.indices.fundamental, AngleDeg(d.current_a.at(1)),
                 d.indices.thd_percent, d.indices.rms, std::sqrt(2.0) * d.indices.peak);
    }
  });
  WriteTable(dir, "branches.csv", [&](std::ostream& out) {
    out << "branch,kind,from,to,i1_a,i1_angle_deg,thd_i_percent,irms_a\n";
    for (const BranchResult& b : r.branches) {
      fmt::print(out, "{},{},{},{},{},{},{},{}\n", CsvField(b.name), b.kind, CsvField(b.from),
                 CsvField(b.to), b.indices.fundamental, AngleDeg(b.current_a.at(1)),
                 b.indices.thd_percent, b.indices.rms);
    }
  });
}

}  // namespace overtone
