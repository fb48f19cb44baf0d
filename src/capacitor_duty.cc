// src/capacitor_duty.cc — IEEE Std 18 capacitor duty: rms and peak voltage, rms current, kvar.
//
// Per phase of the wye equivalent, in volts, amperes and ohms. The bank's current at order h is
// the bus voltage times the bank's admittance (the network's own model, reactor included); the
// capacitor's voltage is that current times -j X_C / h, so a detuned bank sees the fundamental
// rise 1/(1 - p) behind its reactor (IEEE Std 1036-2010; IEEE Std 18-2012 clause 5.1 for the
// quantities and their limits; kvar as the sum of V_h I_h over orders, IEEE Std 18-2012 and
// IEEE Std 1531-2020; clause numbers from memory).
#include "capacitor_duty.h"

#include <algorithm>
#include <cmath>
#include <string_view>
#include <unordered_map>

#include "indices.h"
#include "models.h"

namespace overtone::internal {
namespace {

constexpr Complex kJ{0.0, 1.0};
const double kSqrt3 = std::sqrt(3.0);

// Bus voltage by order in volts, phase to neutral.
std::vector<Complex> PhaseVolts(const std::vector<Phasor>& pu, double nominal_v) {
  std::vector<Complex> v(pu.size());
  for (std::size_t h = 1; h < pu.size(); ++h) v[h] = pu[h] * nominal_v / kSqrt3;
  return v;
}

double Rms(const std::vector<Complex>& x) { return ComputeIndices(x, 0.0, /*with_peak=*/false).rms; }

// The IEEE 18 figures from the capacitor's own voltage and current spectra (index = order) and
// its rating (three-phase var at line-to-line volts).
void FillDuty(const std::vector<Complex>& vc, const std::vector<Complex>& i, double rating_var,
              double rated_v, CapacitorDuty& d) {
  const double v_rated = rated_v / kSqrt3;
  const double i_rated = rating_var / (kSqrt3 * rated_v);
  const WaveformIndices v = ComputeIndices(vc);
  double arith = 0.0, var = 0.0;
  for (std::size_t h = 1; h < vc.size(); ++h) {
    arith += std::abs(vc[h]);
    var += 3.0 * std::abs(vc[h]) * std::abs(i[h]);
  }
  d.vrms_percent = 100.0 * v.rms / v_rated;
  d.vpeak_percent = 100.0 * v.peak / v_rated;
  d.vpeak_arith_percent = 100.0 * arith / v_rated;
  d.irms_percent = 100.0 * Rms(i) / i_rated;
  d.kvar_percent = 100.0 * var / rating_var;
  d.pass = d.vrms_percent <= kCapVrmsLimit && d.vpeak_percent <= kCapVpeakLimit &&
           d.irms_percent <= kCapIrmsLimit && d.kvar_percent <= kCapKvarLimit;
}

double FundamentalRise(const std::vector<Complex>& vc, const std::vector<Complex>& v_bus) {
  return std::abs(v_bus[1]) > 0.0 ? std::abs(vc[1]) / std::abs(v_bus[1]) : 1.0;
}

}  // namespace

std::optional<CapacitorDuty> BankDuty(const Capacitor& bank, double bus_nominal_v,
                                      const std::vector<Phasor>& bus_voltage_pu) {
  if (bank.steps_on <= 0) return std::nullopt;
  const double rating_on = bank.rating_var * bank.steps_on / bank.steps;
  const double xc_on = bank.rated_v * bank.rated_v / rating_on;
  const std::vector<Complex> v = PhaseVolts(bus_voltage_pu, bus_nominal_v);
  std::vector<Complex> i(v.size()), vc(v.size());
  for (std::size_t h = 1; h < v.size(); ++h) {
    const double order = static_cast<double>(h);
    i[h] = v[h] * CapacitorAdmittance(bank, bus_nominal_v, order) / BaseOhms(bus_nominal_v);
    vc[h] = i[h] * (-kJ * xc_on / order);
  }
  CapacitorDuty d;
  d.name = bank.name;
  d.bus = bank.bus;
  d.kind = "capacitor";
  d.steps_on = bank.steps_on;
  d.steps = bank.steps;
  FillDuty(vc, i, rating_on, bank.rated_v, d);
  d.fundamental_rise = FundamentalRise(vc, v);
  if (bank.detuning > 0.0) d.reactor_irms_a = Rms(i);
  return d;
}

CapacitorDuty FilterDuty(const Filter& filter, double bus_nominal_v,
                         const std::vector<Phasor>& bus_voltage_pu) {
  const double xc = filter.rated_v * filter.rated_v / filter.rating_var;
  const double xl = xc / (filter.tuned_order * filter.tuned_order);  // X_L = X_C / n^2
  const std::vector<Complex> v = PhaseVolts(bus_voltage_pu, bus_nominal_v);
  std::vector<Complex> i(v.size()), vc(v.size()), reactor(v.size());
  for (std::size_t h = 1; h < v.size(); ++h) {
    const double order = static_cast<double>(h);
    i[h] = v[h] * FilterAdmittance(filter, bus_nominal_v, order) / BaseOhms(bus_nominal_v);
    vc[h] = i[h] * (-kJ * xc / order);
    // Single-tuned: the reactor carries the branch current. High-pass: the reactor sits in
    // parallel with the resistor, across the voltage left after the capacitor.
    reactor[h] = filter.type == FilterType::kSingleTuned ? i[h] : (v[h] - vc[h]) / (kJ * order * xl);
  }
  CapacitorDuty d;
  d.name = filter.name;
  d.bus = filter.bus;
  d.kind = "filter";
  FillDuty(vc, i, filter.rating_var, filter.rated_v, d);
  d.fundamental_rise = FundamentalRise(vc, v);
  d.reactor_irms_a = Rms(reactor);
  return d;
}

std::vector<CapacitorDuty> CapacitorDuties(const Plant& plant, const std::vector<BusResult>& buses) {
  std::unordered_map<std::string_view, const BusResult*> by_name;  // one pass, not one per bank
  for (const BusResult& b : buses) by_name.emplace(b.name, &b);
  const auto bus = [&](const std::string& name) -> const BusResult& { return *by_name.at(name); };
  std::vector<CapacitorDuty> duties;
  for (const Capacitor& c : plant.capacitors) {
    const BusResult& b = bus(c.bus);
    if (auto d = BankDuty(c, b.nominal_v, b.voltage_pu.by_order)) duties.push_back(std::move(*d));
  }
  for (const Filter& f : plant.filters) {
    const BusResult& b = bus(f.bus);
    duties.push_back(FilterDuty(f, b.nominal_v, b.voltage_pu.by_order));
  }
  return duties;
}

}  // namespace overtone::internal
