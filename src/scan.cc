// src/scan.cc — frequency scans: driving-point and transfer impedances, peaks, step configurations.
//
// Method: at each grid order the positive-sequence harmonic admittance matrix Y(h) is filled in the
// fixed pattern and factored once. The driving-point impedances of the monitored buses are the
// diagonal of Z = Y^-1, found for all of them at once by selected inversion of the factors
// (src/selected_inverse.h); the transfer impedances from a drive bus are one solve for its column
// of Z (the frequency scan of harmonic penetration studies: J. Arrillaga, N. R. Watson, "Power
// System Harmonics", 2nd ed.; IEEE Std 519-2014 application notes; from memory). Capacitor banks
// are added to the diagonal per step configuration, so every configuration shares one network.
#include "scan.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <string_view>
#include <unordered_set>

#include <fmt/format.h>

#include "models.h"
#include "network.h"
#include "overtone/errors.h"
#include "parallel.h"
#include "selected_inverse.h"
#include "sparse_lu.h"

namespace overtone {

std::string ToString(Risk risk) {
  switch (risk) {
    case Risk::kLow: return "low";
    case Risk::kMedium: return "medium";
    case Risk::kHigh: return "high";
  }
  return "?";
}

bool ScanOptions::IsValid(std::string* error) const {
  const auto fail = [error](std::string text) {
    if (error) *error = "Invalid scan. " + text;
    return false;
  };
  if (!(from_order > 0.0)) return fail(fmt::format("from = {}. Violated constraint: from > 0", from_order));
  if (!(to_order > from_order)) {
    return fail(fmt::format("to = {}. Violated constraint: to > from = {}", to_order, from_order));
  }
  if (!(step > 0.0)) return fail(fmt::format("step = {}. Violated constraint: step > 0", step));
  if ((to_order - from_order) / step >= 1e6) {
    return fail(fmt::format("step = {}. Violated constraint: (to - from) / step < 1000000", step));
  }
  if (!(band > 0.0)) return fail(fmt::format("band = {}. Violated constraint: band > 0", band));
  if (threads < 0) return fail(fmt::format("threads = {}. Violated constraint: threads >= 0", threads));
  return true;
}

bool IsWorse(const ResonancePeak& a, const ResonancePeak& b) {
  return a.risk != b.risk ? a.risk > b.risk : a.amplification > b.amplification;
}

const ResonancePeak* BusScan::WorstPeak() const {
  const ResonancePeak* worst = nullptr;
  for (const ResonancePeak& p : peaks) {
    if (!worst || IsWorse(p, *worst)) worst = &p;
  }
  return worst;
}

int ScanResult::WorstConfigurationAt(int bus) const {
  int worst = -1;
  for (int c = 0; c < static_cast<int>(configurations.size()); ++c) {
    const ResonancePeak* p = at(c, bus).WorstPeak();
    if (p && (worst < 0 || IsWorse(*p, *at(worst, bus).WorstPeak()))) worst = c;
  }
  return worst;
}

int ScanOptions::point_count() const {
  // `to` belongs to the grid when it lies on it within rounding.
  return static_cast<int>(std::floor((to_order - from_order) / step + 1e-9)) + 1;
}

namespace internal {
namespace {

constexpr double kRefineTolerance = 1e-9;  // orders
// From this many monitored buses on, driving points come from selected inversion (about one more
// factorization per grid point) rather than one solve per bus.
constexpr std::size_t kSelectedInversionFrom = 4;
// Grid points around a peak through which its admittance is interpolated.
constexpr std::size_t kPeakWindow = 5;
// The base network (no banks or filters) is smooth: its curve is swept at every kBaseStride-th
// grid point only, and interpolated the same way at a peak for the amplification.
constexpr std::size_t kBaseStride = 5;

Plant WithoutShunts(const Plant& plant, bool keep_filters) {
  Plant p = plant;
  p.capacitors.clear();
  if (!keep_filters) p.filters.clear();
  return p;
}

std::vector<std::string> DriveBuses(const Plant& plant) {
  std::vector<std::string> buses;
  std::unordered_set<std::string_view> seen;
  for (const Drive& d : plant.drives) {
    if (seen.insert(d.bus).second) buses.push_back(d.bus);
  }
  return buses;
}

// What every worker reads: the networks without banks (added per configuration) and without
// banks or filters (the reference for amplification), the grid and the buses solved for. The
// networks are built from private plant copies, which must outlive them (a Network points into
// its plant).
class ScanModel {
 public:
  struct Bank {
    int slot = 0;
    double nominal_v = 0.0;
  };

  ScanModel(const Plant& plant, const std::vector<std::string>& monitored,
            const std::vector<std::string>& drives, std::vector<double> orders)
      : fixed_plant_(WithoutShunts(plant, true)), base_plant_(WithoutShunts(plant, false)),
        fixed_(fixed_plant_), base_(base_plant_),
        fixed_analysis_(fixed_.pattern()), base_analysis_(base_.pattern()),
        banks_(plant.capacitors), orders_(std::move(orders)) {
    for (const Capacitor& c : banks_) {
      const int bus = fixed_.BusIndex(c.bus);
      slots_.push_back({fixed_.pattern().Slot(bus, bus), fixed_.nominal_v(bus)});
    }
    for (const std::string& b : monitored) monitored_.push_back(fixed_.BusIndex(b));
    for (const std::string& b : drives) drives_.push_back(fixed_.BusIndex(b));
  }

  const Network& network(bool base) const { return base ? base_ : fixed_; }
  const SparseAnalysis& analysis(bool base) const { return base ? base_analysis_ : fixed_analysis_; }
  const std::vector<Capacitor>& banks() const { return banks_; }
  const std::vector<Bank>& slots() const { return slots_; }
  const std::vector<double>& orders() const { return orders_; }
  const std::vector<int>& monitored() const { return monitored_; }
  const std::vector<int>& drives() const { return drives_; }
  // Ohms per pu of a transfer impedance from bus j to bus i (i = j: driving point).
  double Ohms(int i, int j) const { return fixed_.nominal_v(i) * fixed_.nominal_v(j) / kBaseVa; }

 private:
  Plant fixed_plant_, base_plant_;
  Network fixed_, base_;
  SparseAnalysis fixed_analysis_, base_analysis_;
  std::vector<Capacitor> banks_;
  std::vector<Bank> slots_;
  std::vector<double> orders_;
  std::vector<int> monitored_, drives_;
};

// Z in pu over the grid: curves[m][k] at monitored bus m, transfers[j][m][k] from drive bus j
// (left empty when transfers are not wanted). Filled by several workers, each its own points.
struct SweepBuffers {
  std::vector<std::vector<Complex>> curves;
  std::vector<std::vector<std::vector<Complex>>> transfers;

  SweepBuffers(const ScanModel& model, bool with_transfers)
      : curves(model.monitored().size(), std::vector<Complex>(model.orders().size())) {
    if (with_transfers) transfers.assign(model.drives().size(), curves);
  }
};

// One worker: its own numeric factorizations and a private copy of the banks whose steps it sets.
// Each grid point is computed from the configuration alone, so results do not depend on which
// worker computes them.
class ScanWorker {
 public:
  explicit ScanWorker(const ScanModel& model)
      : model_(model), fixed_(model.analysis(false)), base_(model.analysis(true)),
        values_(static_cast<std::size_t>(model.network(false).pattern().nnz())),
        rhs_(static_cast<std::size_t>(model.network(false).bus_count())), banks_(model.banks()) {}

  void SetConfiguration(const std::vector<int>& steps_on) {
    for (std::size_t k = 0; k < banks_.size(); ++k) {
      if (banks_[k].steps_on != steps_on[k]) fixed_.ClearReference();  // new matrix values
      banks_[k].steps_on = steps_on[k];
    }
  }

  // Grid point k: the monitored buses' driving points and, when `out` has room for them, the
  // transfer impedances from the drive buses.
  void SweepPoint(std::size_t k, bool base, SweepBuffers& out) {
    const std::vector<int>& monitored = model_.monitored();
    Factor(model_.orders()[k], base);
    // Per-bus solves when there are few buses, or should the factors not allow the recurrences.
    const bool selected = monitored.size() >= kSelectedInversionFrom &&
                          (base ? base_ : fixed_).Extract(factors_) && inverse_.Compute(factors_);
    for (std::size_t m = 0; m < monitored.size(); ++m) {
      // Outside the computed set (A(i, i) not stored), the bus's column is solved instead.
      if (!selected || !inverse_.Diagonal(monitored[m], &out.curves[m][k])) {
        out.curves[m][k] = Column(monitored[m], base)[monitored[m]];
      }
    }
    for (std::size_t j = 0; j < out.transfers.size(); ++j) {
      const std::vector<Complex>& z = Column(model_.drives()[j], base);
      for (std::size_t m = 0; m < monitored.size(); ++m) out.transfers[j][m][k] = z[monitored[m]];
    }
  }

 private:
  void Fill(double h, bool base) {
    model_.network(base).Fill(h, Sequence::kPositive, Shunts::kHarmonic, values_);
    if (base) return;
    for (std::size_t k = 0; k < banks_.size(); ++k) {
      const ScanModel::Bank& b = model_.slots()[k];
      values_[b.slot] += CapacitorAdmittance(banks_[k], b.nominal_v, h);
    }
  }

  // Factors Y(h) reusing the pivots of the grid's first order (ReferencePivotLu); the outcome
  // depends on the configuration and h only.
  void Factor(double h, bool base) {
    ReferencePivotLu& lu = base ? base_ : fixed_;
    const auto singular = [](double order) {
      return SolveError(fmt::format("the network is singular at order {:.4f} of the frequency scan "
                                    "(a bus without any path, or an undamped resonance)", order));
    };
    if (!lu.has_reference()) {
      Fill(model_.orders().front(), base);
      if (!lu.SetReference(values_)) throw singular(model_.orders().front());
    }
    Fill(h, base);
    if (!lu.Factor(values_)) throw singular(h);
  }

  // Column `bus` of Z = Y^-1 of the matrix factored last.
  const std::vector<Complex>& Column(int bus, bool base) {
    std::fill(rhs_.begin(), rhs_.end(), Complex{});
    rhs_[bus] = 1.0;
    (base ? base_ : fixed_).Solve(rhs_);
    return rhs_;
  }

  const ScanModel& model_;
  ReferencePivotLu fixed_, base_;  // the configured network and the one without shunts
  LuFactors factors_;
  SelectedInverse inverse_;
  std::vector<Complex> values_, rhs_;
  std::vector<Capacitor> banks_;
};

// An interior maximum of |Z| at grid point k (a plateau counts once, at its first point).
bool IsGridMaximum(const std::vector<Complex>& z, std::size_t k) {
  const double here = std::abs(z[k]);
  return here > std::abs(z[k - 1]) * (1.0 + 1e-9) && here >= std::abs(z[k + 1]);
}

// Grid points first, first + stride, ... (count of them) through which a curve is interpolated.
struct Window {
  std::size_t first = 0, stride = 1, count = 0;
  std::size_t at(std::size_t j) const { return first + j * stride; }
};

// The kPeakWindow points around grid point k of the grid thinned to every stride-th point
// (clipped to the grid; the full grid when the thinned one is too short).
Window WindowAround(std::size_t k, std::size_t points, std::size_t stride) {
  if ((points - 1) / stride + 1 < kPeakWindow) stride = 1;
  const std::size_t thinned = (points - 1) / stride + 1;
  const std::size_t centre = std::min((k + stride / 2) / stride, thinned - 1);
  std::size_t first = centre < kPeakWindow / 2 ? 0 : centre - kPeakWindow / 2;
  if (thinned >= kPeakWindow) first = std::min(first, thinned - kPeakWindow);
  return {first * stride, stride, std::min(kPeakWindow, thinned)};
}

// 1/Z at order h by Lagrange interpolation through the window's grid points. Near a parallel
// resonance Z has a pole but 1/Z (the admittance seen from the bus) is smooth, so a polynomial
// through a few points reproduces it closely (a series R-L with a shunt C: 1/Z is analytic there,
// with its nearest singularity at the R-L branch's pole, far from the real axis when X/R is high).
Complex InterpolatedAdmittance(const std::vector<double>& orders, const std::vector<Complex>& z,
                               const Window& w, double h) {
  Complex y;
  for (std::size_t i = 0; i < w.count; ++i) {
    double weight = 1.0;
    for (std::size_t j = 0; j < w.count; ++j) {
      if (j != i) weight *= (h - orders[w.at(j)]) / (orders[w.at(i)] - orders[w.at(j)]);
    }
    y += weight / z[w.at(i)];
  }
  return y;
}

// Interior maxima of |Z| on a swept curve, refined between the neighbouring grid points by
// golden-section search on the interpolated admittance (no further factorization); impedances in
// pu, amplification against the base network's curve at the same order.
std::vector<ResonancePeak> CurvePeaks(const std::vector<double>& orders, const std::vector<Complex>& z,
                                      const std::vector<Complex>& base) {
  std::vector<ResonancePeak> peaks;
  for (std::size_t k = 1; k + 1 < z.size(); ++k) {
    if (!IsGridMaximum(z, k)) continue;
    const double here = std::abs(z[k]);
    const Window own = WindowAround(k, z.size(), 1);
    const auto y = [&](double h) { return std::abs(InterpolatedAdmittance(orders, z, own, h)); };
    const double g = (std::sqrt(5.0) - 1.0) / 2.0;
    double lo = orders[k - 1], hi = orders[k + 1];
    double c = hi - g * (hi - lo), d = lo + g * (hi - lo), yc = y(c), yd = y(d);
    while (hi - lo > kRefineTolerance) {
      if (yc <= yd) {
        hi = d, d = c, yd = yc;
        c = hi - g * (hi - lo), yc = y(c);
      } else {
        lo = c, c = d, yc = yd;
        d = lo + g * (hi - lo), yd = y(d);
      }
    }
    ResonancePeak p{0.5 * (lo + hi), 1.0 / y(0.5 * (lo + hi))};
    if (!(p.impedance_ohm >= here)) p = {orders[k], here};  // the sample itself is the better bound
    const Window thinned = WindowAround(k, z.size(), kBaseStride);
    p.amplification = p.impedance_ohm * std::abs(InterpolatedAdmittance(orders, base, thinned, p.order));
    peaks.push_back(p);
  }
  return peaks;
}

// The grid points that CurvePeaks reads from the base curve: the windows of the curve's maxima.
void MarkPeakWindows(const std::vector<Complex>& z, std::vector<char>& needed) {
  for (std::size_t k = 1; k + 1 < z.size(); ++k) {
    if (!IsGridMaximum(z, k)) continue;
    const Window thinned = WindowAround(k, z.size(), kBaseStride);
    for (std::size_t j = 0; j < thinned.count; ++j) needed[thinned.at(j)] = 1;
  }
}

std::vector<Phasor> InOhms(const std::vector<Complex>& pu, double ohms_per_pu) {
  std::vector<Phasor> out(pu.size());
  for (std::size_t k = 0; k < pu.size(); ++k) out[k] = pu[k] * ohms_per_pu;
  return out;
}

}  // namespace

std::string ConfigurationName(const std::vector<Capacitor>& banks, const std::vector<int>& steps_on) {
  if (banks.empty()) return "no capacitor banks";
  std::string name;
  for (std::size_t k = 0; k < banks.size(); ++k) {
    name += fmt::format("{}{} {}/{}", k ? ", " : "", banks[k].name, steps_on[k], banks[k].steps);
  }
  return name;
}

StepConfiguration PresentConfiguration(const std::vector<Capacitor>& banks) {
  StepConfiguration c;
  for (const Capacitor& b : banks) c.steps_on.push_back(b.steps_on);
  c.name = ConfigurationName(banks, c.steps_on);
  return c;
}

std::vector<StepConfiguration> StepConfigurations(const std::vector<Capacitor>& banks,
                                                  std::string* note) {
  double total = 1.0;
  for (const Capacitor& b : banks) total *= b.steps + 1.0;
  std::vector<std::vector<int>> settings;
  if (total <= kMaxConfigurations) {
    std::vector<int> steps(banks.size(), 0);
    for (;;) {
      settings.push_back(steps);
      int k = static_cast<int>(banks.size()) - 1;  // odometer: the last bank switches fastest
      while (k >= 0 && steps[k] == banks[k].steps) steps[k--] = 0;
      if (k < 0) break;
      ++steps[k];
    }
  } else {
    std::vector<int> off(banks.size(), 0), on;
    for (const Capacitor& b : banks) on.push_back(b.steps);
    settings = {off, on};
    for (std::size_t k = 0; k < banks.size(); ++k) {
      for (int s = 1; s <= banks[k].steps; ++s) {
        std::vector<int> alone = off;
        alone[k] = s;
        settings.push_back(alone);
      }
    }
    settings.push_back(PresentConfiguration(banks).steps_on);
    if (note) {
      *note = fmt::format("{:.0f} step configurations exceed {}: scanned all banks off, all fully "
                          "on, each bank alone at each of its steps, and the present state",
                          total, kMaxConfigurations);
    }
  }
  std::vector<StepConfiguration> configurations;
  for (const std::vector<int>& s : settings) {
    const bool seen = std::any_of(configurations.begin(), configurations.end(),
                                  [&](const StepConfiguration& c) { return c.steps_on == s; });
    if (!seen) configurations.push_back({s, ConfigurationName(banks, s)});
  }
  return configurations;
}

std::vector<double> InjectionPercent(const std::vector<DriveResult>& drives) {
  std::vector<double> percent;
  for (const DriveResult& d : drives) {
    const double fundamental = std::abs(d.current_a.at(1));
    if (fundamental <= 0.0) continue;
    const std::vector<Phasor>& x = d.current_a.by_order;
    if (percent.size() < x.size()) percent.resize(x.size(), 0.0);
    for (std::size_t h = 2; h < x.size(); ++h) {
      percent[h] = std::max(percent[h], 100.0 * std::abs(x[h]) / fundamental);
    }
  }
  return percent;
}

void RateRisk(const std::vector<double>& injection_percent, double band, ResonancePeak& peak) {
  double distance = std::numeric_limits<double>::infinity();
  peak.near_order = 0;
  const int lo = std::max(2, static_cast<int>(std::ceil(peak.order - 2.0 * band)));
  const int hi = static_cast<int>(std::floor(peak.order + 2.0 * band));
  for (int h = lo; h <= hi && h < static_cast<int>(injection_percent.size()); ++h) {
    if (injection_percent[h] < kInjectionThresholdPercent) continue;
    const double d = std::abs(peak.order - h);
    if (d < distance) distance = d, peak.near_order = h;
  }
  const double a = peak.amplification;
  if (distance <= band && a >= kHighAmplification) {
    peak.risk = Risk::kHigh;
  } else if ((distance <= band && a >= kMediumAmplification) ||
             (distance <= 2.0 * band && a >= kHighAmplification)) {
    peak.risk = Risk::kMedium;
  } else {
    peak.risk = Risk::kLow;
  }
}

std::vector<std::string> DefaultMonitoredBuses(const Plant& plant, const std::string& pcc) {
  std::unordered_set<std::string_view> shunt_buses;  // one pass over the banks, not one per bus
  for (const Capacitor& c : plant.capacitors) shunt_buses.insert(c.bus);
  for (const Filter& f : plant.filters) shunt_buses.insert(f.bus);
  std::vector<std::string> buses;
  for (const Bus& b : plant.buses) {
    if (b.name == pcc || shunt_buses.contains(b.name)) buses.push_back(b.name);
  }
  return buses;
}

ScanResult ScanConfigurations(const Plant& plant, const ScanOptions& options,
                              const std::vector<std::string>& buses,
                              const std::vector<StepConfiguration>& configurations,
                              const std::vector<double>& injection_percent, bool keep_curves) {
  ScanResult r;
  r.variant = plant.study.name;
  r.plant_file = plant.source_file;
  r.options = options;
  r.buses = buses;
  r.drive_buses = keep_curves ? DriveBuses(plant) : std::vector<std::string>{};
  const int points = options.point_count();
  for (int k = 0; k < points; ++k) r.orders.push_back(options.from_order + k * options.step);
  const StepConfiguration present = PresentConfiguration(plant.capacitors);
  std::vector<int> all_on;
  for (const Capacitor& c : plant.capacitors) all_on.push_back(c.steps);
  for (std::size_t c = 0; c < configurations.size(); ++c) {
    r.configurations.push_back(configurations[c].name);
    if (configurations[c].steps_on == present.steps_on) r.present_configuration = static_cast<int>(c);
    if (configurations[c].steps_on == all_on) r.all_on_configuration = static_cast<int>(c);
  }

  const ScanModel model(plant, r.buses, r.drive_buses, r.orders);
  const std::size_t nb = r.buses.size(), nc = configurations.size();
  const double curve_points = static_cast<double>(nc) * nb * points;
  const bool keep_all = keep_curves && curve_points <= kMaxStoredPoints;
  if (keep_curves && !keep_all) {
    r.notes.push_back(fmt::format("curves of {} configurations would hold {:.0f} points: curves are "
                                  "kept for the present configuration and the worst at each bus "
                                  "only; the peaks of every configuration are listed", nc, curve_points));
  }
  constexpr std::size_t kChunk = 32;  // grid points per work item
  const auto make_worker = [&model] { return std::make_unique<ScanWorker>(model); };
  // The listed grid points in parallel chunks: of the network configured with `steps`, or of the
  // base network when `steps` is null.
  const auto sweep_points = [&](const std::vector<std::size_t>& list,
                                const std::vector<int>* steps, SweepBuffers& out) {
    const int chunks = static_cast<int>((list.size() + kChunk - 1) / kChunk);
    ParallelFor(chunks, options.threads, make_worker, [&](ScanWorker& w, int i) {
      if (steps) w.SetConfiguration(*steps);
      const std::size_t end = std::min(list.size(), (i + 1) * kChunk);
      for (std::size_t q = i * kChunk; q < end; ++q) w.SweepPoint(list[q], !steps, out);
    });
  };
  std::vector<std::size_t> all_points(r.orders.size());
  for (std::size_t k = 0; k < all_points.size(); ++k) all_points[k] = k;
  SweepBuffers sweep(model, false), with_transfers(model, true), base(model, false);
  // The base network is the same for every configuration: each of its points is swept once, when
  // a peak's window first needs it.
  std::vector<char> base_swept(r.orders.size(), 0);
  const auto sweep_base = [&](const std::vector<char>& needed) {
    std::vector<std::size_t> list;
    for (std::size_t k = 0; k < needed.size(); ++k) {
      if (needed[k] && !base_swept[k]) list.push_back(k), base_swept[k] = 1;
    }
    if (!list.empty()) sweep_points(list, nullptr, base);
  };

  // One configuration: the grid, the base network where its peaks need it, then each bus's peaks;
  // curves (and transfers) copied out when asked.
  r.scans.resize(nc * nb);
  const auto scan = [&](std::size_t c, bool curves, bool transfers) {
    SweepBuffers& out = transfers ? with_transfers : sweep;
    sweep_points(all_points, &configurations[c].steps_on, out);
    std::vector<char> needed(r.orders.size(), 0);
    for (const std::vector<Complex>& curve : out.curves) MarkPeakWindows(curve, needed);
    sweep_base(needed);
    for (std::size_t m = 0; m < nb; ++m) {
      BusScan& s = r.scans[c * nb + m];
      s = {static_cast<int>(m), static_cast<int>(c), {},
           CurvePeaks(r.orders, out.curves[m], base.curves[m]), Risk::kLow};
      const double scale = model.Ohms(model.monitored()[m], model.monitored()[m]);
      for (ResonancePeak& p : s.peaks) {
        p.impedance_ohm *= scale;
        RateRisk(injection_percent, options.band, p);
        s.risk = std::max(s.risk, p.risk);
      }
      if (curves) s.impedance_ohm = InOhms(out.curves[m], scale);
    }
    for (std::size_t j = 0; j < out.transfers.size(); ++j) {
      for (std::size_t m = 0; m < nb; ++m) {
        const int from = model.drives()[j], to = model.monitored()[m];
        if (from == to) continue;
        r.transfers.push_back({static_cast<int>(j), static_cast<int>(m), static_cast<int>(c),
                               InOhms(out.transfers[j][m], model.Ohms(to, from))});
      }
    }
  };
  for (std::size_t c = 0; c < nc; ++c) scan(c, keep_all, false);

  // The worst configuration: the one holding the worst peak at any monitored bus.
  const ResonancePeak* worst = nullptr;
  for (const BusScan& s : r.scans) {
    for (const ResonancePeak& p : s.peaks) {
      if (!worst || IsWorse(p, *worst)) worst = &p, r.worst_configuration = s.configuration;
    }
  }

  if (keep_curves) {
    // Transfers for the present and the worst configuration (all of them would dwarf the rest);
    // without every curve kept, also the curves of each bus's worst configuration.
    std::vector<int> featured = {r.present_configuration};
    if (r.worst_configuration >= 0 && r.worst_configuration != r.present_configuration) {
      featured.push_back(r.worst_configuration);
    }
    for (int c : featured) scan(static_cast<std::size_t>(c), true, !model.drives().empty());
    for (std::size_t m = 0; m < nb && !keep_all; ++m) {
      const int c = r.WorstConfigurationAt(static_cast<int>(m));
      if (c >= 0 && r.at(c, 0).impedance_ohm.empty()) scan(static_cast<std::size_t>(c), true, false);
    }
    sweep_base(std::vector<char>(r.orders.size(), 1));
    for (std::size_t m = 0; m < nb; ++m) {
      const int bus = model.monitored()[m];
      r.base_impedance_ohm.push_back(InOhms(base.curves[m], model.Ohms(bus, bus)));
    }
  }
  if (std::all_of(injection_percent.begin(), injection_percent.end(),
                  [](double p) { return p < kInjectionThresholdPercent; })) {
    r.notes.push_back("no drive group draws 1 % or more at any harmonic order: every peak rates low");
  }
  return r;
}

std::vector<Resonance> ScreenPresentState(const Plant& plant, const StudyResult& study, int threads) {
  ScanOptions options;
  options.to_order = plant.study.max_order;
  options.threads = threads;
  const std::vector<std::string> buses = DefaultMonitoredBuses(plant, study.pcc.bus);
  if (buses.empty()) return {};
  const ScanResult scan = ScanConfigurations(plant, options, buses, {PresentConfiguration(plant.capacitors)},
                                             InjectionPercent(study.drives), false);
  std::vector<Resonance> resonances;
  for (const BusScan& s : scan.scans) {
    for (const ResonancePeak& p : s.peaks) resonances.push_back({scan.buses[s.bus], scan.configurations[0], p});
  }
  return resonances;
}

}  // namespace internal

ScanResult RunScan(const Plant& plant, const ScanOptions& options, bool keep_curves) {
  Diagnostic usage;  // a command-line value: no file or line
  if (!options.IsValid(&usage.message)) throw InputError({usage});
  std::vector<Diagnostic> unknown;
  for (const std::string& b : options.buses) {
    const bool found = std::any_of(plant.buses.begin(), plant.buses.end(),
                                   [&](const Bus& x) { return x.name == b; });
    if (found) continue;
    Diagnostic d;  // names the plant file, which has no line for a command-line value
    d.where.file = plant.source_file;
    d.message = fmt::format("--bus '{}': the plant has no bus of that name", b);
    unknown.push_back(std::move(d));
  }
  if (!unknown.empty()) throw InputError(std::move(unknown));

  // The drive spectra that the risk rule weighs: a study of the same plant, without its own scan.
  StudyOptions study_options;
  study_options.threads = options.threads;
  study_options.scan = false;
  const StudyResult study = RunStudy(plant, study_options);

  std::string note;
  const std::vector<internal::StepConfiguration> configurations =
      internal::StepConfigurations(plant.capacitors, &note);
  std::vector<std::string> buses;  // as asked, each once
  for (const std::string& b : options.buses) {
    if (std::find(buses.begin(), buses.end(), b) == buses.end()) buses.push_back(b);
  }
  if (buses.empty()) buses = internal::DefaultMonitoredBuses(plant, study.pcc.bus);
  ScanResult r = internal::ScanConfigurations(plant, options, buses, configurations,
                                              internal::InjectionPercent(study.drives), keep_curves);
  if (!note.empty()) r.notes.insert(r.notes.begin(), note);
  return r;
}

}  // namespace overtone
