// include/overtone/report.h — writers of study results: terminal tables, JSON, CSV (public).
#ifndef OVERTONE_PUBLIC_REPORT_H_
#define OVERTONE_PUBLIC_REPORT_H_

#include <functional>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "overtone/compare.h"
#include "overtone/mitigate.h"
#include "overtone/scan.h"
#include "overtone/study.h"

namespace overtone {

// One screen on a loaded plant: counts of buses and elements, drive groups by front end, power.
void PrintPlantSummary(const Plant& plant, std::ostream& out);

// Bus table, drive table, pcc summary, warnings and cautions, for a terminal. Failures are
// marked in words; `colour` also colours them (see WantColour).
void PrintStudyTables(const StudyResult& result, std::ostream& out, bool colour = false);

// Whether terminal tables should use colour: standard output is a terminal, `NO_COLOR` is not
// set, and `--no-color` (`no_color`) was not given.
bool WantColour(bool no_color);

// The JSON document of PLANT-FORMAT.md ("overtone study PLANT --json"), streamed; the long
// arrays are formatted on `threads` threads (0 = all cores), the bytes the same whatever the count.
void WriteStudyJson(const StudyResult& result, std::ostream& out, int threads = 0);

// One `drives` entry of the study JSON alone (`overtone spectrum --json`).
void WriteDriveJson(const DriveResult& drive, std::ostream& out);

// One period of a bridge group's waveform (`overtone spectrum --waveform`): a CSV of theta, line
// current, terminal voltage and DC voltage, and (`--svg`) a chart of the current over the voltage.
void WriteDriveWaveformCsv(const DriveWaveform& waveform, std::ostream& out);
void WriteDriveWaveformSvg(const Drive& drive, const DriveResult& group, std::ostream& out);

// buses.csv, bus_harmonics.csv, drives.csv and branches.csv in `dir` (created if needed).
void WriteStudyCsv(const StudyResult& result, const std::string& dir);

// Everything a report shows, computed before the first byte is written (docs/report.md).
struct ReportInputs {
  const Plant* plant = nullptr;
  StudyResult result;
  std::vector<StudyResult> other_summations;  // the same plant under the two other rules
  std::vector<ScanResult> scans;              // the plant's frequency scan (one variant)
  std::optional<Comparison> comparison;       // against a base case (`--against BASE`)
  std::optional<MitigationResult> mitigation;  // ranked options (`--mitigate`, docs/mitigate.md)
};

// Runs the study of `plant`, the same study under the two other summation rules, its frequency
// scan and, when `base` is given, the base case's study and the comparison with it.
ReportInputs PrepareReport(const Plant& plant, const StudyOptions& options,
                           const Plant* base = nullptr);

// `overtone report`: report.md, a self-contained report.html (inline SVG), each chart as an SVG
// file and the CSV tables of WriteStudyCsv in `dir` (created if needed).
void WriteReport(const ReportInputs& inputs, const std::string& dir);

// Writes a file through a temporary name in the same folder and renames it into place, so an
// interrupted run leaves any previous file intact. Throws std::runtime_error on failure.
void WriteFileAtomically(const std::string& path, const std::function<void(std::ostream&)>& write);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_REPORT_H_
