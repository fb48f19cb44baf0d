// src/spectra.h — fundamental operating point and harmonic currents of each drive group (internal).
#ifndef OVERTONE_INTERNAL_SPECTRA_H_
#define OVERTONE_INTERNAL_SPECTRA_H_

#include <string>
#include <vector>

#include "models.h"
#include "overtone/plant.h"

namespace overtone::internal {

// Fundamental power drawn by a drive group with a table spectrum (pu on kBaseVa):
// P = count * power * loading, Q from the displacement power factor (lagging).
Complex TableDrivePower(const Drive& drive);

// The spectrum an active front end draws when no table is given (documented in docs/method.md).
const std::vector<HarmonicEntry>& DefaultActiveSpectrum();

// Current drawn at every order 1..max_order (index = order, pu of the bus's base current) by a
// group whose drawn fundamental is i1: order h sits at angle(table) + h * angle(i1)
// (PLANT-FORMAT.md "Conventions"). Triplen rows are dropped with a warning.
std::vector<Complex> TableSpectrum(const Drive& drive, Complex i1, int max_order,
                                   std::vector<std::string>& warnings);

// True for the front ends that need the built-in bridge model.
bool NeedsBridgeModel(FrontEnd front_end);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SPECTRA_H_
