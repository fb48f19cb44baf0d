// app/report_command.cc — `overtone report PLANT -o DIR`: the study written as a report.
#include <filesystem>
#include <iostream>
#include <memory>
#include <optional>

#include "commands.h"
#include "overtone/load.h"
#include "overtone/mitigate.h"
#include "overtone/report.h"
#include "overtone/study.h"

namespace overtone::app {

Command AddReportCommand(CLI::App& app) {
  struct Args {
    std::string plant, dir, against;
    int threads = 0;
    bool fail_on_violation = false;
    bool mitigate = false;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "report", "Run the study and write report.md, report.html (inline charts) and CSV tables");
  cmd->add_option("PLANT", args->plant, "plant file (YAML, format 1)")->required();
  cmd->add_option("-o,--out", args->dir, "output directory (created if needed)")
      ->required()
      ->type_name("DIR");
  cmd->add_option("--against", args->against,
                  "also run BASE and add a comparison with it (PLANT is the proposed case)")
      ->type_name("BASE");
  AddThreadsOption(cmd, &args->threads);
  cmd->add_flag(
      "--fail-on-violation", args->fail_on_violation,
      "exit with status 3 when the limit assessment finds violations (the report is written)");
  cmd->add_flag("--mitigate", args->mitigate,
                "add the ranked mitigation options (docs/mitigate.md), each written as a plant "
                "file into DIR/mitigation");
  return {
      cmd, [args]() {
        const Plant plant = LoadPlant(args->plant);
        const std::optional<Plant> base =
            args->against.empty() ? std::nullopt : std::optional<Plant>(LoadPlant(args->against));
        StudyOptions options;
        options.threads = args->threads;
        // Everything is computed before the first byte is written: a failure leaves no partial
        // output.
        ReportInputs inputs = PrepareReport(plant, options, base ? &*base : nullptr);
        const std::string options_dir = (std::filesystem::path(args->dir) / "mitigation").string();
        if (args->mitigate) {
          inputs.mitigation = EvaluateMitigations(plant, {options_dir, args->threads});
        }
        WriteReport(inputs, args->dir);
        if (inputs.mitigation) WriteMitigationPlantFiles(*inputs.mitigation, options_dir);
        std::cout << "wrote " << args->dir << "/report.md and report.html\n";
        const bool violated = !inputs.result.assessment.violations.empty();
        return args->fail_on_violation && violated ? kExitViolation : kExitOk;
      }};
}

}  // namespace overtone::app
