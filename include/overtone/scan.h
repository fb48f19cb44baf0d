// include/overtone/scan.h — frequency scans of a plant for resonance screening (public).
//
// A scan evaluates the driving-point impedance Z(h) of the positive-sequence harmonic network at
// monitored buses on a grid of fractional orders, for every step configuration of the capacitor
// banks, and locates the parallel-resonance peaks. Impedances are in ohms at the bus's nominal
// voltage (phase to neutral volts per line ampere); a transfer impedance is the volts at one bus
// per ampere injected at another.
#ifndef OVERTONE_PUBLIC_SCAN_H_
#define OVERTONE_PUBLIC_SCAN_H_

#include <ostream>
#include <string>
#include <vector>

#include "overtone/plant.h"
#include "overtone/study.h"

namespace overtone {

struct ScanOptions {
  double from_order = 1.0;  // first grid order, > 0
  double to_order = 50.0;   // last grid order, > from_order
  double step = 0.02;       // grid spacing in orders, > 0; at most 1,000,000 points
  double band = 0.5;        // risk band around injected orders, in orders, > 0
  std::vector<std::string> buses;  // monitored buses; empty = the pcc and every capacitor or filter bus
  int threads = 0;          // worker threads (grid points, then buses); 0 = all cores

  bool IsValid(std::string* error) const;
  int point_count() const;
};

// Ranks peaks for "worst": higher risk first, then higher amplification.
bool IsWorse(const ResonancePeak& a, const ResonancePeak& b);

struct BusScan {
  int bus = 0;            // index into ScanResult::buses
  int configuration = 0;  // index into ScanResult::configurations
  std::vector<Phasor> impedance_ohm;  // one per grid order; empty when curves were not kept
  std::vector<ResonancePeak> peaks;   // interior maxima of |Z|, refined between grid points
  Risk risk = Risk::kLow;             // the worst of the peaks

  const ResonancePeak* WorstPeak() const;  // nullptr when there is no peak
};

struct TransferScan {
  int from_bus = 0;       // index into ScanResult::drive_buses (where the current is injected)
  int to_bus = 0;         // index into ScanResult::buses
  int configuration = 0;
  std::vector<Phasor> impedance_ohm;
};

// One plant file (a variant: base, on the standby generator, minimum fault level, ...).
struct ScanResult {
  std::string variant;                       // the study's name
  std::string plant_file;
  ScanOptions options;
  std::vector<double> orders;                // the grid
  std::vector<std::string> buses;            // monitored
  std::vector<std::string> drive_buses;      // where drive groups inject
  std::vector<std::string> configurations;   // names, e.g. "PFC-1 6/6, PFC-2 0/4"
  int present_configuration = 0;             // the steps_on of the plant file
  int all_on_configuration = 0;              // every bank fully in service
  std::vector<BusScan> scans;                // configuration-major: [c * buses.size() + b]
  std::vector<TransferScan> transfers;       // present and worst configurations, with the curves
  std::vector<std::vector<Phasor>> base_impedance_ohm;  // per bus, without capacitors and filters
  int worst_configuration = -1;              // -1: no peak anywhere
  std::vector<std::string> notes;

  const BusScan& at(int configuration, int bus) const {
    return scans[static_cast<std::size_t>(configuration) * buses.size() + bus];
  }
  // The configuration holding the worst peak at monitored bus `bus`; -1 when it has no peak.
  int WorstConfigurationAt(int bus) const;
};

// Scans a plant. The drive spectra that the risk rule weighs come from a study of the same plant
// (RunStudy without its own scan). Throws InputError for an unknown monitored bus or invalid
// options, SolveError when the network cannot be solved. With `keep_curves` false only the peaks
// are kept (no points, transfers or base curves).
ScanResult RunScan(const Plant& plant, const ScanOptions& options, bool keep_curves = true);

// Terminal summary: variants side by side, then per variant the worst configuration and the
// configurations at risk by bus, the low-risk ones summarised.
void PrintScanTables(const std::vector<ScanResult>& variants, std::ostream& out);

// {"scans": [...]} of PLANT-FORMAT.md with a "variant" on every scan.
void WriteScanJson(const std::vector<ScanResult>& variants, std::ostream& out);

// scan_points.csv, scan_peaks.csv and scan_transfers.csv in `dir`.
void WriteScanCsv(const std::vector<ScanResult>& variants, const std::string& dir);

// One SVG chart per monitored bus in `dir`: |Z| against order with the characteristic orders
// 6k +- 1 marked; per variant its worst configuration, the present state and the curve without
// capacitors and filters.
void WriteScanSvg(const std::vector<ScanResult>& variants, const std::string& dir);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_SCAN_H_
