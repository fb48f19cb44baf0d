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

  // Solves order h for every set with sources there, handing each solution to
  // sink(set, voltage, summary).
  template <typename Sink>
  void Solve(int h, const std::vector<const std::vector<std::vector<Injection>>*>& sets, Sink sink) {
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
      std::fill(rhs_.begin(), rhs_.end(), Complex{});
      for (const Injection& i : injections) rhs_[i.bus] += i.current;
      lu_.Solve(rhs_);
      sink(k, std::span<const Complex>(rhs_), OrderSummary{h, true, lu_.fresh(), lu_.rcond()});
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

// Orders 2..max_order over the workers; which worker solves an order does not change its result.
template <typename Sink>
void SolveOrders(const Network& net, const std::vector<const std::vector<std::vector<Injection>>*>& sets,
                 int max_order, int threads, Sink sink) {
  const SparseAnalysis analysis(net.pattern());
  ParallelFor(max_order - 1, threads,
              [&] { return std::make_unique<OrderWorker>(net, analysis); },
              [&](OrderWorker& worker, int k) {
                const int h = k + 2;
                worker.Solve(h, sets, [&](std::size_t set, std::span<const Complex> v,
                                          const OrderSummary& summary) { sink(h, set, v, summary); });
              });
}

}  // namespace

HarmonicSolution SolveHarmonics(const Network& net,
                                const std::vector<std::vector<Injection>>& injections,
                                int max_order, int threads) {
  HarmonicSolution out;
  out.bus_count = net.bus_count();
  out.max_order = max_order;
  out.voltage.assign(static_cast<std::size_t>(max_order + 1) * out.bus_count, Complex{});
  out.orders.resize(static_cast<std::size_t>(max_order) + 1);
  for (int h = 2; h <= max_order; ++h) out.orders[h].order = h;
  SolveOrders(net, {&injections}, max_order, threads,
              [&](int h, std::size_t, std::span<const Complex> v, const OrderSummary& summary) {
                std::copy(v.begin(), v.end(), out.voltage.begin() + static_cast<std::ptrdiff_t>(h) * out.bus_count);
                out.orders[h] = summary;
              });
  return out;
}

void SolveHarmonicsBySource(const Network& net,
                            const std::vector<std::vector<std::vector<Injection>>>& sets,
                            int max_order, int threads, const SetVoltageVisitor& visit) {
  std::vector<const std::vector<std::vector<Injection>>*> pointers;
  for (const auto& set : sets) pointers.push_back(&set);
  SolveOrders(net, pointers, max_order, threads,
              [&](int h, std::size_t set, std::span<const Complex> v, const OrderSummary&) {
                visit(h, set, v);
              });
}

}  // namespace overtone::internal
