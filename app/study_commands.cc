// app/study_commands.cc — `overtone check` and `overtone study`.
#include <iostream>
#include <memory>

#include "commands.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"

namespace overtone::app {

Command AddCheckCommand(CLI::App& app) {
  auto plant_path = std::make_shared<std::string>();
  CLI::App* cmd =
      app.add_subcommand("check", "Validate a plant file and print a one-screen summary");
  cmd->add_option("PLANT", *plant_path, "plant file (YAML, format 1)")->required();
  return {cmd, [plant_path]() {
            const Plant plant = LoadPlant(*plant_path);
            CheckLimitProfile(plant);
            PrintPlantSummary(plant, std::cout);
            std::cout << "no errors found\n";
            return kExitOk;
          }};
}

Command AddStudyCommand(CLI::App& app) {
  struct Args {
    std::string plant, json, csv_dir;
    int threads = 0;
    bool no_scan = false;
    bool fail_on_violation = false;
    bool no_color = false;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "study", "Load flow, drive spectra and harmonic solve: bus distortion tables");
  cmd->add_option("PLANT", args->plant, "plant file (YAML, format 1)")->required();
  AddJsonOption(cmd, &args->json, "the results");
  cmd->add_option("--csv", args->csv_dir,
                  "write buses.csv, bus_harmonics.csv, drives.csv, branches.csv into DIR")
      ->type_name("DIR");
  AddThreadsOption(cmd, &args->threads);
  cmd->add_flag("--no-scan", args->no_scan, "leave resonance screening (frequency scan) out");
  cmd->add_flag("--no-color", args->no_color,
                "no colour in the tables (also when NO_COLOR is set)");
  cmd->add_flag(
      "--fail-on-violation", args->fail_on_violation,
      "exit with status 3 when the limit assessment finds violations (outputs are written)");
  return {cmd, [args]() {
            const Plant plant = LoadPlant(args->plant);
            StudyOptions options;
            options.threads = args->threads;
            options.scan = !args->no_scan;
            const StudyResult result = RunStudy(plant, options);
            // Everything is computed before the first byte is written: a failure leaves no partial
            // output.
            const bool tables =
                WriteJson(args->json, [&](std::ostream& out) { WriteStudyJson(result, out, args->threads); });
            if (!args->csv_dir.empty()) WriteStudyCsv(result, args->csv_dir);
            if (tables) PrintStudyTables(result, std::cout, WantColour(args->no_color));
            const bool violated = !result.assessment.violations.empty();
            return args->fail_on_violation && violated ? kExitViolation : kExitOk;
          }};
}

}  // namespace overtone::app
