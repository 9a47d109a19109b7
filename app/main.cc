// linkrise command line: each subcommand lives in its own app/<name>_command.cc.
#include <iostream>

#include <CLI/CLI.hpp>

#include "app/exit_codes.h"
#include "app/run_command.h"

int main(int argc, char** argv) {
  using namespace linkrise::app;
  CLI::App cli{"linkrise — simulate and judge the pre-charge of battery-pack DC links"};
  cli.require_subcommand(1);
  cli.set_version_flag("--version", LINKRISE_VERSION);

  RunArguments run;
  auto* run_cli = cli.add_subcommand("run", "simulate one case; write waveforms.csv and summary.json");
  run_cli->add_option("case", run.case_file, "case file (YAML)")->required();
  run_cli->add_option("-o,--output", run.output_directory, "output directory")->capture_default_str();
  run_cli->add_option("--sample", run.sample, "uniform output grid, e.g. '100 us'");
  run_cli->add_option("--rtol", run.relative_tolerance, "relative tolerance (overrides the case)");
  run_cli->add_option("--atol", run.absolute_tolerance, "absolute tolerance (overrides the case)");
  run_cli->add_flag("-q,--quiet", run.quiet, "print nothing on success");

  try {
    cli.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    int code = cli.exit(error);
    return code == 0 ? kExitOk : kExitInputError;
  }
  try {
    if (run_cli->parsed()) return run_command(run);
  } catch (const std::exception& error) {
    std::cerr << "linkrise: " << error.what() << "\n";
    return kExitInputError;
  }
  return kExitOk;
}
