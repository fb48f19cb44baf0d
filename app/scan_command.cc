// app/scan_command.cc — `overtone scan`: frequency scans of one or more plant variants.
#include <iostream>
#include <memory>

#include "commands.h"
#include "overtone/load.h"
#include "overtone/report.h"
#include "overtone/scan.h"

namespace overtone::app {

Command AddScanCommand(CLI::App& app) {
  struct Args {
    std::vector<std::string> plants;
    ScanOptions options;
    std::string json, csv_dir, svg_dir;
  };
  auto args = std::make_shared<Args>();
  CLI::App* cmd = app.add_subcommand(
      "scan",
      "Frequency scans for resonance: |Z(h)| at capacitor, filter and pcc buses for every "
      "capacitor step configuration; several plant files are compared as variants");
  cmd->add_option("PLANT", args->plants,
                  "plant files (YAML, format 1), e.g. a base and its "
                  "variant on the standby generator")
      ->required();
  cmd->add_option(
         "--bus", args->options.buses,
         "monitored bus (repeat for several); default: the pcc and every capacitor or filter bus")
      ->type_name("NAME");
  cmd->add_option("--from", args->options.from_order, "first harmonic order of the scan")
      ->capture_default_str();
  cmd->add_option("--to", args->options.to_order, "last harmonic order of the scan")
      ->capture_default_str();
  cmd->add_option("--step", args->options.step, "spacing of the scan in orders")
      ->capture_default_str();
  cmd->add_option("--band", args->options.band,
                  "risk band: a peak within this many orders of an injected order is at risk")
      ->capture_default_str();
  AddThreadsOption(cmd, &args->options.threads, "worker threads");
  AddJsonOption(cmd, &args->json, "the scans");
  cmd->add_option("--csv", args->csv_dir,
                  "write scan_points.csv, scan_peaks.csv, scan_transfers.csv into DIR")
      ->type_name("DIR");
  cmd->add_option("--svg", args->svg_dir, "write one impedance chart per monitored bus into DIR")
      ->type_name("DIR");
  return {cmd, [args]() {
            const bool keep_curves =
                !args->json.empty() || !args->csv_dir.empty() || !args->svg_dir.empty();
            std::vector<Plant> plants;  // every file checked before the first scan starts
            for (const std::string& path : args->plants) plants.push_back(LoadPlant(path));
            std::vector<ScanResult> variants;
            for (const Plant& plant : plants)
              variants.push_back(RunScan(plant, args->options, keep_curves));
            // Everything is computed before the first byte is written: a failure leaves no partial
            // output.
            const bool tables =
                WriteJson(args->json, [&](std::ostream& out) { WriteScanJson(variants, out); });
            if (!args->csv_dir.empty()) WriteScanCsv(variants, args->csv_dir);
            if (!args->svg_dir.empty()) WriteScanSvg(variants, args->svg_dir);
            if (tables) PrintScanTables(variants, std::cout);
            return kExitOk;
          }};
}

}  // namespace overtone::app
