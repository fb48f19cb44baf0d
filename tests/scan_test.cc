// tests/scan_test.cc — frequency scans against closed forms of parallel resonance.
#include "scan.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <complex>
#include <sstream>

#include "overtone/errors.h"
#include "overtone/scan.h"
#include "overtone/study.h"
#include "test_plants.h"

using namespace overtone;
using overtone::testing::MakeBus;
using overtone::testing::MakeSixPulseDrive;
using overtone::testing::MakeSupply;
using overtone::testing::MakeTransformer;
using Z = std::complex<double>;

namespace {

Capacitor MakeBank(const std::string& name, const std::string& bus, double kvar, double kv,
                   int steps) {
  Capacitor c;
  c.name = name;
  c.bus = bus;
  c.rating_var = kvar * 1e3;
  c.rated_v = kv * 1e3;
  c.steps = steps;
  c.steps_on = steps;
  return c;
}

// One 480 V bus on a 15 MVA supply with a 600 kvar bank.
Plant OneBusPlant(double x_over_r) {
  Plant plant;
  plant.study.name = "one bus";
  plant.buses = {MakeBus("LV", 0.48)};
  plant.supplies = {MakeSupply("LV", 15.0, x_over_r)};
  plant.capacitors = {MakeBank("PFC-1", "LV", 600.0, 0.48, 1)};
  return plant;
}

// 13.8 kV supply, 250 MVA; 1500 kVA 5.75 % transformer; two banks on the 480 V bus:
// PFC-1 6 x 50 kvar and PFC-2 4 x 100 kvar. Near-lossless so that closed forms hold.
Plant TwoBankPlant() {
  Plant plant;
  plant.study.name = "two banks";
  plant.buses = {MakeBus("HV", 13.8), MakeBus("LV", 0.48)};
  plant.supplies = {MakeSupply("HV", 250.0, 1e4)};
  plant.transformers = {MakeTransformer("T1", "HV", "LV", 1500, 5.75, 11)};
  plant.transformers[0].x_over_r = 1e4;
  plant.capacitors = {MakeBank("PFC-1", "LV", 300.0, 0.48, 6), MakeBank("PFC-2", "LV", 400.0, 0.48, 4)};
  plant.capacitors[1].steps_on = 2;
  return plant;
}

ScanResult Scan(const Plant& plant, const ScanOptions& options = {}, bool keep_curves = false) {
  return RunScan(plant, options, keep_curves);
}

int BusIndex(const ScanResult& r, const std::string& name) {
  for (std::size_t b = 0; b < r.buses.size(); ++b) {
    if (r.buses[b] == name) return static_cast<int>(b);
  }
  FAIL("bus " << name << " not monitored");
  return -1;
}

}  // namespace

TEST_CASE("A bank on a supply resonates at h_r = sqrt(S_sc / Q_c)", "[scan]") {
  // Parallel resonance of the supply inductance with the bank (IEEE Std 1531-2020 clause 5 /
  // IEEE Std 519-2014 application material, from memory): sqrt(15 MVA / 0.6 Mvar) = 5.0.
  // With supply R: |Z| at the peak = X_r sqrt(X_r^2 + R^2) / R and amplification = |Z| / |R + jX_r|
  // (series R-L in parallel with C at X_L = X_C; textbook circuit theory), X_r = 5 X_s.
  const double x_over_r = 100.0;
  const ScanResult r = Scan(OneBusPlant(x_over_r));
  REQUIRE(r.configurations.size() == 2);  // the one step off and on
  const BusScan& on = r.at(1, 0);
  REQUIRE(on.peaks.size() == 1);
  const ResonancePeak& p = on.peaks[0];
  CHECK(p.order == Approx(5.0).epsilon(1e-4));
  const double zs = 480.0 * 480.0 / 15e6;
  const double rs = zs / std::sqrt(1.0 + x_over_r * x_over_r), xr = 5.0 * rs * x_over_r;
  CHECK(p.impedance_ohm == Approx(xr * std::hypot(xr, rs) / rs).epsilon(1e-3));
  CHECK(p.amplification == Approx(xr / rs).epsilon(1e-3));
  CHECK(r.at(0, 0).peaks.empty());  // no bank in service: an inductive supply has no peak
  CHECK(r.configurations[1] == "PFC-1 1/1");
}

TEST_CASE("A bank behind a transformer resonates near sqrt(kVA / (kvar Z_pu))", "[scan]") {
  // The transformer form of the same rule (IEEE Std 1531-2020 / IEEE 519 application material,
  // from memory): 1000 kVA, 5.75 %, 300 kvar gives sqrt(1000 / (300 * 0.0575)) = 7.61, the
  // supply being stiff (100,000 MVA here) and the transformer nearly pure reactance.
  Plant plant;
  plant.buses = {MakeBus("HV", 13.8), MakeBus("LV", 0.48)};
  plant.supplies = {MakeSupply("HV", 1e5, 10.0)};
  plant.transformers = {MakeTransformer("T1", "HV", "LV", 1000, 5.75, 11)};
  plant.transformers[0].x_over_r = 1e4;
  plant.capacitors = {MakeBank("PFC-1", "LV", 300.0, 0.48, 1)};
  ScanOptions options;
  options.buses = {"LV"};
  ScanResult r = Scan(plant, options);
  REQUIRE(r.at(1, 0).peaks.size() == 1);
  CHECK(r.at(1, 0).peaks[0].order == Approx(7.61).margin(0.005));

  // The rule is approximate because it uses Z for X: at X/R = 8 the reactance is
  // 5.75 % x 8 / sqrt(65) = 5.7056 % and the peak moves to sqrt(1000 / (300 x 0.057056)) = 7.644.
  plant.transformers[0].x_over_r = 8.0;
  r = Scan(plant, options);
  REQUIRE(r.at(1, 0).peaks.size() == 1);
  CHECK(r.at(1, 0).peaks[0].order == Approx(7.644).margin(0.002));
}

TEST_CASE("Peaks of a two-bank plant move with the steps as the closed form says", "[scan]") {
  // h_r = sqrt(S_sc,LV / Q_on) for every configuration (IEEE Std 1531-2020, from memory), with
  // S_sc,LV = 1 / (1/250 MVA + 0.0575/1.5 MVA) the fault level at the 480 V bus. The network's
  // pole is seen from both buses: at HV the supply parallels (transformer + bank), at LV
  // (supply + transformer) parallels the bank, and both vanish at h^2 (X_s + X_t) = X_c.
  const Plant plant = TwoBankPlant();
  const ScanResult r = Scan(plant);
  REQUIRE(r.configurations.size() == 7 * 5);
  CHECK(r.configurations.front() == "PFC-1 0/6, PFC-2 0/4");
  CHECK(r.configurations.back() == "PFC-1 6/6, PFC-2 4/4");
  CHECK(r.configurations[r.present_configuration] == "PFC-1 6/6, PFC-2 2/4");
  const double s_sc_lv = 1.0 / (1.0 / 250e6 + 0.0575 / 1.5e6);
  int checked = 0;
  for (std::size_t c = 0; c < r.configurations.size(); ++c) {
    const int steps1 = static_cast<int>(c) / 5, steps2 = static_cast<int>(c) % 5;
    const double q_on = steps1 * 50e3 + steps2 * 100e3;
    for (const char* bus : {"HV", "LV"}) {
      INFO(r.configurations[c] << " at " << bus);
      const BusScan& s = r.at(static_cast<int>(c), BusIndex(r, bus));
      if (q_on == 0.0) {
        CHECK(s.peaks.empty());
        continue;
      }
      const double h_r = std::sqrt(s_sc_lv / q_on);
      if (h_r > 50.0) continue;
      REQUIRE(s.peaks.size() == 1);
      CHECK(s.peaks[0].order == Approx(h_r).epsilon(1e-4));
      ++checked;
    }
  }
  CHECK(checked == 2 * 34);
}

TEST_CASE("Scan points and transfer impedances match the circuit's closed form", "[scan]") {
  // LV driving point: (Z_s + Z_t) || Z_c. Transfer LV -> HV: the share of the current that flows
  // through the transformer, Z_c / (Z_s + Z_t + Z_c), times Z_s (current divider; textbook).
  // Ohms per pu: V_nom^2 / S_base at one bus, V_HV V_LV / S_base between the two.
  Plant plant = TwoBankPlant();
  plant.drives = {MakeSixPulseDrive("D1", "LV", 200)};
  const ScanResult r = Scan(plant, {}, true);
  const int c = r.present_configuration;  // 300 + 200 kvar in service; transfers are kept for it
  const std::size_t k = 100;  // order 1 + 100 * 0.02 = 3
  REQUIRE(r.orders[k] == Approx(3.0));
  const double h = 3.0, base = 100e6;
  const auto split = [&](double magnitude, double x_over_r) {
    const double rr = magnitude / std::sqrt(1.0 + x_over_r * x_over_r);
    return Z(rr, h * rr * x_over_r);
  };
  const Z zs = split(base / 250e6, 1e4), zt = split(0.0575 * base / 1.5e6, 1e4);
  const Z zc(0.0, -(480.0 * 480.0 / 500e3) / (480.0 * 480.0 / base) / h);
  const Z z_lv = (zs + zt) * zc / (zs + zt + zc);
  CHECK(std::abs(r.at(c, BusIndex(r, "LV")).impedance_ohm[k]) ==
        Approx(std::abs(z_lv) * 480.0 * 480.0 / base).epsilon(1e-9));
  REQUIRE(r.drive_buses == std::vector<std::string>{"LV"});
  const TransferScan* to_hv = nullptr;
  for (const TransferScan& t : r.transfers) {
    if (t.configuration == c && r.buses[t.to_bus] == "HV") to_hv = &t;
  }
  REQUIRE(to_hv);
  CHECK(std::abs(to_hv->impedance_ohm[k]) ==
        Approx(std::abs(zs * zc / (zs + zt + zc)) * 13.8e3 * 480.0 / base).epsilon(1e-9));
  REQUIRE(r.base_impedance_ohm.size() == r.buses.size());
  CHECK(std::abs(r.base_impedance_ohm[BusIndex(r, "LV")][k]) ==
        Approx(std::abs(zs + zt) * 480.0 * 480.0 / base).epsilon(1e-9));
}

TEST_CASE("A detuned bank resonates below its tuning, at sqrt(X_C / (X_s + X_L))", "[scan]") {
  // With X_L = p X_C per step, the supply parallels the bank where h X_s + h X_L = X_C / h:
  // h_p = 1 / sqrt(Q/S_sc + p) = 1 / sqrt(0.04 + 0.07) = 3.015 for 600 kvar on 15 MVA at 7 %
  // (series-parallel LC circuit; IEEE Std 1531-2020 clause 6 on detuned banks, from memory).
  Plant plant = OneBusPlant(1e4);
  plant.capacitors[0].detuning = 0.07;
  plant.capacitors[0].x_over_r = 1e4;
  const ScanResult r = Scan(plant);
  REQUIRE(r.at(1, 0).peaks.size() == 1);
  CHECK(r.at(1, 0).peaks[0].order == Approx(1.0 / std::sqrt(0.11)).epsilon(1e-4));
}

TEST_CASE("A bank resonating at the 5th is high risk; detuned at 7 % it is low", "[scan]") {
  // The six-pulse group draws 20 % at the 5th (I_h = I_1 / h), so a peak at 5.0 with a large
  // amplification is high risk; the detuned bank's peak at 3.0 is 2 orders from the 5th.
  Plant plant = OneBusPlant(10.0);
  plant.drives = {MakeSixPulseDrive("D1", "LV", 200)};
  ScanResult r = Scan(plant);
  REQUIRE(r.at(1, 0).peaks.size() == 1);
  CHECK(r.at(1, 0).peaks[0].near_order == 5);
  CHECK(r.at(1, 0).peaks[0].risk == Risk::kHigh);
  CHECK(r.configurations[r.worst_configuration] == "PFC-1 1/1");
  plant.capacitors[0].detuning = 0.07;
  r = Scan(plant);
  REQUIRE(r.at(1, 0).peaks.size() == 1);
  CHECK(r.at(1, 0).peaks[0].risk == Risk::kLow);
}

TEST_CASE("The risk rule weighs distance to an injected order and amplification", "[scan]") {
  // Our screening rule (docs/resonance.md), not a published one: high within the band with
  // amplification >= 2; medium within the band from 1.2, or within twice the band from 2.
  std::vector<double> injection(14, 0.0);
  injection[5] = 20.0;
  injection[7] = 14.0;
  injection[11] = 0.5;  // below 1 %: does not count
  const auto rate = [&](double order, double amplification, double band) {
    ResonancePeak p;
    p.order = order;
    p.amplification = amplification;
    internal::RateRisk(injection, band, p);
    return p;
  };
  CHECK(rate(5.3, 10.0, 0.5).risk == Risk::kHigh);
  CHECK(rate(5.3, 10.0, 0.5).near_order == 5);
  CHECK(rate(6.8, 2.0, 0.5).near_order == 7);
  CHECK(rate(5.3, 1.5, 0.5).risk == Risk::kMedium);
  CHECK(rate(5.3, 1.1, 0.5).risk == Risk::kLow);
  CHECK(rate(6.0, 10.0, 0.5).risk == Risk::kMedium);
  CHECK(rate(6.0, 10.0, 0.4).risk == Risk::kLow);
  CHECK(rate(6.0, 10.0, 0.4).near_order == 0);
  CHECK(rate(11.0, 50.0, 0.5).risk == Risk::kLow);
  CHECK(rate(3.0, 50.0, 0.5).risk == Risk::kLow);
}

TEST_CASE("Step configurations cover every combination up to 4,096", "[scan]") {
  std::vector<Capacitor> banks = TwoBankPlant().capacitors;
  std::string note;
  const auto all = internal::StepConfigurations(banks, &note);
  CHECK(all.size() == 35);
  CHECK(note.empty());
  CHECK(all[6].name == "PFC-1 1/6, PFC-2 1/4");

  // 13 one-step banks: 8,192 combinations, so only the extremes, each bank alone and the present.
  banks.clear();
  for (int k = 0; k < 13; ++k) banks.push_back(MakeBank("C" + std::to_string(k), "LV", 100.0, 0.48, 1));
  const auto reduced = internal::StepConfigurations(banks, &note);
  CHECK(reduced.size() == 2 + 13);  // the present state (all on) is already listed
  CHECK_THAT(note, Catch::Contains("8192") && Catch::Contains("4096"));
}

TEST_CASE("A study screens the present step state at the pcc and the capacitor buses", "[scan]") {
  Plant plant = TwoBankPlant();
  plant.drives = {MakeSixPulseDrive("D1", "LV", 200)};
  StudyResult r = RunStudy(plant);
  const double h_r = std::sqrt(1.0 / (1.0 / 250e6 + 0.0575 / 1.5e6) / 500e3);  // 300 + 200 kvar
  REQUIRE(r.resonances.size() == 2);
  for (const Resonance& x : r.resonances) {
    CHECK(x.configuration == "PFC-1 6/6, PFC-2 2/4");
    CHECK(x.peak.order == Approx(h_r).epsilon(1e-4));
  }
  StudyOptions options;
  options.scan = false;
  CHECK(RunStudy(plant, options).resonances.empty());
}

TEST_CASE("Scan results do not depend on the thread count", "[scan]") {
  Plant plant = TwoBankPlant();
  plant.drives = {MakeSixPulseDrive("D1", "LV", 200)};
  ScanOptions one, two;
  one.threads = 1;
  two.threads = 2;
  std::ostringstream a, b;
  WriteScanJson({RunScan(plant, one)}, a);
  WriteScanJson({RunScan(plant, two)}, b);
  CHECK(a.str() == b.str());
}

// A 13.8 kV bus feeding five 480 V buses, each through its own transformer and with its own
// one-step bank: enough monitored buses for the driving points to come from selected inversion.
Plant FiveFeederPlant() {
  Plant plant;
  plant.study.name = "five feeders";
  plant.buses = {MakeBus("HV", 13.8)};
  plant.supplies = {MakeSupply("HV", 250.0, 15.0)};
  for (int k = 0; k < 5; ++k) {
    const std::string lv = "LV" + std::to_string(k);
    plant.buses.push_back(MakeBus(lv, 0.48));
    plant.transformers.push_back(MakeTransformer("T" + std::to_string(k), "HV", lv, 1000 + 250 * k, 5.75, 11));
    plant.capacitors.push_back(MakeBank("PFC-" + std::to_string(k), lv, 200.0 + 50.0 * k, 0.48, 1));
  }
  plant.drives = {MakeSixPulseDrive("D1", "LV0", 200)};
  return plant;
}

TEST_CASE("Driving points by selected inversion equal one solve per bus", "[scan]") {
  // Two independent ways to Z_ii(h): the diagonal of Y^-1 by Takahashi's equations for all six
  // buses at once (Takahashi, Fagan & Chen 1973, from memory), and bus i's column of Y^-1 by its
  // own solve when it is scanned alone.
  const Plant plant = FiveFeederPlant();
  ScanOptions all;
  all.to_order = 20.0;
  for (const Bus& b : plant.buses) all.buses.push_back(b.name);
  const ScanResult together = RunScan(plant, all, true);
  REQUIRE(together.buses.size() == 6);
  for (std::size_t m = 0; m < together.buses.size(); ++m) {
    ScanOptions one = all;
    one.buses = {together.buses[m]};
    const ScanResult alone = RunScan(plant, one, true);
    const int c = together.present_configuration;
    const std::vector<Phasor>& a = together.at(c, static_cast<int>(m)).impedance_ohm;
    const std::vector<Phasor>& b = alone.at(alone.present_configuration, 0).impedance_ohm;
    REQUIRE(a.size() == b.size());
    for (std::size_t k = 0; k < a.size(); ++k) {
      INFO(together.buses[m] << " at order " << together.orders[k]);
      CHECK(std::abs(a[k] - b[k]) <= 1e-9 * std::abs(b[k]));
    }
    const auto& pa = together.at(c, static_cast<int>(m)).peaks;
    const auto& pb = alone.at(alone.present_configuration, 0).peaks;
    REQUIRE(pa.size() == pb.size());
    for (std::size_t p = 0; p < pa.size(); ++p) CHECK(pa[p].order == Approx(pb[p].order).epsilon(1e-9));
  }
  // And the screening of this plant is the same on one thread and on two.
  ScanOptions one_thread = all, two_threads = all;
  one_thread.threads = 1;
  two_threads.threads = 2;
  std::ostringstream x, y;
  WriteScanJson({RunScan(plant, one_thread)}, x);
  WriteScanJson({RunScan(plant, two_threads)}, y);
  CHECK(x.str() == y.str());
}

TEST_CASE("Scan options are checked and unknown buses named", "[scan]") {
  std::string error;
  CHECK(ScanOptions{}.IsValid(&error));
  ScanOptions bad;
  bad.step = 0.0;
  CHECK_FALSE(bad.IsValid(&error));
  CHECK_THAT(error, Catch::Contains("step = 0") && Catch::Contains("step > 0"));
  bad = {};
  bad.to_order = 0.5;
  CHECK_FALSE(bad.IsValid(&error));
  CHECK_THAT(error, Catch::Contains("to > from"));

  Plant plant = OneBusPlant(10.0);
  plant.source_file = "plant.yaml";
  ScanOptions options;
  options.buses = {"MCC-9"};
  try {
    RunScan(plant, options);
    FAIL("expected InputError");
  } catch (const InputError& e) {
    REQUIRE(e.diagnostics().size() == 1);
    CHECK(e.diagnostics()[0].where.file == "plant.yaml");
    CHECK_THAT(e.diagnostics()[0].message, Catch::Contains("MCC-9"));
  }
}
