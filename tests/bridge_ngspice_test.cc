// tests/bridge_ngspice_test.cc — the capacitor bridges against the same circuits in ngspice.
//
// Source of every reference value here: ngspice (Debian package `ngspice`, installed by
// tools/test), a general-purpose circuit simulator. Each case is written as a netlist in SI on
// a 480 V, 100 kW, 60 Hz base, simulated in batch mode (`ngspice -b`) from a charged capacitor
// until the periodic steady state, and the last period of the phase-a (single-phase: line-pair)
// current is Fourier-analysed here. ngspice shares no code with the model: it integrates the
// circuit equations with its own variable-step method and real (if nearly ideal) diodes.
//
// Same operating point: SolveBridge tunes its DC load conductance G to reach the requested power
// but does not report G. The model's own circuit is lossless apart from r_supply, which its
// reported power already excludes (terminal power), so in the periodic steady state the power is
// all spent in the load: P = G * mean(v_C^2). G is therefore read from the model's reported
// power and its capacitor-voltage waveform, and ngspice runs with exactly that load resistor. The
// powers the two then draw are compared as a further check, not forced equal. (The alternative,
// tuning ngspice's resistor by secant re-runs, would cost runs and add its own residual.)
//
// The test can fail: doubling phase a's inductance in the netlist alone (single-phase: the
// loop's) fails every comparison in every case, the 5th moving by 2.6 to 22 points.
#include "bridge.h"

#include <catch2/catch.hpp>

#include <stdlib.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <filesystem>
#include <fstream>
#include <future>
#include <iterator>
#include <numbers>
#include <sstream>
#include <string>
#include <vector>

using namespace overtone::internal;

namespace {

constexpr double kPi = std::numbers::pi;
constexpr double kVolts = 480.0;   // base: rms line-to-line EMF, V
constexpr double kWatts = 100e3;   // base: rated input power S, W
constexpr double kHertz = 60.0;
constexpr double kOmega = 2.0 * kPi * kHertz;
constexpr double kPeriod = 1.0 / kHertz;
constexpr double kOhms = kVolts * kVolts / kWatts;  // Z_b
constexpr double kAmps = kWatts / kVolts;           // current unit S / V
constexpr int kMaxOrder = 49;                       // THDi over orders 2..49 on both sides
// DC capacitance 40 uF per kW at 480 V (a common sizing for small drives): b = w C Z_b.
const double kBdc = kOmega * 40e-6 * (kWatts / 1e3) * kOhms;

struct Case {
  const char* name;
  BridgeCircuit circuit;
  double x_supply;   // pu, per phase (single-phase: of the line-pair loop)
  double r_supply;   // pu
  double x_reactor;  // pu
  double power;      // pu
};

struct Spectrum {
  std::vector<std::complex<double>> current;  // rms cosine phasors, orders 0..kMaxOrder, pu
  double dc_voltage = 0.0;                    // mean, pu
  double power = 0.0;                         // terminal input power, pu
};

double Ratio(const Spectrum& s, int h) { return std::abs(s.current[h]) / std::abs(s.current[1]); }

double Thd(const Spectrum& s) {
  double sum = 0.0;
  for (int h = 2; h <= kMaxOrder; ++h) sum += std::norm(s.current[h]);
  return std::sqrt(sum) / std::abs(s.current[1]);
}

BridgeParameters ParametersOf(const Case& c) {
  BridgeParameters p;
  p.circuit = c.circuit;
  p.x_supply = c.x_supply;
  p.r_supply = c.r_supply;
  p.x_reactor = c.x_reactor;
  p.b_dc = kBdc;
  p.power = c.power;
  return p;
}

// Phase angle (rad) where ngspice starts. Six-pulse: 30 deg, where e_b = 0 and e_a = -e_c, so
// the DC side charged to just under the line-to-line peak, centred on the neutral, sits between
// the lines; single-phase: 60 deg, the line-pair EMF's zero.
double StartAngle(const Case& c) {
  return c.circuit == BridgeCircuit::kSinglePhase ? kPi / 3 : kPi / 6;
}

// The circuit of src/bridge.cc as a netlist. Diodes: ngspice's junction diode with N = 0.2
// (5 mV per e-fold, about 0.2 V at the peak currents here, under 0.05 % of the DC voltage), no
// series resistance (0.1 mOhm would add a fifth to the stiff cases' loop resistance and moved
// the single-phase 5th by 0.2 points), no junction capacitance or recovery: nearly ideal; steeper
// (N = 0.05) stops ngspice with "timestep too small". Integration: gear, since the trapezoidal
// rule left a period-to-period jitter of +-2 points in the 5th at light load with 5 % reactance
// that never settled. Maximum step a period / 5000 (0.07 deg); a period / 20000 moved no
// compared quantity by more than 0.003 points. The capacitor starts charged to the model's mean
// DC voltage, the inductors empty (uic), and the run lasts long enough for the start to decay
// (the test checks the last two periods agree). Phase a's EMF is sqrt(2/3) V cos(theta).
std::string Netlist(const Case& c, double load_ohms, double v_start, int periods) {
  const bool single = c.circuit == BridgeCircuit::kSinglePhase;
  const double l_henry = (c.x_supply + c.x_reactor) * kOhms / kOmega;
  const double r_ohm = std::max(c.r_supply * kOhms, 1e-6);
  const double start_deg = StartAngle(c) * 180.0 / kPi;
  std::ostringstream n;
  n.precision(10);
  n << "overtone bridge check: " << c.name << "\n";
  // Sources: amplitude * sin(w t + phase) = amplitude * cos(theta), theta = w t + start.
  std::vector<std::string> lines;
  if (single) {
    // The line pair a-b: EMF sqrt(2) V cos(theta + 30 deg); b is the ground node.
    n << "ve ea 0 SIN(0 " << std::sqrt(2.0) * kVolts << " " << kHertz << " 0 0 "
      << 90.0 + 30.0 + start_deg << ")\n";
    n << "rs ea xa " << r_ohm << "\nls xa a " << l_henry << "\n";
    lines = {"a", "0"};
  } else {
    for (int k = 0; k < 3; ++k) {
      const std::string s(1, static_cast<char>('a' + k));
      const double phase_deg = -120.0 * k;
      n << "v" << s << " e" << s << " 0 SIN(0 " << std::sqrt(2.0 / 3.0) * kVolts << " " << kHertz
        << " 0 0 " << 90.0 + phase_deg + start_deg << ")\n";
      n << "r" << s << " e" << s << " x" << s << " " << r_ohm << "\n";
      n << "l" << s << " x" << s << " " << s << " " << l_henry << "\n";
      lines.push_back(s);
    }
  }
  for (std::size_t k = 0; k < lines.size(); ++k) {
    n << "dp" << k << " " << lines[k] << " p dfast\n";
    n << "dn" << k << " n " << lines[k] << " dfast\n";
  }
  // 100 kOhm from each bridge-side line and DC rail to the neutral: a node whose diodes all block
  // is otherwise held only by diode leakage, and ngspice stops ("timestep too small"). They draw
  // under 4 mA, 2e-5 of the rated current, and hold the DC side centred on the neutral.
  for (const std::string node : {"a", "b", "c", "p", "n"}) {
    if (single && (node == "b" || node == "c")) continue;
    n << "rshunt" << node << " " << node << " 0 100k\n";
  }
  n << "cdc p n " << kBdc / kOmega / kOhms << "\n";
  n << "rload p n " << load_ohms << "\n";
  n << ".model dfast D(IS=1e-12 N=0.2)\n.options method=gear\n";
  n << ".ic v(p)=" << 0.5 * v_start << " v(n)=" << -0.5 * v_start << "\n";
  n << ".tran " << kPeriod / 5000 << " " << periods * kPeriod << " " << (periods - 2.01) * kPeriod
    << " " << kPeriod / 5000 << " uic\n";
  n << ".control\nset wr_singlescale\nrun\nwrdata out.txt i(v" << (single ? "e" : "a")
    << ") v(p,n)\n.endc\n.end\n";
  return n.str();
}

struct Simulated {
  std::string error;  // empty on success
  Spectrum last, before_last;
};

// Spectrum of one period [t0, t0 + T) of the ngspice points, linearly resampled on a uniform
// grid (the ngspice steps vary) and summed with the trapezoid rule, exact for periodic samples.
Spectrum Analyse(const std::vector<double>& t, const std::vector<double>& i,
                 const std::vector<double>& v, double t0, const Case& c) {
  constexpr int kSamples = 14400;
  const bool single = c.circuit == BridgeCircuit::kSinglePhase;
  const double emf_peak = single ? std::sqrt(2.0) : std::sqrt(2.0 / 3.0);
  const double emf_phase = single ? kPi / 6 : 0.0;
  Spectrum s;
  s.current.assign(kMaxOrder + 1, {});
  std::size_t k = 0;
  double p = 0.0;
  for (int n = 0; n < kSamples; ++n) {
    const double tn = t0 + kPeriod * n / kSamples;
    while (k + 2 < t.size() && t[k + 1] <= tn) ++k;
    const double w = (tn - t[k]) / (t[k + 1] - t[k]);
    const double in = (i[k] + w * (i[k + 1] - i[k])) / kAmps;
    const double vn = (v[k] + w * (v[k + 1] - v[k])) / kVolts;
    const double theta = kOmega * tn + StartAngle(c);
    for (int h = 1; h <= kMaxOrder; ++h) s.current[h] += in * std::polar(1.0, -h * theta);
    s.dc_voltage += vn;
    p += (emf_peak * std::cos(theta + emf_phase) - c.r_supply * in) * in;
  }
  for (auto& x : s.current) x *= std::sqrt(2.0) / kSamples;
  s.dc_voltage /= kSamples;
  s.power = (single ? 1.0 : 3.0) * p / kSamples;
  return s;
}

Simulated RunNgspice(const Case& c, double load_ohms, double v_start, int periods) {
  Simulated out;
  std::string dir = (std::filesystem::temp_directory_path() / "overtone-ngspice-XXXXXX").string();
  if (mkdtemp(dir.data()) == nullptr) return {"mkdtemp failed", {}, {}};
  std::ofstream(dir + "/case.cir") << Netlist(c, load_ohms, v_start, periods);
  const std::string command = "cd '" + dir + "' && ngspice -b case.cir > log.txt 2>&1";
  std::vector<double> t, i, v;
  // ngspice -b's exit status says nothing about the run: the written data is checked instead.
  if (std::system(command.c_str()) != -1) {
    std::ifstream in(dir + "/out.txt");
    double a, b, d;
    while (in >> a >> b >> d) {
      t.push_back(a);
      i.push_back(-b);  // ngspice's source current flows into its + node: negate for drawn
      v.push_back(d);
    }
  }
  if (t.size() < 1000 || t.back() < (periods - 1e-6) * kPeriod) {
    std::ifstream log(dir + "/log.txt");
    out.error = "ngspice failed for " + std::string(c.name) + " (in " + dir + "):\n" +
                std::string(std::istreambuf_iterator<char>(log), {});
    return out;  // keep the folder for inspection
  }
  out.last = Analyse(t, i, v, (periods - 1) * kPeriod, c);
  out.before_last = Analyse(t, i, v, (periods - 2) * kPeriod, c);
  std::filesystem::remove_all(dir);
  return out;
}

struct Compared {
  Case c;
  BridgeSolution model;
  double load_ohms = 0.0;
  Simulated spice;
};

void CheckAgainstNgspice(const std::vector<Case>& cases) {
  INFO("ngspice must be on PATH (Debian package ngspice; tools/test installs it)");
  REQUIRE(std::system("command -v ngspice > /dev/null 2>&1") == 0);
  std::vector<Compared> runs(cases.size());
  std::vector<std::future<Simulated>> jobs;
  for (std::size_t n = 0; n < cases.size(); ++n) {
    Compared& r = runs[n];
    r.c = cases[n];
    r.model = SolveBridge(ParametersOf(r.c), kMaxOrder);
    double v2 = 0.0;
    for (double v : r.model.waveform.dc_voltage) v2 += v * v;
    v2 /= static_cast<double>(r.model.waveform.dc_voltage.size());
    r.load_ohms = kOhms * v2 / r.model.power;  // 1 / G, from P = G mean(v_C^2)
    // The start decays with the load's time constant R C (the bridge conducts only briefly):
    // run 10 of them, at least 20 periods.
    const double tau = r.load_ohms * kBdc / kOmega / kOhms;
    const int periods = std::max(20, static_cast<int>(std::ceil(10.0 * tau / kPeriod)));
    jobs.push_back(std::async(std::launch::async, RunNgspice, r.c, r.load_ohms,
                              r.model.dc_voltage * kVolts, periods));
  }
  for (std::size_t n = 0; n < runs.size(); ++n) runs[n].spice = jobs[n].get();
  for (const Compared& r : runs) {
    INFO(r.c.name);
    INFO(r.spice.error);
    REQUIRE(r.spice.error.empty());
    const Spectrum& s = r.spice.last;
    const BridgeSolution& m = r.model;
    Spectrum model{m.current, m.dc_voltage, m.power};
    INFO("model:   I5/I1 " << Ratio(model, 5) << " I7/I1 " << Ratio(model, 7) << " THDi "
                           << Thd(model) << " Vdc " << m.dc_voltage << " P " << m.power
                           << " angle(I1) " << std::arg(m.current[1]) * 180 / kPi);
    INFO("ngspice: I5/I1 " << Ratio(s, 5) << " I7/I1 " << Ratio(s, 7) << " THDi " << Thd(s)
                           << " Vdc " << s.dc_voltage << " P " << s.power << " angle(I1) "
                           << std::arg(s.current[1]) * 180 / kPi);
    // Steady state reached: the last two periods agree to a tenth of the tolerances below.
    const Spectrum& b = r.spice.before_last;
    CHECK(std::abs(Ratio(s, 5) - Ratio(b, 5)) < 2e-4);
    CHECK(std::abs(Ratio(s, 7) - Ratio(b, 7)) < 2e-4);
    CHECK(std::abs(Thd(s) / Thd(b) - 1.0) < 5e-4);
    CHECK(std::abs(s.dc_voltage / b.dc_voltage - 1.0) < 2e-4);
    // Model against ngspice (the reference). The issue asks for the 5th and 7th within 2 points
    // of the fundamental and THDi within 5 % relative; the agreement allows a tenth of that
    // (largest differences seen: 0.02 points, 0.04 %), still ten times what remains from
    // ngspice's diodes and steps. (At 5 % the THDi barely moves when the circuit is perturbed:
    // 1 % for the doubled inductance above.)
    CHECK(std::abs(Ratio(model, 5) - Ratio(s, 5)) < 0.002);
    CHECK(std::abs(Ratio(model, 7) - Ratio(s, 7)) < 0.002);
    CHECK(Thd(model) == Approx(Thd(s)).epsilon(0.005));
    // Against ngspice: same load resistor, so the same DC voltage and power but for the diodes'
    // forward drop in ngspice (0.05 % seen): 0.2 %.
    CHECK(m.dc_voltage == Approx(s.dc_voltage).epsilon(0.002));
    CHECK(m.power == Approx(s.power).epsilon(0.002));
    // Against ngspice: displacement angle of the fundamental (0.01 deg seen): 0.2 deg.
    CHECK(std::abs(std::arg(m.current[1] / s.current[1])) * 180 / kPi < 0.2);
  }
}

}  // namespace

TEST_CASE("The six-pulse capacitor bridge agrees with ngspice", "[bridge][ngspice]") {
  const auto six = BridgeCircuit::kSixPulseCapacitor;
  CheckAgainstNgspice({
      {"stiff supply, no reactor, full load", six, 0.003, 0.0003, 0.0, 1.0},
      {"stiff supply, no reactor, light load", six, 0.003, 0.0003, 0.0, 0.25},
      {"1 % reactor, full load", six, 0.003, 0.0003, 0.01, 1.0},
      {"3 % reactor, light load", six, 0.003, 0.0003, 0.03, 0.25},
      {"5 % reactor, full load", six, 0.003, 0.0003, 0.05, 1.0},
      {"5 % reactor, light load", six, 0.003, 0.0003, 0.05, 0.25},
  });
}

TEST_CASE("The single-phase capacitor bridge agrees with ngspice", "[bridge][ngspice]") {
  const auto single = BridgeCircuit::kSinglePhase;
  CheckAgainstNgspice({
      {"single-phase, stiff supply, full load", single, 0.004, 0.0004, 0.0, 1.0},
      {"single-phase, 3 % reactor, light load", single, 0.004, 0.0004, 0.03, 0.25},
      {"single-phase, 5 % reactor, full load", single, 0.004, 0.0004, 0.05, 1.0},
  });
}
