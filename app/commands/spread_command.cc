#include "app/commands/spread_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/study_report.h"
#include "app/studies/spread.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"

namespace linkrise::app {

int spread_command(const SpreadArguments& arguments) {
  try {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    SpreadPlan plan = spread_plan(arguments.corners, arguments.samples, arguments.seed, arguments.shard);
    Spread spread = run_spread(arguments.case_file, settings, plan, arguments.jobs, "spread");
    std::vector<std::string> metrics =
        arguments.metrics.empty() ? spread.headline
                                  : chosen_metrics(arguments.metrics, spread.results.columns, option_mark("--metrics", 1));
    OutputSet outputs(arguments.output_directory);
    outputs.add("spread_samples.csv", spread_csv(spread));
    outputs.add("spread.json", spread_json(spread));
    outputs.commit();
    // After the other outputs, so a failed study leaves no report (docs/report.md).
    if (!arguments.report.empty()) write_file_atomically(arguments.report, spread_report_html(spread, metrics));
    if (!arguments.quiet) {
      std::cout << spread_text(spread, metrics);
      std::cout << fmt::format("  wrote {} and {}\n", outputs.path("spread_samples.csv").string(),
                               outputs.path("spread.json").string());
      if (!arguments.report.empty()) std::cout << fmt::format("  report {}\n", arguments.report);
    }
    if (spread.results.any_solver_failure()) return kExitSolverFailure;
    return spread.failed() > 0 ? kExitLimitFailed : kExitOk;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
