// include/overtone/report.h — writers of study results: terminal tables, JSON, CSV (public).
#ifndef OVERTONE_PUBLIC_REPORT_H_
#define OVERTONE_PUBLIC_REPORT_H_

#include <functional>
#include <ostream>
#include <string>

#include "overtone/study.h"

namespace overtone {

// One screen on a loaded plant: counts of buses and elements, drive groups by front end, power.
void PrintPlantSummary(const Plant& plant, std::ostream& out);

// Bus table, drive table, pcc summary, warnings and cautions, for a terminal.
void PrintStudyTables(const StudyResult& result, std::ostream& out);

// The JSON document of PLANT-FORMAT.md ("overtone study PLANT --json"), streamed.
void WriteStudyJson(const StudyResult& result, std::ostream& out);

// One `drives` entry of the study JSON alone (`overtone spectrum --json`).
void WriteDriveJson(const DriveResult& drive, std::ostream& out);

// buses.csv, bus_harmonics.csv, drives.csv and branches.csv in `dir` (created if needed).
void WriteStudyCsv(const StudyResult& result, const std::string& dir);

// `overtone report`: report.md, a self-contained report.html (inline SVG), thdv.svg,
// pcc_current.svg and the CSV tables of WriteStudyCsv in `dir` (created if needed).
void WriteReport(const Plant& plant, const StudyResult& result, const std::string& dir);

// Writes a file through a temporary name in the same folder and renames it into place, so an
// interrupted run leaves any previous file intact. Throws std::runtime_error on failure.
void WriteFileAtomically(const std::string& path, const std::function<void(std::ostream&)>& write);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_REPORT_H_
