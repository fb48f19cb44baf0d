// app/sweep_command.cc — `overtone sweep`: run a sweep's cases (or a share of them), or gather
// them.
#include <iostream>
#include <memory>

#include "commands.h"
#include "overtone/errors.h"
#include "overtone/study.h"
#include "overtone/sweep.h"

namespace overtone::app {

Command AddSweepCommand(CLI::App& app) {
  struct Args {
    std::string sweep, out, shard = "1/1", gather;
    int threads = 0;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "sweep", "Study every case of a sweep file (restartable, shardable), or gather the results");
  cmd->add_option("SWEEP", args->sweep, "sweep file (YAML, docs/sweeps.md)");
  cmd->add_option("-o,--out", args->out, "folder for the cases' results")->type_name("DIR");
  cmd->add_option("--shard", args->shard,
                  "run only share K of N: the cases whose index % N == K-1 (default 1/1)")
      ->type_name("K/N");
  AddThreadsOption(cmd, &args->threads, "cases studied at once");
  cmd->add_option("--gather", args->gather,
                  "read every finished case under DIR and write DIR/summary.csv")
      ->type_name("DIR");
  return {
      cmd, [args]() {
        if (!args->gather.empty()) {
          if (!args->sweep.empty() || !args->out.empty()) {
            throw InputError({"--gather", 0, 0}, "--gather DIR takes no sweep file and no --out");
          }
          GatherSweep(args->gather, std::cout);
          for (const std::string& c : StandardCautions()) std::cout << "caution: " << c << '\n';
          return kExitOk;
        }
        if (args->sweep.empty() || args->out.empty()) {
          throw InputError({"overtone sweep", 0, 0},
                           "give a sweep file and --out DIR (or --gather DIR)");
        }
        const auto [k, n] = ParseShard(args->shard, "--shard");
        const Sweep sweep = LoadSweep(args->sweep);
        SweepRunOptions options;
        options.out_dir = args->out;
        options.shard = k;
        options.shards = n;
        options.threads = args->threads;
        const SweepRunCounts counts = RunSweep(sweep, options, std::cout);
        std::cout << counts.studied << " studied, " << counts.skipped << " already done, "
                  << counts.failed << " failed, of " << counts.in_shard << " cases in shard " << k
                  << "/" << n << "\n";
        for (const std::string& c : StandardCautions()) std::cout << "caution: " << c << '\n';
        return counts.failed > 0 ? kExitUnsolvable : kExitOk;
      }};
}

}  // namespace overtone::app
