// src/selected_inverse.h — entries of a sparse matrix's inverse from its LU factors (internal).
//
// Takahashi's equations (K. Takahashi, J. Fagan, M.-S. Chen, "Formation of a sparse bus impedance
// matrix and its application to short circuit study", PICA 1973; A. M. Erisman, W. F. Tinney,
// "On computing certain elements of the inverse of a sparse matrix", CACM 18(3), 1975; from
// memory). With M = L U, L unit lower triangular and U = D W (D diagonal, W unit upper), the
// inverse Z = M^-1 satisfies
//   Z = D^-1 L^-1 + (I - W) Z      (rows:    Z(i, j) = -sum_k W(i, k) Z(k, j),  i < j)
//   Z = W^-1 D^-1 + Z (I - L)      (columns: Z(i, j) = -sum_k Z(i, k) L(k, j),  i > j)
//   Z(i, i) = 1 / D(i) - sum_k W(i, k) Z(k, i),
// so going from the last index down, every entry of Z on the pattern of (L + U)^T follows from
// entries already found. That pattern is closed under the recurrences because LU fill makes
// (k, j) structural whenever L(k, i) and U(i, j) are. The cost is of the order of one more
// factorization, against one solve per wanted diagonal entry.
#ifndef OVERTONE_INTERNAL_SELECTED_INVERSE_H_
#define OVERTONE_INTERNAL_SELECTED_INVERSE_H_

#include <complex>
#include <vector>

#include "sparse_lu.h"

namespace overtone::internal {

class SelectedInverse {
 public:
  // Z = M^-1 on the pattern of (L + U)^T of `factors`, which must outlive the next Diagonal call.
  // Buffers are reused while the factors' sizes do not change. False when an entry that the
  // recurrences need is missing from the pattern (not expected from an LU's fill; the caller
  // then solves instead).
  bool Compute(const LuFactors& factors);

  // A^-1(i, i) of the factored matrix A, in A's own numbering. False when the entry lies outside
  // the computed set (A(i, i) not stored in A's pattern): the caller then solves for it.
  bool Diagonal(int i, std::complex<double>* z) const;

 private:
  using Complex = std::complex<double>;
  // The off-diagonal entries of a compressed-column factor by rows: for row r, entries
  // [ptr[r], ptr[r+1]) of col/pos give each entry's column, ascending, and its position in the
  // factor's arrays.
  struct Rows {
    std::vector<int> ptr, col, pos;
  };
  void Transpose(const std::vector<int>& col_ptr, const std::vector<int>& row_idx, Rows& rows);
  // Z(j, k) for j, k in the computed set, or null when (j, k) is outside it.
  const Complex* Find(int j, int k) const;

  const LuFactors* f_ = nullptr;
  Rows l_rows_, u_rows_;
  std::vector<int> next_;
  std::vector<Complex> zl_;  // at L(r, c): Z(c, r), c < r
  std::vector<Complex> zu_;  // at U(r, c): Z(c, r), c > r
  std::vector<Complex> zd_;  // Z(i, i)
  std::vector<int> row_of_, col_of_, block_of_;  // A's index -> M's row / column; M's index -> block
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SELECTED_INVERSE_H_
