// src/bridge_table.cc — bridge solutions interpolated on a lattice of shared nodes.
#include "bridge_table.h"

#include <algorithm>
#include <cmath>

#include "overtone/errors.h"

namespace overtone::internal {
namespace {

using Complex = std::complex<double>;

// Rounds to 12 significant digits: the same front end computed from different group sizes
// differs only in the last bits, and must land on the same nodes.
double Rounded(double v) {
  if (v == 0.0 || !std::isfinite(v)) return v;
  const double scale = std::pow(10.0, 11 - static_cast<int>(std::floor(std::log10(std::abs(v)))));
  return std::round(v * scale) / scale;
}

// Lagrange weights of the nodes first .. first + n - 1 at position t (all in lattice steps).
template <int n>
std::array<double, n> Lagrange(int first, double t) {
  std::array<double, n> w;
  for (int k = 0; k < n; ++k) {
    w[k] = 1.0;
    for (int m = 0; m < n; ++m) {
      if (m != k) w[k] *= (t - (first + m)) / static_cast<double>(k - m);
    }
  }
  return w;
}

// Nodes first .. first + count - 1 along one lattice direction and their interpolation weights;
// for a cubic also the weights of the difference between its two inner quadratics, which is
// large where the solution bends sharply between the nodes.
struct Stencil {
  int first = 0;
  int count = 1;
  std::array<double, 4> weight = {1.0, 0.0, 0.0, 0.0};
  std::array<double, 4> check = {};
};

Stencil Cubic(double t) {
  Stencil s;
  s.first = static_cast<int>(std::floor(t)) - 1;
  s.count = 4;
  s.weight = Lagrange<4>(s.first, t);
  const std::array<double, 3> q1 = Lagrange<3>(s.first, t), q2 = Lagrange<3>(s.first + 1, t);
  s.check = {q1[0], q1[1] - q2[0], q1[2] - q2[1], -q2[2]};
  return s;
}

Stencil Linear(double t) {
  Stencil s;
  s.first = static_cast<int>(std::floor(t));
  s.count = 2;
  s.weight = {s.first + 1 - t, t - s.first, 0.0, 0.0};
  return s;
}

Stencil Quadratic(double t) {
  Stencil s;
  s.first = static_cast<int>(std::lround(t)) - 1;
  s.count = 3;
  const std::array<double, 3> w = Lagrange<3>(s.first, t);
  s.weight = {w[0], w[1], w[2], 0.0};
  return s;
}

// The cubic is trusted where its two inner quadratics agree within 0.1 percentage points of the
// fundamental at every order: half the 0.2 points DESIGN.md section 4 allows the interpolation.
constexpr double kKinkLimit = 1e-3;

// Below this |Z| P (per unit of the group) a capacitor bridge without reactor rings against the
// supply and its pulses split (docs/bridge-model.md section 8): solved directly.
constexpr double kStiffestSupply = 2e-3;

}  // namespace

BridgeParameters OnEmfBase(BridgeParameters p, double emf) {
  const double e2 = emf * emf;
  p.r_supply /= e2;
  p.x_supply /= e2;
  p.x_reactor /= e2;
  p.x_dc /= e2;
  p.b_dc *= e2;
  return p;
}

BridgeTable::BridgeTable(int max_order, bool keep_waveforms)
    : max_order_(max_order), keep_waveforms_(keep_waveforms) {
  for (int h = 1; h <= max_order; h += 2) {
    if (h % 3 != 0) carried_.push_back(static_cast<std::size_t>(h));
  }
}

std::size_t BridgeTable::KeyHash::operator()(const std::pair<Kind, Index>& key) const {
  std::size_t h = 0;
  const auto mix = [&h](std::size_t v) { h ^= v + 0x9e3779b97f4a7c15ULL + (h << 6) + (h >> 2); };
  for (const double k : key.first) mix(std::hash<double>{}(k));
  for (const int i : key.second) mix(std::hash<int>{}(i));
  return h;
}

int BridgeTable::solved_nodes() const {
  std::size_t count = 0;
  for (const Shard& shard : shards_) {
    std::lock_guard lock(shard.mutex);
    count += shard.nodes.size();
  }
  return static_cast<int>(count);
}

const BridgeTable::Node& BridgeTable::Solved(const Kind& kind, Index index) {
  // A node of a finer lattice that lies on a coarser one is the coarser node.
  while (index[0] > 0 && index[1] % 2 == 0 && index[2] % 2 == 0 && index[3] % 2 == 0) {
    index = {index[0] - 1, index[1] / 2, index[2] / 2, index[3] / 2};
  }
  const std::pair<Kind, Index> key = {kind, index};
  const std::size_t hash = KeyHash{}(key);
  Shard& shard = shards_[hash % kShards];
  Node* node;
  {
    std::lock_guard lock(shard.mutex);
    std::unique_ptr<Node>& slot = shard.nodes[key];
    if (!slot) slot = std::make_unique<Node>();
    node = slot.get();
  }
  if (node->ready.load(std::memory_order_acquire)) return *node;  // the common case, no lock
  // One thread solves a node while any other needing it waits: the node's numbers depend only
  // on its key, never on which thread got there first.
  std::lock_guard lock(node->mutex);
  if (node->done) return *node;
  node->done = true;
  node->failed = true;  // until its solution is in place, whatever escapes below
  SolveNode(kind, index, *node);
  node->ready.store(true, std::memory_order_release);
  return *node;
}

void BridgeTable::SolveNode(const Kind& kind, const Index& index, Node& node) {
  BridgeParameters p;
  p.circuit = static_cast<BridgeCircuit>(kind[0]);
  p.thyristor = kind[1] != 0.0;
  p.firing_deg = kind[2];
  p.x_dc = kind[3];
  p.b_dc = kind[4];
  const double refine = std::ldexp(1.0, index[0]);
  p.power = std::exp(index[3] * kStepW / refine);
  const double z = std::exp(index[1] * kStepU / refine) / p.power;
  const double phi = std::atan(std::exp(index[2] * kStepV / refine));  // arg Z from ln(X/R)
  p.r_supply = z * std::cos(phi);
  p.x_supply = z * std::sin(phi);
  // Finer nodes start from the coarse node nearest to them (a fixed choice: the result does not
  // depend on which nodes happen to be solved already).
  const BridgeStart* from = nullptr;
  if (index[0] > 0) {
    const double coarser = std::ldexp(1.0, -index[0]);
    const Node& parent = Solved(kind, {0, static_cast<int>(std::lround(index[1] * coarser)),
                                       static_cast<int>(std::lround(index[2] * coarser)),
                                       static_cast<int>(std::lround(index[3] * coarser))});
    if (!parent.failed) from = &parent.start;
  }
  BridgeSolution s;
  try {
    s = SolveBridge(p, max_order_, from);
  } catch (const SolveError&) {  // e.g. a node beyond what the supply can deliver
    return;
  }
  node.fundamental = s.current[1];
  const double a1 = std::arg(s.current[1]), m1 = std::abs(s.current[1]);
  node.relative.resize(s.current.size());
  for (std::size_t h = 0; h < s.current.size(); ++h) {
    node.relative[h] = s.current[h] * std::polar(1.0 / m1, -static_cast<double>(h) * a1);
  }
  node.pattern = s.pattern_points;
  node.start = s.start;
  node.dc_voltage = s.dc_voltage;
  node.peak_current = s.peak_current;
  node.conduction_deg = s.conduction_deg;
  node.overlap_deg = s.overlap_deg;
  if (keep_waveforms_) node.waveform = std::move(s.waveform);
  node.failed = false;
}

std::optional<BridgeTable::Blend> BridgeTable::BlendAt(const Kind& kind, const Point& at,
                                                         int level) {
  const double refine = std::ldexp(1.0, level);
  const double tu = at.u / kStepU * refine, tv = at.v / kStepV * refine;
  const double tw = at.w / kStepW * refine;
  // Cubic in u and w (quadratic in v) on the coarse lattice, quadratic on the next, linear on the
  // finest: the finer the lattice, the smaller the stencil, the nearer a kink may pass.
  const auto stencil = [level](double t, bool cubic) {
    return level == 0 ? (cubic ? Cubic(t) : Quadratic(t)) : level == 1 ? Quadratic(t) : Linear(t);
  };
  const Stencil su = stencil(tu, true), sv = stencil(tv, false);
  const Stencil sw = at.scale_free ? Stencil{} : stencil(tw, true);
  const Index first = {level, su.first, sv.first, sw.first};
  const Index near = {level, static_cast<int>(std::lround(tu)),
                      level < 2 ? static_cast<int>(std::lround(tv)) : sv.first,
                      at.scale_free ? 0 : static_cast<int>(std::lround(tw))};
  const std::size_t orders = static_cast<std::size_t>(max_order_) + 1;
  Blend b;
  b.relative.assign(orders, Complex{});
  std::vector<Complex> bend_u(orders), bend_v(orders), bend_w(orders);
  const std::size_t pattern = Solved(kind, first).pattern;
  for (int i = 0; i < su.count; ++i) {
    for (int j = 0; j < sv.count; ++j) {
      for (int k = 0; k < sw.count; ++k) {
        const Index index = {level, su.first + i, sv.first + j, sw.first + k};
        const Node& n = Solved(kind, index);
        if (n.failed || n.pattern != pattern) return std::nullopt;
        const double w = su.weight[i] * sv.weight[j] * sw.weight[k];
        const double du = su.check[i] * sv.weight[j] * sw.weight[k];
        const double dv = su.weight[i] * sv.check[j] * sw.weight[k];
        const double dw = su.weight[i] * sv.weight[j] * sw.check[k];
        for (const std::size_t h : carried_) b.relative[h] += w * n.relative[h];
        if (level == 0) {  // the finer stencils are not cubic: nothing to check
          for (const std::size_t h : carried_) {
            bend_u[h] += du * n.relative[h];
            bend_v[h] += dv * n.relative[h];
            bend_w[h] += dw * n.relative[h];
          }
        }
        b.fundamental += w * n.fundamental;
        b.dc_voltage += w * n.dc_voltage;
        b.peak_current += w * n.peak_current;
        b.conduction_deg += w * n.conduction_deg;
        b.overlap_deg += w * n.overlap_deg;
        if (index == near) b.nearest = &n;
      }
    }
  }
  for (const std::size_t h : carried_) {
    if (h < 2) continue;
    if (std::max({std::abs(bend_u[h]), std::abs(bend_v[h]), std::abs(bend_w[h])}) > kKinkLimit) {
      return std::nullopt;
    }
  }
  return b;
}

std::optional<BridgeTable::Located> BridgeTable::Locate(const BridgeParameters& p, double emf) {
  const double e2 = emf * emf;
  // The same circuit on a unit EMF (see the header). The line current sees the supply and the
  // group's own reactor in series, so they are lumped.
  Located at;
  double power = p.power / e2;
  at.scale = e2;
  double r = p.r_supply, x = p.x_supply + p.x_reactor;
  at.kind = {static_cast<double>(p.circuit), 0.0, 0.0, 0.0, 0.0};
  switch (p.circuit) {
    case BridgeCircuit::kSixPulseCapacitor:
      at.kind[3] = Rounded(p.x_dc);
      at.kind[4] = Rounded(p.b_dc);
      break;
    case BridgeCircuit::kSinglePhase:
      // Its pulse is shaped by a deep capacitor ripple; not tested to the criterion: solved directly.
      return std::nullopt;
    case BridgeCircuit::kSixPulseStiff:
      // Without a capacitor the circuit is scale-free once more: the power is brought to 1.
      at.kind[1] = p.thyristor ? 1.0 : 0.0;
      at.kind[2] = Rounded(p.firing_deg);
      r *= power;
      x *= power;
      at.scale *= power;
      power = 1.0;
      break;
  }
  if (!(power > 0.0) || !(r > 0.0) || !(x > 0.0)) return std::nullopt;
  at.point = {std::log(std::hypot(r, x) * power), std::log(x / r), std::log(power),
              p.circuit == BridgeCircuit::kSixPulseStiff};
  return at;
}

const BridgeStart* BridgeTable::StartNear(const BridgeParameters& p, double emf) {
  const std::optional<Located> at = Locate(p, emf);
  if (!at || at->point.u < std::log(kStiffestSupply)) return nullptr;
  const Point& x = at->point;
  const int w = x.scale_free ? 0 : static_cast<int>(std::lround(x.w / kStepW));
  const Node& node = Solved(at->kind, {0, static_cast<int>(std::lround(x.u / kStepU)),
                                       static_cast<int>(std::lround(x.v / kStepV)), w});
  return node.failed ? nullptr : &node.start;
}

std::optional<SolvedCircuit> BridgeTable::Interpolate(const BridgeParameters& p, double emf) {
  const std::optional<Located> located = Locate(p, emf);
  if (!located) return std::nullopt;
  const Point& at = located->point;
  const Kind& kind = located->kind;
  const double scale = located->scale;
  if (at.u < std::log(kStiffestSupply)) return std::nullopt;
  std::optional<Blend> blend;
  for (int level = 0; level <= kFinestLevel && !blend; ++level) blend = BlendAt(kind, at, level);
  if (!blend) return std::nullopt;
  const std::size_t orders = blend->relative.size();
  const Complex fundamental = blend->fundamental;
  SolvedCircuit out;
  out.interpolated = true;
  out.current.resize(orders);
  const double a1 = std::arg(fundamental), m1 = std::abs(fundamental);
  for (std::size_t h = 0; h < orders; ++h) {
    out.current[h] = scale * m1 * blend->relative[h] * std::polar(1.0, h * a1);
  }
  out.current[1] = scale * fundamental;
  out.power = p.power;
  out.dc_voltage = blend->dc_voltage;
  out.peak_current = scale * blend->peak_current;
  out.conduction_deg = blend->conduction_deg;
  out.overlap_deg = blend->overlap_deg;
  out.waveform = keep_waveforms_ ? &blend->nearest->waveform : nullptr;
  out.waveform_scale = scale;
  return out;
}

}  // namespace overtone::internal
