// tests/selected_inverse_test.cc — the diagonal of a sparse inverse by Takahashi's equations,
// checked against Eigen's dense inverse (an independent calculation: dense LU with partial
// pivoting of the same matrix).
#include "selected_inverse.h"

#include <Eigen/Dense>
#include <catch2/catch.hpp>

#include <cstdint>
#include <random>
#include <string>

#include "network.h"
#include "overtone/load.h"
#include "sparse_lu.h"

using namespace overtone;
using namespace overtone::internal;

namespace {

using Complex = std::complex<double>;

struct SparseMatrix {
  CscPattern pattern;
  std::vector<Complex> values;
};

// A CSC matrix from a dense one, keeping the positions in `keep` (sorted rows per column).
SparseMatrix ToSparse(const Eigen::MatrixXcd& dense, const std::vector<std::vector<bool>>& keep) {
  SparseMatrix m;
  const int n = static_cast<int>(dense.rows());
  m.pattern.n = n;
  m.pattern.col_ptr.push_back(0);
  for (int c = 0; c < n; ++c) {
    for (int r = 0; r < n; ++r) {
      if (!keep[r][c]) continue;
      m.pattern.row_idx.push_back(r);
      m.values.push_back(dense(r, c));
    }
    m.pattern.col_ptr.push_back(m.pattern.nnz());
  }
  return m;
}

// Factors with KLU, runs the selected inversion and compares every diagonal entry it gives with
// the dense inverse; returns how many entries it gave. `factors_out` receives KLU's factors.
int CheckDiagonal(const SparseMatrix& m, const Eigen::MatrixXcd& dense,
                  LuFactors* factors_out = nullptr) {
  const SparseAnalysis analysis(m.pattern);
  SparseLu<Complex> lu(analysis);
  REQUIRE(lu.Factor(m.values));
  LuFactors factors;
  REQUIRE(lu.Extract(factors));
  SelectedInverse inverse;
  inverse.Compute(factors);
  const Eigen::MatrixXcd z = dense.inverse();
  // Rounding error of either method grows with the condition number (Higham, "Accuracy and
  // Stability of Numerical Algorithms", ch. 9, from memory): allow 1e-14 n cond |Z|max.
  const double cond = dense.cwiseAbs().colwise().sum().maxCoeff() *
                      z.cwiseAbs().colwise().sum().maxCoeff();
  const double tolerance = 1e-14 * m.pattern.n * cond * z.cwiseAbs().maxCoeff();
  int given = 0;
  for (int i = 0; i < m.pattern.n; ++i) {
    Complex zii;
    if (!inverse.Diagonal(i, &zii)) continue;
    ++given;
    INFO("i = " << i << ", dense " << z(i, i) << ", selected " << zii << ", cond " << cond);
    CHECK(std::abs(zii - z(i, i)) <= tolerance);
  }
  if (factors_out) *factors_out = factors;
  return given;
}

// A random complex unsymmetric matrix of size n with about `per_column` off-diagonal entries per
// column; `weak_diagonal` makes the diagonal so small (below KLU's diagonal preference of 1e-3
// of the column's largest entry) that KLU pivots off it.
std::pair<Eigen::MatrixXcd, std::vector<std::vector<bool>>> RandomMatrix(
    int n, int per_column, bool weak_diagonal, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  std::uniform_int_distribution<int> row(0, n - 1);
  Eigen::MatrixXcd a = Eigen::MatrixXcd::Zero(n, n);
  std::vector<std::vector<bool>> keep(n, std::vector<bool>(n, false));
  for (int c = 0; c < n; ++c) {
    for (int k = 0; k < per_column; ++k) {
      const int r = row(rng);
      keep[r][c] = true;
      a(r, c) = {u(rng), u(rng)};
    }
    keep[c][c] = true;
    a(c, c) = weak_diagonal ? Complex{1e-5 * u(rng), 1e-5 * u(rng)}
                            : Complex{per_column + 1.0 + u(rng), u(rng)};
  }
  return {a, keep};
}

}  // namespace

TEST_CASE("Selected inversion gives the dense inverse's diagonal on random matrices",
          "[selected_inverse]") {
  // Takahashi, Fagan & Chen 1973; Erisman & Tinney 1975 (from memory): the diagonal of M^-1 from
  // the LU factors alone. Every diagonal entry is in the pattern, so every one must be given.
  for (std::uint64_t seed = 1; seed <= 12; ++seed) {
    const int n = 20 + static_cast<int>(seed) * 7;
    const bool weak = seed % 3 == 0;  // pivoting off the diagonal: P differs from Q
    const auto [a, keep] = RandomMatrix(n, 1 + static_cast<int>(seed % 4), weak, seed);
    INFO("seed " << seed << ", n = " << n << (weak ? ", weak diagonal" : ""));
    LuFactors factors;
    CHECK(CheckDiagonal(ToSparse(a, keep), a, &factors) == n);
    // The weak diagonal makes row and column orders differ, so A's diagonal lies off M's.
    if (weak) CHECK(factors.row_perm != factors.col_perm);
  }
}

TEST_CASE("Selected inversion handles a block triangular matrix", "[selected_inverse]") {
  // A reducible matrix: three diagonal blocks and entries only above them, so KLU's block
  // triangular form has several blocks (and singletons); the inverse's diagonal is that of each
  // block's inverse (block triangular inversion), checked against the dense inverse.
  const int n = 30;
  auto [a, keep] = RandomMatrix(n, 2, false, 99);
  for (int r = 0; r < n; ++r) {
    for (int c = 0; c < n; ++c) {
      const int br = r < 10 ? 0 : r < 12 ? 1 : 2, bc = c < 10 ? 0 : c < 12 ? 1 : 2;
      if (br > bc) keep[r][c] = false, a(r, c) = 0.0;  // nothing below the block diagonal
    }
  }
  LuFactors factors;
  CHECK(CheckDiagonal(ToSparse(a, keep), a, &factors) == n);
  CHECK(factors.block_start.size() > 3);  // at least three blocks in KLU's form
}

TEST_CASE("Selected inversion of plant admittance matrices matches the dense inverse",
          "[selected_inverse]") {
  // Y(h) of real plant files, including phase-shifting transformers (unsymmetric Y), at a few
  // fractional orders; the dense inverse is Z(h), whose diagonal is the driving-point impedance.
  for (const char* file : {"cases/demo/plant.yaml", "tests/reference/plants/kestrel-mill.yaml",
                           "tests/reference/plants/wrenfield-works.yaml"}) {
    const Plant plant = LoadPlant(std::string(OVERTONE_SOURCE_DIR) + "/" + file);
    const Network net(plant);
    std::vector<Complex> values(static_cast<std::size_t>(net.pattern().nnz()));
    for (double h : {1.0, 4.7, 11.3, 37.0}) {
      net.Fill(h, Sequence::kPositive, Shunts::kHarmonic, values);
      const CscPattern& p = net.pattern();
      Eigen::MatrixXcd dense = Eigen::MatrixXcd::Zero(p.n, p.n);
      for (int c = 0; c < p.n; ++c) {
        for (int q = p.col_ptr[c]; q < p.col_ptr[c + 1]; ++q) dense(p.row_idx[q], c) = values[q];
      }
      INFO(file << " at order " << h);
      CHECK(CheckDiagonal({p, values}, dense) == p.n);
    }
  }
}
