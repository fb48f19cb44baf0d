// app/commands.h — each subcommand registers its options and returns the function that runs it.
#ifndef OVERTONE_APP_COMMANDS_H_
#define OVERTONE_APP_COMMANDS_H_

#include <CLI/CLI.hpp>
#include <functional>
#include <ostream>
#include <string>

namespace overtone::app {

// Exit statuses (PLANT-FORMAT.md "Exit status").
constexpr int kExitOk = 0;
constexpr int kExitInternal = 1;
constexpr int kExitBadInput = 2;
constexpr int kExitViolation = 3;
constexpr int kExitUnsolvable = 4;

// A registered subcommand and what runs it once its arguments are parsed.
struct Command {
  CLI::App* cli = nullptr;
  std::function<int()> run;
};

// `--json FILE` ('-' for standard output) writing `what` ("the results").
inline CLI::Option* AddJsonOption(CLI::App* cmd, std::string* path, const std::string& what) {
  return cmd
      ->add_option("--json", *path, "write " + what + " as JSON to FILE ('-' for standard output)")
      ->type_name("FILE");
}

// `--threads N`, 0 for all cores; `what` says what the threads do.
inline CLI::Option* AddThreadsOption(
    CLI::App* cmd, int* threads,
    const std::string& what = "worker threads for the harmonic orders") {
  return cmd->add_option("--threads", *threads, what + " (0 = all cores)")
      ->check(CLI::Range(0, 1024));
}

// Writes a command's JSON to standard output (`path` is "-") or atomically to the file `path`
// (nothing when empty). Returns whether the terminal tables should still be printed: not when
// the JSON took standard output.
bool WriteJson(const std::string& path, const std::function<void(std::ostream&)>& write);

Command AddCheckCommand(CLI::App& app);
Command AddStudyCommand(CLI::App& app);
Command AddScanCommand(CLI::App& app);
Command AddSpectrumCommand(CLI::App& app);
Command AddReportCommand(CLI::App& app);
Command AddCompareCommand(CLI::App& app);
Command AddSweepCommand(CLI::App& app);
Command AddHeadroomCommand(CLI::App& app);
Command AddMitigateCommand(CLI::App& app);

}  // namespace overtone::app

#endif  // OVERTONE_APP_COMMANDS_H_
