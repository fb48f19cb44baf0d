// src/sweep.cc — sweep files read and checked, cases built from the base plant, run, and gathered.
#include "overtone/sweep.h"

#include <algorithm>
#include <cctype>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <mutex>
#include <random>
#include <set>
#include <tuple>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "overtone/errors.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"
#include "output_common.h"
#include "load_diagnostics.h"
#include "parallel.h"
#include "plant_text.h"
#include "sweep.h"
#include "units.h"
#include "yaml_tree.h"

namespace overtone {
namespace internal {

std::uint64_t CaseSeed(std::uint64_t seed, std::uint64_t index) {
  std::uint64_t z = seed + 0x9E3779B97F4A7C15ull * (index + 1);
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  return z ^ (z >> 31);
}

}  // namespace internal

namespace {

namespace fs = std::filesystem;
using internal::QuantityKind;
using internal::YamlNode;

// Largest `add_drives` list written back for the loader: far above any real list.
constexpr std::size_t kMaxAddedDrivesBytes = std::size_t{16} << 20;

// Collects located problems in the sweep file and throws them together.
class SweepReader {
 public:
  explicit SweepReader(std::string file) : file_(std::move(file)) {}

  SourceLocation Where(const YamlNode& node) const { return internal::Locate(node, file_); }
  void Error(const YamlNode& node, const std::string& message) {
    errors_.push_back({Where(node), message});
  }
  void Add(const std::vector<Diagnostic>& more) {
    errors_.insert(errors_.end(), more.begin(), more.end());
  }
  // In the order they were written; problems placed in other files come last.
  void ThrowIfAny() {
    std::stable_sort(errors_.begin(), errors_.end(), [&](const Diagnostic& a, const Diagnostic& b) {
      return std::make_tuple(a.where.file != file_, a.where.line, a.where.column) <
             std::make_tuple(b.where.file != file_, b.where.line, b.where.column);
    });
    if (!errors_.empty()) throw InputError(errors_);
  }

  // Keys of a map outside `allowed` are errors.
  bool CheckMap(const YamlNode& node, const std::string& what,
                std::initializer_list<const char*> allowed) {
    if (!node.IsMap()) {
      Error(node, fmt::format("{} must be a mapping", what));
      return false;
    }
    for (std::size_t pair = 0; pair < node.size(); ++pair) {
      const std::string_view key = node.Key(pair).Scalar();
      if (std::none_of(allowed.begin(), allowed.end(), [&](const char* a) { return key == a; })) {
        std::string list;
        for (const char* a : allowed) list += (list.empty() ? "" : ", ") + std::string(a);
        Error(node.Key(pair), fmt::format("unknown key `{}` in {} (known: {})", key, what, list));
      }
    }
    return true;
  }

  std::optional<double> Quantity(const YamlNode& node, QuantityKind kind, const char* bare,
                                 const std::string& what) {
    if (!node.IsScalar()) {
      Error(node, fmt::format("{} must be a single value", what));
      return std::nullopt;
    }
    std::string error;
    const auto q = internal::ParseQuantity(node.Scalar(), kind, bare, &error);
    if (!q) Error(node, fmt::format("{}: {}", what, error));
    return q ? std::optional<double>(q->value) : std::nullopt;
  }

  std::optional<long> Integer(const YamlNode& node, long lo, long hi, const std::string& what) {
    long v = 0;
    std::size_t used = 0;
    const std::string text(node.Scalar());
    try {
      v = std::stol(text, &used);
    } catch (const std::exception&) {
      used = 0;
    }
    if (text.empty() || used != text.size() || v < lo || v > hi) {
      Error(node, fmt::format("{} must be a whole number from {} to {}", what, lo, hi));
      return std::nullopt;
    }
    return v;
  }

 private:
  std::string file_;
  std::vector<Diagnostic> errors_;
};

bool ValidCaseName(const std::string& name) {
  return !name.empty() && name[0] != '.' && std::all_of(name.begin(), name.end(), [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.';
  });
}

std::set<std::string> ElementNames(const Plant& p) {
  std::set<std::string> names;
  auto add = [&](const auto& list) {
    for (const auto& e : list) names.insert(e.name);
  };
  add(p.supplies), add(p.generators), add(p.buses), add(p.transformers), add(p.cables);
  add(p.capacitors), add(p.filters), add(p.motors), add(p.loads), add(p.drives);
  return names;
}

// Drive groups to add, read by the plant loader itself: a plant text that extends the base and
// lists them. Problems the loader finds are placed at the `add_drives` entry of the sweep file.
std::vector<Drive> ReadAddedDrives(const YamlNode& list, const Sweep& sweep, SweepReader& r) {
  if (!list.IsSequence()) {
    r.Error(list, "`add_drives` must be a list of drive group entries (plant file format)");
    return {};
  }
  const std::optional<std::string> drives = internal::ToFlowYaml(list, kMaxAddedDrivesBytes);
  if (!drives) {
    r.Error(list, "`add_drives` is too large (aliases multiply it beyond a plant file's size)");
    return {};
  }
  const std::string text =
      fmt::format("overtone: 1\nextends: {}\ndrives: {}\n",
                  internal::DoubleQuoted(fs::absolute(sweep.base.source_file).string()), *drives);
  const std::string virtual_file = sweep.source_file + " (add_drives)";
  std::vector<Drive> added;
  try {
    const Plant with = LoadPlantFromString(text, virtual_file);
    const std::set<std::string> base_names = ElementNames(sweep.base);
    std::set<std::string> base_drives;
    for (const Drive& d : sweep.base.drives) base_drives.insert(d.name);
    for (const Drive& d : with.drives) {
      if (base_drives.count(d.name) == 0) added.push_back(d);
    }
    for (std::size_t i = 0; i < list.size(); ++i) {
      const std::string name(list[i]["name"].Scalar());
      if (base_names.count(name) != 0) {
        r.Error(list[i], fmt::format("`{}` is already an element of the base plant; an added "
                                     "drive group needs a new name", name));
      }
    }
  } catch (const InputError& e) {
    std::vector<Diagnostic> placed;
    for (Diagnostic d : e.diagnostics()) {
      if (d.where.file == virtual_file || d.where.file.empty()) {
        d.where = r.Where(list);
        d.message = "in add_drives: " + d.message;
      }
      placed.push_back(d);
    }
    r.Add(placed);
  }
  return added;
}

void ReadExplicitCase(const YamlNode& node, const Sweep& sweep, SweepReader& r, SweepCase& c) {
  if (!r.CheckMap(node, "a case", {"name", "loading_scale", "capacitors", "add_drives"})) return;
  if (node["name"]) {
    c.name = node["name"].Scalar();
  } else {
    r.Error(node, "a case needs a `name`");
  }
  if (const YamlNode f = node["loading_scale"]) {
    c.loading_factor = r.Quantity(f, QuantityKind::kFraction, "", "loading_scale").value_or(1.0);
  }
  if (const YamlNode caps = node["capacitors"]) {
    if (!caps.IsMap()) {
      r.Error(caps, "`capacitors` maps bank names to steps in service, e.g. {PFC-1: 2}");
    } else {
      for (std::size_t pair = 0; pair < caps.size(); ++pair) {
        const std::string bank(caps.Key(pair).Scalar());
        const auto it = std::find_if(sweep.base.capacitors.begin(), sweep.base.capacitors.end(),
                                     [&](const Capacitor& b) { return b.name == bank; });
        if (it == sweep.base.capacitors.end()) {
          r.Error(caps.Key(pair), fmt::format("no capacitor bank `{}` in the base plant", bank));
          continue;
        }
        const auto on = r.Integer(caps.Value(pair), 0, it->steps,
                                  fmt::format("steps in service of `{}`", bank));
        if (on) c.steps_on[bank] = static_cast<int>(*on);
      }
    }
  }
  if (const YamlNode add = node["add_drives"]) c.added_drives = ReadAddedDrives(add, sweep, r);
}

// Scaled loadings must stay within the plant format's range for `loading`: (0, 200 %].
void CheckScaledLoading(const YamlNode& node, const Sweep& sweep, double factor, SweepReader& r) {
  if (!(factor > 0.0)) {
    r.Error(node, "a loading scale must be above 0");
    return;
  }
  for (const Drive& d : sweep.base.drives) {
    if (d.loading * factor > 2.0 + 1e-12) {
      r.Error(node, fmt::format("scaling by {:g} % takes drive group `{}` to {:g} %, above the "
                                "200 % the plant format allows", factor * 100, d.name,
                                d.loading * factor * 100));
      return;
    }
  }
}

}  // namespace

Sweep LoadSweep(const std::string& path) {
  Sweep sweep;
  sweep.source_file = path;
  SweepReader r(path);
  const internal::YamlDocument document = internal::ReadYamlFile(path, {"sweep", "overtone_sweep: 1"});
  const YamlNode top = document.documents()[0];
  if (!r.CheckMap(top, "the sweep file",
                  {"overtone_sweep", "plant", "cases", "loading_levels", "montecarlo"})) {
    r.ThrowIfAny();
  }
  if (!top["overtone_sweep"]) {
    r.Error(top, "missing `overtone_sweep: 1` (the sweep file's format version)");
  } else {
    r.Integer(top["overtone_sweep"], 1, 1, "`overtone_sweep` (format version)");
  }
  if (!top["plant"] || !top["plant"].IsScalar()) {
    r.Error(top, "missing `plant`: the base plant file, relative to this file");
    r.ThrowIfAny();
  }
  r.ThrowIfAny();
  // The base plant's own errors are reported in its own file.
  const fs::path plant_path = fs::path(path).parent_path() / top["plant"].Scalar();
  sweep.base = LoadPlant(plant_path.string());

  if (const YamlNode list = top["cases"]) {
    if (!list.IsSequence()) r.Error(list, "`cases` must be a list");
    for (std::size_t i = 0; list.IsSequence() && i < list.size(); ++i) {
      SweepCase c;
      c.group = "case";
      c.where = r.Where(list[i]);
      ReadExplicitCase(list[i], sweep, r, c);
      if (list[i]["loading_scale"]) CheckScaledLoading(list[i]["loading_scale"], sweep, c.loading_factor, r);
      sweep.cases.push_back(std::move(c));
    }
  }
  if (const YamlNode levels = top["loading_levels"]) {
    if (!levels.IsSequence()) r.Error(levels, "`loading_levels` must be a list of factors (80 %)");
    for (std::size_t i = 0; levels.IsSequence() && i < levels.size(); ++i) {
      const auto f = r.Quantity(levels[i], QuantityKind::kFraction, "", "a loading level");
      if (!f) continue;
      CheckScaledLoading(levels[i], sweep, *f, r);
      SweepCase c;
      c.group = "loading";
      c.name = fmt::format("loading-{:g}", std::round(*f * 1000.0) / 10.0);
      c.loading_factor = *f;
      c.where = r.Where(levels[i]);
      sweep.cases.push_back(std::move(c));
    }
  }
  if (const YamlNode mc = top["montecarlo"]) {
    if (r.CheckMap(mc, "`montecarlo`", {"cases", "seed", "loading"})) {
      std::optional<long> n;
      if (mc["cases"]) n = r.Integer(mc["cases"], 1, 1000000, "`cases`");
      if (!mc["cases"]) r.Error(mc, "`montecarlo` needs `cases` (how many)");
      std::optional<long> seed;
      if (mc["seed"]) seed = r.Integer(mc["seed"], 0, 2147483647, "`seed`");
      if (!mc["seed"]) r.Error(mc, "`montecarlo` needs a `seed` (any whole number)");
      std::optional<double> lo, hi;
      const YamlNode loading = mc["loading"];
      if (!loading) {
        r.Error(mc, "`montecarlo` needs `loading: {min: 50 %, max: 100 %}`");
      } else if (r.CheckMap(loading, "`loading`", {"min", "max"})) {
        if (loading["min"]) lo = r.Quantity(loading["min"], QuantityKind::kRatio, "%", "`min`");
        if (loading["max"]) hi = r.Quantity(loading["max"], QuantityKind::kRatio, "%", "`max`");
        if (!loading["min"] || !loading["max"]) r.Error(loading, "`loading` needs `min` and `max`");
        if (lo && hi && !(*lo > 0.0 && *lo <= *hi && *hi <= 2.0)) {
          r.Error(loading, "the loading range must satisfy 0 < min <= max <= 200 %");
        }
      }
      if (n && seed && lo && hi) {
        const int width = std::max<int>(4, static_cast<int>(std::to_string(*n).size()));
        for (long i = 0; i < *n; ++i) {
          SweepCase c;
          c.group = "montecarlo";
          c.name = fmt::format("mc-{:0{}}", i + 1, width);
          c.random_seed = internal::CaseSeed(static_cast<std::uint64_t>(*seed),
                                             static_cast<std::uint64_t>(i));
          c.random_min = *lo;
          c.random_max = *hi;
          c.where = r.Where(mc);
          sweep.cases.push_back(std::move(c));
        }
      }
    }
  }
  std::set<std::string> seen;
  for (const SweepCase& c : sweep.cases) {
    if (!ValidCaseName(c.name)) {
      r.Add({{c.where, fmt::format("case name `{}` must be letters, digits, '-', '_' or '.' "
                                   "(it names a folder)", c.name)}});
    } else if (!seen.insert(c.name).second) {
      r.Add({{c.where, fmt::format("two cases are named `{}`", c.name)}});
    }
  }
  if (sweep.cases.empty() && top.IsMap()) {
    r.Error(top, "the sweep has no cases: give `cases`, `loading_levels` or `montecarlo`");
  }
  r.ThrowIfAny();
  return sweep;
}

Plant BuildCasePlant(const Sweep& sweep, const SweepCase& c) {
  Plant p = sweep.base;
  p.study.name = fmt::format("{} — case {}", sweep.base.study.name, c.name);
  for (Drive& d : p.drives) d.loading *= c.loading_factor;
  if (c.random_seed) {
    std::mt19937_64 engine(*c.random_seed);
    for (Drive& d : p.drives) {
      const double u = static_cast<double>(engine() >> 11) * 0x1.0p-53;  // [0, 1), portable
      d.loading = c.random_min + (c.random_max - c.random_min) * u;
    }
  }
  for (Capacitor& b : p.capacitors) {
    const auto it = c.steps_on.find(b.name);
    if (it != c.steps_on.end()) b.steps_on = it->second;
  }
  p.drives.insert(p.drives.end(), c.added_drives.begin(), c.added_drives.end());
  return p;
}

SweepRunCounts RunSweep(const Sweep& sweep, const SweepRunOptions& o, std::ostream& log) {
  const fs::path root = fs::path(o.out_dir) / "cases";
  // The full case list, the same from every shard, so the gather step can tell what is missing.
  WriteFileAtomically((fs::path(o.out_dir) / "sweep-cases.txt").string(), [&](std::ostream& out) {
    for (const SweepCase& c : sweep.cases) out << c.name << '\n';
  });
  std::vector<const SweepCase*> todo;
  SweepRunCounts counts;
  for (std::size_t i = 0; i < sweep.cases.size(); ++i) {
    if (static_cast<int>(i % static_cast<std::size_t>(o.shards)) != o.shard - 1) continue;
    ++counts.in_shard;
    const SweepCase& c = sweep.cases[i];
    if (fs::exists(root / c.name / "done")) {
      ++counts.skipped;
      continue;
    }
    todo.push_back(&c);
  }
  log << fmt::format("shard {}/{}: {} cases, {} already done, {} to study\n", o.shard, o.shards,
                     counts.in_shard, counts.skipped, todo.size());
  std::mutex mutex;
  struct NoState {};
  internal::ParallelFor(
      static_cast<int>(todo.size()), o.threads, [] { return std::make_unique<NoState>(); },
      [&](NoState&, int i) {
        const SweepCase& c = *todo[static_cast<std::size_t>(i)];
        const fs::path dir = root / c.name;
        const auto start = std::chrono::steady_clock::now();
        StudyOptions options;
        options.scan = false;
        options.threads = 1;
        std::string failure;
        try {
          const StudyResult result = RunStudy(BuildCasePlant(sweep, c), options);
          WriteFileAtomically((dir / "study.json").string(),
                              [&](std::ostream& out) { WriteStudyJson(result, out, 1); });  // cases run in parallel
          fs::remove(dir / "failed.txt");
          // The marker last: its presence means study.json is complete.
          WriteFileAtomically((dir / "done").string(), [&](std::ostream& out) {
            out << nlohmann::json{{"case", c.name}, {"group", c.group}}.dump() << '\n';
          });
        } catch (const SolveError& e) {
          failure = e.what();
        } catch (const InputError& e) {
          failure = e.what();
        }
        if (!failure.empty()) {
          WriteFileAtomically((dir / "failed.txt").string(),
                              [&](std::ostream& out) { out << failure << '\n'; });
        }
        const double seconds =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        std::lock_guard lock(mutex);
        if (failure.empty()) {
          ++counts.studied;
          log << fmt::format("case {}: done in {:.2f} s\n", c.name, seconds);
        } else {
          ++counts.failed;
          log << fmt::format("case {}: FAILED: {}\n", c.name, failure);
        }
      });
  return counts;
}

std::pair<int, int> ParseShard(const std::string& text, const std::string& option) {
  int k = 0, n = 0;
  char slash = 0;
  std::istringstream in(text);
  if (!(in >> k >> slash >> n) || slash != '/' || !in.eof() || n < 1 || k < 1 || k > n) {
    throw InputError({option, 0, 0},
                     fmt::format("`{}` is not a share K/N with 1 <= K <= N (e.g. 3/8)", text));
  }
  return {k, n};
}

std::optional<double> Percentile(std::vector<double>& values, double p) {
  if (values.empty()) return std::nullopt;
  std::sort(values.begin(), values.end());
  const double rank = p / 100.0 * static_cast<double>(values.size() - 1);
  const std::size_t below = static_cast<std::size_t>(std::floor(rank));
  const std::size_t above = std::min(values.size() - 1, below + 1);
  return values[below] + (rank - static_cast<double>(below)) * (values[above] - values[below]);
}

int GatherSweep(const std::string& out_dir, std::ostream& log) {
  const fs::path root = fs::path(out_dir) / "cases";
  if (!fs::is_directory(root)) {
    throw InputError({out_dir, 0, 0}, "no `cases` folder here: run `overtone sweep` into it first");
  }
  std::vector<std::string> names;
  for (const auto& entry : fs::directory_iterator(root)) {
    if (fs::exists(entry.path() / "done")) names.push_back(entry.path().filename().string());
  }
  std::sort(names.begin(), names.end());

  struct Figure {
    std::string quantity, where;
    double worst = -1.0;
    std::string worst_case;
    int cases = 0;
    std::vector<double> montecarlo;
  };
  std::vector<Figure> figures;  // buses in first-seen order, then the pcc TDD
  std::map<std::string, std::size_t> index;
  auto record = [&](const std::string& quantity, const std::string& where, double value,
                    const std::string& name, bool montecarlo) {
    const std::string key = quantity + '\n' + where;
    auto it = index.find(key);
    if (it == index.end()) {
      it = index.emplace(key, figures.size()).first;
      Figure f;
      f.quantity = quantity;
      f.where = where;
      figures.push_back(std::move(f));
    }
    Figure& f = figures[it->second];
    if (value > f.worst) f.worst = value, f.worst_case = name;
    ++f.cases;
    if (montecarlo) f.montecarlo.push_back(value);
  };
  for (const std::string& name : names) {
    const fs::path dir = root / name;
    std::ifstream marker(dir / "done"), study(dir / "study.json");
    nlohmann::json m, j;
    try {
      m = nlohmann::json::parse(marker);
      j = nlohmann::json::parse(study);
    } catch (const nlohmann::json::exception& e) {
      throw InputError({(dir / "study.json").string(), 0, 0},
                       fmt::format("cannot read this case's results: {}", e.what()));
    }
    const bool mc = m.value("group", "") == "montecarlo";
    for (const auto& b : j.at("buses")) {
      record("thd_v", b.at("name").get<std::string>(), b.at("thd_v_percent").get<double>(), name, mc);
    }
    if (j.contains("pcc") && j["pcc"].contains("tdd_percent")) {
      record("tdd", j["pcc"].at("bus").get<std::string>(), j["pcc"]["tdd_percent"].get<double>(),
             name, mc);
    }
  }
  std::stable_partition(figures.begin(), figures.end(),
                        [](const Figure& f) { return f.quantity == "thd_v"; });
  WriteFileAtomically((fs::path(out_dir) / "summary.csv").string(), [&](std::ostream& out) {
    out << "quantity,where,worst_percent,worst_case,cases,montecarlo_cases,p50_percent,"
           "p95_percent\n";
    for (Figure& f : figures) {
      const std::size_t n = f.montecarlo.size();
      const auto p50 = Percentile(f.montecarlo, 50.0), p95 = Percentile(f.montecarlo, 95.0);
      out << fmt::format("{},{},{:.4f},{},{},{},{},{}\n", f.quantity, internal::CsvField(f.where),
                         f.worst, internal::CsvField(f.worst_case), f.cases, n, p50 ? fmt::format("{:.4f}", *p50) : "",
                         p95 ? fmt::format("{:.4f}", *p95) : "");
    }
  });
  // Cases the sweep lists but that are not done yet.
  std::ifstream listed(fs::path(out_dir) / "sweep-cases.txt");
  int missing = 0;
  for (std::string line; std::getline(listed, line);) {
    if (!line.empty() && !std::binary_search(names.begin(), names.end(), line)) ++missing;
  }
  log << fmt::format("gathered {} cases into {}", names.size(),
                     (fs::path(out_dir) / "summary.csv").string());
  if (missing > 0) log << fmt::format("; {} listed cases are not done yet", missing);
  log << '\n';
  return static_cast<int>(names.size());
}

}  // namespace overtone
