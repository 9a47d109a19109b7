#include "app/commands/window_command.h"

#include <memory>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/report/study_report.h"
#include "app/studies/fault_window.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {

double margin_fraction(const std::string& text) {
  std::string problem;
  auto margin = netlist::parse_quantity(text, problem);
  if (!margin || !(margin->dimension == netlist::Dimension::none())) {
    throw netlist::InputError(option_mark("--margin", 1), fmt::format("'{}' is not a margin", text),
                              "write a percentage, e.g. '--margin 20%'");
  }
  return margin->value;
}

CommandOutput window_output(const WindowArguments& arguments) {
  const SpreadArguments& a = arguments.spread;
  std::vector<netlist::Override> settings = parse_settings(a.settings);
  double margin = margin_fraction(arguments.margin);
  SpreadPlan plan = spread_plan(a.corners, a.samples, a.seed, a.shard, "window");
  if (plan.shards > 1) {
    throw netlist::InputError(option_mark("--shard", 1), "a fault window needs the whole population, not a shard",
                              "run without --shard (shard `linkrise spread` instead)");
  }
  // Shared with the writer of spread_samples.csv, which runs after this function has returned.
  auto shared = std::make_shared<Spread>();
  const Spread& spread = *shared;
  FaultWindow window = fault_window(a.case_file, settings, plan, margin, a.jobs, shared.get(), "window");
  // Checked before anything is written: a misspelt metric is bad input.
  const std::vector<std::string> metrics = shown_metrics(a.metrics, spread.headline, spread.results.columns);
  CommandOutput output;
  output.directory = a.output_directory;
  output.files = {{"window.json", window_json(window, spread)}, {"spread_samples.csv", "", [shared](std::ostream& out) { write_spread_csv(out, *shared); }}};
  output.report_file = a.report;
  if (!a.report.empty()) output.report = window_report_html(window, spread, metrics);
  output.text = window_text(window, spread);
  output.exit_code = window.matrix.solver_failure() || spread.results.any_solver_failure() ? kExitSolverFailure
                     : window.verified()                                                     ? kExitOk
                                                                                              : kExitLimitFailed;
  return output;
}

}  // namespace

int window_command(const WindowArguments& arguments) {
  return carry_out(arguments.spread.quiet, [&] { return window_output(arguments); });
}

}  // namespace linkrise::app
