// src/plant.cc — names of the model's enumerations, as the plant format spells them.
#include "overtone/plant.h"

namespace overtone {

std::string ToString(FrontEnd front_end) {
  switch (front_end) {
    case FrontEnd::kDiodeCapacitor: return "diode-capacitor";
    case FrontEnd::kDiodeChoke: return "diode-choke";
    case FrontEnd::kThyristor: return "thyristor";
    case FrontEnd::kSinglePhase: return "single-phase";
    case FrontEnd::kMultipulse: return "multipulse";
    case FrontEnd::kActive: return "active";
    case FrontEnd::kMeasured: return "measured";
  }
  return "?";
}

std::string ToString(Summation summation) {
  switch (summation) {
    case Summation::kVector: return "vector";
    case Summation::kArithmetic: return "arithmetic";
    case Summation::kIec: return "iec";
  }
  return "?";
}

}  // namespace overtone
