// src/network.cc — bus index, element list and the fixed sparsity pattern of Y(h).
#include "network.h"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <fmt/format.h>

#include "overtone/errors.h"
#include "selected_inverse.h"
#include "sparse_lu.h"

namespace overtone::internal {
namespace {

// Builds a CSC pattern holding every diagonal and the given off-diagonal pairs (both ways).
CscPattern BuildPattern(int n, const std::vector<std::pair<int, int>>& links) {
  std::vector<std::vector<int>> rows(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) rows[i].push_back(i);
  for (auto [a, b] : links) {
    rows[b].push_back(a);  // column b holds row a
    rows[a].push_back(b);
  }
  CscPattern p;
  p.n = n;
  p.col_ptr.push_back(0);
  for (auto& column : rows) {
    std::sort(column.begin(), column.end());
    column.erase(std::unique(column.begin(), column.end()), column.end());
    p.row_idx.insert(p.row_idx.end(), column.begin(), column.end());
    p.col_ptr.push_back(static_cast<int>(p.row_idx.size()));
  }
  return p;
}

}  // namespace

Network::Network(const Plant& plant) : frequency_hz_(plant.study.frequency_hz) {
  for (const Bus& b : plant.buses) {
    bus_index_.emplace(b.name, static_cast<int>(buses_.size()));
    buses_.push_back(&b);
  }
  std::vector<Diagnostic> problems;
  for (const Supply& s : plant.supplies) sources_.push_back({BusIndex(s.bus), &s, nullptr, 0});
  for (const Generator& g : plant.generators) sources_.push_back({BusIndex(g.bus), nullptr, &g, 0});
  for (const Transformer& t : plant.transformers) {
    branches_.push_back({BusIndex(t.from), BusIndex(t.to), &t, nullptr});
  }
  for (const Cable& c : plant.cables) {
    BranchRef b{BusIndex(c.from), BusIndex(c.to), nullptr, &c};
    if (std::abs(nominal_v(b.from) - nominal_v(b.to)) > 1e-9 * nominal_v(b.from)) {
      problems.push_back({c.where, fmt::format("cable '{}' joins buses of different nominal voltage "
                                               "({} V and {} V); use a transformer",
                                               c.name, nominal_v(b.from), nominal_v(b.to))});
    }
    branches_.push_back(b);
  }
  if (!problems.empty()) throw InputError(std::move(problems));
  for (const Capacitor& c : plant.capacitors) shunts_.push_back({BusIndex(c.bus), &c});
  for (const Filter& f : plant.filters) shunts_.push_back({BusIndex(f.bus), nullptr, &f});
  for (const Motor& m : plant.motors) shunts_.push_back({BusIndex(m.bus), nullptr, nullptr, &m});
  for (const Load& l : plant.loads) {
    shunts_.push_back({BusIndex(l.bus), nullptr, nullptr, nullptr, &l});
  }

  std::vector<std::pair<int, int>> links;
  for (const BranchRef& b : branches_) links.emplace_back(b.from, b.to);
  pattern_ = BuildPattern(bus_count(), links);
  for (SourceRef& s : sources_) s.slot = pattern_.Slot(s.bus, s.bus);
  for (ShuntRef& s : shunts_) s.slot = pattern_.Slot(s.bus, s.bus);
  for (BranchRef& b : branches_) {
    b.slot_ff = pattern_.Slot(b.from, b.from);
    b.slot_ft = pattern_.Slot(b.from, b.to);
    b.slot_tf = pattern_.Slot(b.to, b.from);
    b.slot_tt = pattern_.Slot(b.to, b.to);
  }
}

double Network::BaseAmps(int i) const { return kBaseVa / (std::sqrt(3.0) * nominal_v(i)); }

Complex Network::SourceImpedance(const SourceRef& s, double h) const {
  return s.supply ? SupplyImpedance(*s.supply, h)
                  : GeneratorImpedance(*s.generator, nominal_v(s.bus), h);
}

Complex Network::SourceEmf(const SourceRef& s) const {
  const double magnitude = s.supply ? s.supply->voltage_pu : s.generator->voltage_pu;
  const double angle = s.supply ? s.supply->angle_deg : s.generator->angle_deg;
  return std::polar(magnitude, angle * std::numbers::pi / 180.0);
}

BranchStamp Network::Stamp(const BranchRef& b, double h, Sequence seq) const {
  if (b.transformer) return TransformerStamp(*b.transformer, nominal_v(b.from), h, seq);
  return CableStamp(*b.cable, nominal_v(b.from), frequency_hz_, h);
}

Complex Network::ShuntAdmittance(const ShuntRef& s, double h) const {
  if (s.capacitor) return CapacitorAdmittance(*s.capacitor, nominal_v(s.bus), h);
  if (s.filter) return FilterAdmittance(*s.filter, nominal_v(s.bus), h);
  if (s.motor) return MotorAdmittance(*s.motor, nominal_v(s.bus), h);
  return LoadAdmittance(*s.load, h);
}

void Network::Fill(double h, Sequence seq, Shunts shunts, std::vector<Complex>& values) const {
  std::fill(values.begin(), values.end(), Complex{});
  for (const SourceRef& s : sources_) values[s.slot] += 1.0 / SourceImpedance(s, h);
  for (const BranchRef& b : branches_) {
    BranchStamp st;
    if (shunts == Shunts::kShortCircuit && b.cable) {
      const Complex y = 1.0 / CableSeriesImpedance(*b.cable, nominal_v(b.from), h);
      st = {y, -y, -y, y};
    } else {
      st = Stamp(b, h, seq);
    }
    values[b.slot_ff] += st.yff;
    values[b.slot_ft] += st.yft;
    values[b.slot_tf] += st.ytf;
    values[b.slot_tt] += st.ytt;
  }
  if (shunts == Shunts::kShortCircuit) return;
  for (const ShuntRef& s : shunts_) {
    const bool constant_power_at_fundamental = s.motor || s.load;
    if (shunts == Shunts::kFundamental && constant_power_at_fundamental) continue;
    values[s.slot] += ShuntAdmittance(s, h);
  }
}

std::vector<Complex> ShortCircuitImpedances(const Network& net, const std::vector<int>& buses,
                                            SourceSet sources) {
  if (buses.empty()) return {};
  std::vector<Complex> values(static_cast<std::size_t>(net.pattern().nnz()));
  net.Fill(1.0, Sequence::kPositive, Shunts::kShortCircuit, values);
  const bool any_supply = std::any_of(net.sources().begin(), net.sources().end(),
                                      [](const SourceRef& s) { return s.supply != nullptr; });
  if (sources == SourceSet::kSuppliesOnly && any_supply) {
    for (const SourceRef& s : net.sources()) {
      if (s.generator) values[s.slot] -= 1.0 / net.SourceImpedance(s, 1.0);
    }
  }
  const SparseAnalysis analysis(net.pattern());
  SparseLu<Complex> lu(analysis);
  if (!lu.Factor(values)) throw SolveError("the short-circuit network is singular");
  // For many buses the diagonal of the inverse comes from selected inversion, at about the cost
  // of one more factorization (selected_inverse.h); a bus outside its set is solved for.
  LuFactors factors;
  SelectedInverse inverse;
  const bool selected = buses.size() >= 4 && lu.Extract(factors) && inverse.Compute(factors);
  std::vector<Complex> out, unit(static_cast<std::size_t>(net.bus_count()));
  for (int bus : buses) {
    if (Complex z; selected && inverse.Diagonal(bus, &z)) {
      out.push_back(z);
      continue;
    }
    std::fill(unit.begin(), unit.end(), Complex{});
    unit[bus] = 1.0;
    lu.Solve(unit);
    out.push_back(unit[bus]);
  }
  return out;
}

}  // namespace overtone::internal
