// app/compare_command.cc — `overtone compare BASE PROPOSED`: what changes between two cases.
#include <iostream>
#include <memory>

#include "commands.h"
#include "overtone/compare.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"

namespace overtone::app {

Command AddCompareCommand(CLI::App& app) {
  struct Args {
    std::string base, proposed, json;
    int threads = 0;
    bool no_color = false;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "compare",
      "Run two cases (base, proposed) and show what changes: distortion, violations, resonances");
  cmd->add_option("BASE", args->base, "plant file of the base case")->required();
  cmd->add_option("PROPOSED", args->proposed,
                  "plant file of the proposed case (often `extends: BASE`)")
      ->required();
  AddJsonOption(cmd, &args->json, "the comparison");
  AddThreadsOption(cmd, &args->threads);
  cmd->add_flag("--no-color", args->no_color,
                "no colour in the terminal tables (also when NO_COLOR is set)");
  return {cmd, [args]() {
            // Both plants are loaded before either is solved, so input errors in both files are
            // found first.
            const Plant base_plant = LoadPlant(args->base);
            const Plant proposed_plant = LoadPlant(args->proposed);
            StudyOptions options;
            options.threads = args->threads;
            const StudyResult base = RunStudy(base_plant, options);
            const StudyResult proposed = RunStudy(proposed_plant, options);
            const Comparison c = CompareStudies(base, args->base, proposed, args->proposed);
            if (WriteJson(args->json, [&](std::ostream& out) { WriteComparisonJson(c, out); })) {
              PrintComparison(c, std::cout, WantColour(args->no_color));
            }
            return kExitOk;
          }};
}

}  // namespace overtone::app
