// src/load_flow.h — fundamental-frequency load flow by Newton-Raphson (internal).
#ifndef OVERTONE_INTERNAL_LOAD_FLOW_H_
#define OVERTONE_INTERNAL_LOAD_FLOW_H_

#include <vector>

#include "network.h"
#include "sparse_lu.h"

namespace overtone::internal {

struct LoadFlowOptions {
  double tolerance_pu = 1e-8;  // largest power mismatch at any bus, pu on kBaseVa
  int max_iterations = 40;
};

struct LoadFlowResult {
  std::vector<Complex> voltage;  // pu, per bus
  int iterations = 0;
  double max_mismatch_pu = 0.0;
};

// Solves Y1 V + conj(S / V) = I_sources with S the constant power drawn at each bus (pu,
// size bus_count). Sources are Thevenin EMFs behind their impedances, so no slack bus is needed.
// One solver serves many solves of one network (the operating point's rounds): Y1, the symbolic
// analyses and the no-load solution are computed once.
class LoadFlowSolver {
 public:
  // Throws SolveError when the network is singular (a bus without a path to a source).
  explicit LoadFlowSolver(const Network& network);

  // Starts from `start` when given, else from the no-load solution; a start that does not converge
  // is retried from no load. Newton finds the root nearest its start, so `start` must be an
  // earlier solution for nearby powers (a start near zero can find the low-voltage root).
  // Throws SolveError naming the worst bus.
  LoadFlowResult Solve(const std::vector<Complex>& power_drawn, const LoadFlowOptions& options = {},
                       const std::vector<Complex>* start = nullptr);

 private:
  LoadFlowResult Newton(const std::vector<Complex>& power_drawn, const LoadFlowOptions& options,
                        std::vector<Complex> start, int* worst_bus);

  const Network& net_;
  std::vector<Complex> y1_;
  std::vector<Complex> injected_;
  std::vector<Complex> no_load_;
  CscPattern jacobian_pattern_;
  SparseAnalysis jacobian_analysis_;
  SparseLu<double> jacobian_lu_;
};

// One solve from the no-load solution.
LoadFlowResult SolveLoadFlow(const Network& network, const std::vector<Complex>& power_drawn,
                             const LoadFlowOptions& options = {});

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_LOAD_FLOW_H_
