// tests/summation_test.cc — vector, arithmetic and IEC 61000-3-6 summation, worked by hand.
#include "summation.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <sstream>

#include "overtone/report.h"
#include "overtone/study.h"
#include "test_plants.h"

using namespace overtone;

namespace {

// One 480 V bus: a 30 MVA supply (X/R 10) with 2 % 5th and 1 % 11th background, and one measured
// six-pulse group. Two sources; no shunt at the bus, so each source's voltage there is known in
// closed form.
Plant TwoSourcePlant(Summation rule) {
  Plant plant;
  plant.study.name = "two sources";
  plant.study.summation = rule;
  plant.study.demand_current_a = 500.0;
  plant.buses = {testing::MakeBus("MAIN", 0.48)};
  Supply supply = testing::MakeSupply("MAIN", 30.0, 10.0);
  supply.background = {{5, 2.0, 40.0, {}}, {11, 1.0, -70.0, {}}};
  plant.supplies = {supply};
  plant.drives = {testing::MakeSixPulseDrive("D1", "MAIN", 200)};
  return plant;
}

StudyResult Run(Summation rule) {
  StudyOptions options;
  options.scan = false;
  return RunStudy(TwoSourcePlant(rule), options);
}

}  // namespace

TEST_CASE("IEC 61000-3-6 summation exponents", "[summation]") {
  // IEC TR 61000-3-6:2008 clause 8 (general summation law), from memory: 1 for h < 5, 1.4 for
  // 5 <= h <= 10, 2 for h > 10.
  CHECK(internal::SummationExponent(2) == 1.0);
  CHECK(internal::SummationExponent(4) == 1.0);
  CHECK(internal::SummationExponent(5) == 1.4);
  CHECK(internal::SummationExponent(10) == 1.4);
  CHECK(internal::SummationExponent(11) == 2.0);
  CHECK(internal::SummationExponent(49) == 2.0);
  const std::vector<std::complex<double>> parts = {{3.0, 0.0}, {0.0, -4.0}};
  CHECK(internal::CombineSources(Summation::kVector, 7, parts) == Approx(5.0));
  CHECK(internal::CombineSources(Summation::kArithmetic, 7, parts) == Approx(7.0));
  CHECK(internal::CombineSources(Summation::kIec, 13, parts) == Approx(5.0));  // alpha 2
  CHECK(internal::CombineSources(Summation::kIec, 3, parts) == Approx(7.0));   // alpha 1
  CHECK(internal::CombineSources(Summation::kIec, 5, parts) ==
        Approx(std::pow(std::pow(3.0, 1.4) + std::pow(4.0, 1.4), 1.0 / 1.4)));
}

TEST_CASE("Two sources at one bus: arithmetic |a|+|b|, iec (|a|^alpha+|b|^alpha)^(1/alpha)", "[summation]") {
  const StudyResult vec = Run(Summation::kVector);
  const StudyResult ari = Run(Summation::kArithmetic);
  const StudyResult iec = Run(Summation::kIec);
  REQUIRE(ari.study.summation == Summation::kArithmetic);
  // Hand calculation. Background alone: no current flows (the bus has no harmonic path), so
  // |b_h| = percent of the EMF. Drive alone: the supply carries the group's current, so
  // |a_h| = |I_h| |R + j h X| / (V / sqrt 3) pu, with |Z_1| = V^2 / S_sc and X = 10 R.
  const double v = 480.0, z1 = v * v / 30e6, r = z1 / std::sqrt(101.0), x = 10.0 * r;
  for (int h : {5, 7, 11, 13}) {
    INFO("order " << h);
    const double b = h == 5 ? 0.02 : h == 11 ? 0.01 : 0.0;
    const double i_h = std::abs(vec.drives[0].current_a.at(h));
    const double a = i_h * std::hypot(r, h * x) / (v / std::sqrt(3.0));
    const double alpha = h < 5 ? 1.0 : h <= 10 ? 1.4 : 2.0;
    CHECK(std::abs(ari.buses[0].voltage_pu.at(h)) == Approx(a + b).epsilon(1e-9));
    CHECK(std::abs(iec.buses[0].voltage_pu.at(h)) ==
          Approx(std::pow(std::pow(a, alpha) + std::pow(b, alpha), 1.0 / alpha)).epsilon(1e-9));
    // The vector sum lies between | |a| - |b| | and |a| + |b|.
    CHECK(std::abs(vec.buses[0].voltage_pu.at(h)) <= a + b + 1e-12);
    CHECK(std::abs(vec.buses[0].voltage_pu.at(h)) >= std::abs(a - b) - 1e-12);
    // At the pcc only the group's own current flows from the utility (the background drives no
    // current through a bus without a harmonic path): |I_h| under every rule.
    CHECK(std::abs(ari.pcc.current_a.at(h)) == Approx(i_h).epsilon(1e-9));
    CHECK(std::abs(iec.pcc.current_a.at(h)) == Approx(i_h).epsilon(1e-9));
  }
  // THD follows the chosen summation: arithmetic >= iec >= 0, and THD from the summed orders.
  double sum_sq = 0.0;
  for (int h = 2; h <= 50; ++h) sum_sq += std::norm(ari.buses[0].voltage_pu.at(h));
  CHECK(ari.buses[0].indices.thd_percent ==
        Approx(100.0 * std::sqrt(sum_sq) / ari.buses[0].indices.fundamental).epsilon(1e-9));
  CHECK(ari.buses[0].indices.thd_percent > iec.buses[0].indices.thd_percent);
  CHECK(ari.buses[0].indices.fundamental == vec.buses[0].indices.fundamental);
}

TEST_CASE("Non-vector summation writes no harmonic angles (PLANT-FORMAT.md Conventions)", "[summation]") {
  std::ostringstream ari, vec;
  WriteStudyJson(Run(Summation::kArithmetic), ari);
  WriteStudyJson(Run(Summation::kVector), vec);
  CHECK_THAT(ari.str(), Catch::Contains(R"("summation":"arithmetic")"));
  // Buses and branches carry summed magnitudes (no angle); drive groups keep their own spectra.
  const auto section = [](const std::string& json) {
    return json.substr(json.find(R"("buses":)"), json.find(R"("drives":)") - json.find(R"("buses":)"));
  };
  CHECK_THAT(section(ari.str()), !Catch::Contains(R"(,"angle_deg")"));
  CHECK_THAT(section(vec.str()), Catch::Contains(R"(,"angle_deg")"));
}
