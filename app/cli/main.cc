// linkrise command line: each subcommand lives in its own app/commands/<name>_command.cc.
#include <cstdio>
#include <iostream>

#include <CLI/CLI.hpp>

#include "app/cluster/ranks.h"
#include "app/commands/check_command.h"
#include "app/commands/exit_codes.h"
#include "app/commands/faults_command.h"
#include "app/commands/run_command.h"
#include "linkrise/version.h"
#include "app/cli/parse_errors.h"
#include "app/cli/study_commands.h"

namespace {

int run_linkrise(int argc, char** argv) {
  using namespace linkrise::app;
  using linkrise::kVersion;
  CLI::App cli{"linkrise — simulate and judge the pre-charge of battery-pack DC links"};
  cli.require_subcommand(1);
  cli.set_version_flag("--version", kVersion);

  RunArguments run;
  auto* run_cli = cli.add_subcommand("run", "simulate one case; write waveforms.csv and summary.json");
  run_cli->add_option("case", run.case_file, "case file (YAML)")->required();
  run_cli->add_option("-o,--output", run.output_directory, "output directory")->capture_default_str();
  run_cli->add_option("--set", run.settings, kSetHelp);
  run_cli->add_option("--sample", run.sample, "uniform output grid, e.g. '100 us'");
  run_cli->add_option("--rtol", run.relative_tolerance, "relative tolerance (overrides the case)");
  run_cli->add_option("--atol", run.absolute_tolerance, "absolute tolerance (overrides the case)");
  auto* run_report = run_cli->add_option("--report", run.report, "also write a self-contained HTML report to this file");
  run_cli->add_option("--measured", run.measured, "overlay a measured capture (CSV) on the report, without fitting")
      ->needs(run_report);
  run_cli->add_option("--column", run.columns, "map a capture column: NAME=HEADER, e.g. 'link_plus=CH2 [V]' (repeatable)");
  run_cli->add_flag("-q,--quiet", run.quiet, "print nothing on success");
  run_cli->add_flag("--strict", run.strict, "treat values outside the usual ranges (docs/plausibility.md) as errors");

  CheckArguments check;
  auto* check_cli = cli.add_subcommand("check", "re-run the stored cases and compare them with their golden results");
  check_cli->add_option("paths", check.paths, "case files or directories (default: cases)");
  check_cli->add_option("--junit", check.junit_file, "also write a JUnit XML report to this file");
  check_cli->add_flag("--update", check.update, "rewrite the golden results, listing every value that changed");
  check_cli->add_option("--set", check.settings, "override a parameter in every case, e.g. run.rtol=1e-8 (repeatable)");
  check_cli->add_flag("--all", check.show_all, "list unchanged items too");
  check_cli->add_option("-j,--jobs", check.jobs, "parallel cases (default: one per core)")
      ->check(whole_number(0));

  FaultsArguments faults;
  auto* faults_cli =
      cli.add_subcommand("faults", "run the built-in and the case's fault scenarios; write the detection matrix");
  faults_cli->add_option("case", faults.case_file, "case file (YAML) with a sequence block")->required();
  faults_cli->add_option("-o,--output", faults.output_directory, "output directory")->capture_default_str();
  faults_cli->add_option("--set", faults.settings, kSetHelp);
  faults_cli->add_option("-j,--jobs", faults.jobs, "parallel scenarios (default: one per core)")
      ->check(whole_number(0));
  faults_cli->add_option("--report", faults.report, "also write a self-contained HTML report to this file");
  faults_cli->add_flag("-q,--quiet", faults.quiet, "print nothing on success");

  StudyCommands studies(cli);  // compare, sweep, spread, window (app/cli/study_commands.h)

  try {
    cli.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    if (error.get_exit_code() == 0) return cli.exit(error);  // --help, --version
    std::cerr << parse_error_text(cli, error, argc, argv);
    return kExitInputError;
  }
  try {
    if (run_cli->parsed()) return run_command(run);
    if (check_cli->parsed()) return check_command(check);
    if (faults_cli->parsed()) return faults_command(faults);
    if (auto code = studies.dispatch()) return *code;
  } catch (const std::exception& error) {
    // Unexpected, so perhaps this rank's alone: end the whole job rather than leave the others waiting.
    if (rank_count() > 1) {
      std::fprintf(stderr, "linkrise (rank %d of %d): %s\n", rank_index(), rank_count(), error.what());
    } else {
      std::fprintf(stderr, "linkrise: %s\n", error.what());
    }
    end_job(kExitInputError);
    return kExitInputError;
  }
  return kExitOk;
}

}  // namespace

int main(int argc, char** argv) {
  using namespace linkrise::app;
  // Started by an MPI launcher, every rank runs this same command; the first rank alone speaks (app/cluster/ranks.h).
  RankSession session(argc, argv);
  if (!first_rank()) {
    std::cout.rdbuf(nullptr);
    std::cerr.rdbuf(nullptr);
  }
  const int code = run_linkrise(argc, argv);
  // The first rank reports the outcome; the others end with 0, since a launcher stops the whole job when a rank
  // ends otherwise — perhaps before the first rank has written its files.
  return first_rank() ? code : kExitOk;
}
