// tests/edge_cases_test.cc — numerical edge cases: a finite result or a clear refusal, never NaN.
//
// Issue 8 "Numerical edge cases". The rule checked throughout is PLANT-FORMAT.md's: every output is
// a sensible number or the plant is refused (InputError, exit 2; SolveError, exit 4) with a
// message that names where. Plants are built in code (tests/test_plants.h) or loaded from text.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <regex>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "overtone/errors.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"
#include "test_plants.h"

using namespace overtone;
using overtone::testing::MakeBus;
using overtone::testing::MakeSixPulseDrive;
using overtone::testing::MakeSupply;
using overtone::testing::MakeTransformer;

namespace {

bool Finite(const Spectrum& s) {
  return std::ranges::all_of(s.by_order, [](Phasor p) {
    return std::isfinite(p.real()) && std::isfinite(p.imag());
  });
}

bool Finite(const WaveformIndices& w) {
  return std::isfinite(w.fundamental) && std::isfinite(w.rms) && std::isfinite(w.thd_percent) &&
         std::isfinite(w.peak);
}

// Every number of the result and of its JSON is finite: no nan, inf or null (JSON's stand-in for
// a non-finite number) as a value anywhere in the document.
void CheckAllFinite(const StudyResult& r) {
  for (const BusResult& b : r.buses) {
    INFO("bus " << b.name);
    CHECK(Finite(b.voltage_pu));
    CHECK(Finite(b.indices));
  }
  for (const BranchResult& b : r.branches) {
    INFO("branch " << b.name);
    CHECK(Finite(b.current_a));
    CHECK(Finite(b.indices));
  }
  for (const DriveResult& d : r.drives) {
    INFO("drive " << d.name);
    CHECK(Finite(d.current_a));
    CHECK(Finite(d.indices));
  }
  std::ostringstream json;
  WriteStudyJson(r, json);
  static const std::regex kNonFinite(R"([:\[,]\s*-?(nan|inf|infinity|null)\b)",
                                     std::regex::icase);
  std::smatch found;
  const std::string text = json.str();
  const bool non_finite = std::regex_search(text, found, kNonFinite);
  INFO((non_finite ? found.str() : std::string()));
  CHECK_FALSE(non_finite);
}

// The SolveError message of running `plant`; fails the test when it solves.
std::string SolveFailure(const Plant& plant) {
  try {
    RunStudy(plant);
  } catch (const SolveError& e) {
    return e.what();
  }
  FAIL("the plant solved");
  return {};
}

// 13.8 kV supply bus, a 0.48 kV bus behind a 2000 kVA Dyn11 transformer.
Plant TwoBusPlant(double supply_mva, double x_over_r) {
  Plant plant;
  plant.study.name = "edge";
  plant.buses = {MakeBus("HV", 13.8), MakeBus("LV", 0.48)};
  plant.supplies = {MakeSupply("HV", supply_mva, x_over_r)};
  plant.transformers = {MakeTransformer("T1", "HV", "LV", 2000, 5.75, 11)};
  return plant;
}

constexpr char kHeader[] =
    "overtone: 1\n"
    "supplies:\n"
    "  - {name: UTIL, bus: MAIN, short_circuit: 250 MVA}\n"
    "buses:\n"
    "  - {name: MAIN, kv: 13.8 kV}\n"
    "  - {name: MCC-1, kv: 0.48 kV}\n"
    "transformers:\n"
    "  - {name: T1, from: MAIN, to: MCC-1, rating: 2000 kVA, impedance: 5.75 %, connection: "
    "Dyn11}\n";

}  // namespace

TEST_CASE("an island without a supply is refused at load, at the island's bus", "[edge]") {
  // PLANT-FORMAT.md "Errors": islands without a supply are errors, located.
  const std::string text = std::string(kHeader) +
                           "  - {name: T2, from: ISO-HV, to: ISO, rating: 500 kVA, impedance: 5 %, "
                           "connection: Dyn11}\n"
                           "motors:\n"
                           "  - {name: M1, bus: ISO, rating: 100 kW}\n";
  const std::string with_buses =
      std::regex_replace(text, std::regex("transformers:\n"),
                         "  - {name: ISO-HV, kv: 4.16 kV}\n  - {name: ISO, kv: 0.48 kV}\n"
                         "transformers:\n");
  try {
    LoadPlantFromString(with_buses, "island.yaml");
    FAIL("the island loaded");
  } catch (const InputError& e) {
    const Diagnostic& first = e.diagnostics().front();
    INFO(FormatDiagnostic(first));
    CHECK(first.where.file == "island.yaml");
    CHECK(first.where.line == 7);  // the first bus of the island, ISO-HV
    CHECK(first.where.column == 5);
    CHECK_THAT(first.message, Catch::Contains("island with no supply"));
  }
}

TEST_CASE("a lossless resonance exactly at the 5th gives a finite, large result", "[edge]") {
  // Parallel resonance order h_r = sqrt(S_sc / Q_c) (IEEE Std 519-2014 clause 8 / common
  // practice), with S_sc here the short-circuit power at the LV bus through the transformer.
  // Lossless capacitor, no loads: only the supply's and transformer's small R damp it.
  for (const double x_over_r : {200.0, 1e6}) {
    INFO("supply and transformer X/R " << x_over_r);
    Plant plant = TwoBusPlant(250.0, x_over_r);
    plant.transformers[0].x_over_r = x_over_r;
    const double z_pu = 0.0575 * 100.0 / 2.0 + 100.0 / 250.0;  // on 100 MVA: transformer + supply
    const double s_sc_var = 100e6 / z_pu;
    Capacitor c;
    c.name = "PFC";
    c.bus = "LV";
    c.rating_var = s_sc_var / 25.0;  // h_r = 5 exactly
    c.rated_v = 480.0;
    plant.capacitors = {c};
    plant.drives = {MakeSixPulseDrive("D1", "LV", 300)};
    try {
      const StudyResult r = RunStudy(plant);
      CheckAllFinite(r);
      // The 5th is amplified far above the 7th at the bus (a resonance, not a numerical zero).
      CHECK(std::abs(r.buses[1].voltage_pu.at(5)) > 10.0 * std::abs(r.buses[1].voltage_pu.at(7)));
    } catch (const SolveError& e) {
      // Also acceptable: a clear refusal that names the order.
      CHECK_THAT(std::string(e.what()), Catch::Contains("order"));
    }
  }
}

TEST_CASE("a supply with short-circuit ratio near 1 fails the load flow naming the bus",
          "[edge]") {
  // Voltage collapse: a constant-power load close to the source's short-circuit power cannot be
  // served (maximum power transfer, common practice). 1.2 MW behind 1.2 MVA of short circuit.
  Plant plant;
  plant.study.name = "weak";
  plant.buses = {MakeBus("WEAK", 0.48)};
  plant.supplies = {MakeSupply("WEAK", 1.2, 10.0)};
  Load load;
  load.name = "L1";
  load.bus = "WEAK";
  load.p_w = 1.2e6;
  plant.loads = {load};
  const std::string message = SolveFailure(plant);
  CHECK_THAT(message, Catch::Contains("'WEAK'"));
  CHECK_THAT(message, Catch::Contains("load flow"));
}

TEST_CASE("a supply at short-circuit ratio 4 still solves, finite", "[edge]") {
  // The same bus with a quarter of the load: well inside the nose curve (common practice).
  Plant plant;
  plant.study.name = "weak";
  plant.buses = {MakeBus("WEAK", 0.48)};
  plant.supplies = {MakeSupply("WEAK", 1.2, 10.0)};
  plant.drives = {MakeSixPulseDrive("D1", "WEAK", 300)};
  CheckAllFinite(RunStudy(plant));
}

TEST_CASE("an overloaded branch: the load flow fails at the worst bus", "[edge]") {
  // 5 MW behind a 100 kVA transformer cannot converge (common practice); the message names the
  // collapsed bus, not the healthy one.
  Plant plant = TwoBusPlant(250.0, 10.0);
  plant.buses.push_back(MakeBus("LV2", 0.48));
  plant.transformers.push_back(MakeTransformer("T2", "HV", "LV2", 100, 5.0, 11));
  Load load;
  load.name = "L2";
  load.bus = "LV2";
  load.p_w = 5e6;
  plant.loads = {load};
  plant.drives = {MakeSixPulseDrive("D1", "LV", 300)};
  const std::string message = SolveFailure(plant);
  CHECK_THAT(message, Catch::Contains("'LV2'"));
}

TEST_CASE("every front end at a very light loading gives a finite spectrum", "[edge]") {
  // Loading 0 % is refused at load (tests/bad/drive_loading_zero.yaml: a group on standby is left
  // out of the plant); the lightest accepted loadings must still solve without NaN.
  for (const FrontEnd fe : {FrontEnd::kDiodeCapacitor, FrontEnd::kDiodeChoke, FrontEnd::kThyristor,
                            FrontEnd::kSinglePhase, FrontEnd::kMultipulse, FrontEnd::kActive,
                            FrontEnd::kMeasured}) {
    for (const double loading : {1e-3, 0.01}) {
      INFO(ToString(fe) << " at loading " << loading);
      Plant plant = TwoBusPlant(250.0, 10.0);
      Drive d = MakeSixPulseDrive("D1", "LV", 75);
      d.front_end = fe;
      d.loading = loading;
      if (fe == FrontEnd::kThyristor) d.firing_angle_deg = 30.0;
      if (fe == FrontEnd::kMultipulse) d.pulses = 12;
      if (fe != FrontEnd::kMeasured && fe != FrontEnd::kActive) d.harmonics.clear();
      plant.drives = {d};
      try {
        CheckAllFinite(RunStudy(plant));
      } catch (const SolveError& e) {
        FAIL("solve error: " << e.what());
      }
    }
  }
}

TEST_CASE("a capacitor bank with no steps on leaves the study finite", "[edge]") {
  // PLANT-FORMAT.md "capacitors": steps_on may be 0; a bank out of service has no duty to report.
  Plant plant = TwoBusPlant(250.0, 10.0);
  Capacitor c;
  c.name = "PFC";
  c.bus = "LV";
  c.rating_var = 600e3;
  c.rated_v = 480.0;
  c.steps = 6;
  c.steps_on = 0;
  plant.capacitors = {c};
  plant.drives = {MakeSixPulseDrive("D1", "LV", 300)};
  const StudyResult r = RunStudy(plant);
  CheckAllFinite(r);
  for (const CapacitorDuty& duty : r.capacitors) {
    CHECK(std::isfinite(duty.vrms_percent));
    CHECK(std::isfinite(duty.kvar_percent));
  }
}

TEST_CASE("a one-bus plant solves", "[edge]") {
  // Drive straight on the supply bus: the only impedance is the supply's (common practice).
  Plant plant;
  plant.study.name = "one";
  plant.buses = {MakeBus("ONLY", 0.48)};
  plant.supplies = {MakeSupply("ONLY", 20.0, 10.0)};
  plant.drives = {MakeSixPulseDrive("D1", "ONLY", 100)};
  const StudyResult r = RunStudy(plant);
  REQUIRE(r.buses.size() == 1);
  CHECK(r.buses[0].indices.thd_percent > 0.0);
  CheckAllFinite(r);
}

TEST_CASE("large plant: 3000 buses built in code solve, finite", "[edge][large]") {
  // A 13.8 kV bus feeding 1500 feeders of two buses each (4.16 kV, then 0.48 kV), a measured
  // drive and a load on every low-voltage bus: the solver's scale, not its accuracy, is tested.
  Plant plant;
  plant.study.name = "large";
  plant.buses = {MakeBus("HV", 13.8)};
  plant.supplies = {MakeSupply("HV", 2000.0, 10.0)};
  for (int i = 0; i < 1500; ++i) {
    const std::string mv = "MV" + std::to_string(i);
    const std::string lv = "LV" + std::to_string(i);
    plant.buses.push_back(MakeBus(mv, 4.16));
    plant.buses.push_back(MakeBus(lv, 0.48));
    plant.transformers.push_back(MakeTransformer("TA" + std::to_string(i), "HV", mv, 1000, 6, 0));
    plant.transformers.push_back(MakeTransformer("TB" + std::to_string(i), mv, lv, 500, 5.75, 11));
    plant.drives.push_back(MakeSixPulseDrive("D" + std::to_string(i), lv, 20));
    Load load;
    load.name = "L" + std::to_string(i);
    load.bus = lv;
    load.p_w = 50e3;
    load.q_var = 20e3;
    plant.loads.push_back(load);
  }
  const StudyResult r = RunStudy(plant);
  REQUIRE(r.buses.size() == 3001);
  CheckAllFinite(r);
  // The long arrays are formatted in blocks on several threads (report.h): the same bytes as on
  // one, and a document an independent parser (nlohmann::json, RFC 8259) reads with every bus.
  std::ostringstream one, two;
  WriteStudyJson(r, one, 1);
  WriteStudyJson(r, two, 2);
  CHECK(one.str() == two.str());
  const nlohmann::json doc = nlohmann::json::parse(two.str());
  CHECK(doc["buses"].size() == 3001);
  CHECK(doc["branches"].size() == 3000);
  CHECK(doc["drives"].size() == 1500);
}
