// src/models.cc — per-phase harmonic models of the plant's elements.
//
// Element models follow standard harmonic-analysis practice (IEEE Std 399-1997 "Brown Book",
// chapter 10; IEEE Std 519-2014 application notes; J. Arrillaga, N. R. Watson, "Power System
// Harmonics", 2nd ed., chapter 6). Resistances are constant with order in format 1.
#include "models.h"

#include <cmath>
#include <numbers>

namespace overtone::internal {
namespace {

constexpr Complex kJ{0.0, 1.0};

// R + jhX from a magnitude |Z1| at the fundamental and an X/R ratio.
Complex SplitByXOverR(double magnitude, double x_over_r, double h) {
  const double r = magnitude / std::sqrt(1.0 + x_over_r * x_over_r);
  return {r, h * r * x_over_r};
}

double DegToRad(double deg) { return deg * std::numbers::pi / 180.0; }

// Capacitive reactance at the fundamental of a three-phase bank, ohm: X_C = V^2 / Q.
double CapacitorReactanceOhms(double rating_var, double rated_v) {
  return rated_v * rated_v / rating_var;
}

}  // namespace

Sequence SequenceOf(int h) {
  switch (h % 3) {
    case 1: return Sequence::kPositive;
    case 2: return Sequence::kNegative;
    default: return Sequence::kZero;
  }
}

double BaseOhms(double nominal_v) { return nominal_v * nominal_v / kBaseVa; }

// Thevenin impedance |Z| = V^2 / S_sc, i.e. S_base / S_sc in pu (IEEE 399 clause 10.5.1).
Complex SupplyImpedance(const Supply& s, double h) {
  return SplitByXOverR(kBaseVa / s.short_circuit_va, s.x_over_r, h);
}

// Generator: R + jh*X2 with X2 the negative-sequence reactance (IEEE 399 clause 10.5.3).
Complex GeneratorImpedance(const Generator& g, double /*nominal_v*/, double h) {
  const double x = g.x2_pu * kBaseVa / g.rating_va;
  return {x / g.x_over_r, h * x};
}

Complex TransformerSeriesImpedance(const Transformer& t, double /*from_nominal_v*/, double h) {
  return SplitByXOverR(t.impedance * kBaseVa / t.rating_va, t.x_over_r, h);
}

// Positive sequence on the to side lags the from side by 30 deg x clock; negative sequence shifts
// by the opposite angle (IEC 60076-1 vector groups; Arrillaga & Watson section 6.4).
Complex TransformerRatio(const Transformer& t, Sequence seq) {
  double shift = DegToRad(30.0 * t.connection.clock);
  if (seq == Sequence::kNegative) shift = -shift;
  return std::polar(1.0 / (1.0 + t.tap), -shift);
}

BranchStamp TransformerStamp(const Transformer& t, double from_nominal_v, double h, Sequence seq) {
  const Complex y = 1.0 / TransformerSeriesImpedance(t, from_nominal_v, h);
  const VectorGroup& g = t.connection;
  if (seq == Sequence::kZero) {
    // Zero sequence: through only between grounded wyes; a grounded wye facing a delta sees the
    // leakage impedance to ground; any other pair is open (IEEE 399 clause 10.5.4).
    if (g.from_grounded_wye && g.to_grounded_wye) {
      const Complex k = TransformerRatio(t, seq);
      return {y, -y / k, -y / std::conj(k), y / std::norm(k)};
    }
    BranchStamp open{};
    if (g.from_grounded_wye && g.to_delta) open.yff = y;
    if (g.to_grounded_wye && g.from_delta) open.ytt = y / std::norm(TransformerRatio(t, seq));
    return open;
  }
  // I_from = y (V_from - V_to / k); power balance through the ideal part gives
  // I_to = -I_from / conj(k). Unsymmetric when k is complex.
  const Complex k = TransformerRatio(t, seq);
  return {y, -y / k, -y / std::conj(k), y / std::norm(k)};
}

Complex CableSeriesImpedance(const Cable& c, double nominal_v, double h) {
  const Complex ohms{c.r_ohm_per_m * c.length_m, h * c.x_ohm_per_m * c.length_m};
  return ohms / static_cast<double>(c.runs) / BaseOhms(nominal_v);
}

// Nominal pi model (IEEE 399 clause 10.5.5): series R + jhX, shunt jhB/2 at each end.
BranchStamp CableStamp(const Cable& c, double nominal_v, double frequency_hz, double h) {
  const Complex y = 1.0 / CableSeriesImpedance(c, nominal_v, h);
  const double b = 2.0 * std::numbers::pi * frequency_hz * c.c_f_per_m * c.length_m * c.runs *
                   BaseOhms(nominal_v);
  const Complex half_shunt{0.0, h * b / 2.0};
  return {y + half_shunt, -y, -y, y + half_shunt};
}

// Bank of `steps_on` identical steps, each C in series with its own detuning reactor
// X_L = p X_C, R_L = X_L / (X/R); without a reactor a lossless capacitor (IEEE Std 1036-2010).
Complex CapacitorAdmittance(const Capacitor& c, double nominal_v, double h) {
  if (c.steps_on == 0) return 0.0;
  const double xc_step =
      CapacitorReactanceOhms(c.rating_var / c.steps, c.rated_v) / BaseOhms(nominal_v);
  const double xl = c.detuning * xc_step;
  const double r = c.detuning > 0.0 ? xl / c.x_over_r : 0.0;
  const Complex z_step{r, h * xl - xc_step / h};
  return static_cast<double>(c.steps_on) / z_step;
}

// Single-tuned: R, L, C in series, X_L = X_C / h_t^2, Q = X_0 / R with X_0 = sqrt(X_L X_C).
// Second-order high-pass: C in series with R || L, Q = R / X_0 (IEEE Std 1531-2020 clause 6).
Complex FilterAdmittance(const Filter& f, double nominal_v, double h) {
  const double xc = CapacitorReactanceOhms(f.rating_var, f.rated_v) / BaseOhms(nominal_v);
  const double xl = xc / (f.tuned_order * f.tuned_order);
  const double x0 = std::sqrt(xl * xc);
  const Complex zc{0.0, -xc / h};
  const Complex zl{0.0, h * xl};
  if (f.type == FilterType::kSingleTuned) return 1.0 / (x0 / f.quality + zl + zc);
  const double r = f.quality * x0;
  return 1.0 / (zc + r * zl / (r + zl));
}

// Induction motor: R + jh X_lr on the motor's own kVA base, X/R constant (IEEE 399 10.5.6).
Complex MotorAdmittance(const Motor& m, double nominal_v, double h) {
  const double s_va = m.rating_is_kva ? m.rating : m.rating / (m.efficiency * m.power_factor);
  const double x = m.locked_rotor_reactance_pu * m.rated_v * m.rated_v / s_va / BaseOhms(nominal_v);
  return static_cast<double>(m.count) / Complex{x / m.x_over_r, h * x};
}

// Linear load at rated voltage (IEEE 399 clause 10.5.7, model "parallel R-L"): R = V^2/P in
// parallel with jhV^2/Q; or series R + jhX from Z = V^2 / (P - jQ).
Complex LoadAdmittance(const Load& l, double h) {
  const double p = l.p_w * l.count / kBaseVa;
  const double q = l.q_var * l.count / kBaseVa;
  switch (l.model) {
    case LoadModel::kNone: return 0.0;
    case LoadModel::kParallelRL: return Complex{p, -q / h};
    case LoadModel::kSeriesRL: {
      const double s2 = p * p + q * q;
      if (s2 == 0.0) return 0.0;
      return 1.0 / Complex{p / s2, h * q / s2};
    }
  }
  return 0.0;
}

Complex MotorPower(const Motor& m) {
  const double p = m.rating_is_kva ? m.rating * m.power_factor * m.loading
                                   : m.rating * m.loading / m.efficiency;
  const double q = p * std::tan(std::acos(m.power_factor));
  return Complex{p, q} * static_cast<double>(m.count) / kBaseVa;
}

Complex LoadPower(const Load& l) { return Complex{l.p_w, l.q_var} * static_cast<double>(l.count) / kBaseVa; }

}  // namespace overtone::internal
