// app/headroom_command.cc — `overtone headroom`: how many more units of a drive kind each bus
// takes.
#include <iostream>
#include <memory>

#include "commands.h"
#include "output_paths.h"
#include "overtone/headroom.h"
#include "overtone/load.h"
#include "overtone/report.h"

namespace overtone::app {

Command AddHeadroomCommand(CLI::App& app) {
  struct Args {
    std::string plant, json;
    HeadroomOptions options;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "headroom",
      "Hosting capacity: the largest number of units of an existing drive group's kind "
      "that each candidate bus takes before a limit binds, and which limit binds");
  cmd->add_option("PLANT", args->plant, "plant file (YAML, format 1)")->required();
  cmd->add_option("--drive-kind", args->options.drive_kind,
                  "an existing drive group: its front end, reactors and unit power are added")
      ->type_name("NAME")
      ->required();
  cmd->add_option("--bus", args->options.buses, "candidate bus (repeat for several)")
      ->type_name("BUS");
  cmd->add_flag("--all-buses", args->options.all_buses,
                "every bus at the drive group's nominal voltage");
  cmd->add_option("--max-units", args->options.max_units, "search cap on the units added")
      ->capture_default_str();
  AddThreadsOption(cmd, &args->options.threads, "worker threads of each study");
  AddJsonOption(cmd, &args->json, "the results");
  return {cmd, [args]() {
            CheckOutputFile("--json", args->json);
            const Plant plant = LoadPlant(args->plant);
            const HeadroomResult result = RunHeadroom(plant, args->options);
            // Everything is computed before the first byte is written.
            if (WriteJson(args->json, [&](std::ostream& out) { WriteHeadroomJson(result, out); })) {
              PrintHeadroomTable(result, std::cout);
            }
            return kExitOk;
          }};
}

}  // namespace overtone::app
