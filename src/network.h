// src/network.h — bus index, element list and the fixed sparsity pattern of Y(h) (internal).
//
// Per unit on kBaseVa and each bus's nominal voltage. The pattern is built once per plant; every
// element knows the value slots it writes, so filling Y at an order writes values only and
// allocates nothing.
#ifndef OVERTONE_INTERNAL_NETWORK_H_
#define OVERTONE_INTERNAL_NETWORK_H_

#include <string>
#include <unordered_map>
#include <vector>

#include "models.h"
#include "overtone/plant.h"
#include "sparse_lu.h"

namespace overtone::internal {

// Which elements a matrix holds.
enum class Shunts {
  kFundamental,    // sources, branches, capacitors, filters (loads are constant power)
  kHarmonic,       // the above plus motors and linear loads
  kShortCircuit,   // sources and the series part of branches only (I_sc, Thevenin at a bus)
};

// A Thevenin source: a supply or a generator.
struct SourceRef {
  int bus = 0;
  const Supply* supply = nullptr;
  const Generator* generator = nullptr;
  int slot = 0;
  const std::string& name() const { return supply ? supply->name : generator->name; }
};

struct BranchRef {
  int from = 0, to = 0;
  const Transformer* transformer = nullptr;
  const Cable* cable = nullptr;
  int slot_ff = 0, slot_ft = 0, slot_tf = 0, slot_tt = 0;
  const std::string& name() const { return transformer ? transformer->name : cable->name; }
};

class Network {
 public:
  // Throws InputError for connections the model cannot represent.
  explicit Network(const Plant& plant);

  int bus_count() const { return static_cast<int>(buses_.size()); }
  int BusIndex(const std::string& name) const { return bus_index_.at(name); }
  const Bus& bus(int i) const { return *buses_[i]; }
  double nominal_v(int i) const { return buses_[i]->nominal_v; }
  // Amperes per pu of current at bus i: S_base / (sqrt(3) V_nom).
  double BaseAmps(int i) const;
  double frequency_hz() const { return frequency_hz_; }

  const CscPattern& pattern() const { return pattern_; }
  const std::vector<SourceRef>& sources() const { return sources_; }
  const std::vector<BranchRef>& branches() const { return branches_; }

  // Writes the values of Y at order h (sequence `seq`) into `values` (size nnz).
  void Fill(double h, Sequence seq, Shunts shunts, std::vector<Complex>& values) const;

  Complex SourceImpedance(const SourceRef& s, double h) const;
  Complex SourceEmf(const SourceRef& s) const;  // fundamental EMF, pu
  BranchStamp Stamp(const BranchRef& b, double h, Sequence seq) const;

 private:
  struct ShuntRef {
    int bus = 0;
    const Capacitor* capacitor = nullptr;
    const Filter* filter = nullptr;
    const Motor* motor = nullptr;
    const Load* load = nullptr;
    int slot = 0;
  };
  Complex ShuntAdmittance(const ShuntRef& s, double h) const;

  double frequency_hz_ = 60.0;
  std::vector<const Bus*> buses_;
  std::unordered_map<std::string, int> bus_index_;
  std::vector<SourceRef> sources_;
  std::vector<BranchRef> branches_;
  std::vector<ShuntRef> shunts_;
  CscPattern pattern_;
};

enum class SourceSet {
  kAll,           // supplies and generators
  kSuppliesOnly,  // utility supplies (falls back to all sources when the plant has none)
};

// Thevenin impedance at each of `buses` (pu, fundamental, positive sequence) with the sources
// and the series part of the branches only: the short-circuit impedance. One factorization
// serves every bus. Throws SolveError when that network is singular.
std::vector<Complex> ShortCircuitImpedances(const Network& network, const std::vector<int>& buses,
                                            SourceSet sources);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_NETWORK_H_
