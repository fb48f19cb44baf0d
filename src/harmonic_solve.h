// src/harmonic_solve.h — V(h) = Y(h)^-1 I(h) at every harmonic order (internal).
#ifndef OVERTONE_INTERNAL_HARMONIC_SOLVE_H_
#define OVERTONE_INTERNAL_HARMONIC_SOLVE_H_

#include <functional>
#include <span>
#include <vector>

#include "network.h"

namespace overtone::internal {

// A current injected into the network at a bus (pu of the bus's base current; a drive drawing
// I injects -I).
struct Injection {
  int bus = 0;
  Complex current;
};

// What happened at one order (after ceres' Solver::Summary): diagnostics for the report.
struct OrderSummary {
  int order = 0;
  bool solved = false;      // false: no source at this order, voltages are 0
  bool full_factor = false; // the refactor was rejected and the order was factored afresh
  double rcond = 0.0;       // KLU's reciprocal pivot growth estimate
};

struct HarmonicSolution {
  int bus_count = 0;
  int max_order = 0;
  std::vector<Complex> voltage;  // order-major: voltage[h * bus_count + bus], pu; h = 0 unused
  std::vector<OrderSummary> orders;  // index = order
  Complex at(int h, int bus) const { return voltage[static_cast<std::size_t>(h) * bus_count + bus]; }
  // Every bus's voltage at order h.
  std::span<const Complex> order(int h) const {
    return {voltage.data() + static_cast<std::size_t>(h) * bus_count, static_cast<std::size_t>(bus_count)};
  }
};

// Solves orders 2..max_order. injections[h] lists the currents at order h. Each worker thread
// owns one numeric factorization, made at a fixed reference order and refactored for each of its
// orders, so the result does not depend on the thread count. Throws SolveError when an order's
// matrix is singular while it has sources.
HarmonicSolution SolveHarmonics(const Network& network,
                                const std::vector<std::vector<Injection>>& injections,
                                int max_order, int threads);

// Receives set `set`'s bus voltages at order h (pu).
using SetVoltageVisitor = std::function<void(int h, std::size_t set, std::span<const Complex> voltage)>;

// The same for several sets of sources at once (sets[s][h]: set s's currents at order h): each
// order is factored once and serves every set's right-hand side, and each set's solution at that
// order goes to `visit` instead of being kept, so memory does not grow with sets x orders x buses.
// visit runs on the worker that solved order h, for the sets with sources at h in set order; calls
// for different orders may run at the same time. By linearity the sets' solutions add up to the
// solve of all sets together.
void SolveHarmonicsBySource(const Network& network,
                            const std::vector<std::vector<std::vector<Injection>>>& sets,
                            int max_order, int threads, const SetVoltageVisitor& visit);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_HARMONIC_SOLVE_H_
