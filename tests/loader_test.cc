// tests/loader_test.cc — plant files into the typed model: values, defaults, extends, errors.
//
// Expected values come from PLANT-FORMAT.md (the binding input format; section named beside each
// check) and the SI prefixes; vector groups from the IEC 60076-1 notation it refers to.
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <catch2/catch.hpp>

#include "overtone/errors.h"
#include "overtone/load.h"

namespace overtone {
namespace {

namespace fs = std::filesystem;

// A small valid plant: one supply, two buses, one transformer.
constexpr const char* kMinimal = R"(overtone: 1
supplies:
  - {name: UTIL, bus: MAIN, short_circuit: 250 MVA}
buses:
  - {name: MAIN, kv: 13.8 kV}
  - {name: MCC-1, kv: 0.48 kV}
transformers:
  - {name: T1, from: MAIN, to: MCC-1, rating: 2000 kVA, impedance: 5.75 %, connection: Dyn11}
)";

Plant LoadText(const std::string& text, const std::string& file = "plant.yaml") {
  return LoadPlantFromString(text, file);
}

// The diagnostics that loading `text` must produce.
std::vector<Diagnostic> Errors(const std::string& text, const std::string& file = "plant.yaml") {
  try {
    LoadPlantFromString(text, file);
  } catch (const InputError& error) {
    return error.diagnostics();
  }
  FAIL("expected an InputError for:\n" << text);
  return {};
}

// The message of the single diagnostic that `text` must produce.
std::string OnlyError(const std::string& text) {
  const std::vector<Diagnostic> errors = Errors(text);
  INFO(InputError(errors).what());
  REQUIRE(errors.size() == 1);
  return errors[0].message;
}

// The minimal plant plus `extra` lines (whole sections, appended at the end).
std::string With(const std::string& extra) { return std::string(kMinimal) + extra; }

class TempDir {
 public:
  TempDir()
      : path_(fs::temp_directory_path() /
              ("overtone-loader-" + std::to_string(getpid()) + "-" + std::to_string(counter_++))) {
    fs::create_directories(path_);
  }
  ~TempDir() { fs::remove_all(path_); }
  std::string Write(const std::string& name, const std::string& text) const {
    const fs::path file = path_ / name;
    fs::create_directories(file.parent_path());
    std::ofstream(file) << text;
    return file.string();
  }

 private:
  static inline int counter_ = 0;
  fs::path path_;
};

TEST_CASE("a complete plant converts every value to SI", "[loader]") {
  const Plant plant = LoadText(R"(overtone: 1
study:
  name: Mill expansion
  frequency: 50 Hz
  max_order: 40
  pcc: MAIN
  demand_current: 420 A
  limits: iec61000-2-4-class2
  summation: iec
supplies:
  - name: UTIL
    bus: MAIN
    short_circuit: 250 MVA
    x_over_r: 12
    voltage: 1.02 pu
    angle: 30 deg
    background: [{order: 5, percent: 1.5, angle: 10 deg}, {order: 7, percent: 1}]
generators:
  - {name: G1, bus: MCC-2, rating: 2000 kVA, x2: 0.15 pu, x_over_r: 20}
buses:
  - {name: MAIN, kv: 13.8 kV}
  - {name: MCC-1, kv: 480 V}
  - {name: MCC-2, kv: 0.48}
transformers:
  - {name: T1, from: MAIN, to: MCC-1, rating: 2.5 MVA, impedance: 5.75 %, x_over_r: 7,
     connection: Dyn11, tap: -2.5 %, eddy_loss: 12 %}
cables:
  - {name: C1, from: MCC-1, to: MCC-2, length: 0.35 km, r: 0.12 ohm/km, x: 0.08, c: 0.3 uF/km,
     runs: 2}
capacitors:
  - {name: PFC-1, bus: MCC-1, rating: 600 kvar, kv: 0.525 kV, steps: 6, steps_on: 4,
     detuning: 7 %, x_over_r: 60}
filters:
  - {name: F5, bus: MCC-2, type: single-tuned, rating: 300 kVAr, tuned_order: 4.7, quality: 30}
motors:
  - {name: M-7, bus: MCC-2, rating: 250 kW, count: 3, loading: 80 %,
     locked_rotor_reactance: 0.2 pu, x_over_r: 12, efficiency: 95 %, power_factor: 0.85}
loads:
  - {name: LIGHTS, bus: MCC-1, p: 300 kW, q: 100 kvar, count: 2, model: series-rl}
drives:
  - {name: P-101, bus: MCC-1, count: 12, power: 75 kW, loading: 90 %, front_end: diode-capacitor,
     line_reactor: 3 %, dc_choke: 0.5 mH, dc_capacitance: 3000 uF}
  - {name: P-102, bus: MCC-2, power: 150, front_end: multipulse, pulses: 18, imbalance: 2 %}
  - {name: P-103, bus: MCC-2, power: 40 kW, front_end: thyristor, firing_angle: 25 deg}
  - name: P-104
    bus: MCC-2
    power: 90 kW
    front_end: measured
    displacement_pf: 0.97
    harmonics:
      - {order: 5, percent: 32, angle: -175 deg}
      - {order: 7, percent: 11}
)");
  // study: PLANT-FORMAT.md "study"; units: PLANT-FORMAT.md "Quantities" and the SI prefixes.
  CHECK(plant.source_file == "plant.yaml");
  CHECK(plant.study.name == "Mill expansion");
  CHECK(plant.study.frequency_hz == 50.0);
  CHECK(plant.study.max_order == 40);
  CHECK(plant.study.pcc == "MAIN");
  REQUIRE(plant.study.demand_current_a.has_value());
  CHECK(*plant.study.demand_current_a == Approx(420.0));
  CHECK(plant.study.limits == "iec61000-2-4-class2");
  CHECK(plant.study.summation == Summation::kIec);

  REQUIRE(plant.supplies.size() == 1);
  const Supply& supply = plant.supplies[0];
  CHECK(supply.short_circuit_va == Approx(250e6));
  CHECK(supply.x_over_r == 12.0);
  CHECK(supply.voltage_pu == Approx(1.02));
  CHECK(supply.angle_deg == Approx(30.0));
  REQUIRE(supply.background.size() == 2);
  CHECK(supply.background[0].order == 5);
  CHECK(supply.background[0].percent == Approx(1.5));  // kept in percent (plant.h)
  CHECK(supply.background[0].angle_deg == Approx(10.0));
  CHECK(supply.background[1].angle_deg == 0.0);  // angle default 0 deg (PLANT-FORMAT.md supplies)

  REQUIRE(plant.generators.size() == 1);
  CHECK(plant.generators[0].rating_va == Approx(2e6));
  CHECK(plant.generators[0].x2_pu == Approx(0.15));
  CHECK(plant.generators[0].x_over_r == 20.0);

  REQUIRE(plant.buses.size() == 3);
  CHECK(plant.buses[0].nominal_v == Approx(13800.0));
  CHECK(plant.buses[1].nominal_v == Approx(480.0));
  CHECK(plant.buses[2].nominal_v == Approx(480.0));  // bare kv is kV

  const Transformer& t1 = plant.transformers.at(0);
  CHECK(t1.from == "MAIN");
  CHECK(t1.to == "MCC-1");
  CHECK(t1.rating_va == Approx(2.5e6));
  CHECK(t1.impedance == Approx(0.0575));
  CHECK(t1.x_over_r == 7.0);
  CHECK(t1.tap == Approx(-0.025));
  CHECK(t1.eddy_loss == Approx(0.12));
  CHECK(t1.connection.code == "Dyn11");

  const Cable& c1 = plant.cables.at(0);
  CHECK(c1.length_m == Approx(350.0));
  CHECK(c1.r_ohm_per_m == Approx(1.2e-4));
  CHECK(c1.x_ohm_per_m == Approx(8e-5));  // bare x is ohm/km
  CHECK(c1.c_f_per_m == Approx(3e-10));
  CHECK(c1.runs == 2);

  const Capacitor& pfc = plant.capacitors.at(0);
  CHECK(pfc.rating_var == Approx(6e5));
  CHECK(pfc.rated_v == Approx(525.0));
  CHECK(pfc.steps == 6);
  CHECK(pfc.steps_on == 4);
  CHECK(pfc.detuning == Approx(0.07));
  CHECK(pfc.x_over_r == 60.0);

  const Filter& f5 = plant.filters.at(0);
  CHECK(f5.type == FilterType::kSingleTuned);
  CHECK(f5.rating_var == Approx(3e5));
  CHECK(f5.tuned_order == Approx(4.7));
  CHECK(f5.quality == 30.0);

  const Motor& m7 = plant.motors.at(0);
  CHECK(m7.rating == Approx(250e3));
  CHECK_FALSE(m7.rating_is_kva);
  CHECK(m7.count == 3);
  CHECK(m7.loading == Approx(0.8));
  CHECK(m7.locked_rotor_reactance_pu == Approx(0.2));
  CHECK(m7.efficiency == Approx(0.95));
  CHECK(m7.power_factor == Approx(0.85));

  const Load& lights = plant.loads.at(0);
  CHECK(lights.p_w == Approx(3e5));
  CHECK(lights.q_var == Approx(1e5));
  CHECK(lights.count == 2);
  CHECK(lights.model == LoadModel::kSeriesRL);

  REQUIRE(plant.drives.size() == 4);
  const Drive& p101 = plant.drives[0];
  CHECK(p101.count == 12);
  CHECK(p101.power_w == Approx(75e3));
  CHECK(p101.loading == Approx(0.9));
  CHECK(p101.front_end == FrontEnd::kDiodeCapacitor);
  CHECK(p101.line_reactor.kind == ReactorSpec::Kind::kFraction);
  CHECK(p101.line_reactor.value == Approx(0.03));
  CHECK(p101.dc_choke.kind == ReactorSpec::Kind::kHenry);
  CHECK(p101.dc_choke.value == Approx(5e-4));
  REQUIRE(p101.dc_capacitance_f.has_value());
  CHECK(*p101.dc_capacitance_f == Approx(3e-3));
  CHECK(plant.drives[1].power_w == Approx(150e3));  // bare power is kW
  CHECK(plant.drives[1].front_end == FrontEnd::kMultipulse);
  CHECK(plant.drives[1].pulses == 18);
  CHECK(plant.drives[1].imbalance == Approx(0.02));
  CHECK(plant.drives[2].front_end == FrontEnd::kThyristor);
  CHECK(plant.drives[2].firing_angle_deg == Approx(25.0));
  const Drive& p104 = plant.drives[3];
  CHECK(p104.front_end == FrontEnd::kMeasured);
  CHECK(p104.displacement_pf == Approx(0.97));
  REQUIRE(p104.harmonics.size() == 2);
  CHECK(p104.harmonics[0].percent == Approx(32.0));
  CHECK(p104.harmonics[0].angle_deg == Approx(-175.0));
  CHECK(p104.harmonics[0].where.line == 51);
  CHECK(p104.harmonics[0].where.column == 9);
}

TEST_CASE("defaults follow the format", "[loader]") {
  const Plant plant = LoadText(R"(overtone: 1
supplies:
  - {name: UTIL, bus: MAIN, short_circuit: 250}
generators:
  - {name: G1, bus: MAIN, rating: 1000 kVA, x2: 0.2}
buses:
  - {name: MAIN, kv: 13.8 kV}
  - {name: MAIN-2, kv: 13.8 kV}
  - {name: MCC-1, kv: 0.48 kV}
transformers:
  - {name: T1, from: MAIN, to: MCC-1, rating: 2000, impedance: 5.75, connection: Dyn11}
cables:
  - {name: C1, from: MAIN, to: MAIN-2, length: 100, r: 0.1, x: 0.1}
capacitors:
  - {name: PFC-1, bus: MCC-1, rating: 600 kvar, steps: 6}
  - {name: PFC-2, bus: MCC-1, rating: 100 kvar, tuned_order: 4.7}
filters:
  - {name: F5, bus: MCC-1, rating: 300 kvar, tuned_order: 4.7}
  - {name: HP, bus: MCC-1, type: high-pass, rating: 300 kvar, tuned_order: 12}
motors:
  - {name: M1, bus: MCC-1, rating: 250 kW}
  - {name: M2, bus: MCC-1, rating: 300 kVA}
loads:
  - {name: L1, bus: MCC-1, p: 30}
drives:
  - {name: D1, bus: MCC-1, power: 75 kW, front_end: active}
)",
                               "cases/line-3.yaml");
  // PLANT-FORMAT.md "study": name = file name, 60 Hz, max_order 50, pcc = first supply's bus
  // (left empty in the model, plant.h), limits ieee519, summation vector.
  CHECK(plant.study.name == "line-3");
  CHECK(plant.study.frequency_hz == 60.0);
  CHECK(plant.study.max_order == 50);
  CHECK(plant.study.pcc.empty());
  CHECK_FALSE(plant.study.demand_current_a.has_value());
  CHECK(plant.study.limits == "ieee519");
  CHECK(plant.study.summation == Summation::kVector);
  // PLANT-FORMAT.md "supplies": x_over_r 10, voltage 1.0 pu, angle 0; bare short_circuit in MVA.
  CHECK(plant.supplies[0].short_circuit_va == Approx(250e6));
  CHECK(plant.supplies[0].x_over_r == 10.0);
  CHECK(plant.supplies[0].voltage_pu == 1.0);
  CHECK(plant.supplies[0].angle_deg == 0.0);
  // PLANT-FORMAT.md "generators": x_over_r 15, voltage 1.0 pu.
  CHECK(plant.generators[0].x_over_r == 15.0);
  CHECK(plant.generators[0].voltage_pu == 1.0);
  // PLANT-FORMAT.md "transformers": x_over_r 8, tap 0, eddy_loss 10 %; bare rating kVA, bare
  // impedance %.
  const Transformer& t1 = plant.transformers[0];
  CHECK(t1.rating_va == Approx(2e6));
  CHECK(t1.impedance == Approx(0.0575));
  CHECK(t1.x_over_r == 8.0);
  CHECK(t1.tap == 0.0);
  CHECK(t1.eddy_loss == Approx(0.10));
  // PLANT-FORMAT.md "cables": runs 1, c optional (0 = none in the model); bare length m.
  CHECK(plant.cables[0].runs == 1);
  CHECK(plant.cables[0].c_f_per_m == 0.0);
  CHECK(plant.cables[0].length_m == Approx(100.0));
  // PLANT-FORMAT.md "capacitors": kv = bus kv, steps 1, steps_on = steps, no reactor, reactor
  // X/R 50; tuned_order h_t stored as detuning 1/h_t^2 (series resonance of the reactor with the
  // capacitor at h_t = sqrt(X_C / X_L), common practice).
  const Capacitor& pfc1 = plant.capacitors[0];
  CHECK(pfc1.rated_v == Approx(480.0));
  CHECK(pfc1.steps == 6);
  CHECK(pfc1.steps_on == 6);
  CHECK(pfc1.detuning == 0.0);
  CHECK(pfc1.x_over_r == 50.0);
  CHECK(plant.capacitors[1].steps == 1);
  CHECK(plant.capacitors[1].steps_on == 1);
  CHECK(plant.capacitors[1].detuning == Approx(1.0 / (4.7 * 4.7)));
  // PLANT-FORMAT.md "filters": type single-tuned, quality 40 (single-tuned) / 1.0 (high-pass),
  // kv = bus kv.
  CHECK(plant.filters[0].type == FilterType::kSingleTuned);
  CHECK(plant.filters[0].quality == 40.0);
  CHECK(plant.filters[0].rated_v == Approx(480.0));
  CHECK(plant.filters[1].type == FilterType::kHighPass);
  CHECK(plant.filters[1].quality == 1.0);
  // PLANT-FORMAT.md "motors": count 1, loading 100 %, locked_rotor_reactance 0.17 pu, x_over_r
  // 10, efficiency 0.95, power_factor 0.88, kv = bus kv; a kVA rating is marked.
  const Motor& m1 = plant.motors[0];
  CHECK(m1.count == 1);
  CHECK(m1.loading == 1.0);
  CHECK(m1.locked_rotor_reactance_pu == Approx(0.17));
  CHECK(m1.x_over_r == 10.0);
  CHECK(m1.efficiency == Approx(0.95));
  CHECK(m1.power_factor == Approx(0.88));
  CHECK(m1.rated_v == Approx(480.0));
  CHECK_FALSE(m1.rating_is_kva);
  CHECK(plant.motors[1].rating_is_kva);
  CHECK(plant.motors[1].rating == Approx(3e5));
  // PLANT-FORMAT.md "loads": q 0, count 1, model parallel-rl; bare p in kW.
  CHECK(plant.loads[0].p_w == Approx(3e4));
  CHECK(plant.loads[0].q_var == 0.0);
  CHECK(plant.loads[0].count == 1);
  CHECK(plant.loads[0].model == LoadModel::kParallelRL);
  // PLANT-FORMAT.md "drives": count 1, loading 100 %, displacement_pf 1.0, no reactors, default
  // dc_capacitance (left empty in the model, plant.h).
  const Drive& d1 = plant.drives[0];
  CHECK(d1.count == 1);
  CHECK(d1.loading == 1.0);
  CHECK(d1.displacement_pf == 1.0);
  CHECK(d1.line_reactor.kind == ReactorSpec::Kind::kNone);
  CHECK(d1.dc_choke.kind == ReactorSpec::Kind::kNone);
  CHECK_FALSE(d1.dc_capacitance_f.has_value());
  CHECK(d1.harmonics.empty());
}

TEST_CASE("every element keeps where it was written", "[loader]") {
  const Plant plant = LoadText(kMinimal, "dir/plant.yaml");
  // Lines and columns counted from 1 (PLANT-FORMAT.md "Errors"); a flow mapping starts at `{`.
  CHECK(plant.supplies[0].where.file == "dir/plant.yaml");
  CHECK(plant.supplies[0].where.line == 3);
  CHECK(plant.supplies[0].where.column == 5);
  CHECK(plant.buses[1].where.line == 6);
  CHECK(plant.transformers[0].where.line == 8);
}

TEST_CASE("names are read as their source text", "[loader]") {
  // PLANT-FORMAT.md "Quantities": "any scalar is read as its source text (`ON` stays "ON")".
  const Plant plant = LoadText(R"(overtone: 1
supplies: [{name: yes, bus: ON, short_circuit: 100}]
buses: [{name: ON, kv: 4.16}, {name: 007, kv: 0.48}]
transformers: [{name: 1.50, from: ON, to: 007, rating: 500, impedance: 5, connection: Dyn1}]
)");
  CHECK(plant.supplies[0].name == "yes");
  CHECK(plant.buses[0].name == "ON");
  CHECK(plant.buses[1].name == "007");
  CHECK(plant.transformers[0].name == "1.50");
  CHECK(plant.transformers[0].to == "007");
}

// The transformer's connection when `code` is written in the minimal plant.
VectorGroup GroupOf(const std::string& code) {
  std::string text = kMinimal;
  text.replace(text.find("Dyn11"), 5, code);
  return LoadText(text).transformers.at(0).connection;
}

TEST_CASE("vector groups give the clock number and the winding kinds", "[loader]") {
  // IEC 60076-1 notation (PLANT-FORMAT.md "transformers"): HV letter D/Y/YN/Z/ZN, LV letter
  // d/y/yn/z/zn, clock number = lag of the LV side in units of 30 deg.
  struct Case {
    const char* code;
    int clock;
    bool from_grounded_wye;
    bool to_grounded_wye;
    bool from_delta;
    bool to_delta;
  };
  for (const Case& c :
       {Case{"Dd0", 0, false, false, true, true}, Case{"Dyn11", 11, false, true, true, false},
        Case{"Dyn1", 1, false, true, true, false}, Case{"Yd1", 1, false, false, false, true},
        Case{"YNd11", 11, true, false, false, true}, Case{"YNyn0", 0, true, true, false, false},
        Case{"Yy0", 0, false, false, false, false}, Case{"Yy6", 6, false, false, false, false},
        Case{"Dz0", 0, false, false, true, false}, Case{"Dzn0", 0, false, false, true, false},
        Case{"Yzn11", 11, false, false, false, false},
        Case{"ZNyn1", 1, false, true, false, false}}) {
    INFO(c.code);
    const VectorGroup group = GroupOf(c.code);
    CHECK(group.code == c.code);
    CHECK(group.clock == c.clock);
    CHECK(group.from_grounded_wye == c.from_grounded_wye);
    CHECK(group.to_grounded_wye == c.to_grounded_wye);
    CHECK(group.from_delta == c.from_delta);
    CHECK(group.to_delta == c.to_delta);
  }
}

TEST_CASE("impossible or misspelt vector groups are errors", "[loader]") {
  // IEC 60076-1: HV letters in capitals, LV in small letters, clock 0..11; a wye against a
  // delta or zigzag winding gives an odd clock number, like windings an even one (common
  // practice, from the vector diagrams).
  const auto problem = [](const std::string& code) {
    std::string text = kMinimal;
    text.replace(text.find("Dyn11"), 5, code);
    return OnlyError(text);
  };
  CHECK_THAT(problem("Dyn12"), Catch::Contains("the clock number must be 0 to 11"));
  CHECK_THAT(problem("dyn11"), Catch::Contains("is not a vector group"));
  CHECK_THAT(problem("DYN11"), Catch::Contains("is not a vector group"));
  CHECK_THAT(problem("Dyn011"), Catch::Contains("is not a vector group"));
  CHECK_THAT(problem("Dy"), Catch::Contains("is not a vector group"));
  CHECK_THAT(problem("Dyn0"), Catch::Contains("odd clock number"));
  CHECK_THAT(problem("Yy1"), Catch::Contains("even clock number"));
  CHECK_THAT(problem("Dz1"), Catch::Contains("even clock number"));
}

TEST_CASE("line_reactor and dc_choke take a percent or an inductance", "[loader]") {
  // PLANT-FORMAT.md "drives": "percent on the unit's base Z = V_LL^2 / power, or an inductance".
  const Plant plant = LoadText(With(R"(drives:
  - {name: D1, bus: MCC-1, power: 75, front_end: diode-choke, line_reactor: 20 uH, dc_choke: 4}
)"));
  CHECK(plant.drives[0].line_reactor.kind == ReactorSpec::Kind::kHenry);
  CHECK(plant.drives[0].line_reactor.value == Approx(2e-5));
  CHECK(plant.drives[0].dc_choke.kind == ReactorSpec::Kind::kFraction);
  CHECK(plant.drives[0].dc_choke.value == Approx(0.04));
}

TEST_CASE("front-end keys apply only where the format says", "[loader]") {
  // PLANT-FORMAT.md "drives": pulses for multipulse, firing_angle for thyristor, harmonics for
  // measured (required) and active, no reactors on measured.
  const auto drive = [](const std::string& keys) {
    return OnlyError(With("drives:\n  - {name: D1, bus: MCC-1, power: 75, " + keys + "}\n"));
  };
  CHECK(drive("front_end: diode-capacitor, pulses: 12") ==
        "`pulses` does not apply to front_end `diode-capacitor`");
  CHECK(drive("front_end: multipulse") == "front_end `multipulse` needs `pulses`");
  CHECK(drive("front_end: multipulse, pulses: 15") == "pulses must be 12, 18 or 24; got 15");
  CHECK(drive("front_end: thyristor") == "front_end `thyristor` needs `firing_angle`");
  CHECK(drive("front_end: active, firing_angle: 10") ==
        "`firing_angle` does not apply to front_end `active`");
  CHECK(drive("front_end: measured") == "front_end `measured` needs `harmonics`");
  CHECK(drive("front_end: diode-choke, imbalance: 1 %") ==
        "`imbalance` does not apply to front_end `diode-choke`");
  CHECK_THAT(drive("front_end: measured, harmonics: [{order: 5, percent: 30}], dc_choke: 2 %"),
             Catch::Contains("a measured spectrum already includes"));
  CHECK(drive("front_end: diode-cap") ==
        "front_end `diode-cap` is not one of diode-capacitor, diode-choke, thyristor, "
        "single-phase, multipulse, active, measured; did you mean `diode-capacitor`?");
}

TEST_CASE("capacitor detuning and tuned_order exclude each other", "[loader]") {
  // PLANT-FORMAT.md "capacitors": "`tuned_order` may be given instead".
  CHECK_THAT(OnlyError(With(R"(capacitors:
  - {name: C, bus: MCC-1, rating: 600, detuning: 7 %, tuned_order: 3.78}
)")),
             Catch::Contains("give `detuning` or `tuned_order`, not both"));
}

TEST_CASE("unknown keys suggest the nearest known key", "[loader]") {
  const std::vector<Diagnostic> errors = Errors(With(R"(cables:
  - {name: C1, from: MAIN, to: MAIN, lenght: 10, r: 0.1, x: 0.1, colour: red}
)"));
  REQUIRE(errors.size() == 4);
  CHECK(errors[0].message == "cable `C1` is missing `length`");
  CHECK(errors[1].message == "cable `C1` connects bus `MAIN` to itself");
  CHECK(errors[2].message == "unknown key `lenght` in cable `C1`; did you mean `length`?");
  CHECK(errors[3].message ==
        "unknown key `colour` in cable `C1`; known keys: name, from, to, length, r, x, c, runs");
  CHECK_THAT(OnlyError(With("loads: [{name: L, bus: MCC-1, p: 1, x_over_rr: 3}]\n")),
             Catch::Contains("unknown key `x_over_rr` in load `L`"));
  CHECK(OnlyError(With("motors: [{name: M, bus: MCC-1, rating: 1, x_ovr_r: 3}]\n")) ==
        "unknown key `x_ovr_r` in motor `M`; did you mean `x_over_r`?");
  CHECK(OnlyError(With("transformer: []\n")) ==
        "unknown key `transformer` in the plant file; did you mean `transformers`?");
}

TEST_CASE("unknown buses suggest the nearest bus", "[loader]") {
  const std::vector<Diagnostic> errors =
      Errors(With("capacitors: [{name: C, bus: MCC1, rating: 600}]\n"));
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].message == "unknown bus `MCC1`; did you mean `MCC-1`?");
  CHECK(errors[0].where.line == 9);
  CHECK(errors[0].where.column == 29);
}

TEST_CASE("names are unique across the whole file, buses included", "[loader]") {
  // PLANT-FORMAT.md "Top level": "Every element has a `name`, unique across the whole file."
  const std::vector<Diagnostic> errors =
      Errors(With("capacitors: [{name: MCC-1, bus: MCC-1, rating: 600}]\n"));
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].message == "name `MCC-1` is already used by the bus at plant.yaml:6:5");
  CHECK(errors[0].where.line == 9);
}

TEST_CASE("several errors are reported together, in file order", "[loader]") {
  const std::vector<Diagnostic> errors = Errors(R"(overtone: 1
supplies:
  - {name: UTIL, bus: MAIN, short_circuit: 250 kW}
buses:
  - {name: MAIN, kv: 1500 kV}
  - {name: LV, kv: 0.48}
transformers:
  - {name: T1, from: MAIN, to: LV, rating: 0, impedance: 5.75 %}
)");
  REQUIRE(errors.size() == 4);
  CHECK(errors[0].message ==
        "short_circuit: `250 kW` is not an apparent power; use VA, kVA or MVA");
  CHECK(errors[0].where.line == 3);
  CHECK(errors[1].message == "kv must be at most 1000 kV; got `1500 kV`");
  CHECK(errors[1].where.line == 5);
  CHECK(errors[2].message == "transformer `T1` is missing `connection`");
  CHECK(errors[2].where.line == 8);
  CHECK(errors[2].where.column == 5);
  CHECK(errors[3].message == "rating must be above 0 kVA; got `0`");
  CHECK(errors[3].where.column == 44);
}

TEST_CASE("islands without a source are found", "[loader]") {
  // PLANT-FORMAT.md "Errors": "islands without a supply" are errors; connectivity runs over
  // transformers and cables.
  const std::vector<Diagnostic> errors = Errors(R"(overtone: 1
supplies: [{name: UTIL, bus: MAIN, short_circuit: 250}]
buses:
  - {name: MAIN, kv: 13.8}
  - {name: SPARE-1, kv: 0.48}
  - {name: SPARE-2, kv: 0.48}
  - {name: LONE, kv: 4.16}
cables:
  - {name: C1, from: SPARE-1, to: SPARE-2, length: 10, r: 0.1, x: 0.1}
)");
  REQUIRE(errors.size() == 2);
  CHECK(errors[0].message ==
        "bus `SPARE-1` is in an island with no supply or generator (2 "
        "buses: SPARE-1, SPARE-2); connect it by a transformer or cable, "
        "or remove it");
  CHECK(errors[0].where.line == 5);
  CHECK_THAT(errors[1].message, Catch::StartsWith("bus `LONE` is in an island"));
  // A generator feeds its island as well as a supply does.
  CHECK_NOTHROW(LoadText(R"(overtone: 1
generators: [{name: G, bus: LONE, rating: 500, x2: 0.2}]
buses: [{name: LONE, kv: 0.48}]
)"));
  CHECK(OnlyError("overtone: 1\nbuses: [{name: A, kv: 1}]\n") ==
        "the plant has no supply or generator");
  CHECK(OnlyError("overtone: 1\n") == "the plant has no buses");
}

TEST_CASE("a transformer's from bus is its high-voltage side", "[loader]") {
  // PLANT-FORMAT.md "Conventions": "A transformer whose `from` bus has a lower nominal voltage
  // than its `to` bus is an error."
  std::string text = kMinimal;
  text.replace(text.find("from: MAIN, to: MCC-1"), 21, "from: MCC-1, to: MAIN");
  CHECK(OnlyError(text) ==
        "transformer `T1` is upside down: `from` bus `MCC-1` (0.48 kV) is "
        "below `to` bus `MAIN` (13.8 kV); `from` is the high-voltage side");
}

TEST_CASE("values outside their physical range are errors", "[loader]") {
  // The ranges are this implementation's (docs/plant-format.md); the bounds below are theirs.
  const auto transformer = [](const std::string& key_value) {
    std::string text = kMinimal;
    text.replace(text.find("connection: Dyn11"), 17, "connection: Dyn11, " + key_value);
    return OnlyError(text);
  };
  CHECK(transformer("tap: 25 %") == "tap must be at most 20 %; got `25 %`");
  CHECK(transformer("x_over_r: 0") == "x_over_r must be above 0; got `0`");
  CHECK(transformer("eddy_loss: -1 %") == "eddy_loss must be at least 0 %; got `-1 %`");
  CHECK(OnlyError(With("capacitors: [{name: C, bus: MCC-1, rating: 6, detuning: 50 %}]\n")) ==
        "detuning must be below 50 %; got `50 %`");
  CHECK(OnlyError(With("capacitors: [{name: C, bus: MCC-1, rating: 6, steps: 0}]\n")) ==
        "steps must be at least 1; got `0`");
  CHECK(OnlyError(With("capacitors: [{name: C, bus: MCC-1, rating: 6, steps: 2.5}]\n")) ==
        "steps must be a whole number; got `2.5`");
  CHECK(
      OnlyError(With("capacitors: [{name: C, bus: MCC-1, rating: 6, steps: 2, steps_on: 3}]\n")) ==
      "steps_on 3 is more than the 2 steps of the bank");
  CHECK(OnlyError(With("capacitors: [{name: C, bus: MCC-1, rating: 6, kv: 480}]\n")) ==
        "kv 480 kV is far from the 0.48 kV of bus `MCC-1`; a rated voltage lies within 0.5 to 2 "
        "times its bus voltage");
  CHECK(OnlyError(With("motors: [{name: M, bus: MCC-1, rating: 9, power_factor: 88}]\n")) ==
        "power_factor must be at most 1; got `88` (write a fraction, 0.95, or a percent, 95 %)");
  CHECK(OnlyError(With("study: {max_order: 300}\n")) == "max_order must be at most 200; got `300`");
  CHECK(OnlyError(With("study: {frequency: 0.5 Hz}\n")) ==
        "frequency must be at least 1 Hz; got `0.5 Hz`");
}

TEST_CASE("harmonic tables are checked row by row", "[loader]") {
  const std::string table_start =
      "drives:\n  - {name: D, bus: MCC-1, power: 9, front_end: measured,\n";
  CHECK(OnlyError(With(table_start +
                       "     harmonics: [{order: 5, percent: 30}, {order: 5, percent: 9}]}\n")) ==
        "order 5 is listed twice; first at line 11");
  // Rows above the study's max_order are kept (a variant may lower max_order); the study
  // ignores them with a warning. Beyond 200, the highest max_order, is an error.
  CHECK(OnlyError(With(table_start + "     harmonics: [{order: 250, percent: 1}]}\n")) ==
        "order must be at most 200; got `250`");
  CHECK(OnlyError(With(table_start + "     harmonics: [{order: 1, percent: 100}]}\n")) ==
        "order must be at least 2; got `1`");
  CHECK(OnlyError(With(table_start + "     harmonics: [{order: 5}]}\n")) ==
        "harmonic entry is missing `percent`");
  CHECK(OnlyError(With(table_start + "     harmonics: 5}\n")) ==
        "`harmonics` must be a list (`- ...` lines or `[a, b]`), not a single value");
}

TEST_CASE("study settings are checked", "[loader]") {
  CHECK(OnlyError(With("study: {pcc: MCC1}\n")) == "unknown bus `MCC1`; did you mean `MCC-1`?");
  CHECK(OnlyError(With("study: {summation: vectors}\n")) ==
        "summation `vectors` is not one of vector, arithmetic, iec; did you mean `vector`?");
  CHECK(OnlyError(With("study: {limits: ieee-519}\n")) ==
        "limits `ieee-519` is neither a built-in profile (ieee519, iec61000-2-4-class1, "
        "iec61000-2-4-class2, iec61000-2-4-class3) nor an existing file (looked for "
        "`ieee-519`); did you mean `ieee519`?");
}

TEST_CASE("a limit profile file is found relative to the plant file", "[loader]") {
  const TempDir dir;
  const std::string profile = dir.Write("profiles/site.yaml", "# a profile\n");
  const std::string plant_file =
      dir.Write("plant.yaml", With("study: {limits: profiles/site.yaml}\n"));
  CHECK(LoadPlant(plant_file).study.limits == profile);
}

TEST_CASE("extends: replace in place, remove, add, and merge study key by key", "[loader]") {
  // PLANT-FORMAT.md "Conventions" and "Top level": `study` merges key by key; an element with an
  // inherited name replaces it in place; `remove` drops inherited elements, which may then be
  // defined anew.
  const TempDir dir;
  dir.Write("base/plant.yaml", R"(overtone: 1
study: {name: Base, frequency: 50 Hz, max_order: 40}
supplies: [{name: UTIL, bus: MAIN, short_circuit: 250}]
buses:
  - {name: MAIN, kv: 13.8}
  - {name: MCC-1, kv: 0.48}
transformers:
  - {name: T1, from: MAIN, to: MCC-1, rating: 2000, impedance: 5.75, connection: Dyn11}
capacitors:
  - {name: PFC-1, bus: MCC-1, rating: 100}
  - {name: PFC-2, bus: MCC-1, rating: 200}
  - {name: PFC-3, bus: MCC-1, rating: 300}
  - {name: PFC-4, bus: MCC-1, rating: 400}
  - {name: PFC-5, bus: MCC-1, rating: 500}
)");
  const std::string variant = dir.Write("variant.yaml", R"(overtone: 1
extends: base/plant.yaml
remove: [PFC-2, UTIL, PFC-3]
study: {max_order: 60}
generators: [{name: G1, bus: MAIN, rating: 2000, x2: 0.15}]
capacitors:
  - {name: PFC-4, bus: MCC-1, rating: 900}
  - {name: PFC-2, bus: MCC-1, rating: 50}
)");
  const Plant plant = LoadPlant(variant);
  CHECK(plant.study.name == "Base");
  CHECK(plant.study.frequency_hz == 50.0);
  CHECK(plant.study.max_order == 60);
  CHECK(plant.supplies.empty());
  REQUIRE(plant.generators.size() == 1);
  CHECK(plant.buses.size() == 2);
  // Removed elements leave no trace; the rest keep their own values and places.
  REQUIRE(plant.capacitors.size() == 4);
  const std::vector<std::pair<std::string, double>> expected = {
      {"PFC-1", 100e3}, {"PFC-4", 900e3}, {"PFC-5", 500e3}, {"PFC-2", 50e3}};
  for (size_t i = 0; i < expected.size(); ++i) {
    INFO(i);
    CHECK(plant.capacitors[i].name == expected[i].first);
    CHECK(plant.capacitors[i].rating_var == Approx(expected[i].second));
  }
  CHECK_THAT(plant.capacitors[0].where.file, Catch::EndsWith("base/plant.yaml"));
  CHECK(plant.capacitors[0].where.line == 10);
  CHECK(plant.capacitors[1].where.file == variant);
  CHECK(plant.capacitors[1].where.line == 7);
  CHECK(plant.capacitors[2].where.line == 14);
  CHECK(plant.capacitors[3].where.file == variant);
}

TEST_CASE("errors in inherited content name the file where it was written", "[loader]") {
  const TempDir dir;
  const std::string base = dir.Write("base.yaml", R"(overtone: 1
supplies: [{name: UTIL, bus: MAIN, short_circuit: 250}]
buses:
  - {name: MAIN, kv: 13.8}
  - {name: MCC-1, kv: 0.48, colour: red}
cables: [{name: C1, from: MAIN, to: MCC-1, length: 10, r: 0.1, x: 0.1}]
)");
  const std::string variant = dir.Write("variant.yaml", R"(overtone: 1
extends: base.yaml
buses: [{name: MCC-2, kv: 9 kW}]
cables: [{name: C2, from: MAIN, to: MCC-2, length: 10, r: 0.1, x: 0.1}]
)");
  try {
    LoadPlant(variant);
    FAIL("expected an InputError");
  } catch (const InputError& error) {
    REQUIRE(error.diagnostics().size() == 2);
    const Diagnostic& inherited = error.diagnostics()[0];
    CHECK(inherited.where.file == base);
    CHECK(inherited.where.line == 5);
    CHECK(inherited.where.column == 29);
    CHECK(inherited.message == "unknown key `colour` in bus `MCC-1`; known keys: name, kv");
    CHECK(error.diagnostics()[1].where.file == variant);
  }
}

TEST_CASE("cyclic extends is an error naming the chain", "[loader]") {
  const TempDir dir;
  const std::string a = dir.Write("a.yaml", "overtone: 1\nextends: b.yaml\n");
  const std::string b = dir.Write("b.yaml", "overtone: 1\nextends: a.yaml\n");
  try {
    LoadPlant(a);
    FAIL("expected an InputError");
  } catch (const InputError& error) {
    REQUIRE(error.diagnostics().size() == 1);
    CHECK(error.diagnostics()[0].where.file == b);
    CHECK(error.diagnostics()[0].where.line == 2);
    CHECK(error.diagnostics()[0].message ==
          "`extends` makes a cycle: " + a + " -> " + b + " -> " + a);
  }
}

TEST_CASE("remove names only inherited elements", "[loader]") {
  const TempDir dir;
  dir.Write("base.yaml", kMinimal);
  const std::string variant =
      dir.Write("v.yaml", "overtone: 1\nextends: base.yaml\nremove: [T2]\n");
  try {
    LoadPlant(variant);
    FAIL("expected an InputError");
  } catch (const InputError& error) {
    REQUIRE_FALSE(error.diagnostics().empty());
    CHECK(error.diagnostics()[0].message ==
          "`T2` is not inherited, so it cannot be removed; did you mean `T1`?");
    CHECK(error.diagnostics()[0].where.line == 3);
    CHECK(error.diagnostics()[0].where.column == 10);
  }
  CHECK(OnlyError(With("remove: [T1]\n")) ==
        "`remove` drops inherited elements, but this file has no `extends`");
}

TEST_CASE("an unreadable file names the file", "[loader]") {
  try {
    LoadPlant("no/such/plant.yaml");
    FAIL("expected an InputError");
  } catch (const InputError& error) {
    REQUIRE(error.diagnostics().size() == 1);
    CHECK(error.diagnostics()[0].where.file == "no/such/plant.yaml");
    CHECK_THAT(error.diagnostics()[0].message, Catch::StartsWith("cannot read the plant file"));
  }
}

}  // namespace
}  // namespace overtone
