#include "app/cli/study_commands.h"

#include "app/cli/parse_errors.h"

namespace linkrise::app {
namespace {

// The options every study ends with, in the order its help lists them.
template <class Arguments>
void add_output_options(CLI::App* command, Arguments& arguments) {
  command->add_option("-o,--output", arguments.output_directory, "output directory")->capture_default_str();
  command->add_option("-j,--jobs", arguments.jobs,
                      "parallel evaluations (default: one per core; results do not depend on it)")
      ->check(whole_number(0));
  command->add_flag("-q,--quiet", arguments.quiet, "print nothing on success");
  command->add_option("--report", arguments.report, "also write a self-contained HTML report to this file");
}

}  // namespace

StudyCommands::StudyCommands(CLI::App& cli) {
  compare_cli_ = cli.add_subcommand("compare", "run the case's variants side by side with the nominal case");
  compare_cli_->add_option("case", compare_.case_file, "case file (YAML) with a variants block")->required();
  compare_cli_->add_option("--set", compare_.settings, kSetHelp);
  compare_cli_->add_flag("--faults", compare_.faults, "also run the fault scenarios for every variant");
  compare_cli_->add_flag("--all", compare_.all, "show every metric in the table (default: the headline metrics)");
  add_output_options(compare_cli_, compare_);

  sweep_cli_ = cli.add_subcommand("sweep", "vary one or two parameters over lists or ranges");
  sweep_cli_->add_option("case", sweep_.case_file, "case file (YAML)")->required();
  sweep_cli_->add_option("--vary", sweep_.vary,
                         "PATH=A,B,C or PATH=A..B[:lin|:log][:N] (once or twice), e.g. r_pre.resistance=22Ohm..68Ohm:log:5")
      ->required();
  sweep_cli_->add_option("--set", sweep_.settings, kSetHelp);
  sweep_cli_->add_option("--metrics", sweep_.metrics, "metrics for the terminal table, comma-separated");
  add_output_options(sweep_cli_, sweep_);

  // The parser rejects both --corners and --samples, and a malformed --shard, before anything runs.
  const CLI::Validator shard_form([](std::string& text) { return shard_problem(text); }, "K/N", "shard");
  auto add_population = [&shard_form](CLI::App* command, SpreadArguments& arguments) {
    auto* corners =
        command->add_flag("--corners", arguments.corners, "every combination of the tolerance bounds (2^k runs)");
    command->add_option("--samples", arguments.samples, "Monte Carlo: number of samples")
        ->check(whole_number(1))
        ->excludes(corners);
    command->add_option("--seed", arguments.seed, "Monte Carlo seed")->capture_default_str();
    command->add_option("--shard", arguments.shard, "run the k-th of n blocks of the samples, e.g. 2/4")
        ->check(shard_form);
    command->add_option("--set", arguments.settings, kSetHelp);
    command->add_option("--metrics", arguments.metrics, "metrics for the terminal tables, comma-separated");
    add_output_options(command, arguments);
  };
  spread_cli_ = cli.add_subcommand("spread", "tolerance spread: corners or Monte Carlo over the tolerances block");
  spread_cli_->add_option("case", spread_.case_file, "case file (YAML) with a tolerances block")->required();
  add_population(spread_cli_, spread_);

  merge_cli_ = cli.add_subcommand("merge", "combine the output folders of a spread's shards (--shard k/n) into one "
                                           "study");
  merge_cli_->add_option("folders", merge_.folders, "the shards' output folders, in any order")->required();
  merge_cli_->add_option("--metrics", merge_.metrics, "metrics for the terminal tables, comma-separated");
  merge_cli_->add_option("-o,--output", merge_.output_directory, "output directory")->capture_default_str();
  merge_cli_->add_flag("-q,--quiet", merge_.quiet, "print nothing on success");
  merge_cli_->add_option("--report", merge_.report, "also write a self-contained HTML report to this file");

  window_cli_ = cli.add_subcommand(
      "window", "recommend the BMS minimum time and timeout from the spread, then verify them on the fault scenarios");
  window_cli_->add_option("case", window_.spread.case_file, "case file (YAML) with sequence and tolerances blocks")
      ->required();
  add_population(window_cli_, window_.spread);
  window_cli_->add_option("--margin", window_.margin, "margin below the fastest and above the slowest charge, e.g. 20%")
      ->capture_default_str();

  size_cli_ = cli.add_subcommand(
      "size", "find the resistor: the window of values and the catalogue part that pass every limit, rating, "
              "tolerance point and fault scenario, verified with the BMS window");
  size_cli_->add_option("case", size_.case_file, "case file (YAML), usually with a sizing block")->required();
  size_cli_->add_option("--part", size_.part, "the part to size, e.g. r_pre (default: the sizing block's)");
  size_cli_->add_option("--range", size_.range, "the values to search, e.g. 10Ohm..200Ohm (default: the block's)");
  size_cli_->add_option("--parameter", size_.parameter, "the resistance parameter (default resistance)");
  auto* nominal = size_cli_->add_flag("--nominal", size_.nominal, "judge the nominal point only");
  auto* corners = size_cli_->add_flag("--corners", size_.corners, "judge the nominal point and every tolerance corner")
                      ->excludes(nominal);
  size_cli_->add_option("--samples", size_.samples, "Monte Carlo: judge N samples at a quantile")
      ->check(whole_number(1))
      ->excludes(nominal)
      ->excludes(corners);
  size_cli_->add_option("--seed", size_.seed, "Monte Carlo seed (default 1)")->check(whole_number(1));
  size_cli_->add_option("--quantile", size_.quantile, "the share of samples that must pass, e.g. 99%");
  size_cli_->add_flag("--no-faults", size_.no_faults, "leave the fault scenarios out of the constraints");
  size_cli_->add_option("--attempts", size_.attempts, "attempts each fault scenario runs with (its retries)")
      ->check(whole_number(1));
  size_cli_->add_option("--faults-at", size_.faults_at, "run the fault scenarios at the nominal point or the whole spread")
      ->check(CLI::IsMember({"nominal", "spread"}));
  size_cli_->add_option("--tolerance", size_.tolerance, "relative tolerance of the boundaries (default 0.5%)");
  size_cli_->add_option("--catalogue", size_.catalogue, "candidate parts (YAML) to rank over the same spread and faults");
  size_cli_->add_flag("--no-verify", size_.no_verify, "skip the fault matrix and BMS window of the chosen design");
  size_cli_->add_option("--margin", size_.margin, "margin of the verified BMS window, e.g. 20%")->capture_default_str();
  size_cli_->add_option("--set", size_.settings, kSetHelp);
  add_output_options(size_cli_, size_);

  fit_cli_ = cli.add_subcommand("fit", "estimate the fit block's parameters from a measured capture, with intervals");
  fit_cli_->add_option("case", fit_.case_file, "case file (YAML) with measured and fit blocks")->required();
  fit_cli_->add_option("--capture", fit_.capture, "the capture (CSV), replacing the measured block's file");
  fit_cli_->add_option("--column", fit_.columns,
                       "map a capture column: NAME=HEADER, e.g. 'link_plus=CH2 [V]' (repeatable; replaces the block's)");
  fit_cli_->add_option("--set", fit_.settings, kSetHelp);
  fit_cli_->add_option("-o,--output", fit_.output_directory, "output directory")->capture_default_str();
  fit_cli_->add_flag("-q,--quiet", fit_.quiet, "print nothing on success");
  fit_cli_->add_option("--report", fit_.report, "also write a self-contained HTML report to this file");
}

std::optional<int> StudyCommands::dispatch() const {
  if (compare_cli_->parsed()) return compare_command(compare_);
  if (sweep_cli_->parsed()) return sweep_command(sweep_);
  if (spread_cli_->parsed()) return spread_command(spread_);
  if (merge_cli_->parsed()) return merge_command(merge_);
  if (window_cli_->parsed()) return window_command(window_);
  if (size_cli_->parsed()) return size_command(size_);
  if (fit_cli_->parsed()) return fit_command(fit_);
  return std::nullopt;
}

}  // namespace linkrise::app
