// app/main.cc — the overtone command line: parse arguments, call the library, map status to exit.
#include <fstream>
#include <iostream>

#include <CLI/CLI.hpp>
#include <spdlog/spdlog.h>

#include "overtone/errors.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/study.h"

namespace {

// Exit statuses (PLANT-FORMAT.md "Exit status").
constexpr int kExitOk = 0;
constexpr int kExitInternal = 1;
constexpr int kExitBadInput = 2;
constexpr int kExitUnsolvable = 4;

struct StudyArgs {
  std::string plant;
  std::string json;
  std::string csv_dir;
  int threads = 0;
};

int RunCheck(const std::string& path) {
  const overtone::Plant plant = overtone::LoadPlant(path);
  overtone::PrintPlantSummary(plant, std::cout);
  std::cout << "no errors found\n";
  return kExitOk;
}

int RunStudyCommand(const StudyArgs& args) {
  const overtone::Plant plant = overtone::LoadPlant(args.plant);
  overtone::StudyOptions options;
  options.threads = args.threads;
  const overtone::StudyResult result = overtone::RunStudy(plant, options);
  // Everything is computed before the first byte is written: a failure leaves no partial output.
  if (!args.json.empty()) {
    if (args.json == "-") {
      overtone::WriteStudyJson(result, std::cout);
    } else {
      overtone::WriteFileAtomically(args.json, [&](std::ostream& out) { overtone::WriteStudyJson(result, out); });
    }
  }
  if (!args.csv_dir.empty()) overtone::WriteStudyCsv(result, args.csv_dir);
  if (args.json != "-") overtone::PrintStudyTables(result, std::cout);
  return kExitOk;
}

}  // namespace

int main(int argc, char** argv) {
  spdlog::set_level(spdlog::level::warn);
  CLI::App app{"overtone: harmonic studies of industrial plants (a screening tool; see the cautions "
               "in every report)"};
  app.set_version_flag("--version", std::string("overtone ") + OVERTONE_VERSION);
  app.require_subcommand(1);

  std::string check_plant;
  CLI::App* check = app.add_subcommand("check", "Validate a plant file and print a one-screen summary");
  check->add_option("PLANT", check_plant, "plant file (YAML, format 1)")->required();

  StudyArgs study_args;
  CLI::App* study = app.add_subcommand("study", "Load flow, drive spectra and harmonic solve: bus "
                                                "distortion tables");
  study->add_option("PLANT", study_args.plant, "plant file (YAML, format 1)")->required();
  study->add_option("--json", study_args.json, "write the results as JSON to FILE ('-' for standard output)")
      ->type_name("FILE");
  study->add_option("--csv", study_args.csv_dir, "write buses.csv, bus_harmonics.csv, drives.csv, "
                                                 "branches.csv into DIR")->type_name("DIR");
  study->add_option("--threads", study_args.threads, "worker threads for the harmonic orders (0 = all cores)")
      ->check(CLI::Range(0, 1024));

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int status = app.exit(e);
    return status == 0 ? kExitOk : kExitBadInput;
  }

  try {
    if (check->parsed()) return RunCheck(check_plant);
    return RunStudyCommand(study_args);
  } catch (const overtone::InputError& e) {
    for (const auto& d : e.diagnostics()) std::cerr << overtone::FormatDiagnostic(d) << '\n';
    return kExitBadInput;
  } catch (const overtone::SolveError& e) {
    std::cerr << "error: " << e.what() << '\n';
    return kExitUnsolvable;
  } catch (const std::exception& e) {
    std::cerr << "internal error: " << e.what() << '\n';
    return kExitInternal;
  }
}
