// src/selected_inverse.cc — Takahashi's recurrences on KLU's factors, one block-diagonal pass.
#include "selected_inverse.h"

#include <algorithm>

namespace overtone::internal {

// Rows come out with columns ascending because columns are visited in order.
void SelectedInverse::Transpose(const std::vector<int>& col_ptr, const std::vector<int>& row_idx,
                                Rows& rows) {
  const int n = f_->n;
  rows.ptr.assign(static_cast<std::size_t>(n) + 1, 0);
  for (int c = 0; c < n; ++c) {
    for (int p = col_ptr[c]; p < col_ptr[c + 1]; ++p) {
      if (row_idx[p] != c) ++rows.ptr[row_idx[p] + 1];
    }
  }
  for (int r = 0; r < n; ++r) rows.ptr[r + 1] += rows.ptr[r];
  rows.col.resize(rows.ptr[n]);
  rows.pos.resize(rows.ptr[n]);
  next_.assign(rows.ptr.begin(), rows.ptr.end() - 1);
  for (int c = 0; c < n; ++c) {
    for (int p = col_ptr[c]; p < col_ptr[c + 1]; ++p) {
      const int r = row_idx[p];
      if (r == c) continue;
      rows.col[next_[r]] = c;
      rows.pos[next_[r]++] = p;
    }
  }
}

// Z(j, k), j < k, sits at L(k, j): row k of L; j > k at U(k, j): row k of U. Both sorted.
const std::complex<double>* SelectedInverse::Find(int j, int k) const {
  if (j == k) return &zd_[k];
  const Rows& rows = j < k ? l_rows_ : u_rows_;
  const auto first = rows.col.begin() + rows.ptr[k], last = rows.col.begin() + rows.ptr[k + 1];
  const auto it = std::lower_bound(first, last, j);
  if (it == last || *it != j) return nullptr;
  const int pos = rows.pos[it - rows.col.begin()];
  return j < k ? &zl_[pos] : &zu_[pos];
}

bool SelectedInverse::Compute(const LuFactors& f) {
  f_ = &f;
  const int n = f.n;
  Transpose(f.l_ptr, f.l_idx, l_rows_);
  Transpose(f.u_ptr, f.u_idx, u_rows_);
  zl_.assign(f.l_val.size(), Complex{});
  zu_.assign(f.u_val.size(), Complex{});
  zd_.assign(n, Complex{});
  row_of_.resize(n), col_of_.resize(n), block_of_.resize(n);
  for (int k = 0; k < n; ++k) row_of_[f.row_perm[k]] = k, col_of_[f.col_perm[k]] = k;
  for (std::size_t b = 0; b + 1 < f.block_start.size(); ++b) {
    std::fill(block_of_.begin() + f.block_start[b], block_of_.begin() + f.block_start[b + 1],
              static_cast<int>(b));
  }

  // Each entry is a short sum over entries with both indices above i, found already.
  for (int i = n - 1; i >= 0; --i) {
    // Column i below the diagonal, where U(i, j) != 0: Z(j, i) = -sum_k Z(j, k) L(k, i).
    for (int q = u_rows_.ptr[i]; q < u_rows_.ptr[i + 1]; ++q) {
      const int j = u_rows_.col[q];
      Complex sum;
      for (int p = f.l_ptr[i]; p < f.l_ptr[i + 1]; ++p) {
        const int k = f.l_idx[p];
        if (k == i) continue;
        const Complex* z = Find(j, k);
        if (!z) return false;
        sum += *z * f.l_val[p];
      }
      zu_[u_rows_.pos[q]] = -sum;
    }
    // The diagonal: Z(i, i) = (1 - sum_k U(i, k) Z(k, i)) / U(i, i); U's diagonal is last in its
    // column.
    const Complex inv_d = 1.0 / f.u_val[f.u_ptr[i + 1] - 1];
    Complex sum;
    for (int q = u_rows_.ptr[i]; q < u_rows_.ptr[i + 1]; ++q) {
      sum += f.u_val[u_rows_.pos[q]] * zu_[u_rows_.pos[q]];
    }
    zd_[i] = (1.0 - sum) * inv_d;
    // Row i right of the diagonal, where L(j, i) != 0: Z(i, j) = -sum_k U(i, k) Z(k, j) / U(i, i).
    for (int p = f.l_ptr[i]; p < f.l_ptr[i + 1]; ++p) {
      const int j = f.l_idx[p];
      if (j == i) continue;
      Complex row_sum;
      for (int q = u_rows_.ptr[i]; q < u_rows_.ptr[i + 1]; ++q) {
        const Complex* z = Find(u_rows_.col[q], j);
        if (!z) return false;
        row_sum += f.u_val[u_rows_.pos[q]] * *z;
      }
      zl_[p] = -row_sum * inv_d;
    }
  }
  return true;
}

bool SelectedInverse::Diagonal(int i, Complex* z) const {
  // A^-1(i, i) = Z(col_of[i], row_of[i]) / row_scale[row_of[i]], from M = (A permuted) / row
  // scale (KLU keeps the scale factors in pivot order once it has factored).
  const int r = col_of_[i], c = row_of_[i];
  if (const Complex* found = Find(r, c)) {
    *z = *found / f_->row_scale[c];
    return true;
  }
  if (block_of_[r] > block_of_[c]) {  // below the block diagonal the inverse is zero
    *z = Complex{};
    return true;
  }
  return false;
}

}  // namespace overtone::internal
