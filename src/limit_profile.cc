// src/limit_profile.cc — reads limit profile files (docs/limits.md) with located errors.
#include "limit_profile.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <initializer_list>
#include <string_view>

#include "overtone/errors.h"
#include "overtone/load.h"
#include "load_diagnostics.h"
#include "plant_text.h"
#include "yaml_tree.h"

namespace overtone::internal {
namespace {

namespace fs = std::filesystem;

constexpr std::string_view kBuiltinProfiles[] = {"ieee519", "iec61000-2-4-class1",
                                                 "iec61000-2-4-class2", "iec61000-2-4-class3"};

// Reads nodes of one file, collecting every problem with its place.
class ProfileReader {
 public:
  explicit ProfileReader(std::string file) : file_(std::move(file)) {}

  void Error(const YamlNode& node, const std::string& message) {
    errors_.push_back({Locate(node, file_), message});
  }

  // Reports keys of `map` not in `allowed`; false when `map` is not a mapping.
  bool Mapping(const YamlNode& map, std::string_view what,
               std::initializer_list<std::string_view> allowed) {
    if (!map.IsMap()) {
      Error(map, fmt::format("{} must be a mapping", what));
      return false;
    }
    for (std::size_t pair = 0; pair < map.size(); ++pair) {
      const std::string_view key = map.Key(pair).Scalar();
      if (std::find(allowed.begin(), allowed.end(), key) == allowed.end()) {
        Error(map.Key(pair), fmt::format("unknown key `{}` in {}", key, what));
      }
    }
    return true;
  }

  YamlNode Required(const YamlNode& map, const char* key, std::string_view what) {
    const YamlNode node = map[key];
    if (!node) Error(map, fmt::format("{} needs `{}`", what, key));
    return node;
  }

  std::optional<double> Number(const YamlNode& node, const char* key, double lo, double hi) {
    const std::string_view text = node.Scalar();
    double v = 0.0;
    const auto [end, error] = std::from_chars(text.data(), text.data() + text.size(), v);
    if (!text.empty() && error == std::errc() && end == text.data() + text.size() &&
        std::isfinite(v) && v >= lo && v <= hi) {
      return v;
    }
    Error(node, fmt::format("`{}` must be a number from {} to {}", key, lo, hi));
    return std::nullopt;
  }

  std::optional<int> Order(const YamlNode& node, const char* key) {
    const std::optional<double> v = Number(node, key, 2, kMaxLimitOrder);
    if (v && *v != std::floor(*v)) {
      Error(node, fmt::format("`{}` must be a whole harmonic order", key));
      return std::nullopt;
    }
    return v ? std::optional<int>(static_cast<int>(*v)) : std::nullopt;
  }

  // `up_to_kv` of a class; classes rise, only the last may leave it out.
  std::optional<double> UpTo(const YamlNode& node, const char* key,
                             std::optional<double>& previous, bool last) {
    if (!node[key]) {
      if (!last) Error(node, fmt::format("only the last entry may leave `{}` out", key));
      return std::nullopt;
    }
    std::optional<double> v = Number(node[key], key, 0.0, 1e6);
    if (v && previous && *v <= *previous) {
      Error(node[key], fmt::format("`{}` must rise from entry to entry", key));
    }
    if (v) previous = v;
    return v;
  }

  // One `orders` row of a voltage class into `limits`.
  void VoltageOrders(const YamlNode& row, OrderLimits& limits) {
    if (!Mapping(row, "an orders entry", {"order", "from", "to", "kind", "percent", "law"})) return;
    std::optional<int> from, to;
    if (row["order"]) {
      if (row["from"] || row["to"]) Error(row, "give either `order` or `from` and `to`");
      from = to = Order(row["order"], "order");
    } else {
      from = Order(Required(row, "from", "an orders entry"), "from");
      to = Order(Required(row, "to", "an orders entry"), "to");
    }
    std::string kind = "all";
    if (row["kind"]) kind = row["kind"].Scalar();
    const auto selected = [&kind](int h) {
      if (kind == "odd-non-triplen") return h % 2 == 1 && h % 3 != 0;
      if (kind == "triplen") return h % 3 == 0 && h % 2 == 1;
      if (kind == "even") return h % 2 == 0;
      if (kind == "odd") return h % 2 == 1;
      return true;
    };
    if (kind != "all" && kind != "odd" && kind != "even" && kind != "odd-non-triplen" &&
        kind != "triplen") {
      Error(row["kind"],
            fmt::format("unknown kind `{}` (all, odd, even, odd-non-triplen, triplen)", kind));
      return;
    }
    std::optional<double> percent, times, n, plus;
    if (row["percent"] && row["law"]) Error(row, "give either `percent` or `law`");
    if (row["law"]) {
      const YamlNode law = row["law"];
      if (!Mapping(law, "a law", {"times", "n", "plus"})) return;
      times = Number(Required(law, "times", "a law"), "times", 0.0, 100.0);
      n = Number(Required(law, "n", "a law"), "n", 1.0, kMaxLimitOrder);
      plus = law["plus"] ? Number(law["plus"], "plus", -100.0, 100.0) : 0.0;
      if (!times || !n || !plus) return;
    } else {
      percent = Number(Required(row, "percent", "an orders entry"), "percent", 0.0, 100.0);
    }
    if (!from || !to || (!percent && !times)) return;
    if (*from > *to) {
      Error(row, "`from` must not exceed `to`");
      return;
    }
    for (int h = *from; h <= *to; ++h) {
      if (!selected(h)) continue;
      const double value = percent ? *percent : *times * *n / h + *plus;
      if (value <= 0.0) {
        Error(row, fmt::format("the law gives {:.3g} % at order {}; a limit must be positive",
                               value, h));
        return;
      }
      if (limits[h]) {
        Error(row, fmt::format("order {} is given a limit twice in this class", h));
        return;
      }
      limits[h] = value;
    }
  }

  void Voltage(const YamlNode& node, LimitProfile& p) {
    if (!Mapping(node, "`voltage`", {"applies_at", "classes"})) return;
    const YamlNode at = Required(node, "applies_at", "`voltage`");
    if (at) {
      if (at.Scalar() == "every-bus") {
        p.voltage_at_every_bus = true;
      } else if (at.Scalar() != "pcc") {
        Error(at, fmt::format("`applies_at` must be `pcc` or `every-bus`, not `{}`", at.Scalar()));
      }
    }
    const YamlNode classes = Required(node, "classes", "`voltage`");
    if (!classes) return;
    if (!classes.IsSequence() || classes.size() == 0) {
      Error(classes, "`classes` must be a non-empty list");
      return;
    }
    std::optional<double> previous;
    for (std::size_t i = 0; i < classes.size(); ++i) {
      const YamlNode c = classes[i];
      if (!Mapping(c, "a voltage class", {"up_to_kv", "thd", "orders"})) continue;
      VoltageLimitClass vc;
      vc.up_to_kv = UpTo(c, "up_to_kv", previous, i + 1 == classes.size());
      vc.thd_percent =
          Number(Required(c, "thd", "a voltage class"), "thd", 0.01, 100.0).value_or(0.0);
      vc.individual.resize(kMaxLimitOrder + 1);
      const YamlNode orders = Required(c, "orders", "a voltage class");
      if (orders && !orders.IsSequence()) Error(orders, "`orders` must be a list");
      if (orders && orders.IsSequence()) {
        for (const YamlNode& row : orders) VoltageOrders(row, vc.individual);
      }
      p.voltage.push_back(std::move(vc));
    }
  }

  // `ranges: [[2, 10], ...]`: disjoint and rising.
  std::vector<std::pair<int, int>> Ranges(const YamlNode& node) {
    std::vector<std::pair<int, int>> ranges;
    if (!node.IsSequence() || node.size() == 0) {
      Error(node, "`ranges` must be a non-empty list of [from, to] pairs");
      return {};
    }
    for (const YamlNode& r : node) {
      if (!r.IsSequence() || r.size() != 2) {
        Error(r, "each range is a pair [from, to]");
        return {};
      }
      const std::optional<int> lo = Order(r[0], "from"), hi = Order(r[1], "to");
      if (!lo || !hi) return {};
      if (*lo > *hi || (!ranges.empty() && *lo <= ranges.back().second)) {
        Error(r, "ranges must rise without overlapping");
        return {};
      }
      ranges.emplace_back(*lo, *hi);
    }
    return ranges;
  }

  void Current(const YamlNode& node, LimitProfile& p) {
    if (!Mapping(node, "`current`", {"even_percent_of_odd", "classes"})) return;
    const double even = Number(Required(node, "even_percent_of_odd", "`current`"),
                               "even_percent_of_odd", 0.0, 100.0)
                            .value_or(100.0) /
                        100.0;
    const YamlNode classes = Required(node, "classes", "`current`");
    if (!classes) return;
    if (!classes.IsSequence() || classes.size() == 0) {
      Error(classes, "`classes` must be a non-empty list");
      return;
    }
    std::optional<double> previous_kv;
    for (std::size_t i = 0; i < classes.size(); ++i) {
      const YamlNode c = classes[i];
      if (!Mapping(c, "a current class", {"up_to_kv", "ranges", "rows"})) continue;
      CurrentLimitClass cc;
      cc.up_to_kv = UpTo(c, "up_to_kv", previous_kv, i + 1 == classes.size());
      const YamlNode ranges_node = Required(c, "ranges", "a current class");
      const std::vector<std::pair<int, int>> ranges =
          ranges_node ? Ranges(ranges_node) : decltype(Ranges(c)){};
      const YamlNode rows = Required(c, "rows", "a current class");
      if (!rows) continue;
      if (!rows.IsSequence() || rows.size() == 0) {
        Error(rows, "`rows` must be a non-empty list");
        continue;
      }
      std::optional<double> previous_ratio;
      for (std::size_t k = 0; k < rows.size(); ++k) {
        const YamlNode row = rows[k];
        if (!Mapping(row, "a current row", {"isc_il_below", "odd", "tdd"})) continue;
        CurrentLimitRow cr;
        cr.isc_il_below = UpTo(row, "isc_il_below", previous_ratio, k + 1 == rows.size());
        cr.tdd_percent =
            Number(Required(row, "tdd", "a current row"), "tdd", 0.01, 100.0).value_or(0.0);
        cr.individual.resize(kMaxLimitOrder + 1);
        const YamlNode odd = Required(row, "odd", "a current row");
        if (!odd) continue;
        if (!odd.IsSequence() || odd.size() != ranges.size()) {
          if (!ranges.empty())
            Error(odd, fmt::format("`odd` must list {} limits, one per range", ranges.size()));
          continue;
        }
        for (std::size_t r = 0; r < ranges.size(); ++r) {
          const std::optional<double> limit = Number(odd[r], "odd", 0.01, 100.0);
          if (!limit) continue;
          for (int h = ranges[r].first; h <= ranges[r].second; ++h) {
            cr.individual[h] = h % 2 == 0 ? *limit * even : *limit;
          }
        }
        cc.rows.push_back(std::move(cr));
      }
      p.current.push_back(std::move(cc));
    }
  }

  LimitProfile Read(const YamlNode& root) {
    LimitProfile p;
    p.file = file_;
    if (!Mapping(root, "a limit profile",
                 {"overtone_limits", "name", "title", "voltage", "current"}))
      Throw();
    const YamlNode version = Required(root, "overtone_limits", "a limit profile");
    if (version && version.Scalar() != "1")
      Error(version, "`overtone_limits` must be 1 (this version reads format 1)");
    if (const YamlNode name = Required(root, "name", "a limit profile")) p.name = name.Scalar();
    p.title = root["title"] ? std::string(root["title"].Scalar()) : p.name;
    if (const YamlNode voltage = Required(root, "voltage", "a limit profile"))
      Voltage(voltage, p);
    if (root["current"]) Current(root["current"], p);
    if (!errors_.empty()) Throw();
    return p;
  }

  [[noreturn]] void Throw() {
    std::stable_sort(errors_.begin(), errors_.end(), [](const Diagnostic& a, const Diagnostic& b) {
      return std::pair(a.where.line, a.where.column) < std::pair(b.where.line, b.where.column);
    });
    throw InputError(std::move(errors_));
  }

 private:
  std::string file_;
  std::vector<Diagnostic> errors_;
};

template <typename Class>
const Class* ClassFor(const std::vector<Class>& classes, double kv) {
  for (const Class& c : classes) {
    if (!c.up_to_kv || kv <= *c.up_to_kv) return &c;
  }
  return nullptr;
}

}  // namespace

const VoltageLimitClass* LimitProfile::VoltageClass(double kv) const {
  return ClassFor(voltage, kv);
}

const CurrentLimitRow* LimitProfile::CurrentRow(double kv, double isc_over_il) const {
  const CurrentLimitClass* c = ClassFor(current, kv);
  if (!c) return nullptr;
  for (const CurrentLimitRow& row : c->rows) {
    if (!row.isc_il_below || isc_over_il < *row.isc_il_below) return &row;
  }
  return nullptr;
}

std::string BuiltinLimitsDir() {
  std::error_code code;
  const fs::path exe = fs::read_symlink("/proc/self/exe", code);
  if (!code) {
    const fs::path installed = exe.parent_path().parent_path() / "share" / "overtone" / "limits";
    if (fs::is_directory(installed, code)) return installed.string();
  }
  return OVERTONE_LIMITS_DIR;
}

LimitProfile ReadLimitProfile(const std::string& path) {
  const YamlDocument document = ReadYamlFile(path, {"limit profile", "overtone_limits: 1"});
  return ProfileReader(path).Read(document.documents()[0]);
}

LimitProfile LoadLimitProfile(const std::string& name_or_path) {
  if (std::find(std::begin(kBuiltinProfiles), std::end(kBuiltinProfiles), name_or_path) !=
      std::end(kBuiltinProfiles)) {
    const fs::path file = fs::path(BuiltinLimitsDir()) / (name_or_path + ".yaml");
    std::error_code code;
    if (!fs::is_regular_file(file, code)) {
      throw InputError({file.string(), 0, 0},
                       fmt::format("the built-in limit profile `{}` is missing from this "
                                   "installation",
                                   name_or_path));
    }
    return ReadLimitProfile(file.string());
  }
  return ReadLimitProfile(name_or_path);
}

}  // namespace overtone::internal

namespace overtone {

void CheckLimitProfile(const Plant& plant) { internal::LoadLimitProfile(plant.study.limits); }

}  // namespace overtone
