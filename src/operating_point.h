// src/operating_point.h — the plant's fundamental operating point and each drive group's
// drawn current at every order (internal). Groups with a built-in bridge front end and the load
// flow are iterated until the groups' fundamental powers agree (PLANT-FORMAT.md "Conventions").
#ifndef OVERTONE_INTERNAL_OPERATING_POINT_H_
#define OVERTONE_INTERNAL_OPERATING_POINT_H_

#include <optional>
#include <string>
#include <vector>

#include "bridge_model.h"
#include "load_flow.h"
#include "network.h"
#include "overtone/study.h"

namespace overtone::internal {

struct DriveOperatingPoint {
  std::vector<Complex> current;          // drawn, pu of the bus base current, orders 0..max_order
  std::optional<GroupSpectrum> bridge;   // details from the bridge model (its current moved out)
};

struct OperatingPoint {
  LoadFlowResult flow;
  std::vector<DriveOperatingPoint> drives;  // in plant order
  int bridge_iterations = 0;                // load flow / bridge model rounds
};

// Bridge groups are simulated on `options.threads` threads (0 = all cores); the result does not
// depend on the thread count. Waveforms are kept when `options.keep_waveforms` asks, and the group
// named `options.exact_drive` is simulated on its own wherever the others are interpolated.
OperatingPoint SolveOperatingPoint(const Plant& plant, const Network& network,
                                   const StudyOptions& options, std::vector<std::string>& warnings);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_OPERATING_POINT_H_
