// src/harmonic_solve.cc — per-order sparse solves: analyse once, factor a reference, refactor.
#include "harmonic_solve.h"

#include <algorithm>
#include <memory>

#include <fmt/format.h>

#include "overtone/errors.h"
#include "parallel.h"

namespace overtone::internal {
namespace {

constexpr int kReferenceOrder = 2;

bool HasSource(const std::vector<Injection>& injections) {
  return std::any_of(injections.begin(), injections.end(),
                     [](const Injection& i) { return i.current != Complex{}; });
}

// One worker: a factorization whose reference is a fixed order, refactored for each order it is
// given, so a result does not depend on which worker solved it.
class OrderWorker {
 public:
  OrderWorker(const Network& net, const SparseAnalysis& analysis)
      : net_(net), lu_(analysis), values_(static_cast<std::size_t>(net.pattern().nnz())),
        rhs_(static_cast<std::size_t>(net.bus_count())) {}

  // Solves order h for every set: sets[s][h] into out[s].
  void Solve(int h, const std::vector<const std::vector<std::vector<Injection>>*>& sets,
             std::vector<HarmonicSolution>& out) {
    for (HarmonicSolution& o : out) o.orders[h].order = h;
    const bool any = std::any_of(sets.begin(), sets.end(), [h](const auto* set) { return HasSource((*set)[h]); });
    if (!any) return;  // V(h) = 0 exactly
    if (!lu_.has_reference()) {
      net_.Fill(kReferenceOrder, SequenceOf(kReferenceOrder), Shunts::kHarmonic, values_);
      if (!lu_.SetReference(values_)) throw Singular(kReferenceOrder);
    }
    net_.Fill(h, SequenceOf(h), Shunts::kHarmonic, values_);
    if (!lu_.Factor(values_)) throw Singular(h);
    for (std::size_t k = 0; k < sets.size(); ++k) {
      const std::vector<Injection>& injections = (*sets[k])[h];
      if (!HasSource(injections)) continue;
      OrderSummary& summary = out[k].orders[h];
      summary.rcond = lu_.rcond();
      summary.full_factor = lu_.fresh();
      std::fill(rhs_.begin(), rhs_.end(), Complex{});
      for (const Injection& i : injections) rhs_[i.bus] += i.current;
      lu_.Solve(rhs_);
      std::copy(rhs_.begin(), rhs_.end(), out[k].voltage.begin() + static_cast<std::ptrdiff_t>(h) * out[k].bus_count);
      summary.solved = true;
    }
  }

 private:
  static SolveError Singular(int h) {
    return SolveError(fmt::format("the network is singular at order {} (a bus has no path for "
                                  "harmonic current, or a resonance has no damping)", h));
  }

  const Network& net_;
  ReferencePivotLu lu_;
  std::vector<Complex> values_;
  std::vector<Complex> rhs_;
};

std::vector<HarmonicSolution> SolveSets(const Network& net,
                                        const std::vector<const std::vector<std::vector<Injection>>*>& sets,
                                        int max_order, int threads) {
  std::vector<HarmonicSolution> out(sets.size());
  for (HarmonicSolution& o : out) {
    o.bus_count = net.bus_count();
    o.max_order = max_order;
    o.voltage.assign(static_cast<std::size_t>(max_order + 1) * o.bus_count, Complex{});
    o.orders.resize(static_cast<std::size_t>(max_order) + 1);
  }
  const SparseAnalysis analysis(net.pattern());
  // Orders 2..max_order; which worker solves an order does not change its result.
  ParallelFor(max_order - 1, threads,
              [&] { return std::make_unique<OrderWorker>(net, analysis); },
              [&](OrderWorker& worker, int k) { worker.Solve(k + 2, sets, out); });
  return out;
}

}  // namespace

HarmonicSolution SolveHarmonics(const Network& net,
                                const std::vector<std::vector<Injection>>& injections,
                                int max_order, int threads) {
  return std::move(SolveSets(net, {&injections}, max_order, threads).front());
}

std::vector<HarmonicSolution> SolveHarmonicsBySource(
    const Network& net, const std::vector<std::vector<std::vector<Injection>>>& sets,
    int max_order, int threads) {
  std::vector<const std::vector<std::vector<Injection>>*> pointers;
  for (const auto& set : sets) pointers.push_back(&set);
  return SolveSets(net, pointers, max_order, threads);
}

}  // namespace overtone::internal
