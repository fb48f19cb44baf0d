// tools/bench.cc — timings behind tools/bench: the bridge model per distinct group, and the phases
// of a study of one plant file, with a plain per-order full LU on the same matrices for the ratio.
//
//   overtone_bench bridges                 markdown rows: milliseconds per distinct bridge group
//   overtone_bench study PLANT.yaml JSON   one markdown row: phase seconds, peak memory, and the
//                                          per-order factor+solve time of both LU paths
//   overtone_bench scan PLANT.yaml         one markdown row: screening of the present step state
#include <malloc.h>
#include <sys/resource.h>

#include <Eigen/SparseCore>
#include <Eigen/SparseLU>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <numbers>
#include <string>
#include <vector>

#include "bridge.h"
#include "network.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"
#include "scan.h"
#include "sparse_lu.h"

namespace {

using Clock = std::chrono::steady_clock;
using overtone::internal::BridgeCircuit;
using overtone::internal::BridgeParameters;
using overtone::internal::Complex;

double Seconds(Clock::time_point since) {
  return std::chrono::duration<double>(Clock::now() - since).count();
}

// Processor seconds of the whole process (every thread) so far: on a busy machine the wall time
// overstates the cost, this does not.
double CpuSeconds() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_utime.tv_sec + usage.ru_stime.tv_sec) +
         1e-6 * static_cast<double>(usage.ru_utime.tv_usec + usage.ru_stime.tv_usec);
}

double PeakMemoryMiB() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return usage.ru_maxrss / 1024.0;  // Linux reports kilobytes
}

// Milliseconds per SolveBridge call over `n` slightly different circuits (no cache hits).
double BridgeMilliseconds(BridgeCircuit circuit, double reactor, int n) {
  BridgeParameters p;
  p.circuit = circuit;
  p.x_reactor = reactor;
  p.b_dc = 2.0 * std::numbers::pi * 60.0 * 40e-6 * (480.0 * 480.0 / 1e3);  // 40 uF/kW at 480 V
  p.power = 0.8;
  const auto start = Clock::now();
  for (int k = 0; k < n; ++k) {
    p.x_supply = 0.004 * (1.0 + 0.01 * k);
    p.r_supply = p.x_supply / 8.0;
    overtone::internal::SolveBridge(p, 50);
  }
  return 1e3 * Seconds(start) / n;
}

int Bridges() {
  std::printf("| diode-capacitor bridge, 3 %% reactor | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseCapacitor, 0.03, 40));
  std::printf("| diode-capacitor bridge, no reactor | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseCapacitor, 0.0, 40));
  std::printf("| current-stiff bridge | %.2f ms |\n",
              BridgeMilliseconds(BridgeCircuit::kSixPulseStiff, 0.03, 40));
  return 0;
}

// Seconds per order to fill Y(h), factor it and solve one right-hand side, over the orders
// 2..max_order that carry drive currents (not the triplens: format 1 has no zero-sequence
// sources, and a zero-sequence network cut by delta windings is singular), on one thread: the study's path (one symbolic analysis, a reference order factored
// with pivoting, the others refactored on its pivots) against a plain full sparse LU of every
// order (Eigen's SparseLU: ordering, symbolic and numeric factorization each time).
struct LuComparison {
  double refactor_s = 0.0;
  double full_lu_s = 0.0;
};

LuComparison CompareLu(const overtone::internal::Network& net, int max_order) {
  using namespace overtone::internal;
  const CscPattern& p = net.pattern();
  std::vector<Complex> values(static_cast<std::size_t>(p.nnz())), rhs(static_cast<std::size_t>(p.n));
  const auto reset_rhs = [&] {
    std::fill(rhs.begin(), rhs.end(), Complex{});
    rhs[static_cast<std::size_t>(p.n) - 1] = 1.0;
  };
  LuComparison out;
  std::vector<int> orders;
  for (int h = 2; h <= max_order; ++h) {
    if (h % 3 != 0) orders.push_back(h);
  }

  auto start = Clock::now();
  const SparseAnalysis analysis(p);
  ReferencePivotLu lu(analysis);
  for (int h : orders) {
    net.Fill(h, SequenceOf(h), Shunts::kHarmonic, values);
    if (!lu.has_reference() && !lu.SetReference(values)) std::abort();
    if (!lu.Factor(values)) std::abort();
    reset_rhs();
    lu.Solve(rhs);
  }
  out.refactor_s = Seconds(start) / static_cast<double>(orders.size());

  // The full LU is slow on large plants: it stops after kFullLuBudgetS (at least two orders) and
  // reports the mean of the orders it did.
  constexpr double kFullLuBudgetS = 5.0;
  start = Clock::now();
  int done = 0;
  Eigen::SparseLU<Eigen::SparseMatrix<Complex, Eigen::ColMajor, int>, Eigen::COLAMDOrdering<int>> eigen_lu;
  for (int h : orders) {
    if (done >= 2 && Seconds(start) > kFullLuBudgetS) break;
    ++done;
    net.Fill(h, SequenceOf(h), Shunts::kHarmonic, values);
    const Eigen::Map<const Eigen::SparseMatrix<Complex, Eigen::ColMajor, int>> y(
        p.n, p.n, p.nnz(), p.col_ptr.data(), p.row_idx.data(), values.data());
    eigen_lu.compute(y);
    if (eigen_lu.info() != Eigen::Success) std::abort();
    reset_rhs();
    const Eigen::VectorXcd x = eigen_lu.solve(Eigen::Map<const Eigen::VectorXcd>(rhs.data(), p.n));
    if (!std::isfinite(std::abs(x[0]))) std::abort();
  }
  out.full_lu_s = Seconds(start) / done;
  return out;
}

// | buses | drive groups | load | operating point | per-order solves | assessments | output |
// total | processor time | per bus | peak memory | per order: refactor | per order: full LU | ratio |
int Study(const std::string& plant_path, const std::string& json_path) {
  const double cpu_start = CpuSeconds();
  auto start = Clock::now();
  const overtone::Plant plant = overtone::LoadPlant(plant_path);
  const double load_s = Seconds(start);
  overtone::StudyTimings t;
  overtone::StudyOptions options;
  options.scan = false;
  options.timings = &t;
  start = Clock::now();
  const overtone::StudyResult result = overtone::RunStudy(plant, options);
  const double study_s = Seconds(start);
  start = Clock::now();
  overtone::WriteFileAtomically(json_path, [&](std::ostream& out) { overtone::WriteStudyJson(result, out); });
  const double output_s = Seconds(start);
  const double cpu_s = CpuSeconds() - cpu_start;
  const double memory = PeakMemoryMiB();  // before the comparison below adds its own
  const overtone::internal::Network net(plant);
  const LuComparison lu = CompareLu(net, plant.study.max_order);
  const double total_s = load_s + study_s + output_s;
  std::printf("| %zu | %zu | %.3f | %.3f | %.3f | %.3f | %.3f | **%.3f** | %.3f | %.0f us | %.0f MiB "
              "| %.2f ms | %.2f ms | %.1f |\n",
              plant.buses.size(), plant.drives.size(), load_s, t.operating_point_s,
              t.harmonic_solves_s, t.assessments_s, output_s, total_s, cpu_s,
              1e6 * total_s / static_cast<double>(plant.buses.size()), memory,
              1e3 * lu.refactor_s, 1e3 * lu.full_lu_s, lu.full_lu_s / lu.refactor_s);
  return 0;
}

// | buses | monitored buses | grid points | peaks | seconds | processor seconds |
// The screening that `overtone study` runs after the solves, timed alone.
int Scan(const std::string& plant_path) {
  const overtone::Plant plant = overtone::LoadPlant(plant_path);
  overtone::StudyOptions options;
  options.scan = false;
  const overtone::StudyResult result = overtone::RunStudy(plant, options);
  const double cpu_start = CpuSeconds();
  const auto start = Clock::now();
  const std::vector<overtone::Resonance> peaks =
      overtone::internal::ScreenPresentState(plant, result, options.threads);
  const double wall_s = Seconds(start), cpu_s = CpuSeconds() - cpu_start;
  const std::size_t monitored = overtone::internal::DefaultMonitoredBuses(plant, result.pcc.bus).size();
  overtone::ScanOptions grid;
  grid.to_order = plant.study.max_order;
  std::printf("| %zu | %zu | %d | %zu | **%.3f** | %.3f |\n", plant.buses.size(), monitored,
              grid.point_count(), peaks.size(), wall_s, cpu_s);
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  // The memory settings of the command (app/main.cc), so that the phases add up to its time.
  mallopt(M_MMAP_THRESHOLD, 32 << 20);
  mallopt(M_TRIM_THRESHOLD, 1 << 30);
  const std::string mode = argc > 1 ? argv[1] : "";
  if (mode == "bridges" && argc == 2) return Bridges();
  try {
    if (mode == "study" && argc == 4) return Study(argv[2], argv[3]);
    if (mode == "scan" && argc == 3) return Scan(argv[2]);
  } catch (const std::exception& e) {  // a row that says so, and the table goes on
    std::printf("| %s | failed: %s |\n", argv[2], e.what());
    return 1;
  }
  std::fprintf(stderr, "usage: overtone_bench bridges | study PLANT.yaml OUT.json | scan PLANT.yaml\n");
  return 2;
}
