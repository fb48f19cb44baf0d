// tools/synth.cc — writes realistic synthetic format-1 plants of a given size, deterministic from a seed.
//
// Usage: overtone_synth --buses N --drives M [--seed S] [--kinds K] -o plant.yaml
//
// The plant: a utility supply at a 115 kV bus; main transformers to 13.8 kV switchgear, each
// feeding medium-voltage rings (closed through a second cable back to the switchgear) or
// radials; one unit substation per ring or radial node (Dd0, Dyn11 or Dyn1) with low-voltage
// feeders (cables) to motor control centres; switched capacitor banks (some detuned); motors,
// linear loads and M drive groups drawn from K distinct kinds. Every rating is sized from the
// load it carries, so the load flow lands between about 0.95 and 1.05 pu. All names are
// invented designations. Random numbers: std::mt19937_64 with our own mapping to ranges (the
// standard distributions differ between library versions), so a seed gives the same bytes
// everywhere. The file is streamed: 100,000 buses take well under a second.
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <iostream>
#include <random>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "overtone/report.h"

namespace {

// Uniform numbers from a seeded engine, mapped by hand for portability.
class Random {
 public:
  explicit Random(std::uint64_t seed) : engine_(seed) {}
  double Unit() { return static_cast<double>(engine_() >> 11) * 0x1.0p-53; }  // [0, 1)
  double Uniform(double lo, double hi) { return lo + (hi - lo) * Unit(); }
  int Int(int lo, int hi) {  // [lo, hi]
    return lo + std::min(hi - lo, static_cast<int>(Unit() * (hi - lo + 1)));
  }
  bool Chance(double p) { return Unit() < p; }
  template <typename T>
  const T& Pick(const std::vector<T>& v) { return v[static_cast<std::size_t>(Int(0, static_cast<int>(v.size()) - 1))]; }

 private:
  std::mt19937_64 engine_;
};

// One distinct drive design: front end, reactors and unit power.
struct DriveKind {
  std::string front_end;
  std::string extra;  // further keys, already formatted (", line_reactor: 3 %")
  double unit_kw = 0.0;
};

// The first kinds are the common designs; beyond them, variants with other reactors and sizes.
std::vector<DriveKind> MakeKinds(int k) {
  const std::vector<DriveKind> base = {
      {"diode-capacitor", ", line_reactor: 3 %", 15},
      {"diode-capacitor", "", 7.5},
      {"diode-choke", ", line_reactor: 2 %", 55},
      {"thyristor", ", firing_angle: 25 deg, line_reactor: 3 %", 75},
      {"multipulse", ", pulses: 12, imbalance: 2 %", 250},
      {"active", ", displacement_pf: 1.0", 30},
      {"measured",
       ", displacement_pf: 0.97, harmonics: [{order: 5, percent: 33, angle: 160 deg}, "
       "{order: 7, percent: 12, angle: 50 deg}, {order: 11, percent: 6.5, angle: -150 deg}, "
       "{order: 13, percent: 4.5, angle: 45 deg}, {order: 17, percent: 2.8, angle: -130 deg}, "
       "{order: 19, percent: 2.1, angle: 60 deg}]",
       45},
      {"diode-capacitor", ", dc_choke: 3 %", 22},
      {"diode-capacitor", ", line_reactor: 5 %", 45},
      {"multipulse", ", pulses: 18, imbalance: 1 %", 200},
  };
  std::vector<DriveKind> kinds;
  for (int i = 0; i < k; ++i) {
    DriveKind kind = base[static_cast<std::size_t>(i) % base.size()];
    const int round = i / static_cast<int>(base.size());
    if (round > 0) {
      kind.unit_kw = std::round(kind.unit_kw * (1.0 + 0.1 * round) * 10.0) / 10.0;
      if (kind.front_end == "diode-capacitor") {  // 20..60 uF per kW, around the 40 uF/kW default
        kind.extra += fmt::format(", dc_capacitance: {} uF",
                                  std::round(kind.unit_kw * (20.0 + 10.0 * (round % 5))));
      }
    }
    kinds.push_back(kind);
  }
  return kinds;
}

// The smallest standard rating at least `needed` (kVA).
double StandardRating(double needed, const std::vector<double>& sizes) {
  for (double s : sizes)
    if (s >= needed) return s;
  return std::ceil(needed / sizes.back()) * sizes.back();
}

struct Mcc {
  std::string name;
  std::vector<int> drives;  // indices of drive groups placed here
};

struct Substation {
  std::string node;  // medium-voltage ring or radial node
  std::string uss;   // low-voltage main bus
  std::vector<Mcc> mccs;
};

struct MvSystem {
  std::string swgr;
  bool ring = false;
  std::vector<Substation> subs;
};

struct Options {
  long buses = 0;
  long drives = 0;
  std::uint64_t seed = 1;
  int kinds = 6;
  std::string out;
};

// Buses: 1 grid bus; per system 1 switchgear; per substation node + USS + MCCs.
std::vector<MvSystem> Layout(const Options& o, Random& rng) {
  std::vector<MvSystem> systems;
  long left = o.buses - 1;
  while (left > 0) {
    if (left < 4 && !systems.empty()) {  // too few for a new system: extra MCCs on the last USS
      Substation& s = systems.back().subs.back();
      for (; left > 0; --left) s.mccs.push_back({});
      break;
    }
    MvSystem sys;
    sys.ring = rng.Chance(0.5);
    --left;
    const int nsubs = sys.ring ? rng.Int(4, 12) : rng.Int(2, 6);
    for (int i = 0; i < nsubs && left >= 3; ++i) {
      Substation s;
      const long nmcc = std::min<long>(rng.Int(2, 5), left - 2);
      left -= 2 + nmcc;
      s.mccs.resize(static_cast<std::size_t>(nmcc));
      sys.subs.push_back(std::move(s));
    }
    if (sys.subs.empty()) {  // left was exactly 3 or less here: one substation takes them
      Substation s;
      s.mccs.resize(static_cast<std::size_t>(std::max<long>(1, left - 2)));
      left = 0;
      sys.subs.push_back(std::move(s));
    }
    systems.push_back(std::move(sys));
  }
  for (std::size_t m = 0; m < systems.size(); ++m) {
    MvSystem& sys = systems[m];
    sys.swgr = fmt::format("SWG-{}", m + 1);
    for (std::size_t i = 0; i < sys.subs.size(); ++i) {
      Substation& s = sys.subs[i];
      s.node = fmt::format("RMU-{}-{}", m + 1, i + 1);
      s.uss = fmt::format("USS-{}-{}", m + 1, i + 1);
      for (std::size_t j = 0; j < s.mccs.size(); ++j)
        s.mccs[j].name = fmt::format("MCC-{}-{}-{}", m + 1, i + 1, j + 1);
    }
  }
  return systems;
}

int Run(const Options& o) {
  Random rng(o.seed);
  std::vector<MvSystem> systems = Layout(o, rng);
  const std::vector<DriveKind> kinds = MakeKinds(o.kinds);

  // Place drive groups on MCCs (spread evenly, then shuffled by the seed).
  std::vector<Mcc*> mccs;
  for (MvSystem& sys : systems)
    for (Substation& s : sys.subs)
      for (Mcc& m : s.mccs) mccs.push_back(&m);
  for (long d = 0; d < o.drives; ++d) {
    const std::size_t at = static_cast<std::size_t>((d * static_cast<long>(mccs.size())) / o.drives);
    const std::size_t jitter = static_cast<std::size_t>(rng.Int(0, 2));
    mccs[std::min(mccs.size() - 1, at + jitter)]->drives.push_back(static_cast<int>(d));
  }

  fmt::memory_buffer buses, transformers, cables, capacitors, motors, loads, drives;
  const double pf_motor = 0.86;
  double plant_kva = 0.0;
  long caps = 0, motor_groups = 0, load_groups = 0;

  for (MvSystem& sys : systems) {
    fmt::format_to(std::back_inserter(buses), "  - {{name: {}, kv: 13.8 kV}}\n", sys.swgr);
    std::vector<double> sub_kva;
    for (Substation& s : sys.subs) {
      fmt::format_to(std::back_inserter(buses), "  - {{name: {}, kv: 13.8 kV}}\n", s.node);
      fmt::format_to(std::back_inserter(buses), "  - {{name: {}, kv: 0.48 kV}}\n", s.uss);
      double p_sub = 0.0, q_sub = 0.0;
      for (Mcc& m : s.mccs) {
        fmt::format_to(std::back_inserter(buses), "  - {{name: {}, kv: 0.48 kV}}\n", m.name);
        double p = 0.0, q = 0.0;
        const double group_budget_kw = std::max(8.0, 220.0 / std::max<std::size_t>(1, m.drives.size()));
        for (int d : m.drives) {
          const DriveKind& k = kinds[static_cast<std::size_t>(d % o.kinds)];  // exactly min(K, M) kinds
          const int count = std::max(1, static_cast<int>(std::floor(group_budget_kw * rng.Uniform(0.4, 1.0) / k.unit_kw)));
          const int loading = 5 * rng.Int(12, 18);  // 60..90 %
          const double kw = count * k.unit_kw * loading / 100.0;
          p += kw;
          q += kw * 0.3;
          fmt::format_to(std::back_inserter(drives),
                         "  - {{name: VFD-{}, bus: {}, count: {}, power: {} kW, loading: {} %, "
                         "front_end: {}{}}}\n",
                         d + 1, m.name, count, k.unit_kw, loading, k.front_end, k.extra);
        }
        if (rng.Chance(0.6)) {
          static const std::vector<double> sizes = {7.5, 11, 15, 18.5, 22, 30, 37, 45, 55, 75};
          const double kw = rng.Pick(sizes);
          const int count = rng.Int(1, 4);
          const int loading = 5 * rng.Int(14, 18);
          const double pin = count * kw * loading / 100.0 / 0.93;
          p += pin;
          q += pin * std::tan(std::acos(pf_motor));
          fmt::format_to(std::back_inserter(motors),
                         "  - {{name: M-{}, bus: {}, rating: {} kW, kv: 0.46 kV, count: {}, "
                         "loading: {} %, efficiency: 0.93, power_factor: {}}}\n",
                         ++motor_groups, m.name, kw, count, loading, pf_motor);
        }
        if (rng.Chance(0.5)) {
          const int kw = 5 * rng.Int(4, 24);
          const int kvar = kw / 3;
          p += kw;
          q += kvar;
          fmt::format_to(std::back_inserter(loads), "  - {{name: L-{}, bus: {}, p: {} kW, q: {} kvar}}\n",
                         ++load_groups, m.name, kw, kvar);
        }
        // The feeder: copper, sized for about 300 A per run.
        const double amps = std::hypot(p, q) * 1e3 / (std::sqrt(3.0) * 480.0);
        const int runs = std::max(1, static_cast<int>(std::ceil(amps / 300.0)));
        fmt::format_to(std::back_inserter(cables),
                       "  - {{name: F-{}, from: {}, to: {}, length: {} m, r: 0.089 ohm/km, "
                       "x: 0.10 ohm/km, runs: {}}}\n",
                       m.name, s.uss, m.name, 5 * rng.Int(4, 16), runs);
        p_sub += p;
        q_sub += q;
      }
      // The unit substation: rated for its load at about 65 %, a tap to lift the LV side.
      static const std::vector<double> uss_sizes = {300, 500, 750, 1000, 1500, 2000, 2500, 3000, 3750};
      const double kva = StandardRating(std::hypot(p_sub, q_sub) / 0.65, uss_sizes);
      static const std::vector<std::string> groups = {"Dd0", "Dyn11", "Dyn1"};
      fmt::format_to(std::back_inserter(transformers),
                     "  - {{name: T-{}, from: {}, to: {}, rating: {} kVA, impedance: 5.75 %, "
                     "x_over_r: 6, connection: {}, tap: -2.5 %}}\n",
                     s.uss, s.node, s.uss, kva, rng.Pick(groups));
      if (rng.Chance(0.6)) {  // switched bank for about half the reactive load
        // 20..35 % of the transformer rating: a plain bank's parallel resonance with the
        // transformer then sits near the 7th to 9th, as in common practice.
        const double kvar =
            50.0 * std::round(std::clamp(q_sub * 0.5, 0.2 * kva, 0.35 * kva) / 50.0);
        const int steps = rng.Int(3, 6);
        const int on = rng.Int(1, steps);
        const bool detuned = rng.Chance(0.5);
        fmt::format_to(std::back_inserter(capacitors),
                       "  - {{name: PFC-{}, bus: {}, rating: {} kvar, kv: {} kV, steps: {}, "
                       "steps_on: {}{}}}\n",
                       ++caps, s.uss, kvar, detuned ? "0.525" : "0.48", steps, on,
                       detuned ? (rng.Chance(0.5) ? ", detuning: 7 %" : ", detuning: 14 %") : "");
      }
      sub_kva.push_back(std::hypot(p_sub, q_sub));
    }
    // Medium-voltage cables: a ring closes back on the switchgear (two feeding cables).
    double sys_kva = 0.0;
    for (double k : sub_kva) sys_kva += k;
    plant_kva += sys_kva;
    auto mv_cable = [&](const std::string& name, const std::string& from, const std::string& to,
                        double kva) {
      const double amps = kva * 1e3 / (std::sqrt(3.0) * 13.8e3);
      const int runs = std::max(1, static_cast<int>(std::ceil(amps / 350.0)));
      fmt::format_to(std::back_inserter(cables),
                     "  - {{name: {}, from: {}, to: {}, length: {} m, r: 0.089 ohm/km, "
                     "x: 0.12 ohm/km, c: 0.40 uF/km, runs: {}}}\n",
                     name, from, to, 10 * rng.Int(10, 50), runs);
    };
    std::string prev = sys.swgr;
    double downstream = sys_kva;
    for (std::size_t i = 0; i < sys.subs.size(); ++i) {
      mv_cable("C-" + sys.subs[i].node, prev, sys.subs[i].node, sys.ring ? sys_kva / 2 : downstream);
      downstream -= sub_kva[i];
      prev = sys.subs[i].node;
    }
    if (sys.ring) mv_cable("C-" + sys.swgr + "-RING", prev, sys.swgr, sys_kva / 2);
    static const std::vector<double> main_sizes = {5000, 7500, 10000, 12000, 15000, 20000, 25000, 30000};
    fmt::format_to(std::back_inserter(transformers),
                   "  - {{name: T-{}, from: GRID, to: {}, rating: {} kVA, impedance: 8 %, "
                   "x_over_r: 20, connection: Dyn1, tap: -2.5 %}}\n",
                   sys.swgr, sys.swgr, StandardRating(sys_kva / 0.65, main_sizes));
  }

  // 25 times the load, within the plant format's 500..100,000 MVA.
  const double sc_mva =
      std::clamp(100.0 * std::ceil(plant_kva * 25.0 / 1e3 / 100.0), 500.0, 100000.0);
  std::string text;
  text.reserve(static_cast<std::size_t>(o.buses) * 420);
  fmt::format_to(std::back_inserter(text),
                 "# Synthetic plant written by tools/synth: {} buses, {} drive groups of {} kinds, "
                 "seed {}.\n"
                 "# Invented names and typical ratings, not data of any real site. A screening "
                 "study only: results\n# depend on the quality of the data; verify by measurement, "
                 "and follow the local code, the\n# utility's requirements and a licensed "
                 "engineer's judgment.\n"
                 "overtone: 1\n\nstudy:\n  name: Synthetic plant, {} buses, seed {}\n"
                 "  frequency: 60 Hz\n  max_order: 50\n  pcc: GRID\n\n"
                 "supplies:\n  - {{name: UTILITY, bus: GRID, short_circuit: {} MVA, x_over_r: 15, "
                 "background: [{{order: 5, percent: 0.8}}, {{order: 7, percent: 0.5}}]}}\n\n"
                 "buses:\n  - {{name: GRID, kv: 115 kV}}\n",
                 o.buses, o.drives, o.kinds, o.seed, o.buses, o.seed, sc_mva);
  auto section = [&](const char* key, const fmt::memory_buffer& b) {
    if (b.size() == 0) return;
    if (key[0] != '\0') fmt::format_to(std::back_inserter(text), "\n{}:\n", key);
    text.append(b.data(), b.size());
  };
  section("", buses);
  section("transformers", transformers);
  section("cables", cables);
  section("capacitors", capacitors);
  section("motors", motors);
  section("loads", loads);
  section("drives", drives);

  if (o.out == "-") {
    std::cout << text;
  } else {
    overtone::WriteFileAtomically(o.out, [&](std::ostream& out) { out << text; });
  }
  return 0;
}

int Usage(const std::string& why) {
  std::cerr << "error: " << why << "\n"
            << "usage: overtone_synth --buses N --drives M [--seed S] [--kinds K] -o FILE\n"
            << "  N 5..10,000,000 buses, M 0..25 N drive groups, K 1..100 distinct drive kinds\n";
  return 2;
}

}  // namespace

int main(int argc, char** argv) {
  Options o;
  bool have_buses = false, have_drives = false;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    if (i + 1 >= argc) return Usage("missing value after " + a);
    const std::string v = argv[++i];
    try {
      std::size_t used = 0;
      if (a == "-o" || a == "--out") {
        o.out = v;
        continue;
      }
      const long long n = std::stoll(v, &used);
      if (used != v.size()) return Usage("not a whole number: " + v);
      if (a == "--buses") {
        o.buses = static_cast<long>(n), have_buses = true;
      } else if (a == "--drives") {
        o.drives = static_cast<long>(n), have_drives = true;
      } else if (a == "--seed") {
        if (n < 0) return Usage("--seed must not be negative");
        o.seed = static_cast<std::uint64_t>(n);
      } else if (a == "--kinds") {
        o.kinds = static_cast<int>(n);
      } else {
        return Usage("unknown option " + a);
      }
    } catch (const std::exception&) {
      return Usage("not a whole number: " + v);
    }
  }
  if (!have_buses || !have_drives || o.out.empty()) return Usage("--buses, --drives and -o are required");
  if (o.buses < 5 || o.buses > 10'000'000) return Usage("--buses must be 5 to 10,000,000");
  if (o.kinds < 1 || o.kinds > 100) return Usage("--kinds must be 1 to 100");
  if (o.drives < 0 || o.drives > 25 * o.buses) return Usage("--drives must be 0 to 25 times --buses");
  try {
    return Run(o);
  } catch (const std::exception& e) {
    std::cerr << "error: " << e.what() << "\n";
    return 1;
  }
}
