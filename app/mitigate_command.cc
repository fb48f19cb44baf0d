// app/mitigate_command.cc — `overtone mitigate`: standard mitigations, studied, ranked, written.
#include <iostream>
#include <memory>

#include "commands.h"
#include "output_paths.h"
#include "overtone/load.h"
#include "overtone/mitigate.h"
#include "overtone/report.h"

namespace overtone::app {

Command AddMitigateCommand(CLI::App& app) {
  struct Args {
    std::string plant, json;
    MitigateOptions options;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "mitigate",
      "For a plant over its limits: study standard mitigations (reactors, multipulse or "
      "active front ends, detuning, a tuned filter, capacitor steps), rank them and write "
      "each as a plant file that extends the original");
  cmd->add_option("PLANT", args->plant, "plant file (YAML, format 1)")->required();
  cmd->add_option("-o,--out", args->options.out_dir,
                  "folder for the option plant files (created if needed)")
      ->type_name("DIR")
      ->required();
  AddThreadsOption(cmd, &args->options.threads, "worker threads of each study");
  AddJsonOption(cmd, &args->json, "the options");
  return {
      cmd, [args]() {
        CheckOutputFile("--json", args->json);
        CheckOutputFolder("-o", args->options.out_dir);
        const Plant plant = LoadPlant(args->plant);
        const MitigationResult result = EvaluateMitigations(plant, args->options);
        // Everything is computed before the first byte is written.
        WriteMitigationPlantFiles(result, args->options.out_dir);
        if (WriteJson(args->json, [&](std::ostream& out) { WriteMitigationJson(result, out); })) {
          PrintMitigationTable(result, std::cout);
          if (!result.options.empty()) {
            std::cout << "\nwrote " << result.options.size() << " option plant files into "
                      << args->options.out_dir << '\n';
          }
        }
        return kExitOk;
      }};
}

}  // namespace overtone::app
