// src/transformer_derating.cc — IEEE Std C57.110 winding eddy-loss factor and derated capacity.
#include "transformer_derating.h"

#include <algorithm>
#include <cmath>
#include <string_view>
#include <unordered_map>

namespace overtone::internal {

double HarmonicLossFactor(const std::vector<Phasor>& current) {
  double weighted = 0.0, total = 0.0;
  for (std::size_t h = 1; h < current.size(); ++h) {
    const double sq = std::norm(current[h]);
    weighted += sq * static_cast<double>(h * h);
    total += sq;
  }
  return total > 0.0 ? weighted / total : 1.0;
}

// With I_h in per unit of the rms current, sum (I_h/I_rms)^2 h^2 is F_HL's ratio term by term.
double KFactor(const std::vector<Phasor>& current) { return HarmonicLossFactor(current); }

double DeratedCurrent(double harmonic_loss_factor, double eddy_loss) {
  return std::sqrt((1.0 + eddy_loss) / (1.0 + harmonic_loss_factor * eddy_loss));
}

std::vector<TransformerDerating> TransformerDeratings(const Plant& plant,
                                                      const std::vector<BranchResult>& branches) {
  // Names looked up through maps built once, so the cost stays linear in the plant's size.
  std::unordered_map<std::string_view, const BranchResult*> transformer_branch;
  for (const BranchResult& b : branches) {
    if (b.kind == "transformer") transformer_branch.emplace(b.name, &b);
  }
  std::unordered_map<std::string_view, const Bus*> bus_by_name;
  for (const Bus& b : plant.buses) bus_by_name.emplace(b.name, &b);
  std::vector<TransformerDerating> out;
  for (const Transformer& t : plant.transformers) {
    const auto branch_it = transformer_branch.find(t.name);
    const auto from_it = bus_by_name.find(t.from);
    if (branch_it == transformer_branch.end() || from_it == bus_by_name.end()) continue;
    const BranchResult* branch = branch_it->second;
    const Bus* from = from_it->second;
    const std::vector<Phasor>& i = branch->current_a.by_order;
    TransformerDerating d;
    d.name = t.name;
    d.harmonic_loss_factor = HarmonicLossFactor(i);
    d.k_factor = KFactor(i);
    d.derated_percent = 100.0 * DeratedCurrent(d.harmonic_loss_factor, t.eddy_loss);
    // Rated current at the from-side voltage, tap ignored (the nameplate rating).
    d.load_percent = 100.0 * branch->indices.rms / (t.rating_va / (std::sqrt(3.0) * from->nominal_v));
    out.push_back(d);
  }
  return out;
}

}  // namespace overtone::internal
