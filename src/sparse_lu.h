// src/sparse_lu.h — sparse LU behind Analyze / Factor / Refactor / Solve (internal).
//
// Wraps SuiteSparse KLU. The matrix is CSC with 0-based int indices:
//   col_ptr  size n+1, column pointers;  row_idx  size nnz, row indices (sorted per column);
//   values   size nnz, Scalar = double or std::complex<double> (KLU reads these as interleaved
//            re/im pairs, which is the layout of std::complex<double>).
// The symbolic analysis (ordering) depends on the pattern only and is shared read-only by every
// numeric factorization made from it, so workers on different orders can share one Analysis.
#ifndef OVERTONE_INTERNAL_SPARSE_LU_H_
#define OVERTONE_INTERNAL_SPARSE_LU_H_

#include <complex>
#include <memory>
#include <vector>

namespace overtone::internal {

struct CscPattern {
  int n = 0;
  std::vector<int> col_ptr;  // size n+1
  std::vector<int> row_idx;  // size nnz
  int nnz() const { return static_cast<int>(row_idx.size()); }
  // Position of (row, col) in the values array; -1 when not in the pattern.
  int Slot(int row, int col) const;
};

// KLU's factors of A in compressed columns (0-based, int): with M(k, j) = A(row_perm[k],
// col_perm[j]) / row_scale[k] (scale factors in pivot order), M = L U + F, where L (unit diagonal, stored first in each
// column) and U (diagonal stored last in each column) are block diagonal over the blocks
// [block_start[b], block_start[b + 1]) of the block triangular form, and F holds the blocks above
// the diagonal (not extracted). Row indices within a column are not sorted.
struct LuFactors {
  int n = 0;
  std::vector<int> l_ptr, l_idx, u_ptr, u_idx;
  std::vector<std::complex<double>> l_val, u_val;
  std::vector<int> row_perm, col_perm, block_start;
  std::vector<double> row_scale;
  std::vector<double> re, im;  // scratch: KLU hands complex factors out as separate parts
};

// Symbolic analysis of a pattern (AMD ordering, block triangular form).
class SparseAnalysis {
 public:
  explicit SparseAnalysis(const CscPattern& pattern);
  ~SparseAnalysis();
  SparseAnalysis(const SparseAnalysis&) = delete;
  SparseAnalysis& operator=(const SparseAnalysis&) = delete;
  const CscPattern& pattern() const { return pattern_; }
  void* symbolic() const { return symbolic_; }

 private:
  const CscPattern& pattern_;
  void* symbolic_ = nullptr;
};

// Numeric LU of one matrix with the analysed pattern. Not thread safe: one per worker.
template <typename Scalar>
class SparseLu {
 public:
  explicit SparseLu(const SparseAnalysis& analysis);
  ~SparseLu();
  SparseLu(const SparseLu&) = delete;
  SparseLu& operator=(const SparseLu&) = delete;

  // Full factorization with partial pivoting; false when the matrix is singular.
  bool Factor(const std::vector<Scalar>& values);
  // Reuses the pivot sequence of the last Factor; false on a zero pivot.
  bool Refactor(const std::vector<Scalar>& values);
  // Cheap reciprocal pivot growth estimate, min|U_ii| / max|U_ii| (KLU rcond).
  double Rcond();
  // Solves in place; rhs has size n.
  bool Solve(std::vector<Scalar>& rhs);
  // Copies the factors out (complex only); reuses out's buffers when the sizes are unchanged.
  bool Extract(LuFactors& out) const;
  bool factored() const { return numeric_ != nullptr; }

 private:
  void FreeNumeric();
  const SparseAnalysis& analysis_;
  void* numeric_ = nullptr;
  void* common_ = nullptr;
};

extern template class SparseLu<double>;
extern template class SparseLu<std::complex<double>>;

// Complex LU of a family of matrices with one pattern (the orders of a harmonic solve, the points
// of a scan) that reuses the pivot sequence of a reference member: refactoring allocates nothing.
// klu_refactor does no pivoting, so its reciprocal condition estimate is checked (KLU user
// guide); when it collapses below kRcondCollapse times the reference's, the matrix is factored
// afresh in a second object and the reference stays intact. A member's factors therefore depend
// on the reference and that member only, never on the order in which members are factored.
class ReferencePivotLu {
 public:
  static constexpr double kRcondCollapse = 1e-3;

  explicit ReferencePivotLu(const SparseAnalysis& analysis) : reference_(analysis), fallback_(analysis) {}

  bool has_reference() const { return reference_rcond_ >= 0.0; }
  void ClearReference() { reference_rcond_ = -1.0; }
  // Factors the reference member; false when it is singular.
  bool SetReference(const std::vector<std::complex<double>>& values);
  // Factors a member; false when it is singular.
  bool Factor(const std::vector<std::complex<double>>& values);
  // Solves in place with the factors of the last member.
  bool Solve(std::vector<std::complex<double>>& rhs) { return last_->Solve(rhs); }
  // The factors of the last member.
  bool Extract(LuFactors& out) const { return last_->Extract(out); }
  double rcond() const { return rcond_; }       // of the last member
  bool fresh() const { return last_ == &fallback_; }  // the last member was factored afresh

 private:
  SparseLu<std::complex<double>> reference_;
  SparseLu<std::complex<double>> fallback_;
  SparseLu<std::complex<double>>* last_ = &reference_;
  double reference_rcond_ = -1.0;
  double rcond_ = 0.0;
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SPARSE_LU_H_
