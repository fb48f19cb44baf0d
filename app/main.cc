// app/main.cc — the overtone command line: parse arguments, run one command, map errors to exits.
#include <CLI/CLI.hpp>
#include <iostream>
#ifdef __GLIBC__
#include <malloc.h>
#endif

#include "commands.h"
#include "overtone/errors.h"
#include "overtone/report.h"

using namespace overtone::app;

bool overtone::app::WriteJson(const std::string& path,
                              const std::function<void(std::ostream&)>& write) {
  if (path == "-") {
    write(std::cout);
    return false;
  }
  if (!path.empty()) overtone::WriteFileAtomically(path, write);
  return true;
}

int main(int argc, char** argv) {
#ifdef __GLIBC__
  // A study allocates and frees large blocks phase after phase. Handing them back to the system
  // and faulting them in again costs more than keeping them: about 5 % of a 10,000-bus study on
  // a virtual machine, where a page fault takes microseconds. 32 MiB is glibc's largest
  // mmap threshold.
  mallopt(M_MMAP_THRESHOLD, 32 << 20);
  mallopt(M_TRIM_THRESHOLD, 1 << 30);
#endif
  CLI::App app{
      "overtone: harmonic studies of industrial plants (a screening tool; see the "
      "cautions in every report)"};
  app.set_version_flag("--version", std::string("overtone ") + OVERTONE_VERSION);
  app.require_subcommand(1);
  const std::vector<Command> commands = {
      AddCheckCommand(app),    AddStudyCommand(app),    AddScanCommand(app),
      AddSpectrumCommand(app), AddSweepCommand(app),    AddReportCommand(app),
      AddCompareCommand(app),  AddHeadroomCommand(app), AddMitigateCommand(app)};

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    return app.exit(e) == 0 ? kExitOk : kExitBadInput;
  }

  try {
    for (const Command& c : commands) {
      if (c.cli->parsed()) return c.run();
    }
    return kExitBadInput;
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
