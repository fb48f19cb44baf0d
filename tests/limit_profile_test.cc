// tests/limit_profile_test.cc — the shipped limit profiles against the published tables, and
// located errors for bad profile files.
//
// The expected numbers are typed here a second time from the tables named at each test; a slip in
// a data file or in the reader's expansion of ranges, kinds and laws fails a check. Where they
// come from: IEEE Std 519-2014 Table 2 as reproduced (its 1992 Table 10.3, same values) in Kusko
// and Thompson, "Power Quality in Electrical Systems", McGraw-Hill 2007, Figure 2.3; Table 1's
// new row (V <= 1.0 kV: 5 % individual, 8 % THD) as summarised in published reviews of the 2014
// revision; the other Table 1 rows, Tables 3 and 4 (Table 3 is Table 2 halved) and every
// IEC 61000-2-4:2002 level from memory, not from the standards' text.
#include "limit_profile.h"

#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <map>

#include "overtone/errors.h"

using namespace overtone;
using namespace overtone::internal;

namespace {

LimitProfile Builtin(const std::string& name) {
  return ReadLimitProfile(std::string(OVERTONE_SOURCE_DIR) + "/src/limits/" + name + ".yaml");
}

// Every order 2..50 against `expected(h)`; empty expected = no limit at that order.
template <typename Expected>
void CheckOrders(const OrderLimits& limits, Expected expected) {
  for (int h = 2; h <= 50; ++h) {
    INFO("order " << h);
    const std::optional<double> want = expected(h);
    REQUIRE(limits[h].has_value() == want.has_value());
    if (want) CHECK(*limits[h] == Approx(*want).epsilon(1e-12));
  }
  for (int h = 51; h <= kMaxLimitOrder; ++h) CHECK_FALSE(limits[h].has_value());
}

std::string WriteTemp(const std::string& name, const std::string& text) {
  const std::string path = (std::filesystem::temp_directory_path() / ("overtone-" + name)).string();
  std::ofstream(path) << text;
  return path;
}

std::string ErrorsOf(const std::string& path) {
  try {
    ReadLimitProfile(path);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

}  // namespace

TEST_CASE("ieee519 voltage limits are IEEE Std 519-2014 Table 1 (clause 5.1)", "[limits]") {
  const LimitProfile p = Builtin("ieee519");
  CHECK(p.name == "ieee519");
  CHECK_FALSE(p.voltage_at_every_bus);
  // Bus voltage at the pcc: individual harmonic (%), THD (%). The <= 1.0 kV row from a review of
  // the 2014 revision; the others from memory.
  const struct { double kv; double individual; double thd; } rows[] = {
      {0.48, 5.0, 8.0},  {1.0, 5.0, 8.0},  {4.16, 3.0, 5.0},  {13.8, 3.0, 5.0}, {69.0, 3.0, 5.0},
      {115.0, 1.5, 2.5}, {161.0, 1.5, 2.5}, {230.0, 1.0, 1.5}, {500.0, 1.0, 1.5}};
  for (const auto& row : rows) {
    INFO(row.kv << " kV");
    const VoltageLimitClass* c = p.VoltageClass(row.kv);
    REQUIRE(c != nullptr);
    CHECK(c->thd_percent == row.thd);
    CheckOrders(c->individual, [&](int) { return std::optional<double>(row.individual); });
  }
}

TEST_CASE("ieee519 current limits are IEEE Std 519-2014 Tables 2, 3 and 4 (clause 5.2)", "[limits]") {
  const LimitProfile p = Builtin("ieee519");
  // Odd-order limits in % of I_L for 3<=h<11, 11<=h<17, 17<=h<23, 23<=h<35, 35<=h<=50, and TDD;
  // even orders at 25 % of the odd limits of their range (order 2 with the first range). Table 2
  // and the 25 % rule checked against Kusko and Thompson's reproduction (Figure 2.3); Tables 3
  // and 4 from memory.
  struct Row { double kv; double ratio; double odd[5]; double tdd; };
  const Row rows[] = {
      // Table 2, 120 V through 69 kV.
      {13.8, 10, {4.0, 2.0, 1.5, 0.6, 0.3}, 5.0},
      {13.8, 20, {7.0, 3.5, 2.5, 1.0, 0.5}, 8.0},  // 20 < 50 includes 20
      {0.48, 35, {7.0, 3.5, 2.5, 1.0, 0.5}, 8.0},
      {69.0, 75, {10.0, 4.5, 4.0, 1.5, 0.7}, 12.0},
      {4.16, 500, {12.0, 5.5, 5.0, 2.0, 1.0}, 15.0},
      {13.8, 5000, {15.0, 7.0, 6.0, 2.5, 1.4}, 20.0},
      // Table 3, above 69 kV through 161 kV.
      {115, 10, {2.0, 1.0, 0.75, 0.3, 0.15}, 2.5},
      {115, 30, {3.5, 1.75, 1.25, 0.5, 0.25}, 4.0},
      {138, 60, {5.0, 2.25, 2.0, 0.75, 0.35}, 6.0},
      {161, 200, {6.0, 2.75, 2.5, 1.0, 0.5}, 7.5},
      {161, 2000, {7.5, 3.5, 3.0, 1.25, 0.7}, 10.0},
      // Table 4, above 161 kV: < 25, 25 < 50, >= 50.
      {230, 10, {1.0, 0.5, 0.38, 0.15, 0.1}, 1.5},
      {345, 30, {2.0, 1.0, 0.75, 0.3, 0.15}, 2.5},
      {500, 50, {3.0, 1.5, 1.15, 0.45, 0.22}, 3.75},
  };
  for (const Row& row : rows) {
    INFO(row.kv << " kV, I_sc/I_L " << row.ratio);
    const CurrentLimitRow* r = p.CurrentRow(row.kv, row.ratio);
    REQUIRE(r != nullptr);
    CHECK(r->tdd_percent == row.tdd);
    CheckOrders(r->individual, [&](int h) {
      const int range = h < 11 ? 0 : h < 17 ? 1 : h < 23 ? 2 : h < 35 ? 3 : 4;
      return std::optional<double>(row.odd[range] * (h % 2 == 0 ? 0.25 : 1.0));
    });
  }
}

// IEC 61000-2-4:2002 Tables 2 (odd non-multiple of 3), 3 (odd multiple of 3), 4 (even) and the
// THD compatibility level (clause 5.5); from memory.
struct IecClass {
  const char* name;
  double thd;
  std::map<int, double> fixed;  // single orders
  double odd_a, odd_b;          // 19 <= h <= 49, non-triplen: a * 17 / h + b
  double triplen_high;          // 27 <= h <= 45 (21 < h <= 45)
  double even_a, even_b;        // 10 <= h <= 50: a * 10 / h + b
};

TEST_CASE("iec61000-2-4 classes are IEC 61000-2-4:2002 Tables 2, 3, 4 and the THD levels", "[limits]") {
  const IecClass classes[] = {
      {"iec61000-2-4-class1", 5.0,
       {{5, 3}, {7, 3}, {11, 3}, {13, 3}, {17, 2}, {3, 3}, {9, 1.5}, {15, 0.3}, {21, 0.2},
        {2, 2}, {4, 1}, {6, 0.5}, {8, 0.5}},
       2.27, -0.27, 0.2, 0.25, 0.25},
      {"iec61000-2-4-class2", 8.0,
       {{5, 6}, {7, 5}, {11, 3.5}, {13, 3}, {17, 2}, {3, 5}, {9, 1.5}, {15, 0.4}, {21, 0.3},
        {2, 2}, {4, 1}, {6, 0.5}, {8, 0.5}},
       2.27, -0.27, 0.2, 0.25, 0.25},
      {"iec61000-2-4-class3", 10.0,
       {{5, 8}, {7, 7}, {11, 5}, {13, 4.5}, {17, 4}, {3, 6}, {9, 2.5}, {15, 2}, {21, 1.75},
        {2, 3}, {4, 1.5}, {6, 1}, {8, 1}},
       4.5, -0.5, 1.0, 0.0, 1.0},
  };
  for (const IecClass& k : classes) {
    INFO(k.name);
    const LimitProfile p = Builtin(k.name);
    CHECK(p.name == k.name);
    CHECK(p.voltage_at_every_bus);
    CHECK(p.current.empty());
    for (double kv : {0.4, 0.69, 11.0, 33.0}) {
      const VoltageLimitClass* c = p.VoltageClass(kv);
      REQUIRE(c != nullptr);
      CHECK(c->thd_percent == k.thd);
      CheckOrders(c->individual, [&](int h) -> std::optional<double> {
        if (auto it = k.fixed.find(h); it != k.fixed.end()) return it->second;
        if (h % 2 == 0) return k.even_a * 10.0 / h + k.even_b;
        if (h % 3 == 0) return k.triplen_high;
        return k.odd_a * 17.0 / h + k.odd_b;
      });
    }
  }
  // Spot values of the laws as printed in tables of the standard's users (rounded): class 2,
  // h = 25: 2.27 * 17 / 25 - 0.27 = 1.27; h = 49: 0.52; even h = 20: 0.375.
  const LimitProfile class2 = Builtin("iec61000-2-4-class2");
  CHECK(*class2.VoltageClass(0.4)->individual[25] == Approx(1.2736));
  CHECK(*class2.VoltageClass(0.4)->individual[49] == Approx(0.5175).epsilon(1e-3));
  CHECK(*class2.VoltageClass(0.4)->individual[20] == Approx(0.375));
}

TEST_CASE("LoadLimitProfile finds the built-in profiles by name", "[limits]") {
  CHECK(LoadLimitProfile("ieee519").title == "IEEE Std 519-2014");
  CHECK(LoadLimitProfile("iec61000-2-4-class3").voltage.size() == 1);
}

TEST_CASE("A user profile of the same shape is read; errors name file, line and column", "[limits]") {
  const std::string good = WriteTemp("good-profile.yaml",
      "overtone_limits: 1\n"
      "name: site-spec\n"
      "voltage:\n"
      "  applies_at: every-bus\n"
      "  classes:\n"
      "    - {up_to_kv: 1.0, thd: 6.0, orders: [{from: 2, to: 25, kind: odd, percent: 4.0}]}\n"
      "    - {thd: 4.0, orders: [{order: 5, percent: 2.5}]}\n");
  const LimitProfile p = ReadLimitProfile(good);
  CHECK(p.VoltageClass(0.48)->thd_percent == 6.0);
  CHECK(*p.VoltageClass(0.48)->individual[25] == 4.0);
  CHECK_FALSE(p.VoltageClass(0.48)->individual[24].has_value());
  CHECK_FALSE(p.VoltageClass(0.48)->individual[27].has_value());
  CHECK(*p.VoltageClass(13.8)->individual[5] == 2.5);
  CHECK_FALSE(p.VoltageClass(13.8)->individual[7].has_value());

  const std::string bad = WriteTemp("bad-profile.yaml",
      "overtone_limits: 1\n"
      "name: broken\n"
      "voltage:\n"
      "  applies_at: everywhere\n"
      "  classes:\n"
      "    - {up_to_kv: 1.0, thd: 6.0, orders: [{from: 7, to: 5, percent: 4.0}]}\n"
      "    - {thd: eight, orders: [{order: 5, percent: 2.5}, {order: 5, percent: 2.0}], colour: red}\n");
  const std::string errors = ErrorsOf(bad);
  CHECK_THAT(errors, Catch::Contains(bad + ":4:15: error: `applies_at` must be `pcc` or `every-bus`"));
  CHECK_THAT(errors, Catch::Contains(bad + ":6:42: error: `from` must not exceed `to`"));
  CHECK_THAT(errors, Catch::Contains(bad + ":7:13: error: `thd` must be a number"));
  CHECK_THAT(errors, Catch::Contains(":7:55: error: order 5 is given a limit twice"));
  CHECK_THAT(errors, Catch::Contains(":7:82: error: unknown key `colour`"));

  const std::string current = WriteTemp("bad-current.yaml",
      "overtone_limits: 1\n"
      "name: broken\n"
      "voltage: {applies_at: pcc, classes: [{thd: 5, orders: []}]}\n"
      "current:\n"
      "  even_percent_of_odd: 25\n"
      "  classes:\n"
      "    - ranges: [[2, 10], [9, 16]]\n"
      "      rows: [{isc_il_below: 20, odd: [4.0], tdd: 5.0}, {isc_il_below: 10, odd: [1, 2], tdd: 5}]\n");
  const std::string current_errors = ErrorsOf(current);
  CHECK_THAT(current_errors, Catch::Contains(":7:25: error: ranges must rise without overlapping"));
  CHECK_THAT(current_errors, Catch::Contains(":8:71: error: `isc_il_below` must rise"));
  CHECK_THAT(ErrorsOf(WriteTemp("syntax.yaml", "name: [\n")), Catch::Contains("syntax.yaml:2:1: error:"));
  CHECK_THAT(ErrorsOf("/nonexistent/profile.yaml"), Catch::Contains("cannot read"));
}
