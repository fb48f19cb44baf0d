// src/limit_profile.h — harmonic limit profiles: data files read into per-order tables (internal).
//
// A profile holds voltage limits by bus voltage class (individual orders and THD, in percent of
// the fundamental) and, optionally, current limits at the pcc by voltage class and I_sc/I_L
// (individual orders and TDD, in percent of I_L). The file shape is in docs/limits.md.
#ifndef OVERTONE_INTERNAL_LIMIT_PROFILE_H_
#define OVERTONE_INTERNAL_LIMIT_PROFILE_H_

#include <optional>
#include <string>
#include <vector>

namespace overtone::internal {

constexpr int kMaxLimitOrder = 200;

// Percent limits by order; index = order, empty where the profile sets no limit.
using OrderLimits = std::vector<std::optional<double>>;

struct VoltageLimitClass {
  std::optional<double> up_to_kv;  // empty: every voltage above the previous class
  double thd_percent = 0.0;
  OrderLimits individual;
};

struct CurrentLimitRow {
  std::optional<double> isc_il_below;  // empty: every ratio above the previous row
  double tdd_percent = 0.0;
  OrderLimits individual;
};

struct CurrentLimitClass {
  std::optional<double> up_to_kv;
  std::vector<CurrentLimitRow> rows;
};

struct LimitProfile {
  std::string name;   // "ieee519" or the file's `name`
  std::string title;  // e.g. "IEEE Std 519-2014"
  std::string file;   // where it was read from
  bool voltage_at_every_bus = false;  // false: at the pcc, elsewhere a design guide
  std::vector<VoltageLimitClass> voltage;
  std::vector<CurrentLimitClass> current;  // empty: the profile has no current limits

  // The class for a bus of nominal `kv` (classes in increasing order of up_to_kv); null if none.
  const VoltageLimitClass* VoltageClass(double kv) const;
  const CurrentLimitRow* CurrentRow(double kv, double isc_over_il) const;
};

// The directory that holds the built-in profiles: <executable>/../share/overtone/limits when it
// exists, else the source tree's src/limits (compile definition).
std::string BuiltinLimitsDir();

// Reads a profile file. Throws InputError naming file, line and column for every problem found.
LimitProfile ReadLimitProfile(const std::string& path);

// A built-in name (`ieee519`, `iec61000-2-4-class1`, ...) or a file path as resolved by the loader.
LimitProfile LoadLimitProfile(const std::string& name_or_path);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_LIMIT_PROFILE_H_
