// src/scan.h — frequency-scan engine, step configurations and the resonance risk rule (internal).
#ifndef OVERTONE_INTERNAL_SCAN_H_
#define OVERTONE_INTERNAL_SCAN_H_

#include <string>
#include <vector>

#include "overtone/plant.h"
#include "overtone/scan.h"
#include "overtone/study.h"

namespace overtone::internal {

// Above this many step configurations only the reduced set is scanned (issue 5).
constexpr long kMaxConfigurations = 4096;
// Curves are kept for every configuration only while they hold at most this many points
// (16 bytes each, about 128 MB); beyond it only the present configuration and each bus's worst
// keep theirs.
constexpr long kMaxStoredPoints = 8'000'000;
// A drive group "injects" an order when it draws at least this percent of its fundamental there.
constexpr double kInjectionThresholdPercent = 1.0;
// Amplification at or above which a peak near an injected order is high risk, and the floor
// below which it counts as damped (our screening rule, docs/resonance.md).
constexpr double kHighAmplification = 2.0;
constexpr double kMediumAmplification = 1.2;

// Steps in service of every bank, in plant order.
struct StepConfiguration {
  std::vector<int> steps_on;
  std::string name;  // "PFC-1 6/6, PFC-2 0/4"; "no capacitor banks" when there are none
};

std::string ConfigurationName(const std::vector<Capacitor>& banks, const std::vector<int>& steps_on);

// The plant file's own step state.
StepConfiguration PresentConfiguration(const std::vector<Capacitor>& banks);

// Every combination 0..steps of every bank (the last bank switching fastest). Above
// kMaxConfigurations: all banks off, all fully on, each bank alone at each of its steps and the
// present state, and `note` says so (otherwise `note` is left empty).
std::vector<StepConfiguration> StepConfigurations(const std::vector<Capacitor>& banks,
                                                  std::string* note);

// Largest percent of its own fundamental that any drive group draws at each integer order
// (index = order; size = largest order + 1).
std::vector<double> InjectionPercent(const std::vector<DriveResult>& drives);

// The risk rule (docs/resonance.md). d is the distance from the peak to the nearest order with at
// least kInjectionThresholdPercent injection, A the peak's amplification:
//   high    d <= band and A >= 2
//   medium  d <= band and 1.2 <= A < 2, or band < d <= 2 band and A >= 2
//   low     otherwise
// Fills peak.near_order (0 when no injected order lies within 2 band) and peak.risk.
void RateRisk(const std::vector<double>& injection_percent, double band, ResonancePeak& peak);

// Scans `configurations` of the plant's banks at the monitored buses (names, already checked).
// The plant's own steps_on are ignored. Orders with no drive injection never raise the risk.
ScanResult ScanConfigurations(const Plant& plant, const ScanOptions& options,
                              const std::vector<std::string>& buses,
                              const std::vector<StepConfiguration>& configurations,
                              const std::vector<double>& injection_percent, bool keep_curves);

// The pcc and every capacitor or filter bus, in bus order.
std::vector<std::string> DefaultMonitoredBuses(const Plant& plant, const std::string& pcc);

// Peaks of the present step state at the default buses over orders 1..max_order, for a study.
std::vector<Resonance> ScreenPresentState(const Plant& plant, const StudyResult& study, int threads);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SCAN_H_
