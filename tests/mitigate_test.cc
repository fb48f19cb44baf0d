// tests/mitigate_test.cc — mitigation options on a resonant test plant, checked by closed forms
// and by frequency scans of the option files the tool writes.
#include "overtone/mitigate.h"

#include <catch2/catch.hpp>

#include <unistd.h>
#include <cmath>
#include <complex>
#include <filesystem>
#include <string>

#include "output_mitigation.h"
#include "overtone/load.h"
#include "overtone/scan.h"

using namespace overtone;
namespace fs = std::filesystem;

namespace {

const std::string kMill =
    std::string(OVERTONE_SOURCE_DIR) + "/tests/plants/mitigate/resonant-mill.yaml";

// The mill's options, evaluated once, with their files written into a scratch folder.
struct Evaluated {
  fs::path dir;
  MitigationResult result;
};

const Evaluated& Mill() {
  static const Evaluated evaluated = [] {
    Evaluated e;
    // Per process: ctest runs the test cases as separate processes, possibly at once.
    e.dir = fs::temp_directory_path() / ("overtone-mitigate-test-" + std::to_string(::getpid()));
    fs::remove_all(e.dir);
    MitigateOptions options;
    options.out_dir = e.dir.string();
    e.result = EvaluateMitigations(LoadPlant(kMill), options);
    WriteMitigationPlantFiles(e.result, options.out_dir);
    return e;
  }();
  return evaluated;
}

const MitigationOption& Option(const std::string& kind, const std::string& name_part) {
  for (const MitigationOption& o : Mill().result.options) {
    if (o.kind == kind && o.name.find(name_part) != std::string::npos) return o;
  }
  FAIL("no option " << kind << " " << name_part);
  throw;
}

ScanResult ScanLv(const Plant& plant) {
  ScanOptions options;
  options.buses = {"LV"};
  options.to_order = 15.0;
  return RunScan(plant, options);
}

}  // namespace

TEST_CASE("The resonant mill needs mitigation and every option file loads", "[mitigate]") {
  const MitigationResult& r = Mill().result;
  REQUIRE(r.needed());
  REQUIRE(r.options.size() >= 8);
  for (const MitigationOption& o : r.options) {
    INFO(o.plant_file);
    const Plant changed = LoadPlant((Mill().dir / o.plant_file).string());
    CHECK(changed.study.name.find(o.name) != std::string::npos);
    CHECK(o.solved);
  }
}

TEST_CASE("A written option file reproduces the option's results", "[mitigate]") {
  const MitigationOption& o = Option("detuning", "7 %");
  const StudyResult study = RunStudy(LoadPlant((Mill().dir / o.plant_file).string()));
  const MitigationFigures f = FiguresOf(study);
  CHECK(f.worst_thd_v_percent == Approx(o.figures.worst_thd_v_percent).epsilon(1e-9));
  REQUIRE(f.pcc_tdd_percent);
  CHECK(*f.pcc_tdd_percent == Approx(*o.figures.pcc_tdd_percent).epsilon(1e-9));
  CHECK(f.meets_profile == o.figures.meets_profile);
}

TEST_CASE("Options are ranked: clearing everything, then the profile, then by score",
          "[mitigate]") {
  // Score definition (docs/mitigate.md): (V0 - V1) / V0 / units with V = sum of (value/limit - 1)
  // over the findings; an option that removes every finding scores exactly 1 / units.
  const auto& options = Mill().result.options;
  const auto tier = [](const MitigationOption& o) {
    return o.figures.meets_profile ? (o.figures.meets_design_guide ? 2 : 1) : 0;
  };
  for (std::size_t i = 0; i < options.size(); ++i) {
    const MitigationOption& o = options[i];
    if (tier(o) == 2) CHECK(o.score == Approx(1.0 / o.equipment_units).epsilon(1e-12));
    if (i == 0) continue;
    CHECK(tier(options[i - 1]) >= tier(o));
    if (tier(options[i - 1]) == tier(o)) CHECK(options[i - 1].score >= o.score);
  }
}

TEST_CASE("The tool's filter meets its tuning order and kvar", "[mitigate]") {
  const MitigationOption& o = Option("filter", "4.7");
  const Plant plant = LoadPlant((Mill().dir / o.plant_file).string());
  REQUIRE(plant.filters.size() == 1);
  const Filter& f = plant.filters[0];
  // Effective fundamental kvar of a series L-C filter at the bus voltage V: Q = V^2 / (X_C - X_L),
  // X_C = V_r^2 / Q_r from the capacitor rating, X_L = X_C / n^2 for tuning order n
  // (series resonance h^2 X_L = X_C; textbook filter design, e.g. IEEE Std 1531 clause 6, from
  // memory). Sizing rule (docs/mitigate.md): at least the undetuned bank it replaces, 750 kvar at
  // 480 V, which exceeds half the transformer's reactive power and 10 % of its 1500 kVA.
  const double xc = f.rated_v * f.rated_v / f.rating_var;
  const double xl = xc / (f.tuned_order * f.tuned_order);
  CHECK(480.0 * 480.0 / (xc - xl) == Approx(750e3).epsilon(1e-9));
  CHECK(plant.capacitors.empty());   // the bank is replaced, not left beside the filter
  CHECK(o.figures.capacitors_pass);  // the filter's own IEEE 18 duty

  // The series resonance seen by the scan: the driving-point |Z| at LV is smallest where the
  // filter branch is (R + j(hX_L - X_C/h) = R), 0.3 below the 5th (the largest characteristic
  // current of a six-pulse bridge, I_h ~ I_1/h: N. Mohan et al., "Power Electronics", 5-5).
  const ScanResult scan = ScanLv(plant);
  const BusScan& lv = scan.at(scan.present_configuration, 0);
  double min_order = 0.0, min_z = 1e300;
  for (std::size_t i = 0; i < scan.orders.size(); ++i) {
    if (scan.orders[i] < 3.0 || scan.orders[i] > 6.0) continue;
    if (std::abs(lv.impedance_ohm[i]) < min_z) {
      min_z = std::abs(lv.impedance_ohm[i]);
      min_order = scan.orders[i];
    }
  }
  CHECK(min_order == Approx(4.7).margin(0.03));
}

TEST_CASE("Detuning the bank removes the resonance near the 5th, as the scan shows", "[mitigate]") {
  // As given: the parallel resonance of the bank with the supply side, h_r = sqrt(S_sc,bus / Q_c)
  // (docs/resonance.md; 250 MVA behind 1500 kVA at 5.75 %: S_sc,bus about 23.9 MVA, 750 kvar:
  // h_r about 5.6), within one order of the injected 5th: risk medium or high.
  const ScanResult before = ScanLv(LoadPlant(kMill));
  const BusScan& b = before.at(before.present_configuration, 0);
  REQUIRE(b.WorstPeak());
  CHECK(b.WorstPeak()->order == Approx(5.6).margin(0.15));
  CHECK(b.risk != Risk::kLow);

  // With 7 % reactors the bank is inductive above 1/sqrt(0.07) = 3.78 and the parallel peak
  // moves below it, to 1/sqrt(Q_c/S_sc + p) (docs/resonance.md), about 3.5: away from every
  // injected order (5, 7, 11, 13, ...), so low risk.
  const MitigationOption& o = Option("detuning", "7 %");
  const ScanResult after = ScanLv(LoadPlant((Mill().dir / o.plant_file).string()));
  const BusScan& a = after.at(after.present_configuration, 0);
  CHECK(a.risk == Risk::kLow);
  for (const ResonancePeak& p : a.peaks) {
    if (p.amplification > 2.0) CHECK(p.order < 1.0 / std::sqrt(0.07));
  }
  CHECK(o.figures.resonance_risk == Risk::kLow);
}

TEST_CASE("A plant within its limits needs no mitigation", "[mitigate]") {
  // The demo plant meets IEEE 519 at its pcc and the design guide at every bus (docs/limits.md).
  MitigateOptions options;
  options.out_dir = (fs::temp_directory_path() /
                      ("overtone-mitigate-none-" + std::to_string(::getpid())))
                         .string();
  fs::remove_all(options.out_dir);
  const MitigationResult r = EvaluateMitigations(
      LoadPlant(std::string(OVERTONE_SOURCE_DIR) + "/cases/demo/plant.yaml"), options);
  CHECK_FALSE(r.needed());
  CHECK(r.options.empty());
  WriteMitigationPlantFiles(r, options.out_dir);
  CHECK_FALSE(fs::exists(options.out_dir));
}

TEST_CASE("The report section lists the options best first", "[mitigate]") {
  const MitigationResult& r = Mill().result;
  const internal::ReportSection s = internal::MitigationSection(r);
  CHECK(s.title == "Mitigation options");
  REQUIRE(s.tables.size() == 1);
  REQUIRE(s.tables[0].rows.size() == r.options.size());
  CHECK(s.tables[0].rows[0][1] == r.options[0].name);
  CHECK(s.tables[0].header.size() == s.tables[0].rows[0].size());
}
