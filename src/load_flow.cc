// src/load_flow.cc — Newton-Raphson on the bus current balance in rectangular coordinates.
//
// F(V) = Y1 V - I_N + conj(S / V) = 0, unknowns x = Re V, y = Im V (the current-injection
// formulation; e.g. P. A. N. Garcia et al., IEEE Trans. Power Systems 15(1), 2000). The real
// Jacobian has the pattern of Y1 with each entry a 2x2 block, analysed once.
#include "load_flow.h"

#include <cmath>

#include <fmt/format.h>

#include "overtone/errors.h"

namespace overtone::internal {
namespace {

// The 2n x 2n real pattern whose 2x2 blocks sit where Y1 has entries.
CscPattern BlockPattern(const CscPattern& y) {
  CscPattern p;
  p.n = 2 * y.n;
  p.col_ptr.assign(static_cast<std::size_t>(p.n) + 1, 0);
  p.row_idx.resize(4 * static_cast<std::size_t>(y.nnz()));
  for (int c = 0; c < y.n; ++c) {
    const int m = y.col_ptr[c + 1] - y.col_ptr[c];
    const int base = 4 * y.col_ptr[c];
    p.col_ptr[2 * c] = base;
    p.col_ptr[2 * c + 1] = base + 2 * m;
    for (int j = 0; j < m; ++j) {
      const int r = y.row_idx[y.col_ptr[c] + j];
      p.row_idx[base + 2 * j] = 2 * r;
      p.row_idx[base + 2 * j + 1] = 2 * r + 1;
      p.row_idx[base + 2 * m + 2 * j] = 2 * r;
      p.row_idx[base + 2 * m + 2 * j + 1] = 2 * r + 1;
    }
  }
  p.col_ptr[p.n] = 4 * y.nnz();
  return p;
}

// Writes the block of d(F_r)/d(x_c, y_c) for the complex nonzero k of Y1, where F_r += a V_c.
void WriteBlock(const CscPattern& y, int c, int k, Complex a, std::vector<double>& jac) {
  const int m = y.col_ptr[c + 1] - y.col_ptr[c];
  const int j = k - y.col_ptr[c];
  const int base = 4 * y.col_ptr[c];
  jac[base + 2 * j] = a.real();             // dRe/dx
  jac[base + 2 * j + 1] = a.imag();         // dIm/dx
  jac[base + 2 * m + 2 * j] = -a.imag();    // dRe/dy
  jac[base + 2 * m + 2 * j + 1] = a.real(); // dIm/dy
}

std::vector<Complex> SourceCurrents(const Network& net) {
  std::vector<Complex> injected(static_cast<std::size_t>(net.bus_count()));
  for (const SourceRef& s : net.sources()) injected[s.bus] += net.SourceEmf(s) / net.SourceImpedance(s, 1.0);
  return injected;
}

}  // namespace

LoadFlowSolver::LoadFlowSolver(const Network& network)
    : net_(network),
      y1_(static_cast<std::size_t>(network.pattern().nnz())),
      injected_(SourceCurrents(network)),
      jacobian_pattern_(BlockPattern(network.pattern())),
      jacobian_analysis_(jacobian_pattern_),
      jacobian_lu_(jacobian_analysis_) {
  net_.Fill(1.0, Sequence::kPositive, Shunts::kFundamental, y1_);
  // No-load solution: Y1 V0 = I_N.
  SparseAnalysis analysis(net_.pattern());
  SparseLu<Complex> lu(analysis);
  no_load_ = injected_;
  if (!lu.Factor(y1_) || !lu.Solve(no_load_)) {
    throw SolveError("the fundamental network is singular: check that every bus is connected "
                     "to a supply through transformers and cables");
  }
}

LoadFlowResult LoadFlowSolver::Solve(const std::vector<Complex>& power_drawn,
                                     const LoadFlowOptions& options,
                                     const std::vector<Complex>* start) {
  int worst_bus = 0;
  LoadFlowResult result;
  if (start) result = Newton(power_drawn, options, *start, &worst_bus);
  if (!start || !(result.max_mismatch_pu <= options.tolerance_pu)) {
    result = Newton(power_drawn, options, no_load_, &worst_bus);
  }
  const double worst = result.max_mismatch_pu;
  if (!std::isfinite(worst)) {
    throw SolveError(fmt::format(
        "the load flow diverged (voltage collapse) near bus '{}': the constant-power load is more "
        "than the supply can deliver; check the supply's short_circuit and the load, motor and "
        "drive ratings", net_.bus(worst_bus).name));
  }
  if (!(worst <= options.tolerance_pu)) {
    throw SolveError(fmt::format(
        "the load flow did not converge after {} iterations: the largest power mismatch is {:.4g} kVA "
        "at bus '{}' (|V| = {:.3f} pu); the plant may be overloaded for its supply, or a load, "
        "motor or drive rating may be wrong",
        result.iterations, worst * kBaseVa / 1e3, net_.bus(worst_bus).name,
        std::abs(result.voltage[worst_bus])));
  }
  return result;
}

LoadFlowResult LoadFlowSolver::Newton(const std::vector<Complex>& power_drawn,
                                      const LoadFlowOptions& options, std::vector<Complex> start,
                                      int* worst_bus_out) {
  const CscPattern& yp = net_.pattern();
  const int n = net_.bus_count();
  const std::vector<Complex>& y1 = y1_;
  const std::vector<Complex>& injected = injected_;
  SparseLu<double>& lu = jacobian_lu_;
  LoadFlowResult result;
  result.voltage = std::move(start);
  std::vector<double> jac(static_cast<std::size_t>(jacobian_pattern_.nnz()));
  std::vector<double> step(static_cast<std::size_t>(2 * n));
  std::vector<Complex> mismatch(static_cast<std::size_t>(n));
  std::vector<Complex>& v = result.voltage;
  auto residual = [&]() {
    double worst = 0.0;
    int worst_bus = 0;
    for (int i = 0; i < n; ++i) mismatch[i] = power_drawn[i] == 0.0 ? 0.0 : std::conj(power_drawn[i] / v[i]);
    for (int c = 0; c < n; ++c) {
      for (int k = yp.col_ptr[c]; k < yp.col_ptr[c + 1]; ++k) mismatch[yp.row_idx[k]] += y1[k] * v[c];
    }
    for (int i = 0; i < n; ++i) {
      mismatch[i] -= injected[i];
      const double ds = std::abs(v[i] * std::conj(mismatch[i]));  // power mismatch, pu
      if (!std::isfinite(ds)) return std::pair{ds, i};
      if (ds > worst) {
        worst = ds;
        worst_bus = i;
      }
    }
    return std::pair{worst, worst_bus};
  };

  auto [worst, worst_bus] = residual();
  // Newton converges quadratically: one more step after the tolerance is met costs little and
  // takes the mismatch to round-off, so harmonic angles (h x the fundamental's) stay exact.
  bool polished = false;
  for (int it = 0; it < options.max_iterations && (worst > options.tolerance_pu || !polished); ++it) {
    polished = worst <= options.tolerance_pu;
    for (int c = 0; c < n; ++c) {
      for (int k = yp.col_ptr[c]; k < yp.col_ptr[c + 1]; ++k) WriteBlock(yp, c, k, y1[k], jac);
    }
    for (int i = 0; i < n; ++i) {
      if (power_drawn[i] == 0.0) continue;
      // d conj(S/V)/dx = -conj(S)/conj(V)^2 =: b;  d/dy = -j b (rectangular coordinates).
      const Complex b = -std::conj(power_drawn[i]) / (std::conj(v[i]) * std::conj(v[i]));
      const int k = yp.Slot(i, i);
      const int m = yp.col_ptr[i + 1] - yp.col_ptr[i];
      const int base = 4 * yp.col_ptr[i] + 2 * (k - yp.col_ptr[i]);
      jac[base] += b.real();
      jac[base + 1] += b.imag();
      jac[base + 2 * m] += b.imag();
      jac[base + 2 * m + 1] += -b.real();
    }
    for (int i = 0; i < n; ++i) {
      step[2 * i] = -mismatch[i].real();
      step[2 * i + 1] = -mismatch[i].imag();
    }
    if (!(lu.Refactor(jac) || lu.Factor(jac)) || !lu.Solve(step)) break;
    for (int i = 0; i < n; ++i) v[i] += Complex{step[2 * i], step[2 * i + 1]};
    std::tie(worst, worst_bus) = residual();
    result.iterations = it + 1;
  }
  result.max_mismatch_pu = worst;
  *worst_bus_out = worst_bus;
  return result;
}

LoadFlowResult SolveLoadFlow(const Network& network, const std::vector<Complex>& power_drawn,
                             const LoadFlowOptions& options) {
  return LoadFlowSolver(network).Solve(power_drawn, options);
}

}  // namespace overtone::internal
