// tests/headroom_test.cc — hosting capacity against closed forms on a one-bus plant.
#include "overtone/headroom.h"

#include <catch2/catch.hpp>
#include <cmath>
#include <numbers>

#include "overtone/errors.h"
#include "overtone/load.h"
#include "test_plants.h"

using namespace overtone;
using overtone::testing::MakeBus;
using overtone::testing::MakeSupply;

namespace {

constexpr double kVolts = 480.0;
constexpr double kUnitW = 10e3;
constexpr double kFifthPercent = 18.0;

// One 480 V bus on a supply, one group of `count` measured units whose table has a 5th only,
// drawn at unity displacement power factor: the spectrum is linear in the count.
Plant OneBusPlant(double supply_mva, double x_over_r, int count) {
  Plant plant;
  plant.study.name = "one bus";
  plant.buses = {MakeBus("LV", kVolts / 1e3)};
  plant.supplies = {MakeSupply("LV", supply_mva, x_over_r)};
  Drive d;
  d.name = "KIND";
  d.bus = "LV";
  d.count = count;
  d.power_w = kUnitW;
  d.front_end = FrontEnd::kMeasured;
  d.displacement_pf = 1.0;
  d.harmonics = {{5, kFifthPercent, 0.0, {}}};
  plant.drives = {d};
  return plant;
}

HeadroomOptions AtBus(const std::string& bus) {
  HeadroomOptions o;
  o.drive_kind = "KIND";
  o.buses = {bus};
  return o;
}

}  // namespace

TEST_CASE("Headroom on one bus is the count where V_5 reaches the IEEE 519 limit", "[headroom]") {
  // Ohm's law at order 5 on the supply's Thevenin impedance (IEEE Std 399 clause 10.5: X(h) = hX,
  // R constant): V_5 = |R + j5X| * I_5 * n, with I_5 = 18 % of I_1 = P / (sqrt 3 V) per unit and
  // n = 1 existing + N added units, every unit in phase. IEEE Std 519-2014 Table 1: 5 % for an
  // individual order at a bus of 1 kV or less (THD 8 %, so the individual limit binds first).
  // X/R = 200 keeps the fundamental drop (P R / V^2, below 0.03 %) out of the count.
  const double mva = 10.0, x_over_r = 200.0;
  const double z = kVolts * kVolts / (mva * 1e6);
  const double x = z * x_over_r / std::sqrt(1.0 + x_over_r * x_over_r);
  const double r = x / x_over_r;
  const double z5 = std::hypot(r, 5.0 * x);
  const double i5_per_unit = kFifthPercent / 100.0 * kUnitW / (std::numbers::sqrt3 * kVolts);
  const double v_limit = 0.05 * kVolts / std::numbers::sqrt3;
  const double n_total = v_limit / (z5 * i5_per_unit);  // about 55.6 units
  const int expected_added = static_cast<int>(std::floor(n_total)) - 1;

  const HeadroomResult h = RunHeadroom(OneBusPlant(mva, x_over_r, 1), AtBus("LV"));
  REQUIRE(h.buses.size() == 1);
  const BusHeadroom& b = h.buses[0];
  CHECK(std::abs(b.added_units - expected_added) <= 1);
  CHECK(b.added_kw == Approx(b.added_units * kUnitW / 1e3));
  REQUIRE(b.binding);
  CHECK(b.binding->what == "v_h5");
  CHECK(b.binding->where == "LV");
  CHECK(b.binding->limit == Approx(5.0));
  CHECK(b.binding->value > 5.0);
  CHECK_FALSE(b.capped);
  CHECK(b.studies < 15);  // interpolation, not plain bisection over 1000 units
}

TEST_CASE("Headroom is zero when a limit is already exceeded", "[headroom]") {
  // The same closed form: 80 units on 10 MVA put V_5 near 7.2 %, over the 5 % of IEEE 519 Table 1.
  const HeadroomResult h = RunHeadroom(OneBusPlant(10.0, 200.0, 80), AtBus("LV"));
  REQUIRE(h.buses.size() == 1);
  CHECK(h.buses[0].added_units == 0);
  CHECK(h.buses[0].already_violating);
  REQUIRE(h.buses[0].binding);
  CHECK(h.buses[0].binding->what == "v_h5");
}

TEST_CASE("Headroom stops at the search cap when no limit binds", "[headroom]") {
  // Closed form as above: 5 units more on 10 MVA give V_5 about 0.5 %, far below 5 %.
  HeadroomOptions o = AtBus("LV");
  o.max_units = 5;
  const HeadroomResult h = RunHeadroom(OneBusPlant(10.0, 200.0, 1), o);
  CHECK(h.buses[0].capped);
  CHECK(h.buses[0].added_units == 5);
  CHECK_FALSE(h.buses[0].binding);
}

TEST_CASE("A count the load flow cannot solve binds as unsolvable", "[headroom]") {
  // A lossless line of reactance X delivers at most V^2 / (2X) at unity power factor (the
  // nose of the P-V curve, P. Kundur, "Power System Stability and Control", section 14.1):
  // on 1 MVA that is about 500 kW, 50 units. A 0.01 % 5th keeps V_5 far below its limit.
  Plant plant = OneBusPlant(1.0, 200.0, 1);
  plant.drives[0].harmonics[0].percent = 0.01;
  HeadroomOptions o = AtBus("LV");
  o.max_units = 200;
  const HeadroomResult h = RunHeadroom(plant, o);
  const BusHeadroom& b = h.buses[0];
  REQUIRE(b.binding);
  CHECK(b.binding->what == "unsolvable");
  CHECK(b.added_units + 1 < 50);
  CHECK(b.added_units > 10);
}

TEST_CASE("Unknown drive kinds and buses are input errors", "[headroom]") {
  const Plant plant = OneBusPlant(10.0, 200.0, 1);
  HeadroomOptions o = AtBus("LV");
  o.drive_kind = "NOPE";
  CHECK_THROWS_AS(RunHeadroom(plant, o), InputError);
  CHECK_THROWS_WITH(RunHeadroom(plant, AtBus("MCC-9")), Catch::Contains("no bus named 'MCC-9'"));
  HeadroomOptions both = AtBus("LV");
  both.all_buses = true;
  CHECK_THROWS_AS(RunHeadroom(plant, both), InputError);
}

TEST_CASE("Transformer derating binds when the load exceeds the derated capacity", "[headroom]") {
  // IEEE Std C57.110 clause 5: F_HL = sum I_h^2 h^2 / sum I_h^2 and the largest rms current of
  // that shape, I_max / I_R = sqrt((1 + P_EC-R) / (1 + F_HL P_EC-R)); P_EC-R = 10 % by default.
  // The figure is `tx_derating`, value = the load, limit = that capacity, both % of rated current.
  const Plant plant =
      LoadPlant(std::string(OVERTONE_SOURCE_DIR) + "/tests/plants/mitigate/resonant-mill.yaml");
  const StudyResult r = RunStudy(plant, StudyOptions{.threads = 0, .scan = false});
  const BranchResult& tx = r.branches.at(0);
  REQUIRE(tx.name == "TX-1");
  double sum = 0.0, weighted = 0.0;
  for (int h = 1; h < static_cast<int>(tx.current_a.by_order.size()); ++h) {
    sum += std::norm(tx.current_a.at(h));
    weighted += std::norm(tx.current_a.at(h)) * h * h;
  }
  const double f_hl = weighted / sum;
  const double capacity = 100.0 * std::sqrt(1.1 / (1.0 + 0.1 * f_hl));
  const double rated_a = 1500e3 / (std::numbers::sqrt3 * 13.8e3);
  const double load = 100.0 * std::sqrt(sum) / rated_a;
  bool found = false;
  for (const HeadroomBinding& f : LimitFigures(r)) {
    if (f.what != "tx_derating") continue;
    found = true;
    CHECK(f.where == "TX-1");
    CHECK(f.value == Approx(load).epsilon(1e-6));
    CHECK(f.limit == Approx(capacity).epsilon(1e-6));
  }
  CHECK(found);
  CHECK(load > capacity);  // this mill's transformer is overloaded by its harmonic content
}
