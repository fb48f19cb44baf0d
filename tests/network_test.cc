// tests/network_test.cc — element models, sequence shifts, Y(h) and the sparse solver.
#include "network.h"

#include <catch2/catch.hpp>

#include <Eigen/Dense>
#include <cmath>
#include <numbers>
#include <random>

#include "sparse_lu.h"
#include "test_plants.h"

using namespace overtone;
using namespace overtone::internal;
using overtone::testing::MakeBus;
using overtone::testing::MakeSupply;
using overtone::testing::MakeTransformer;

namespace {

constexpr double kPi = std::numbers::pi;

double AngleDeg(Complex x) { return std::arg(x) * 180.0 / kPi; }

// Open-circuit voltage ratio V_to / V_from of a transformer stamp: -ytf / ytt.
Complex OpenCircuitRatio(const BranchStamp& s) { return -s.ytf / s.ytt; }

Eigen::MatrixXcd Dense(const CscPattern& p, const std::vector<Complex>& values) {
  Eigen::MatrixXcd a = Eigen::MatrixXcd::Zero(p.n, p.n);
  for (int c = 0; c < p.n; ++c) {
    for (int k = p.col_ptr[c]; k < p.col_ptr[c + 1]; ++k) a(p.row_idx[k], c) = values[k];
  }
  return a;
}

}  // namespace

TEST_CASE("Sequence follows h mod 3", "[models]") {
  // DESIGN.md section 3 / IEEE 519-2014 annex: 7, 13 positive; 5, 11 negative; triplens zero.
  CHECK(SequenceOf(1) == Sequence::kPositive);
  CHECK(SequenceOf(5) == Sequence::kNegative);
  CHECK(SequenceOf(7) == Sequence::kPositive);
  CHECK(SequenceOf(11) == Sequence::kNegative);
  CHECK(SequenceOf(13) == Sequence::kPositive);
  CHECK(SequenceOf(2) == Sequence::kNegative);
  CHECK(SequenceOf(4) == Sequence::kPositive);
  CHECK(SequenceOf(9) == Sequence::kZero);
}

TEST_CASE("Vector-group shifts apply by sequence", "[models]") {
  // IEC 60076-1 clock notation: the low-voltage side lags the high-voltage side by 30 deg x clock
  // for positive sequence; negative sequence shifts the opposite way.
  const Transformer dyn11 = MakeTransformer("T", "A", "B", 1000, 5.75, 11);
  const Transformer dyn1 = MakeTransformer("T", "A", "B", 1000, 5.75, 1);
  const Transformer dd0 = MakeTransformer("T", "A", "B", 1000, 5.75, 0);
  // Dyn11: LV leads by 30 deg at positive sequence (330 deg lag), lags by 30 deg at negative.
  CHECK(AngleDeg(OpenCircuitRatio(TransformerStamp(dyn11, 13.8e3, 1, Sequence::kPositive))) == Approx(30.0));
  CHECK(AngleDeg(OpenCircuitRatio(TransformerStamp(dyn11, 13.8e3, 5, Sequence::kNegative))) == Approx(-30.0));
  CHECK(AngleDeg(OpenCircuitRatio(TransformerStamp(dyn11, 13.8e3, 7, Sequence::kPositive))) == Approx(30.0));
  CHECK(AngleDeg(OpenCircuitRatio(TransformerStamp(dyn1, 13.8e3, 1, Sequence::kPositive))) == Approx(-30.0));
  CHECK(AngleDeg(OpenCircuitRatio(TransformerStamp(dyn1, 13.8e3, 11, Sequence::kNegative))) == Approx(30.0));
  CHECK(std::abs(OpenCircuitRatio(TransformerStamp(dd0, 13.8e3, 5, Sequence::kNegative)) - 1.0) < 1e-12);
}

TEST_CASE("A nameplate tap lowers the open-circuit voltage by 1/(1+tap)", "[models]") {
  // PLANT-FORMAT.md Conventions: +2.5 % turns on the from winding -> to side falls by 1/1.025.
  Transformer t = MakeTransformer("T", "A", "B", 1000, 5.75, 0);
  t.tap = 0.025;
  CHECK(std::abs(OpenCircuitRatio(TransformerStamp(t, 13.8e3, 1, Sequence::kPositive))) ==
        Approx(1.0 / 1.025));
}

TEST_CASE("Triplens pass only between grounded wye windings", "[models]") {
  // IEEE Std 399-1997 clause 10.5.4 / common practice: zero-sequence current does not cross a
  // delta winding; a grounded wye facing a delta sees the leakage impedance to ground.
  const Transformer dyn11 = MakeTransformer("T", "A", "B", 1000, 5.75, 11);
  const BranchStamp zero = TransformerStamp(dyn11, 13.8e3, 3, Sequence::kZero);
  CHECK(zero.yft == Complex{});
  CHECK(zero.ytf == Complex{});
  CHECK(zero.yff == Complex{});
  CHECK(std::abs(zero.ytt) > 0.0);
  Transformer ynyn0 = dyn11;
  ynyn0.connection = {"YNyn0", 0, true, true, false, false};
  CHECK(std::abs(TransformerStamp(ynyn0, 13.8e3, 3, Sequence::kZero).yft) > 0.0);
}

TEST_CASE("Supply and capacitor resonate at sqrt(S_sc / Q_c)", "[network]") {
  // IEEE Std 519-2014 clause 8 application notes / IEEE Std 1531: h_r = sqrt(S_sc / Q_c) for a
  // capacitor bank on a bus fed by a source of fault level S_sc (negligible resistance).
  Plant plant;
  plant.buses = {MakeBus("B", 0.48)};
  plant.supplies = {MakeSupply("B", 20.0, 1000.0)};  // 20 MVA, nearly lossless
  Capacitor cap;
  cap.name = "C";
  cap.bus = "B";
  cap.rating_var = 800e3;
  cap.rated_v = 480.0;
  plant.capacitors = {cap};
  const Network net(plant);
  std::vector<Complex> values(static_cast<std::size_t>(net.pattern().nnz()));
  double best_h = 0.0, best_z = 0.0;
  for (double h = 2.0; h <= 8.0; h += 0.0005) {
    net.Fill(h, Sequence::kPositive, Shunts::kHarmonic, values);
    const double z = std::abs(1.0 / values[0]);
    if (z > best_z) {
      best_z = z;
      best_h = h;
    }
  }
  CHECK(best_h == Approx(std::sqrt(20.0e6 / 800e3)).epsilon(1e-3));  // 5.0

  // |Z_parallel(h)| at h = 7 from the textbook element formulas (ohms), then back to pu.
  const double v = 480.0, h = 7.0;
  const double zs_mag = v * v / 20e6, r = zs_mag / std::sqrt(1.0 + 1000.0 * 1000.0);
  const std::complex<double> zs{r, h * r * 1000.0};
  const std::complex<double> zc{0.0, -v * v / 800e3 / h};
  const std::complex<double> zp = zs * zc / (zs + zc);
  net.Fill(h, Sequence::kPositive, Shunts::kHarmonic, values);
  CHECK(std::abs(1.0 / values[0]) * BaseOhms(v) == Approx(std::abs(zp)).epsilon(1e-12));
}

TEST_CASE("KLU agrees with a dense LU on random damped plants", "[sparse]") {
  // Reference: Eigen's dense partial-pivoting LU of the same matrix. Tolerance eps * cond * 100
  // (ceres sparse_cholesky_test.cc practice), so the check cannot flake near a resonance.
  std::mt19937 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int trial = 0; trial < 20; ++trial) {
    Plant plant;
    const int n = 5 + trial * 3;
    for (int i = 0; i < n; ++i) plant.buses.push_back(MakeBus("B" + std::to_string(i), i == 0 ? 13.8 : 0.48));
    plant.supplies = {MakeSupply("B0", 50 + 400 * u(rng), 5 + 20 * u(rng))};
    for (int i = 1; i < n; ++i) {
      const int parent = i == 1 ? 0 : 1 + static_cast<int>(u(rng) * (i - 1));
      if (parent == 0) {
        plant.transformers.push_back(MakeTransformer("T" + std::to_string(i), "B0", "B" + std::to_string(i),
                                                     500 + 2000 * u(rng), 4 + 4 * u(rng),
                                                     u(rng) < 0.5 ? 0 : 11));
      } else {
        Cable c;
        c.name = "K" + std::to_string(i);
        c.from = "B" + std::to_string(parent);
        c.to = "B" + std::to_string(i);
        c.length_m = 10 + 200 * u(rng);
        c.r_ohm_per_m = 1e-4 + 3e-4 * u(rng);
        c.x_ohm_per_m = 0.8e-4;
        c.c_f_per_m = 0.3e-9;
        plant.cables.push_back(c);
      }
      if (u(rng) < 0.3) {
        Capacitor cap;
        cap.name = "C" + std::to_string(i);
        cap.bus = "B" + std::to_string(i);
        cap.rating_var = 50e3 + 300e3 * u(rng);
        cap.rated_v = 480.0;
        plant.capacitors.push_back(cap);
      }
      Load l;
      l.name = "L" + std::to_string(i);
      l.bus = "B" + std::to_string(i);
      l.p_w = 50e3 + 200e3 * u(rng);
      l.q_var = 20e3;
      plant.loads.push_back(l);
    }
    const Network net(plant);
    const SparseAnalysis analysis(net.pattern());
    SparseLu<Complex> lu(analysis);
    std::vector<Complex> values(static_cast<std::size_t>(net.pattern().nnz()));
    for (int h : {2, 5, 7, 11, 13, 25, 49}) {
      net.Fill(h, SequenceOf(h), Shunts::kHarmonic, values);
      REQUIRE(lu.Factor(values));
      std::vector<Complex> b(static_cast<std::size_t>(n));
      for (auto& x : b) x = {u(rng) - 0.5, u(rng) - 0.5};
      const Eigen::MatrixXcd a = Dense(net.pattern(), values);
      const Eigen::VectorXcd rhs = Eigen::Map<Eigen::VectorXcd>(b.data(), n);
      const Eigen::PartialPivLU<Eigen::MatrixXcd> dense(a);
      const Eigen::VectorXcd expected = dense.solve(rhs);
      REQUIRE(lu.Solve(b));
      const Eigen::VectorXcd actual = Eigen::Map<Eigen::VectorXcd>(b.data(), n);
      const Eigen::VectorXd sv = Eigen::JacobiSVD<Eigen::MatrixXcd>(a).singularValues();
      const double cond = sv(0) / sv(n - 1);
      CHECK((actual - expected).norm() / expected.norm() <= 100.0 * 2.2e-16 * cond);
      CHECK((a * actual - rhs).norm() / rhs.norm() <= 1e-10 * cond);
    }
  }
}
