// tests/load_flow_test.cc — Newton-Raphson load flow against closed forms.
#include "load_flow.h"

#include <catch2/catch.hpp>

#include <cmath>

#include "overtone/errors.h"
#include "test_plants.h"

using namespace overtone;
using namespace overtone::internal;
using overtone::testing::MakeBus;
using overtone::testing::MakeSupply;

TEST_CASE("Two-bus load flow matches the closed-form receiving-end voltage", "[load_flow]") {
  // A load S = P + jQ fed from an EMF E behind Z = R + jX: with a = E^2 - 2(RP + XQ),
  // |V|^2 = (a + sqrt(a^2 - 4 |Z|^2 |S|^2)) / 2 (the radial-line voltage equation, e.g.
  // P. Kundur, "Power System Stability and Control", section 14.1; from memory).
  Plant plant;
  plant.buses = {MakeBus("B", 13.8)};
  plant.supplies = {MakeSupply("B", 25.0, 6.0)};
  Load load;
  load.name = "L";
  load.bus = "B";
  load.p_w = 6e6;
  load.q_var = 3e6;
  plant.loads = {load};
  const Network net(plant);
  const std::vector<Complex> drawn = {LoadPower(load)};
  const LoadFlowResult flow = SolveLoadFlow(net, drawn);

  const double z = kBaseVa / 25e6, r = z / std::sqrt(37.0), x = 6.0 * r;
  const double p = 6e6 / kBaseVa, q = 3e6 / kBaseVa;
  const double a = 1.0 - 2.0 * (r * p + x * q);
  const double v2 = (a + std::sqrt(a * a - 4.0 * z * z * (p * p + q * q))) / 2.0;
  CHECK(std::abs(flow.voltage[0]) == Approx(std::sqrt(v2)).epsilon(1e-9));
  CHECK(flow.max_mismatch_pu <= 1e-8);
  // And the power balance: P drawn = P delivered, V conj(I) = S.
  const Complex i = (Complex{1.0, 0.0} - flow.voltage[0]) / Complex{r, x};
  CHECK(std::abs(flow.voltage[0] * std::conj(i) - Complex{p, q}) < 1e-8);

  // One solver, solved again from a start off by 5 % and 3 degrees: the same answer. A start near
  // the equation's other root, |V|^2 = (a - sqrt(...)) / 2, finds that root: a start must be an
  // earlier solution for nearby powers (LoadFlowSolver::Solve).
  LoadFlowSolver solver(net);
  const std::vector<Complex> near = {flow.voltage[0] * std::polar(1.05, 0.05)};
  CHECK(std::abs(solver.Solve(drawn, {}, &near).voltage[0]) == Approx(std::sqrt(v2)).epsilon(1e-9));
  const double v2_low = (a - std::sqrt(a * a - 4.0 * z * z * (p * p + q * q))) / 2.0;
  const std::vector<Complex> low = {Complex{0.05, 0.0}};
  CHECK(std::abs(solver.Solve(drawn, {}, &low).voltage[0]) ==
        Approx(std::sqrt(v2_low)).epsilon(1e-9));
}

TEST_CASE("A load beyond the supply's capability fails naming the bus", "[load_flow]") {
  // Maximum power transfer through Z is about E^2 / (2 |Z|) (common practice); ask for ten times it.
  Plant plant;
  plant.buses = {MakeBus("WEAK", 0.48)};
  plant.supplies = {MakeSupply("WEAK", 1.0, 5.0)};
  Load load;
  load.name = "L";
  load.bus = "WEAK";
  load.p_w = 5e6;
  plant.loads = {load};
  const Network net(plant);
  try {
    SolveLoadFlow(net, {LoadPower(load)});
    FAIL("expected SolveError");
  } catch (const SolveError& e) {
    CHECK_THAT(e.what(), Catch::Contains("WEAK"));
  }
}
