#include "app/commands/spread_command.h"

#include <memory>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/commands/spread_output.h"
#include "app/report/study_report.h"
#include "app/studies/spread.h"
#include "app/studies/spread_record.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {

CommandOutput spread_output(std::shared_ptr<const Spread> shared, const std::string& metrics_option,
                            const std::string& output_directory, const std::string& report) {
  const Spread& spread = *shared;
  std::vector<std::string> metrics = shown_metrics(metrics_option, spread.headline, spread.results.columns);
  CommandOutput output;
  output.directory = output_directory;
  // The samples are streamed into their temporary file when the set is written: not held as text.
  output.files = {{"spread_samples.csv", "", [shared](std::ostream& out) { write_spread_csv(out, *shared); }},
                  {"spread.json", spread_json(spread)}};
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
    auto spread = std::make_shared<const Spread>(run_spread(
        netlist::CaseDocument::parse(case_text, arguments.case_file).with(settings), plan, arguments.jobs, "spread"));
    CommandOutput output = spread_output(spread, arguments.metrics, arguments.output_directory, arguments.report);
    if (!arguments.shard.empty()) {
      // Streamed like the samples' CSV (about 1.5 kB per sample as text).
      output.files.push_back({kSpreadRecordFile, "",
                              [spread, case_text, settings = arguments.settings](std::ostream& out) {
                                write_spread_record_json(out, *spread, case_text, settings);
                              }});
    }
    return output;
  });
}

std::string shard_problem(const std::string& text) {
  if (read_shard(text)) return "";
  return fmt::format("'{}' is not a shard k/n with 1 <= k <= n; write e.g. '--shard 2/4'", text);
}

}  // namespace linkrise::app
