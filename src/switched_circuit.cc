// src/switched_circuit.cc — grid stepping with exact propagators and switching-instant location.
#include "switched_circuit.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <unsupported/Eigen/MatrixFunctions>

namespace overtone::internal {
namespace {

// Switching functions within this of zero count as zero (state values are of order 1).
constexpr double kSwitchTolerance = 1e-11;
constexpr int kMaxSwitchesPerInstant = 12;

StateMatrix Propagator(const StateMatrix& a, double tau) { return (a * tau).exp(); }

// Largest absolute column sum of a (the 1-norm), which bounds how fast a state can change.
double NormOf(const StateMatrix& a) { return a.cwiseAbs().colwise().sum().maxCoeff(); }

// expm(a tau) z by its Taylor series, in substeps with |a tau|_1 <= 1/2 each, where the series
// reaches round-off in about 15 terms: matrix-vector products only, where the full exponential
// costs a dozen matrix products and a solve (C. Moler, C. Van Loan, "Nineteen dubious ways to
// compute the exponential of a matrix, twenty-five years later", SIAM Review 45(1), 2003,
// methods 1 and 3). `norm` is NormOf(a).
StateVector Propagate(const StateMatrix& a, double norm, double tau, StateVector z) {
  const int substeps = std::max(1, static_cast<int>(std::ceil(2.0 * norm * tau)));
  const double h = tau / substeps;
  for (int s = 0; s < substeps; ++s) {
    StateVector term = z;
    for (int k = 1; k <= 40; ++k) {
      term = (h / k) * (a * term);
      z += term;
      if (term.lpNorm<Eigen::Infinity>() <= 1e-17 * z.lpNorm<Eigen::Infinity>()) break;
    }
  }
  return z;
}

// Root of g(tau) = row * expm(a tau) z0 in (0, span], given g(0) <= tol < g(span) and
// `end` = expm(a span) z0: Newton steps (g' = row * a * z(tau)) kept inside a shrinking bracket,
// bisection when Newton leaves it.
double LocateSwitch(const StateMatrix& a, double norm, const StateVector& z0,
                    const StateVector& end, const SwitchingRow& row, double span) {
  double lo = 0.0, hi = span;
  double tau = span * (-row.dot(z0)) / (row.dot(end) - row.dot(z0));
  if (!(tau > lo && tau < hi)) tau = 0.5 * span;
  for (int it = 0; it < 60; ++it) {
    const StateVector z = Propagate(a, norm, tau, z0);
    const double g = row.dot(z);
    if (std::abs(g) <= 1e-14) return tau;  // on the switching instant to round-off
    if (g > 0.0) hi = tau; else lo = tau;
    if (hi - lo <= 1e-15 * span) break;
    const double slope = row.dot(a * z);
    double next = slope != 0.0 ? tau - g / slope : 0.5 * (lo + hi);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    tau = next;
  }
  return hi;
}

}  // namespace

Simulator::Simulator(const SwitchedCircuit& circuit, double step) : circuit_(circuit), step_(step) {}

const Simulator::Cached& Simulator::Get(int topology) {
  // Most steps stay in the topology of the step before.
  if (last_ != nullptr && last_id_ == topology) return *last_;
  auto it = cache_.find(topology);
  if (it == cache_.end()) {
    Cached c{circuit_.Build(topology), StateMatrix(), 0.0};
    c.step = Propagator(c.topology.a, step_);
    c.norm = NormOf(c.topology.a);
    it = cache_.emplace(topology, std::move(c)).first;
  }
  last_id_ = topology;
  last_ = &it->second;  // elements of an unordered_map stay put
  return *last_;
}

void Simulator::Settle(StateVector& z, int& topology) {
  for (int n = 0; n < kMaxSwitchesPerInstant; ++n) {
    const Topology& t = Get(topology).topology;
    int fired = -1;
    double largest = kSwitchTolerance;
    for (std::size_t k = 0; k < t.switching.size(); ++k) {
      if (t.edge_only[k]) continue;
      const double g = t.switching[k].dot(z);
      if (g > largest) {
        largest = g;
        fired = static_cast<int>(k);
      }
    }
    if (fired < 0) return;
    topology = t.next[fired];
    circuit_.Enter(topology, z);
  }
  throw std::runtime_error("bridge simulation: switching does not settle (chattering)");
}

void Simulator::Advance(StateVector& z, int& topology, const SwitchFn& on_switch) {
  double remaining = step_;
  for (int n = 0; n < 4 * kMaxSwitchesPerInstant; ++n) {
    const Cached& c = Get(topology);
    const StateMatrix& a = c.topology.a;
    const StateVector end = remaining == step_ ? StateVector(c.step * z)
                                               : Propagate(a, c.norm, remaining, z);
    // The earliest switching function to rise through zero inside this step.
    double first = remaining;
    int fired = -1;
    for (std::size_t k = 0; k < c.topology.switching.size(); ++k) {
      const SwitchingRow& row = c.topology.switching[k];
      if (row.dot(end) <= kSwitchTolerance) continue;
      if (c.topology.edge_only[k] && row.dot(z) > kSwitchTolerance) continue;
      const double tau = LocateSwitch(a, c.norm, z, end, row, remaining);
      if (tau < first || fired < 0) {
        first = tau;
        fired = static_cast<int>(k);
      }
    }
    if (fired < 0) {
      z = end;
      return;
    }
    z = Propagate(a, c.norm, first, z);
    remaining -= first;
    if (on_switch) on_switch(step_ - remaining, z, topology);
    topology = c.topology.next[fired];
    circuit_.Enter(topology, z);
    Settle(z, topology);
    if (remaining <= 0.0) return;
  }
  throw std::runtime_error("bridge simulation: too many switchings in one step");
}

void Simulator::Run(StateVector& z, int& topology, int steps, const SampleFn& sample,
                    const SwitchFn& on_switch) {
  for (int n = 0; n < steps; ++n) {
    Advance(z, topology, on_switch);
    if (sample) sample(z, topology);
  }
}

}  // namespace overtone::internal
