#include "app/commands/spread_command.h"

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/report/study_report.h"
#include "app/studies/spread.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {

int spread_command(const SpreadArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    SpreadPlan plan = spread_plan(arguments.corners, arguments.samples, arguments.seed, arguments.shard);
    Spread spread = run_spread(arguments.case_file, settings, plan, arguments.jobs, "spread");
    std::vector<std::string> metrics = shown_metrics(arguments.metrics, spread.headline, spread.results.columns);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"spread_samples.csv", spread_csv(spread)}, {"spread.json", spread_json(spread)}};
    output.report_file = arguments.report;
    if (!arguments.report.empty()) output.report = spread_report_html(spread, metrics);
    output.text = spread_text(spread, metrics);
    output.exit_code = spread.results.any_solver_failure() ? kExitSolverFailure
                       : spread.failed() > 0                ? kExitLimitFailed
                                                            : kExitOk;
    return output;
  });
}

std::string shard_problem(const std::string& text) {
  if (read_shard(text)) return "";
  return fmt::format("'{}' is not a shard k/n with 1 <= k <= n; write e.g. '--shard 2/4'", text);
}

}  // namespace linkrise::app
