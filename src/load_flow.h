// src/load_flow.h — fundamental-frequency load flow by Newton-Raphson (internal).
#ifndef OVERTONE_INTERNAL_LOAD_FLOW_H_
#define OVERTONE_INTERNAL_LOAD_FLOW_H_

#include <vector>

#include "network.h"

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
// Starts from the no-load solution. Throws SolveError naming the worst bus when it fails.
LoadFlowResult SolveLoadFlow(const Network& network, const std::vector<Complex>& power_drawn,
                             const LoadFlowOptions& options = {});

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_LOAD_FLOW_H_
