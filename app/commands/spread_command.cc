#include "app/commands/spread_command.h"

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/commands/spread_output.h"
#include "app/report/study_report.h"
#include "app/studies/spread.h"
#include "app/studies/spread_record.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {

CommandOutput spread_output(const Spread& spread, const std::string& metrics_option,
                            const std::string& output_directory, const std::string& report) {
  std::vector<std::string> metrics = shown_metrics(metrics_option, spread.headline, spread.results.columns);
  CommandOutput output;
  output.directory = output_directory;
  output.files = {{"spread_samples.csv", spread_csv(spread)}, {"spread.json", spread_json(spread)}};
  output.report_file = report;
  if (!report.empty()) output.report = spread_report_html(spread, metrics);
  output.text = spread_text(spread, metrics);
  output.exit_code = spread.results.any_solver_failure() ? kExitSolverFailure
                     : spread.failed() > 0                ? kExitLimitFailed
                                                          : kExitOk;
  return output;
}

int spread_command(const SpreadArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    SpreadPlan plan = spread_plan(arguments.corners, arguments.samples, arguments.seed, arguments.shard);
    // Read once: the run and a shard's record (for `linkrise merge`) see the same case text.
    const std::string case_text = read_case_text(arguments.case_file);
    Spread spread = run_spread(netlist::CaseDocument::parse(case_text, arguments.case_file).with(settings), plan,
                               arguments.jobs, "spread");
    CommandOutput output = spread_output(spread, arguments.metrics, arguments.output_directory, arguments.report);
    if (!arguments.shard.empty()) {
      output.files.push_back({kSpreadRecordFile, spread_record_json(spread, case_text, arguments.settings)});
    }
    return output;
  });
}

std::string shard_problem(const std::string& text) {
  if (read_shard(text)) return "";
  return fmt::format("'{}' is not a shard k/n with 1 <= k <= n; write e.g. '--shard 2/4'", text);
}

}  // namespace linkrise::app
