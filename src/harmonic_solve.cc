// src/harmonic_solve.cc — per-order sparse solves: analyse once, factor a reference, refactor.
#include "harmonic_solve.h"

#include <algorithm>
#include <memory>

#include <fmt/format.h>

#include "overtone/errors.h"
#include "parallel.h"

namespace overtone::internal {
namespace {

// A refactor whose pivot growth estimate falls this far below the reference's is redone with
// fresh pivoting (KLU user guide: klu_refactor does no pivoting, so check rcond after it).
constexpr double kRcondCollapse = 1e-3;
constexpr int kReferenceOrder = 2;

bool HasSource(const std::vector<Injection>& injections) {
  return std::any_of(injections.begin(), injections.end(),
                     [](const Injection& i) { return i.current != Complex{}; });
}

// One worker: a reference factorization, then a refactor per order it is given.
class OrderWorker {
 public:
  OrderWorker(const Network& net, const SparseAnalysis& analysis)
      : net_(net), lu_(analysis), fallback_(analysis),
        values_(static_cast<std::size_t>(net.pattern().nnz())),
        rhs_(static_cast<std::size_t>(net.bus_count())) {}

  void Solve(int h, const std::vector<Injection>& injections, HarmonicSolution& out) {
    OrderSummary& summary = out.orders[h];
    summary.order = h;
    const Sequence seq = SequenceOf(h);
    if (!HasSource(injections)) return;  // V(h) = 0 exactly
    if (!lu_.factored()) FactorReference();
    net_.Fill(h, seq, Shunts::kHarmonic, values_);
    SparseLu<Complex>* lu = &lu_;
    summary.rcond = lu_.Refactor(values_) ? lu_.Rcond() : 0.0;
    if (!(summary.rcond >= kRcondCollapse * reference_rcond_)) {
      summary.full_factor = true;
      if (!fallback_.Factor(values_)) {
        throw SolveError(fmt::format("the network is singular at order {} (a bus has no path for "
                                     "harmonic current, or a resonance has no damping)", h));
      }
      summary.rcond = fallback_.Rcond();
      lu = &fallback_;
    }
    std::fill(rhs_.begin(), rhs_.end(), Complex{});
    for (const Injection& i : injections) rhs_[i.bus] += i.current;
    lu->Solve(rhs_);
    std::copy(rhs_.begin(), rhs_.end(), out.voltage.begin() + static_cast<std::ptrdiff_t>(h) * out.bus_count);
    summary.solved = true;
  }

 private:
  void FactorReference() {
    net_.Fill(kReferenceOrder, SequenceOf(kReferenceOrder), Shunts::kHarmonic, values_);
    if (!lu_.Factor(values_)) {
      throw SolveError(fmt::format("the network is singular at order {}", kReferenceOrder));
    }
    reference_rcond_ = lu_.Rcond();
  }

  const Network& net_;
  SparseLu<Complex> lu_;
  SparseLu<Complex> fallback_;
  double reference_rcond_ = 0.0;
  std::vector<Complex> values_;
  std::vector<Complex> rhs_;
};

}  // namespace

HarmonicSolution SolveHarmonics(const Network& net,
                                const std::vector<std::vector<Injection>>& injections,
                                int max_order, int threads) {
  HarmonicSolution out;
  out.bus_count = net.bus_count();
  out.max_order = max_order;
  out.voltage.assign(static_cast<std::size_t>(max_order + 1) * out.bus_count, Complex{});
  out.orders.resize(static_cast<std::size_t>(max_order) + 1);

  const SparseAnalysis analysis(net.pattern());
  // Orders 2..max_order; which worker solves an order does not change its result.
  ParallelFor(max_order - 1, threads,
              [&] { return std::make_unique<OrderWorker>(net, analysis); },
              [&](OrderWorker& worker, int k) { worker.Solve(k + 2, injections[k + 2], out); });
  return out;
}

}  // namespace overtone::internal
