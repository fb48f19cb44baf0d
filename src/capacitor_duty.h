// src/capacitor_duty.h — IEEE Std 18 duty of capacitor banks and filter capacitors (internal).
#ifndef OVERTONE_INTERNAL_CAPACITOR_DUTY_H_
#define OVERTONE_INTERNAL_CAPACITOR_DUTY_H_

#include <optional>
#include <vector>

#include "overtone/plant.h"
#include "overtone/study.h"

namespace overtone::internal {

// Continuous-operation limits of IEEE Std 18-2012 (clause 5.1, from memory), percent of rated.
constexpr double kCapVrmsLimit = 110.0;
constexpr double kCapVpeakLimit = 120.0;
constexpr double kCapIrmsLimit = 135.0;
constexpr double kCapKvarLimit = 135.0;

// Duty of one bank (its steps in service) from the voltage spectrum at its bus, by order in pu of
// the bus's nominal voltage (index 0 unused). Empty when no step is in service.
std::optional<CapacitorDuty> BankDuty(const Capacitor& bank, double bus_nominal_v,
                                      const std::vector<Phasor>& bus_voltage_pu);

// Duty of a filter's capacitor and the rms current of its reactor.
CapacitorDuty FilterDuty(const Filter& filter, double bus_nominal_v,
                         const std::vector<Phasor>& bus_voltage_pu);

// Every bank with steps in service, then every filter, from a study's bus voltages.
std::vector<CapacitorDuty> CapacitorDuties(const Plant& plant, const std::vector<BusResult>& buses);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_CAPACITOR_DUTY_H_
