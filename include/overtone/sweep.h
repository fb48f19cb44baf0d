// include/overtone/sweep.h — sweeps: a base plant and its variations, run case by case and gathered (public).
//
// A sweep file (docs/sweeps.md) names a base plant and the cases made from it: explicit cases
// (drive loading scaled, capacitor steps switched, drive groups added), loading levels, and a
// seeded Monte-Carlo draw of every drive group's loading. Each case is studied on its own and
// written to OUT/cases/<case>/study.json with a `done` marker written last, so an interrupted
// sweep resumes where it stopped and a scheduler can spread the cases over machines by shard.
#ifndef OVERTONE_PUBLIC_SWEEP_H_
#define OVERTONE_PUBLIC_SWEEP_H_

#include <cstdint>
#include <map>
#include <optional>
#include <ostream>
#include <string>
#include <utility>
#include <vector>

#include "overtone/plant.h"

namespace overtone {

// How one case differs from the base plant. Changes apply in this order: loading factor,
// Monte-Carlo loading, capacitor steps, added drive groups.
struct SweepCase {
  std::string name;             // folder name under OUT/cases; [A-Za-z0-9._-], unique
  std::string group;            // "case", "loading" or "montecarlo" (for the gather step)
  double loading_factor = 1.0;  // every drive group's loading multiplied by this
  std::optional<std::uint64_t> random_seed;  // Monte-Carlo: the case's own draw
  double random_min = 0.0;      // Monte-Carlo loading range, fractions (0.5 = 50 %)
  double random_max = 0.0;
  std::map<std::string, int> steps_on;  // capacitor bank name -> steps in service
  std::vector<Drive> added_drives;      // checked against the base plant by the loader
  SourceLocation where;
};

struct Sweep {
  std::string source_file;
  Plant base;
  std::vector<SweepCase> cases;  // explicit cases, then loading levels, then Monte-Carlo
};

// Reads and checks a sweep file and its base plant; every problem found is thrown together as
// one InputError with file, line and column.
Sweep LoadSweep(const std::string& path);

// The plant of one case: the base with the case's changes applied.
Plant BuildCasePlant(const Sweep& sweep, const SweepCase& c);

struct SweepRunOptions {
  std::string out_dir;
  int shard = 1;   // this share, 1..shards: cases whose index % shards == shard - 1
  int shards = 1;
  int threads = 0;  // cases studied at once (0 = all cores); each study runs on one thread
};

struct SweepRunCounts {
  int in_shard = 0;
  int studied = 0;
  int skipped = 0;  // already done
  int failed = 0;   // could not be solved; reason in OUT/cases/<case>/failed.txt
};

// Studies every case of the shard that has no `done` marker yet, `threads` cases at a time;
// prints one line per case to `log`.
SweepRunCounts RunSweep(const Sweep& sweep, const SweepRunOptions& options, std::ostream& log);

// Reads every finished case under `out_dir` and writes `out_dir`/summary.csv (docs/sweeps.md):
// per bus the worst THDv and its case, and over the Monte-Carlo cases the 50th and 95th
// percentiles of each bus's THDv and of the pcc TDD. Returns the number of cases gathered.
int GatherSweep(const std::string& out_dir, std::ostream& log);

// "K/N" with 1 <= K <= N into {K, N}; throws InputError (placed at `option`) otherwise.
std::pair<int, int> ParseShard(const std::string& text, const std::string& option);

// Linear-interpolation percentile (p in 0..100) of `values`, as numpy's default; values sorted
// in place. Nothing for an empty list.
std::optional<double> Percentile(std::vector<double>& values, double p);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_SWEEP_H_
