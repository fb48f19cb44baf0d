// src/assessment.cc — checks a study against its limit profile (docs/limits.md).
#include "assessment.h"

#include <cmath>
#include <string>
#include <type_traits>

#include <fmt/format.h>

#include "capacitor_duty.h"
#include "indices.h"

namespace overtone::internal {
namespace {

// Checks one figure; a figure over its limit is added to `out` with its label `what`, or
// `what()` for a label made only then (a large study checks millions of figures).
template <typename Label>
void Check(std::vector<Violation>& out, const std::string& where, const Label& what, double value,
           double limit) {
  if (!(value > limit)) return;
  if constexpr (std::is_invocable_v<Label>) {
    out.push_back({where, what(), value, limit});
  } else {
    out.push_back({where, std::string(what), value, limit});
  }
}

BusLimitCheck CheckBus(const BusResult& b, const VoltageLimitClass& limits, bool design_guide,
                       std::vector<Violation>& out) {
  BusLimitCheck c;
  c.bus = b.name;
  c.design_guide = design_guide;
  c.thd_percent = b.indices.thd_percent;
  c.thd_limit_percent = limits.thd_percent;
  const std::size_t before = out.size();
  Check(out, b.name, "thd_v", c.thd_percent, c.thd_limit_percent);
  const double v1 = b.indices.fundamental;
  double worst_ratio = -1.0;
  for (std::size_t h = 2; h < b.voltage_pu.by_order.size() && h < limits.individual.size(); ++h) {
    if (!limits.individual[h]) continue;
    const double percent = v1 > kNegligibleVoltagePu ? 100.0 * std::abs(b.voltage_pu.by_order[h]) / v1 : 0.0;
    const double limit = *limits.individual[h];
    Check(out, b.name, [h] { return fmt::format("v_h{}", h); }, percent, limit);
    if (percent / limit > worst_ratio) {
      worst_ratio = percent / limit;
      c.worst_order = static_cast<int>(h);
      c.worst_percent = percent;
      c.worst_limit_percent = limit;
    }
  }
  c.pass = out.size() == before;
  return c;
}

void CheckPccCurrent(const LimitProfile& profile, double pcc_kv, StudyResult& r) {
  PccResult& pcc = r.pcc;
  if (!pcc.demand_current_a || !pcc.tdd_percent) return;
  const CurrentLimitRow* row = profile.CurrentRow(pcc_kv, pcc.isc_a / *pcc.demand_current_a);
  if (!row) return;
  pcc.tdd_limit_percent = row->tdd_percent;
  Check(r.assessment.violations, pcc.bus, "tdd", *pcc.tdd_percent, row->tdd_percent);
  for (PccHarmonic& h : pcc.harmonics) {
    if (h.order >= static_cast<int>(row->individual.size()) || !row->individual[h.order]) continue;
    h.limit_percent = row->individual[h.order];
    h.pass = h.percent_of_il <= *h.limit_percent;
    Check(r.assessment.violations, pcc.bus, [&h] { return fmt::format("i_h{}", h.order); },
          h.percent_of_il, *h.limit_percent);
  }
}

void CheckCapacitors(StudyResult& r) {
  for (const CapacitorDuty& c : r.capacitors) {
    std::vector<Violation>& out = r.assessment.violations;
    Check(out, c.name, "cap_vrms", c.vrms_percent, kCapVrmsLimit);
    Check(out, c.name, "cap_vpeak", c.vpeak_percent, kCapVpeakLimit);
    Check(out, c.name, "cap_irms", c.irms_percent, kCapIrmsLimit);
    Check(out, c.name, "cap_kvar", c.kvar_percent, kCapKvarLimit);
  }
}

}  // namespace

void AssessLimits(const LimitProfile& profile, StudyResult& r) {
  Assessment& a = r.assessment;
  a.profile = profile.name;
  a.title = profile.title;
  double pcc_kv = 0.0;
  for (const BusResult& b : r.buses) {
    const double kv = b.nominal_v / 1e3;
    const bool at_pcc = b.name == r.pcc.bus;
    if (at_pcc) pcc_kv = kv;
    const VoltageLimitClass* limits = profile.VoltageClass(kv);
    if (!limits) continue;
    const bool design_guide = !at_pcc && !profile.voltage_at_every_bus;
    a.buses.push_back(CheckBus(b, *limits, design_guide, design_guide ? a.design_guide : a.violations));
  }
  CheckPccCurrent(profile, pcc_kv, r);
  CheckCapacitors(r);
}

}  // namespace overtone::internal
