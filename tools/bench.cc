// tools/bench.cc — timings behind tools/bench: the bridge model per distinct group, and the cost
// that bridge groups add to a study of a plant where every group sees its own bus impedance.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <string>

#include "bridge.h"
#include "overtone/study.h"

namespace {

using Clock = std::chrono::steady_clock;
using overtone::internal::BridgeCircuit;
using overtone::internal::BridgeParameters;

double Seconds(Clock::time_point since) {
  return std::chrono::duration<double>(Clock::now() - since).count();
}

// Milliseconds per SolveBridge call over `n` slightly different circuits (no cache hits).
double BridgeMilliseconds(BridgeCircuit circuit, double reactor, int n) {
  BridgeParameters p;
  p.circuit = circuit;
  p.x_reactor = reactor;
  p.b_dc = 2.0 * std::numbers::pi * 60.0 * 40e-6 * (480.0 * 480.0 / 1e3);  // 40 uF/kW at 480 V
  p.power = 0.8;
  const auto start = Clock::now();
  for (int k = 0; k < n; ++k) {
    p.x_supply = 0.004 * (1.0 + 0.01 * k);
    p.r_supply = p.x_supply / 8.0;
    overtone::internal::SolveBridge(p, 50);
  }
  return 1e3 * Seconds(start) / n;
}

// An MV bus feeding `groups` LV buses, each through its own transformer (so its own impedance)
// with one drive group; `bridge` selects a computed front end or the same group as a table.
overtone::Plant SpreadPlant(int groups, bool bridge) {
  overtone::Plant p;
  p.study.name = "bench";
  p.buses.push_back({"MV", 13.8e3, {}});
  overtone::Supply s;
  s.name = "U";
  s.bus = "MV";
  s.short_circuit_va = 500e6;
  p.supplies.push_back(s);
  for (int k = 0; k < groups; ++k) {
    const std::string bus = "LV" + std::to_string(k);
    p.buses.push_back({bus, 480.0, {}});
    overtone::Transformer t;
    t.name = "T" + std::to_string(k);
    t.from = "MV";
    t.to = bus;
    t.rating_va = 500e3 + 100.0 * k;
    t.impedance = 0.0575;
    t.connection = {"Dyn11", 11, false, true, true, false};
    p.transformers.push_back(t);
    overtone::Drive d;
    d.name = "D" + std::to_string(k);
    d.bus = bus;
    d.power_w = 15e3;
    d.loading = 0.8;
    if (bridge) {
      d.front_end = overtone::FrontEnd::kDiodeCapacitor;
      d.line_reactor = {overtone::ReactorSpec::Kind::kFraction, 0.03};
    } else {
      d.front_end = overtone::FrontEnd::kMeasured;
      d.harmonics = {{5, 35, 0, {}}, {7, 12, 0, {}}, {11, 7, 0, {}}, {13, 4, 0, {}}};
    }
    p.drives.push_back(d);
  }
  return p;
}

double StudySeconds(int groups, bool bridge) {
  const overtone::Plant plant = SpreadPlant(groups, bridge);
  overtone::StudyOptions options;
  options.scan = false;
  const auto start = Clock::now();
  overtone::RunStudy(plant, options);
  return Seconds(start);
}

}  // namespace

int main() {
  std::printf("| measurement | value |\n|---|---|\n");
  std::printf("| diode-capacitor bridge, 3 %% reactor, one distinct group (1 core) | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseCapacitor, 0.03, 40));
  std::printf("| diode-capacitor bridge, no reactor, one distinct group (1 core) | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseCapacitor, 0.0, 40));
  std::printf("| current-stiff bridge, one distinct group (1 core) | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseStiff, 0.03, 40));
  for (int groups : {200, 2000}) {
    const double table = StudySeconds(groups, false);
    const double bridge = StudySeconds(groups, true);
    std::printf("| study, %d buses, %d table-spectrum groups (all cores) | %.3f s |\n", groups + 1,
                groups, table);
    std::printf("| study, %d buses, %d bridge groups each at its own impedance (all cores) | %.3f s "
                "(adds %.3f s) |\n", groups + 1, groups, bridge, bridge - table);
  }
}
