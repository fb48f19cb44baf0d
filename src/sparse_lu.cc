// src/sparse_lu.cc — KLU calls for real and complex matrices.
#include "sparse_lu.h"

#include <klu.h>

#include <algorithm>
#include <stdexcept>

namespace overtone::internal {
namespace {

klu_common* Common(void* p) { return static_cast<klu_common*>(p); }
klu_symbolic* Symbolic(const SparseAnalysis& a) { return static_cast<klu_symbolic*>(a.symbolic()); }
int* Ptr(const std::vector<int>& v) { return const_cast<int*>(v.data()); }

// KLU reads complex values as interleaved doubles; it does not write through these pointers.
double* Raw(const std::vector<double>& v) { return const_cast<double*>(v.data()); }
double* Raw(const std::vector<std::complex<double>>& v) {
  return reinterpret_cast<double*>(const_cast<std::complex<double>*>(v.data()));
}
double* Raw(std::vector<double>& v) { return v.data(); }
double* Raw(std::vector<std::complex<double>>& v) { return reinterpret_cast<double*>(v.data()); }

klu_common* NewCommon() {
  auto* common = new klu_common;
  klu_defaults(common);
  return common;
}

}  // namespace

int CscPattern::Slot(int row, int col) const {
  const auto begin = row_idx.begin() + col_ptr[col];
  const auto end = row_idx.begin() + col_ptr[col + 1];
  const auto it = std::lower_bound(begin, end, row);
  return (it != end && *it == row) ? static_cast<int>(it - row_idx.begin()) : -1;
}

SparseAnalysis::SparseAnalysis(const CscPattern& pattern) : pattern_(pattern) {
  klu_common common;
  klu_defaults(&common);
  symbolic_ = klu_analyze(pattern.n, Ptr(pattern.col_ptr), Ptr(pattern.row_idx), &common);
  if (symbolic_ == nullptr) throw std::runtime_error("sparse analysis failed (KLU)");
}

SparseAnalysis::~SparseAnalysis() {
  klu_common common;
  klu_defaults(&common);
  auto* symbolic = static_cast<klu_symbolic*>(symbolic_);
  klu_free_symbolic(&symbolic, &common);
}

template <typename Scalar>
SparseLu<Scalar>::SparseLu(const SparseAnalysis& analysis)
    : analysis_(analysis), common_(NewCommon()) {}

template <typename Scalar>
SparseLu<Scalar>::~SparseLu() {
  FreeNumeric();
  delete Common(common_);
}

template <typename Scalar>
void SparseLu<Scalar>::FreeNumeric() {
  if (numeric_ == nullptr) return;
  auto* numeric = static_cast<klu_numeric*>(numeric_);
  if constexpr (std::is_same_v<Scalar, double>) {
    klu_free_numeric(&numeric, Common(common_));
  } else {
    klu_z_free_numeric(&numeric, Common(common_));
  }
  numeric_ = nullptr;
}

template <typename Scalar>
bool SparseLu<Scalar>::Factor(const std::vector<Scalar>& values) {
  FreeNumeric();
  const CscPattern& p = analysis_.pattern();
  if constexpr (std::is_same_v<Scalar, double>) {
    numeric_ = klu_factor(Ptr(p.col_ptr), Ptr(p.row_idx), Raw(values), Symbolic(analysis_),
                          Common(common_));
  } else {
    numeric_ = klu_z_factor(Ptr(p.col_ptr), Ptr(p.row_idx), Raw(values), Symbolic(analysis_),
                            Common(common_));
  }
  return numeric_ != nullptr;
}

template <typename Scalar>
bool SparseLu<Scalar>::Refactor(const std::vector<Scalar>& values) {
  if (numeric_ == nullptr) return Factor(values);
  const CscPattern& p = analysis_.pattern();
  auto* numeric = static_cast<klu_numeric*>(numeric_);
  int ok;
  if constexpr (std::is_same_v<Scalar, double>) {
    ok = klu_refactor(Ptr(p.col_ptr), Ptr(p.row_idx), Raw(values), Symbolic(analysis_), numeric,
                      Common(common_));
  } else {
    ok = klu_z_refactor(Ptr(p.col_ptr), Ptr(p.row_idx), Raw(values), Symbolic(analysis_), numeric,
                        Common(common_));
  }
  return ok != 0 && Common(common_)->status == KLU_OK;
}

template <typename Scalar>
double SparseLu<Scalar>::Rcond() {
  if (numeric_ == nullptr) return 0.0;
  auto* numeric = static_cast<klu_numeric*>(numeric_);
  int ok;
  if constexpr (std::is_same_v<Scalar, double>) {
    ok = klu_rcond(Symbolic(analysis_), numeric, Common(common_));
  } else {
    ok = klu_z_rcond(Symbolic(analysis_), numeric, Common(common_));
  }
  return ok ? Common(common_)->rcond : 0.0;
}

template <typename Scalar>
bool SparseLu<Scalar>::Solve(std::vector<Scalar>& rhs) {
  if (numeric_ == nullptr) return false;
  const int n = analysis_.pattern().n;
  auto* numeric = static_cast<klu_numeric*>(numeric_);
  if constexpr (std::is_same_v<Scalar, double>) {
    return klu_solve(Symbolic(analysis_), numeric, n, 1, Raw(rhs), Common(common_)) != 0;
  } else {
    return klu_z_solve(Symbolic(analysis_), numeric, n, 1, Raw(rhs), Common(common_)) != 0;
  }
}

template <typename Scalar>
bool SparseLu<Scalar>::Extract(LuFactors& out) const {
  if constexpr (std::is_same_v<Scalar, double>) {
    throw std::logic_error("SparseLu<double>::Extract is not provided");
  } else {
    if (numeric_ == nullptr) return false;
    auto* numeric = static_cast<klu_numeric*>(numeric_);
    klu_symbolic* symbolic = Symbolic(analysis_);
    const int n = symbolic->n, lnz = numeric->lnz, unz = numeric->unz;
    out.n = n;
    out.l_ptr.resize(n + 1), out.u_ptr.resize(n + 1);
    out.l_idx.resize(lnz), out.u_idx.resize(unz);
    out.l_val.resize(lnz), out.u_val.resize(unz);
    out.row_perm.resize(n), out.col_perm.resize(n), out.row_scale.resize(n);
    out.block_start.resize(symbolic->nblocks + 1);
    out.re.resize(static_cast<std::size_t>(lnz) + unz);  // L then U
    out.im.resize(out.re.size());
    double* lx = out.re.data();
    double* lz = out.im.data();
    double* ux = lx + lnz;
    double* uz = lz + lnz;
    if (!klu_z_extract(numeric, symbolic, out.l_ptr.data(), out.l_idx.data(), lx, lz,
                       out.u_ptr.data(), out.u_idx.data(), ux, uz, nullptr, nullptr, nullptr,
                       nullptr, out.row_perm.data(), out.col_perm.data(), out.row_scale.data(),
                       out.block_start.data(), Common(common_))) {
      return false;
    }
    for (int p = 0; p < lnz; ++p) out.l_val[p] = {lx[p], lz[p]};
    for (int p = 0; p < unz; ++p) out.u_val[p] = {ux[p], uz[p]};
    return true;
  }
}

template class SparseLu<double>;
template class SparseLu<std::complex<double>>;

bool ReferencePivotLu::SetReference(const std::vector<std::complex<double>>& values) {
  if (!reference_.Factor(values)) return false;
  reference_rcond_ = reference_.Rcond();
  return true;
}

bool ReferencePivotLu::Factor(const std::vector<std::complex<double>>& values) {
  last_ = &reference_;
  rcond_ = reference_.Refactor(values) ? reference_.Rcond() : 0.0;
  if (rcond_ >= kRcondCollapse * reference_rcond_) return true;
  last_ = &fallback_;
  if (!fallback_.Factor(values)) return false;
  rcond_ = fallback_.Rcond();
  return true;
}

}  // namespace overtone::internal
