// src/bridge.cc — rectifier circuits, their periodic steady state and the Fourier series.
//
// The six-pulse bridge: phase k has EMF e_k = sqrt(2/3) cos(theta - 2 pi k / 3) behind r + jx
// (supply plus reactor). Each phase is connected to the positive rail P (top valve on), to the
// negative rail N (bottom valve on) or to nothing. With the connected phases known the circuit is
// linear: x i_k' = e_k - r i_k - v_P (or v_N), sum of connected i_k' = 0, and on the DC side either
// v_P - v_N = v_C + x_dc i_d' with C v_C' = i_d - G v_C (capacitor link), or i_d constant
// (current-stiff link). A valve turns off when its current reaches zero and a diode turns on when
// its phase EMF passes the rail it would join; a thyristor turns on at its gate instant.
// Standard textbook circuit: N. Mohan, T. Undeland, W. Robbins, "Power Electronics", 3rd ed.,
// chapter 5 (diode rectifiers) and chapter 6 (phase-controlled rectifiers).
#include "bridge.h"

#include <array>
#include <cmath>
#include <numbers>

#include <fmt/format.h>

#include "overtone/errors.h"
#include "switched_circuit.h"

namespace overtone::internal {
namespace {

using Complex = std::complex<double>;
constexpr double kPi = std::numbers::pi;
constexpr int kSamplesPerCycle = 1440;  // 0.25 degree grid; switching instants are exact
constexpr int kVdc = 3;                  // state index of the DC capacitor voltage
const double kPhasePeak = std::sqrt(2.0 / 3.0);

SwitchingRow Unit(int i) {
  SwitchingRow r = SwitchingRow::Zero();
  r[i] = 1.0;
  return r;
}

// amplitude * cos(theta + phase) as a row acting on the oscillator states.
SwitchingRow Sinusoid(double amplitude, double phase) {
  SwitchingRow r = SwitchingRow::Zero();
  r[kCos] = amplitude * std::cos(phase);
  r[kSin] = -amplitude * std::sin(phase);
  return r;
}

// sin(theta - at): rises through zero at theta = at (a timed event).
SwitchingRow TimedRow(double at) { return Sinusoid(1.0, -at - kPi / 2.0); }

void Oscillate(StateMatrix& a) {
  a(kCos, kSin) = -1.0;
  a(kSin, kCos) = 1.0;
}

void SetTheta(StateVector& z, double theta) {
  z[kCos] = std::cos(theta);
  z[kSin] = std::sin(theta);
}

// ---- Six-pulse bridge -------------------------------------------------------------------------

using Connection = std::array<int, 3>;  // +1 on P, -1 on N, 0 open, for phases a, b, c

double PhaseOf(int k) { return -2.0 * kPi * k / 3.0; }

int Encode(const Connection& c) { return (c[0] + 1) + 3 * (c[1] + 1) + 9 * (c[2] + 1); }
Connection Decode(int id) { return {id % 3 - 1, (id / 3) % 3 - 1, (id / 9) % 3 - 1}; }

// Current flows only with a phase on each rail; anything else is the open bridge.
int Normalized(Connection c) {
  bool plus = false, minus = false;
  for (int k : c) {
    plus |= k > 0;
    minus |= k < 0;
  }
  if (!plus || !minus) c = {0, 0, 0};
  return Encode(c);
}

class SixPulseCircuit : public SwitchedCircuit {
 public:
  // `level` is the load conductance G of a capacitor link or the current I_d of a stiff link.
  SixPulseCircuit(const BridgeParameters& p, double level)
      : p_(p), x_(p.x_supply + p.x_reactor), capacitor_(p.circuit == BridgeCircuit::kSixPulseCapacitor),
        g_(capacitor_ ? level : 0.0), i_dc_(capacitor_ ? 0.0 : level) {}

  Topology Build(int id) const override {
    const Connection c = Decode(id);
    Topology t;
    Oscillate(t.a);
    std::vector<int> on;
    for (int k = 0; k < 3; ++k) {
      if (c[k] != 0) on.push_back(k);
    }
    if (on.empty()) {
      if (capacitor_) t.a(kVdc, kVdc) = -g_ / p_.b_dc;
      t.output = capacitor_ ? Unit(kVdc) : SwitchingRow::Zero();
      for (int hi = 0; hi < 3; ++hi) {
        for (int lo = 0; lo < 3; ++lo) {
          if (hi == lo) continue;
          Connection n{0, 0, 0};
          n[hi] = 1;
          n[lo] = -1;
          SwitchingRow row = Emf(hi) - Emf(lo);
          if (capacitor_) row -= Unit(kVdc);
          if (p_.thyristor) continue;  // a stiff thyristor bridge never opens completely
          t.Add(row, Encode(n));
        }
      }
      return t;
    }
    // Unknowns: i_k' for the connected phases, then v_P, v_N; each a linear function of z.
    const int m = static_cast<int>(on.size());
    Eigen::MatrixXd lhs = Eigen::MatrixXd::Zero(m + 2, m + 2);
    Eigen::MatrixXd rhs = Eigen::MatrixXd::Zero(m + 2, kStateSize);
    for (int j = 0; j < m; ++j) {
      const int k = on[j];
      lhs(j, j) = x_;
      lhs(j, c[k] > 0 ? m : m + 1) = 1.0;
      rhs.row(j) = Emf(k) - p_.r_supply * Unit(k);
      lhs(m, j) = 1.0;  // the connected currents sum to zero
    }
    if (capacitor_) {  // v_P - v_N - x_dc i_d' = v_C
      lhs(m + 1, m) = 1.0;
      lhs(m + 1, m + 1) = -1.0;
      for (int j = 0; j < m; ++j) {
        if (c[on[j]] > 0) lhs(m + 1, j) = -p_.x_dc;
      }
      rhs.row(m + 1) = Unit(kVdc);
    } else {  // i_d' = 0
      for (int j = 0; j < m; ++j) {
        if (c[on[j]] > 0) lhs(m + 1, j) = 1.0;
      }
    }
    const Eigen::MatrixXd solved = lhs.fullPivLu().solve(rhs);
    for (int j = 0; j < m; ++j) t.a.row(on[j]) = solved.row(j);
    const SwitchingRow v_p = solved.row(m), v_n = solved.row(m + 1);
    if (capacitor_) {
      for (int k : on) {
        if (c[k] > 0) t.a(kVdc, k) = 1.0 / p_.b_dc;
      }
      t.a(kVdc, kVdc) = -g_ / p_.b_dc;
    }
    t.output = v_p - v_n;
    for (int k = 0; k < 3; ++k) {
      Connection n = c;
      if (c[k] != 0) {  // the valve carrying this phase turns off at zero current
        n[k] = 0;
        t.Add(c[k] > 0 ? SwitchingRow(-Unit(k)) : Unit(k), Normalized(n));
        continue;
      }
      n[k] = 1;
      const int to_top = Normalized(n);
      n[k] = -1;
      const int to_bottom = Normalized(n);
      if (p_.thyristor) {
        t.Add(TimedRow(GateAngle(k, true)), to_top, true);
        t.Add(TimedRow(GateAngle(k, false)), to_bottom, true);
      } else {
        t.Add(Emf(k) - v_p, to_top);
        t.Add(v_n - Emf(k), to_bottom);
      }
    }
    return t;
  }

  // Open phases carry exactly zero; the connected currents keep summing to zero (and to I_d on
  // each rail of a stiff link), so round-off at the switching instants cannot accumulate.
  void Enter(int id, StateVector& z) const override {
    const Connection c = Decode(id);
    for (int k = 0; k < 3; ++k) {
      if (c[k] == 0) z[k] = 0.0;
    }
    for (int rail : {1, -1}) {
      int largest = -1;
      double sum = 0.0;
      for (int k = 0; k < 3; ++k) {
        if (c[k] != rail) continue;
        sum += z[k];
        if (largest < 0 || std::abs(z[k]) > std::abs(z[largest])) largest = k;
      }
      if (largest < 0) continue;
      if (capacitor_ && rail < 0) continue;  // one rail suffices: it is matched to the other
      const double target = capacitor_ ? -RailCurrent(c, z, -1) : rail * i_dc_;
      z[largest] += target - sum;
    }
  }

  static double RailCurrent(const Connection& c, const StateVector& z, int rail) {
    double sum = 0.0;
    for (int k = 0; k < 3; ++k) {
      if (c[k] == rail) sum += z[k];
    }
    return sum;
  }

  // Gate instant of a valve: its natural commutation point (where its EMF becomes the highest,
  // or the lowest) plus the firing delay.
  double GateAngle(int k, bool top) const {
    const double peak = -PhaseOf(k);
    return peak + (top ? -kPi / 3.0 : 2.0 * kPi / 3.0) + p_.firing_deg * kPi / 180.0;
  }

  // The six-pulse pattern repeats every 60 degrees with the phases relabelled and the polarity
  // reversed: x(theta + 60) = P x(theta), (P x)_a = -x_b. Maps a state at theta0 + 60 back.
  static void Rotate(StateVector& z, int& id, double theta0) {
    const StateVector old = z;
    z[0] = -old[2];
    z[1] = -old[0];
    z[2] = -old[1];
    SetTheta(z, theta0);
    const Connection c = Decode(id);
    id = Encode({-c[2], -c[0], -c[1]});
  }

  static SwitchingRow Emf(int k) { return Sinusoid(kPhasePeak, PhaseOf(k)); }

 private:
  BridgeParameters p_;
  double x_;
  bool capacitor_;
  double g_;
  double i_dc_;
};

// ---- Single-phase bridge on one line pair -----------------------------------------------------
// State: z[0] = bridge current i >= 0, z[3] = v_C. Topology 0 open, 1 conducting with the line
// pair voltage positive, 2 with it negative. EMF e = sqrt(2) cos(theta + 30 deg) (line a to b).

class SinglePhaseCircuit : public SwitchedCircuit {
 public:
  SinglePhaseCircuit(const BridgeParameters& p, double g_load) : p_(p), g_(g_load) {}

  Topology Build(int id) const override {
    Topology t;
    Oscillate(t.a);
    t.a(kVdc, kVdc) = -g_ / p_.b_dc;
    t.output = Unit(kVdc);
    if (id == 0) {
      t.Add(Emf() - Unit(kVdc), 1);
      t.Add(-Emf() - Unit(kVdc), 2);
      return t;
    }
    const double sign = id == 1 ? 1.0 : -1.0;
    const double x = p_.x_supply + p_.x_reactor + p_.x_dc;
    t.a.row(0) = (sign * Emf() - p_.r_supply * Unit(0) - Unit(kVdc)) / x;
    t.a(kVdc, 0) = 1.0 / p_.b_dc;
    t.Add(-Unit(0), 0);
    return t;
  }

  void Enter(int id, StateVector& z) const override {
    if (id == 0) z[0] = 0.0;
  }

  static SwitchingRow Emf() { return Sinusoid(std::sqrt(2.0), kPi / 6.0); }
  static double Sign(int id) { return id == 1 ? 1.0 : (id == 2 ? -1.0 : 0.0); }

  // Half-wave symmetry: the same bridge state with the line pair's polarity reversed.
  static void Rotate(StateVector& z, int& id, double theta0) {
    SetTheta(z, theta0);
    id = id == 0 ? 0 : 3 - id;
  }

 private:
  BridgeParameters p_;
  double g_;
};

// ---- Periodic steady state ----------------------------------------------------------------------

struct PeriodicState {
  StateVector z = StateVector::Zero();
  int topology = 0;
};

constexpr int kCircuitStates = 4;
using CircuitStates = Eigen::Matrix<double, kCircuitStates, 1>;

// The Jacobian of F(x) - x below, kept between the solves of one circuit at neighbouring levels:
// a step with a kept Jacobian costs one segment, a fresh finite-difference one five.
struct ShootingJacobian {
  Eigen::Matrix<double, kCircuitStates, kCircuitStates> matrix;
  bool valid = false;
};

// Finds the fixed point of the symmetry segment map F(x) = R(Phi(x)) (Phi: one segment of the
// circuit, R: the symmetry that maps its end back to theta0) by Newton's method on F(x) - x with
// a finite-difference Jacobian (shooting; e.g. T. J. Aprille, T. N. Trick, Proc. IEEE 60(1),
// 1972), after two plain iterations for a good start. A Jacobian kept from a neighbouring level
// is reused and corrected by Broyden's update (C. G. Broyden, Math. Comp. 19(92), 1965) while
// it halves the residual at each step, and computed afresh otherwise. A fresh step that does not
// reduce the residual falls back to the plain iteration, which contracts for these damped
// circuits.
template <typename RotateFn>
PeriodicState FindPeriodicState(Simulator& sim, PeriodicState x, int steps_per_segment,
                                double theta0, RotateFn rotate, ShootingJacobian& jacobian,
                                double tolerance) {
  const auto segment = [&](PeriodicState s) {
    sim.Settle(s.z, s.topology);
    sim.Run(s.z, s.topology, steps_per_segment);
    rotate(s.z, s.topology, theta0);
    sim.Settle(s.z, s.topology);
    return s;
  };
  const auto residual = [](const PeriodicState& from, const PeriodicState& to) -> CircuitStates {
    return (to.z - from.z).head<kCircuitStates>();
  };
  sim.Settle(x.z, x.topology);
  PeriodicState y = segment(x);
  CircuitStates r = residual(x, y);
  for (int n = 0; n < 200; ++n) {
    const double scale = std::max(1.0, y.z.head<kCircuitStates>().lpNorm<Eigen::Infinity>());
    const double size = r.lpNorm<Eigen::Infinity>();
    if (size < tolerance * scale) return y;
    const bool fresh = !jacobian.valid;
    if (fresh && n < 2) {
      x = y;
      y = segment(x);
      r = residual(x, y);
      continue;
    }
    if (fresh) {
      for (int j = 0; j < kCircuitStates; ++j) {
        PeriodicState xp = x;
        const double delta = 1e-7 * std::max(1.0, std::abs(x.z[j]));
        xp.z[j] += delta;
        jacobian.matrix.col(j) = (residual(xp, segment(xp)) - r) / delta;
      }
      jacobian.valid = true;
    }
    const CircuitStates step = -jacobian.matrix.fullPivLu().solve(r);
    PeriodicState trial = x;
    trial.z.head<kCircuitStates>() += step;
    const PeriodicState trial_end = segment(trial);
    const CircuitStates trial_residual = residual(trial, trial_end);
    const double trial_size = trial_residual.lpNorm<Eigen::Infinity>();
    if (step.allFinite() && trial_size < size) {
      jacobian.matrix += (trial_residual - r - jacobian.matrix * step) * step.transpose() /
                         step.squaredNorm();
      if (!fresh && trial_size > 0.5 * size) jacobian.valid = false;
      x = trial;
      y = trial_end;
      r = trial_residual;
    } else if (fresh) {
      jacobian.valid = false;
      x = y;
      y = segment(x);
      r = residual(x, y);
    } else {
      jacobian.valid = false;  // retried from x with a fresh one
    }
  }
  throw SolveError("bridge simulation: no periodic steady state after 200 shooting steps");
}

// Fourier series of one period given by its first symmetry segment, as sampled by SampleCycle:
// points at offsets t_n from the segment's start (0 .. 2 pi / segments) with each phase's line
// current there; segment k of the period carries phase k % phases of the first with the sign
// (-1)^k. The result is the rms cosine phasors X_h = 1/(sqrt(2) pi) * integral x(theta)
// exp(-j h theta) dtheta of phase a's piecewise-linear interpolant through those points, each
// piece integrated exactly. Switching instants are among the points, so the kinks of the
// waveform are resolved exactly rather than smeared over a grid step. Summed by parts, so that
// each point enters once per order, through its jump in value and its change of slope.
std::vector<Complex> FourierSeries(const std::vector<double>& offset,
                                   const std::vector<std::array<double, 3>>& current,
                                   int segments, int phases, double theta0, int max_order) {
  // Over a piece [n, n+1] of width w and slope s, with a = -j h:
  //   integral = (x_{n+1} e_{n+1} - x_n e_n) / a - s (e_{n+1} - e_n) / a^2,
  // so point k gathers alpha_k = x_k (end of the piece before) - x_k (start of the one after)
  // and beta_k = s (piece before) - s (piece after); zero-width pieces are left out.
  const std::size_t points = offset.size();
  std::vector<std::array<double, 3>> alpha(points), beta(points);  // zeros
  for (std::size_t n = 0; n + 1 < points; ++n) {
    const double width = offset[n + 1] - offset[n];
    if (width <= 0.0) continue;
    for (int m = 0; m < 3; ++m) {
      const double slope = (current[n + 1][m] - current[n][m]) / width;
      alpha[n + 1][m] += current[n + 1][m];
      alpha[n][m] -= current[n][m];
      beta[n + 1][m] += slope;
      beta[n][m] -= slope;
    }
  }
  // Segment k + segments / 2 is segment k shifted by half a period with the opposite sign (the
  // symmetry the periodic state is found with, section 4 of docs/bridge-model.md): the even
  // orders vanish and each odd one is twice the sum over the first half period. exp(-j h t_n)
  // comes by repeated products with exp(-2j t_n), real and imaginary parts apart so that the
  // loop vectorises (a std::complex product checks for infinities and does not).
  std::vector<Complex> out(static_cast<std::size_t>(max_order) + 1);
  std::vector<double> step_re(points), step_im(points), re(points), im(points);
  for (std::size_t n = 0; n < points; ++n) {
    // exp(+j t_n), one step before order 1; exp(-2j t_n) from it by the double-angle formulas.
    const double c = std::cos(offset[n]), s = std::sin(offset[n]);
    re[n] = c;
    im[n] = s;
    step_re[n] = (c - s) * (c + s);
    step_im[n] = -2.0 * c * s;
  }
  const double segment_width = 2.0 * kPi / segments;
  for (int h = 1; h <= max_order; h += 2) {
    std::array<double, 3> a_re = {}, a_im = {}, b_re = {}, b_im = {};
    for (std::size_t n = 0; n < points; ++n) {
      const double next_re = re[n] * step_re[n] - im[n] * step_im[n];
      im[n] = re[n] * step_im[n] + im[n] * step_re[n];
      re[n] = next_re;
      for (int m = 0; m < 3; ++m) {
        a_re[m] += alpha[n][m] * re[n];
        a_im[m] += alpha[n][m] * im[n];
        b_re[m] += beta[n][m] * re[n];
        b_im[m] += beta[n][m] * im[n];
      }
    }
    Complex sum;
    for (int k = 0; k < segments / 2; ++k) {
      const int m = k % phases;
      // 1/a = j/h and 1/a^2 = -1/h^2: a segment's integral = (j/h) A + (1/h^2) B.
      const Complex segment = Complex{0.0, 1.0 / h} * Complex{a_re[m], a_im[m]} +
                              Complex{b_re[m], b_im[m]} / (static_cast<double>(h) * h);
      const double sign = k % 2 == 0 ? 1.0 : -1.0;
      sum += sign * std::polar(1.0, -h * (theta0 + k * segment_width)) * segment;
    }
    out[h] = 2.0 * sum / (std::sqrt(2.0) * kPi);
  }
  return out;
}

// One period from a periodic state: spectrum, power, DC voltage and waveform. Only one symmetry
// segment is simulated: the six-pulse bridge's phase a over the segments of 60 deg is a, -b, c,
// -a, b, -c of the first (the relabelling of SixPulseCircuit::Rotate), the single-phase bridge's
// line current over two half periods i, -i; the DC voltage repeats.
BridgeSolution SampleCycle(const BridgeParameters& p, Simulator& sim, PeriodicState x,
                           double theta0, int max_order) {
  const bool single_phase = p.circuit == BridgeCircuit::kSinglePhase;
  const int phases = single_phase ? 1 : 3;
  const int segments = single_phase ? 2 : 6;
  const int steps = kSamplesPerCycle / segments;
  const double dt = 2.0 * kPi / kSamplesPerCycle;
  // Line current and terminal voltage of each phase (single-phase: the line pair) at a state.
  const auto current = [&](const StateVector& z, int id, int m) {
    return single_phase ? SinglePhaseCircuit::Sign(id) * z[0] : z[m];
  };
  const auto emf = [&](int m) {
    return single_phase ? SinglePhaseCircuit::Emf() : SixPulseCircuit::Emf(m);
  };
  // One segment's points: offset from theta0, phase currents, and for grid points (not switching
  // instants) the phase terminal voltages and the DC voltage.
  struct Point {
    double offset;
    std::array<double, 3> i, v;
    double v_dc;
    bool grid;
  };
  std::vector<Point> seg;
  seg.reserve(static_cast<std::size_t>(steps) * 5 / 4);
  const auto state_point = [&](double offset, const StateVector& z, int id) {
    Point q{offset, {}, {}, 0.0, false};
    for (int m = 0; m < phases; ++m) q.i[m] = current(z, id, m);
    return q;
  };
  seg.push_back(state_point(0.0, x.z, x.topology));
  BridgeSolution s;
  double power = 0.0, dc = 0.0;
  int conducting = 0, overlapping = 0;
  double theta = 0.0;
  const auto on_switch = [&](double offset, const StateVector& z, int id) {
    seg.push_back(state_point(theta + offset, z, id));
  };
  const auto on_sample = [&](const StateVector& z, int id) {
    theta += dt;
    const Topology& t = sim.TopologyOf(id);
    const StateVector dz = t.a * z;
    Point q = state_point(theta, z, id);
    q.grid = true;
    q.v_dc = p.circuit == BridgeCircuit::kSixPulseStiff ? t.output.dot(z) : z[kVdc];
    for (int m = 0; m < phases; ++m) {
      const double e = emf(m).dot(z);
      q.v[m] = e - p.r_supply * q.i[m] - p.x_supply * current(dz, id, m);
      power += e * q.i[m] - p.r_supply * q.i[m] * q.i[m];
      conducting += std::abs(q.i[m]) > 1e-9;
      s.peak_current = std::max(s.peak_current, std::abs(q.i[m]));
    }
    dc += q.v_dc;
    if (!single_phase) {
      const Connection c = Decode(id);
      overlapping += c[0] != 0 && c[1] != 0 && c[2] != 0;
    }
    seg.push_back(q);
  };
  sim.Run(x.z, x.topology, steps, on_sample, on_switch);

  BridgeWaveform& w = s.waveform;
  for (std::vector<double>* v : {&w.theta, &w.line_current, &w.terminal_voltage, &w.dc_voltage}) {
    v->reserve(kSamplesPerCycle);
  }
  for (int k = 0; k < segments; ++k) {
    const int m = k % phases;
    const double sign = k % 2 == 0 ? 1.0 : -1.0;
    const double start = theta0 + k * (2.0 * kPi / segments);
    for (std::size_t n = 1; n < seg.size(); ++n) {
      const Point& q = seg[n];
      if (!q.grid) continue;
      w.theta.push_back(start + q.offset);
      w.line_current.push_back(sign * q.i[m]);
      w.terminal_voltage.push_back(sign * q.v[m]);
      w.dc_voltage.push_back(q.v_dc);
    }
  }
  // Sums over the segment's phases stand for the period's phase a: each phase serves
  // segments / phases segments.
  s.power = power / steps;
  s.dc_voltage = dc / steps;
  s.conduction_deg = 180.0 * conducting * (segments / phases) / kSamplesPerCycle;
  s.overlap_deg = 360.0 * overlapping * segments / kSamplesPerCycle / 6.0;
  std::vector<double> offset(seg.size());
  std::vector<std::array<double, 3>> phase_currents(seg.size());
  for (std::size_t n = 0; n < seg.size(); ++n) {
    offset[n] = seg[n].offset;
    phase_currents[n] = seg[n].i;
  }
  s.current = FourierSeries(offset, phase_currents, segments, phases, theta0, max_order);
  s.pattern_points = 1 + segments * (seg.size() - 1);
  return s;
}

// The terminal input power at a periodic state, averaged over one symmetry segment (the
// three-phase sum, or the line pair's power, repeats from segment to segment).
BridgeSolution SegmentPower(const BridgeParameters& p, Simulator& sim, PeriodicState x, int steps) {
  const bool single_phase = p.circuit == BridgeCircuit::kSinglePhase;
  double power = 0.0;
  sim.Run(x.z, x.topology, steps, [&](const StateVector& z, int id) {
    if (single_phase) {
      const double i = SinglePhaseCircuit::Sign(id) * z[0];
      power += SinglePhaseCircuit::Emf().dot(z) * i - p.r_supply * i * i;
      return;
    }
    for (int k = 0; k < 3; ++k) power += SixPulseCircuit::Emf(k).dot(z) * z[k] - p.r_supply * z[k] * z[k];
  });
  BridgeSolution s;
  s.power = power / steps;
  return s;
}

// Steady state for one value of the free parameter (load conductance or DC current): with
// `sampled`, the full period's samples and figures; otherwise the power alone.
BridgeSolution Evaluate(const BridgeParameters& p, double parameter, PeriodicState& warm,
                        ShootingJacobian& jacobian, bool sampled, int max_order) {
  // The power alone, for a secant step, needs the state to less than its 1e-7 tolerance; the
  // sampled period, to round-off.
  const double tolerance = sampled ? 1e-11 : 1e-9;
  const double dt = 2.0 * kPi / kSamplesPerCycle;
  if (p.circuit == BridgeCircuit::kSinglePhase) {
    SinglePhaseCircuit circuit(p, parameter);
    Simulator sim(circuit, dt);
    warm = FindPeriodicState(sim, warm, kSamplesPerCycle / 2, 0.0, SinglePhaseCircuit::Rotate,
                             jacobian, tolerance);
    return sampled ? SampleCycle(p, sim, warm, 0.0, max_order) : SegmentPower(p, sim, warm, kSamplesPerCycle / 2);
  }
  SixPulseCircuit circuit(p, parameter);
  Simulator sim(circuit, dt);
  // Start midway between natural commutation points (multiples of 60 degrees, delayed by the
  // firing angle), where the segment map is smooth.
  const double theta0 = kPi / 6.0 + p.firing_deg * kPi / 180.0;
  if (p.circuit == BridgeCircuit::kSixPulseStiff) {
    // Phase a on the top rail and c on the bottom carry the DC current at theta0; only the
    // level changes between evaluations.
    warm.z = StateVector::Zero();
    warm.z[0] = parameter;
    warm.z[2] = -parameter;
    warm.topology = Encode({1, 0, -1});
  }
  SetTheta(warm.z, theta0);
  warm = FindPeriodicState(sim, warm, kSamplesPerCycle / 6, theta0, SixPulseCircuit::Rotate,
                           jacobian, tolerance);
  return sampled ? SampleCycle(p, sim, warm, theta0, max_order) : SegmentPower(p, sim, warm, kSamplesPerCycle / 6);
}

// The free parameter that reaches the requested power: the DC load conductance (P ~ G V_dc^2,
// V_dc ~ 1.35 V) or the DC current (P ~ 1.35 V cos(alpha) I_d), by secant steps.
BridgeSolution ReachPower(const BridgeParameters& p, int max_order, const BridgeStart* from) {
  const bool stiff = p.circuit == BridgeCircuit::kSixPulseStiff;
  PeriodicState warm;
  ShootingJacobian jacobian;
  if (!stiff) warm.z[kVdc] = std::sqrt(2.0);  // open bridge, DC link at the line-to-line peak
  if (p.power <= 0.0) return Evaluate(p, stiff ? 0.0 : 1e-9, warm, jacobian, true, max_order);
  double x0 = stiff ? p.power / (1.35 * std::cos(p.firing_deg * kPi / 180.0))
                    : p.power / (1.35 * 1.35);
  // The power grows about as the level to the power `elasticity` (1 at first: P ~ G V_dc^2 or
  // P ~ V_dc I_d), which a neighbouring solution tells more exactly.
  double elasticity = 1.0;
  if (from != nullptr && from->power > 0.0 && from->level > 0.0) {
    elasticity = from->elasticity;
    x0 = from->level * std::pow(p.power / from->power, 1.0 / elasticity);
    for (int k = 0; k < 4; ++k) warm.z[k] = from->state[k];
    warm.topology = from->topology;
    std::copy(from->jacobian.begin(), from->jacobian.end(), jacobian.matrix.data());
    jacobian.valid = from->has_jacobian;
  }
  double p0 = Evaluate(p, x0, warm, jacobian, false, max_order).power;
  double x1 = x0 * std::pow(p.power / std::max(p0, 1e-12), 1.0 / elasticity);
  PeriodicState at_x0 = warm;
  for (int it = 0; it < 40; ++it) {
    const double p1 = Evaluate(p, x1, warm, jacobian, false, max_order).power;
    // The period is sampled once, at the level found (its steady state is already in `warm`).
    if (std::abs(p1 - p.power) <= 1e-9 + 1e-7 * p.power) {
      BridgeSolution s = Evaluate(p, x1, warm, jacobian, true, max_order);
      s.start = {x1, p1, {warm.z[0], warm.z[1], warm.z[2], warm.z[3]}, warm.topology};
      std::copy(jacobian.matrix.data(), jacobian.matrix.data() + 16, s.start.jacobian.begin());
      s.start.has_jacobian = jacobian.valid;
      const double found = std::log(p1 / p0) / std::log(x1 / x0);
      if (std::isfinite(found) && found > 0.1 && found < 10.0) s.start.elasticity = found;
      return s;
    }
    const double slope = (p1 - p0) / (x1 - x0);
    double x2 = slope > 0.0 ? x1 + (p.power - p1) / slope : 2.0 * x1;
    x2 = std::clamp(x2, 0.25 * x1, 4.0 * x1);
    // The periodic state moves about linearly with the level: the next one starts extrapolated
    // from the last two (in one topology), a step or two nearer than the last.
    const PeriodicState at_x1 = warm;
    if (at_x0.topology == warm.topology) {
      warm.z.head<kCircuitStates>() += (x2 - x1) / (x1 - x0) *
                                      (at_x1.z - at_x0.z).head<kCircuitStates>();
    }
    at_x0 = at_x1;
    x0 = x1;
    p0 = p1;
    x1 = x2;
  }
  throw SolveError(fmt::format(
      "bridge model: the front end cannot draw {:.3g} of its rating from this supply (it reaches "
      "{:.3g}); the supply is too weak for the drive's power, or the firing angle too large",
      p.power, p0));
}

}  // namespace

BridgeSolution SolveBridge(const BridgeParameters& p, int max_order, const BridgeStart* from) {
  return ReachPower(p, max_order, from);
}

}  // namespace overtone::internal
