// tests/test_plants.h — small plants built in code for the solver tests (no loader involved).
#ifndef OVERTONE_TESTS_TEST_PLANTS_H_
#define OVERTONE_TESTS_TEST_PLANTS_H_

#include <string>

#include "overtone/plant.h"

namespace overtone::testing {

inline Bus MakeBus(const std::string& name, double kv) { return Bus{name, kv * 1e3, {}}; }

inline Supply MakeSupply(const std::string& bus, double mva, double x_over_r) {
  Supply s;
  s.name = "U-" + bus;
  s.bus = bus;
  s.short_circuit_va = mva * 1e6;
  s.x_over_r = x_over_r;
  return s;
}

inline Transformer MakeTransformer(const std::string& name, const std::string& from,
                                   const std::string& to, double kva, double z_percent,
                                   int clock, bool to_grounded = true) {
  Transformer t;
  t.name = name;
  t.from = from;
  t.to = to;
  t.rating_va = kva * 1e3;
  t.impedance = z_percent / 100.0;
  t.x_over_r = 8.0;
  t.connection.code = clock == 0 ? "Dd0" : "Dyn" + std::to_string(clock);
  t.connection.clock = clock;
  t.connection.from_delta = true;
  t.connection.to_delta = clock == 0;
  t.connection.to_grounded_wye = clock != 0 && to_grounded;
  return t;
}

// A measured group whose table is the ideal six-pulse spectrum I_h = I_1/h for h = 6k +- 1,
// with the signs of the 120-degree block's Fourier series, cos x - cos5x/5 + cos7x/7 - ...
// (N. Mohan, T. Undeland, W. Robbins, "Power Electronics", 3rd ed., section 5-5; from memory).
inline Drive MakeSixPulseDrive(const std::string& name, const std::string& bus, double kw) {
  Drive d;
  d.name = name;
  d.bus = bus;
  d.power_w = kw * 1e3;
  d.front_end = FrontEnd::kMeasured;
  d.displacement_pf = 0.95;
  for (int k = 1; 6 * k - 1 <= 50; ++k) {
    // a_h is proportional to sin(h pi / 3) / h: negative for 6k - 1, positive for 6k + 1.
    d.harmonics.push_back({6 * k - 1, 100.0 / (6 * k - 1), 180.0, {}});
    if (6 * k + 1 <= 50) d.harmonics.push_back({6 * k + 1, 100.0 / (6 * k + 1), 0.0, {}});
  }
  return d;
}

}  // namespace overtone::testing

#endif  // OVERTONE_TESTS_TEST_PLANTS_H_
