// tests/study_test.cc — the whole pipeline on small plants with known answers.
#include "overtone/study.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <sstream>

#include "overtone/errors.h"
#include "overtone/report.h"
#include "test_plants.h"

using namespace overtone;
using overtone::testing::MakeBus;
using overtone::testing::MakeSixPulseDrive;
using overtone::testing::MakeSupply;
using overtone::testing::MakeTransformer;

namespace {

Plant TwoGroupPlant(int second_clock) {
  Plant plant;
  plant.study.name = "twelve";
  plant.buses = {MakeBus("HV", 13.8), MakeBus("LV1", 0.48), MakeBus("LV2", 0.48)};
  plant.supplies = {MakeSupply("HV", 150.0, 10.0)};
  plant.transformers = {MakeTransformer("T1", "HV", "LV1", 1500, 5.75, 0),
                        MakeTransformer("T2", "HV", "LV2", 1500, 5.75, second_clock)};
  plant.drives = {MakeSixPulseDrive("D1", "LV1", 600), MakeSixPulseDrive("D2", "LV2", 600)};
  return plant;
}

const BranchResult& Branch(const StudyResult& r, const std::string& name) {
  for (const auto& b : r.branches) {
    if (b.name == name) return b;
  }
  FAIL("no branch " << name);
  throw;
}

}  // namespace

TEST_CASE("Dd0 and Dyn11 groups cancel the 5th and 7th at the common bus", "[study]") {
  // The standard twelve-pulse result (IEEE Std 519-2014 clause 4 / J. Arrillaga, N. Watson,
  // "Power System Harmonics", section 4.5): 6k +- 1 with k odd cancel, k even add.
  const StudyResult r = RunStudy(TwoGroupPlant(11));
  const StudyResult same = RunStudy(TwoGroupPlant(0));
  for (int h : {5, 7, 17, 19}) {
    INFO("order " << h);
    const Phasor sum = Branch(r, "T1").current_a.at(h) + Branch(r, "T2").current_a.at(h);
    CHECK(std::abs(sum) < 1e-9 * std::abs(Branch(r, "T1").current_a.at(h)));
    CHECK(std::abs(r.buses[0].voltage_pu.at(h)) < 1e-9 * std::abs(same.buses[0].voltage_pu.at(h)));
  }
  for (int h : {11, 13, 23, 25}) {
    INFO("order " << h);
    const Phasor sum = Branch(r, "T1").current_a.at(h) + Branch(r, "T2").current_a.at(h);
    CHECK(std::abs(sum) == Approx(2.0 * std::abs(Branch(r, "T1").current_a.at(h))).epsilon(1e-9));
    CHECK(std::abs(r.buses[0].voltage_pu.at(h)) ==
          Approx(std::abs(same.buses[0].voltage_pu.at(h))).epsilon(1e-9));
  }
}

TEST_CASE("A harmonic current source raises V_h = I_h |Z(h)| at its bus", "[study]") {
  // Closed form for one bus: the drive's 5th flows into the supply impedance R + j5X
  // (IEEE Std 519-2014 clause 8 / IEEE Std 399 clause 10.4). The 5th's magnitude is 20 % of
  // the drawn fundamental.
  Plant plant;
  plant.buses = {MakeBus("B", 0.48)};
  plant.supplies = {MakeSupply("B", 15.0, 8.0)};
  Drive d;
  d.name = "D";
  d.bus = "B";
  d.power_w = 400e3;
  d.front_end = FrontEnd::kMeasured;
  d.harmonics = {{5, 20.0, 0.0, {}}};
  plant.drives = {d};
  const StudyResult r = RunStudy(plant);
  const double i1 = std::abs(r.drives[0].current_a.at(1));
  const double zs = 480.0 * 480.0 / 15e6;
  const double rs = zs / std::sqrt(65.0);
  const double z5 = std::abs(std::complex<double>(rs, 5.0 * 8.0 * rs));
  const double v5_volts = 0.2 * i1 * z5;                 // line-to-neutral
  const double v5_pu = v5_volts / (480.0 / std::sqrt(3.0));
  CHECK(std::abs(r.buses[0].voltage_pu.at(5)) == Approx(v5_pu).epsilon(1e-9));
  // And the drawn fundamental is P / (sqrt 3 V) at unity displacement factor.
  CHECK(i1 == Approx(400e3 / (std::sqrt(3.0) * 480.0 * r.buses[0].indices.fundamental)).epsilon(1e-9));
}

TEST_CASE("Background voltage divides between supply and plant impedance", "[study]") {
  // Voltage divider: V_h = E_h Z_load / (Z_s + Z_load) with a parallel-RL load (IEEE 399 10.5.7).
  Plant plant;
  plant.buses = {MakeBus("B", 13.8)};
  Supply s = MakeSupply("B", 100.0, 10.0);
  s.background = {{5, 2.0, 0.0, {}}};
  plant.supplies = {s};
  Load l;
  l.name = "L";
  l.bus = "B";
  l.p_w = 5e6;
  l.q_var = 2e6;
  plant.loads = {l};
  const StudyResult r = RunStudy(plant);
  const double v2 = 13.8e3 * 13.8e3;
  const std::complex<double> zload = 1.0 / (std::complex<double>(5e6 / v2, 0) +
                                            1.0 / std::complex<double>(0, 5.0 * v2 / 2e6));
  const double zmag = v2 / 100e6, rs = zmag / std::sqrt(101.0);
  const std::complex<double> zs{rs, 5.0 * 10.0 * rs};
  CHECK(std::abs(r.buses[0].voltage_pu.at(5)) == Approx(0.02 * std::abs(zload / (zs + zload))).epsilon(1e-9));
}

TEST_CASE("Results and JSON do not depend on the thread count", "[study]") {
  // DESIGN.md section 5: each order is refactored from one fixed reference factorization.
  const Plant plant = TwoGroupPlant(11);
  std::ostringstream one, two;
  WriteStudyJson(RunStudy(plant, StudyOptions{1}), one, 1);
  WriteStudyJson(RunStudy(plant, StudyOptions{2}), two, 2);
  CHECK(one.str() == two.str());
}

TEST_CASE("Computed six-pulse spectra cancel through Dd0 and Dyn11 like the textbook case", "[study]") {
  // The bridge model works in each group's own frame; the network places the spectra. Two
  // identical diode bridges behind Dd0 and Dyn11: 5th and 7th cancel at the common bus, 11th and
  // 13th add (standard twelve-pulse result, IEEE Std 519-2014 clause 4; Arrillaga & Watson 4.5).
  Plant plant = TwoGroupPlant(11);
  for (Drive& d : plant.drives) {
    d.front_end = FrontEnd::kDiodeChoke;
    d.harmonics.clear();
  }
  const StudyResult r = RunStudy(plant);
  REQUIRE(r.drives[0].vdc_v.has_value());
  for (int h : {5, 7}) {
    const Phasor sum = Branch(r, "T1").current_a.at(h) + Branch(r, "T2").current_a.at(h);
    CHECK(std::abs(sum) < 1e-6 * std::abs(Branch(r, "T1").current_a.at(h)));
  }
  for (int h : {11, 13}) {
    const Phasor sum = Branch(r, "T1").current_a.at(h) + Branch(r, "T2").current_a.at(h);
    CHECK(std::abs(sum) == Approx(2.0 * std::abs(Branch(r, "T1").current_a.at(h))).epsilon(1e-6));
  }
}
