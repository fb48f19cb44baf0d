// tests/transformer_derating_test.cc — IEEE C57.110 harmonic loss factor, K-factor, derating.
#include "transformer_derating.h"

#include <catch2/catch.hpp>

#include <cmath>

#include "overtone/study.h"
#include "test_plants.h"

using namespace overtone;
using overtone::internal::DeratedCurrent;
using overtone::internal::HarmonicLossFactor;
using overtone::internal::KFactor;

TEST_CASE("F_HL of the ideal six-pulse current follows the defining sum", "[transformer_derating]") {
  // F_HL = sum (I_h/I_1)^2 h^2 / sum (I_h/I_1)^2 (IEEE C57.110-2008 clause 4, from memory), on
  // the textbook six-pulse spectrum I_h = I_1 / h, h = 1, 5, 7, ..., 25 (N. Mohan et al., "Power
  // Electronics", 3rd ed., chapter 5): every numerator term is 1, so F_HL = 9 / sum 1/h^2 with
  // sum 1/h^2 = 1 + 1/25 + 1/49 + 1/121 + 1/169 + 1/289 + 1/361 + 1/529 + 1/625 = 1.0843104,
  // F_HL = 8.30021. Angles do not matter.
  std::vector<Phasor> i(26);
  i[1] = 100.0;
  for (int h : {5, 7, 11, 13, 17, 19, 23, 25}) i[h] = std::polar(100.0 / h, 0.3 * h);
  CHECK(HarmonicLossFactor(i) == Approx(8.30021).epsilon(1e-6));
  // A sinusoid has F_HL = 1; no current at all is reported as 1, not NaN.
  std::vector<Phasor> sine(26);
  sine[1] = 42.0;
  CHECK(HarmonicLossFactor(sine) == 1.0);
  CHECK(HarmonicLossFactor(std::vector<Phasor>(26)) == 1.0);
}

TEST_CASE("K-factor with currents in per unit of the rms current", "[transformer_derating]") {
  // UL 1561 K = sum I_h(pu)^2 h^2; with pu of the actual rms (as C57.110 relates it to F_HL):
  // I1 = 1, I5 = 0.2 -> I_rms^2 = 1.04, K = (1 + 0.04 x 25) / 1.04 = 1.923077.
  std::vector<Phasor> i(8);
  i[1] = 10.0;
  i[5] = 2.0;
  CHECK(KFactor(i) == Approx(2.0 / 1.04).epsilon(1e-12));
  CHECK(KFactor(i) == Approx(HarmonicLossFactor(i)).epsilon(1e-12));
}

TEST_CASE("Derated current of a dry-type transformer", "[transformer_derating]") {
  // I_max = sqrt(P_LL-R / (1 + F_HL P_EC-R)), P_LL-R = 1 + P_EC-R (IEEE C57.110-2008 clause 5,
  // from memory). P_EC-R = 0.10, F_HL = 2: sqrt(1.1 / 1.2) = 0.957427. A sinusoid needs none.
  CHECK(DeratedCurrent(2.0, 0.10) == Approx(0.9574271).epsilon(1e-7));
  CHECK(DeratedCurrent(1.0, 0.10) == Approx(1.0).epsilon(1e-12));
}

TEST_CASE("A study derates the transformer feeding a six-pulse group", "[transformer_derating]") {
  // The group's table is I_h = I_1/h for h = 6k +- 1 up to 49; a transformer passes every order
  // in the same ratio, so the branch's F_HL is 17 / sum 1/h^2 over h = 1, 5, 7, ..., 47, 49,
  // = 17 / 1.0900918 = 15.59502 (hand sum as above), and with the default P_EC-R = 0.10 the
  // derated current is sqrt(1.1 / (1 + 1.559502)) = 0.655569.
  Plant plant;
  plant.buses = {testing::MakeBus("HV", 13.8), testing::MakeBus("LV", 0.48)};
  plant.supplies = {testing::MakeSupply("HV", 250.0, 10.0)};
  plant.transformers = {testing::MakeTransformer("T1", "HV", "LV", 1500, 5.75, 11)};
  plant.drives = {testing::MakeSixPulseDrive("D1", "LV", 600)};
  const StudyResult r = RunStudy(plant);
  REQUIRE(r.transformers.size() == 1);
  const TransformerDerating& t = r.transformers[0];
  CHECK(t.name == "T1");
  CHECK(t.harmonic_loss_factor == Approx(15.59502).epsilon(1e-6));
  CHECK(t.derated_percent == Approx(65.5569).epsilon(1e-5));
  // Load: the branch rms current over 1500 kVA / (sqrt 3 x 13.8 kV) = 62.7555 A.
  CHECK(t.load_percent == Approx(100.0 * r.branches[0].indices.rms / 62.75546).epsilon(1e-6));
}
