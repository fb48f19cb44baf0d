// src/models.h — per-phase harmonic models of the plant's elements (internal).
//
// Per unit on kBaseVa and each bus's nominal voltage. `h` is the harmonic order (fractional for
// frequency scans); reactances scale with h, resistances stay constant (format 1). Sources of the
// models are named at each function in models.cc.
#ifndef OVERTONE_INTERNAL_MODELS_H_
#define OVERTONE_INTERNAL_MODELS_H_

#include <complex>

#include "overtone/plant.h"

namespace overtone::internal {

using Complex = std::complex<double>;

constexpr double kBaseVa = 100e6;  // system base, 100 MVA (common practice)

enum class Sequence { kZero, kPositive, kNegative };

// h mod 3: 1 positive (1, 4, 7, ...), 2 negative (2, 5, 11, ...), 0 zero (triplens).
Sequence SequenceOf(int h);

// Impedance base of a bus, ohm.
double BaseOhms(double nominal_v);

// Two-port admittance stamp of a series branch: I_from = yff V_from + yft V_to, I_to = ...
struct BranchStamp {
  Complex yff, yft, ytf, ytt;
};

// Thevenin sources: series impedance at order h (pu on the bus base).
Complex SupplyImpedance(const Supply& supply, double h);
Complex GeneratorImpedance(const Generator& generator, double nominal_v, double h);

// Transformer: series impedance on the from side, then an ideal transformer whose to-side
// voltage is k times the internal voltage, k = exp(-j*shift)/(1 + tap). The shift follows the
// order's sequence; zero sequence passes only between grounded wye windings.
BranchStamp TransformerStamp(const Transformer& t, double from_nominal_v, double h, Sequence seq);
Complex TransformerSeriesImpedance(const Transformer& t, double from_nominal_v, double h);
// Ratio k (V_to = k * V_internal) for the given sequence.
Complex TransformerRatio(const Transformer& t, Sequence seq);

// Cable: pi model, series R + jhX and half the charging susceptance at each end.
BranchStamp CableStamp(const Cable& c, double nominal_v, double frequency_hz, double h);
Complex CableSeriesImpedance(const Cable& c, double nominal_v, double h);

// Shunt admittances at order h (pu). Capacitors and filters apply at every order (fundamental
// included); motors and loads are constant power at the fundamental and use these for h > 1.
Complex CapacitorAdmittance(const Capacitor& c, double nominal_v, double h);
Complex FilterAdmittance(const Filter& f, double nominal_v, double h);
Complex MotorAdmittance(const Motor& m, double nominal_v, double h);
Complex LoadAdmittance(const Load& l, double h);

// Fundamental power drawn at constant power (pu on kBaseVa): P + jQ.
Complex MotorPower(const Motor& m);
Complex LoadPower(const Load& l);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_MODELS_H_
