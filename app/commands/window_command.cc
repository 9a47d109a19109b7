#include "app/commands/window_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/study_report.h"
#include "app/studies/fault_window.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"
#include "netlist/units.h"

namespace linkrise::app {

int window_command(const WindowArguments& arguments) {
  try {
    const SpreadArguments& a = arguments.spread;
    std::vector<netlist::Override> settings = parse_settings(a.settings);
    std::string problem;
    auto margin = netlist::parse_quantity(arguments.margin, problem);
    if (!margin || !(margin->dimension == netlist::Dimension::none())) {
      throw netlist::InputError(option_mark("--margin", 1), fmt::format("'{}' is not a margin", arguments.margin),
                                "write a percentage, e.g. '--margin 20%'");
    }
    SpreadPlan plan = spread_plan(a.corners, a.samples, a.seed, a.shard);
    if (plan.shards > 1) {
      throw netlist::InputError(option_mark("--shard", 1), "a fault window needs the whole population, not a shard",
                                "run without --shard (shard `linkrise spread` instead)");
    }
    Spread spread;
    FaultWindow window = fault_window(a.case_file, settings, plan, margin->value, a.jobs, &spread, "window");
    // Checked before anything is written: a misspelt metric is bad input.
    const std::vector<std::string> metrics =
        a.metrics.empty() ? spread.headline : chosen_metrics(a.metrics, spread.results.columns, option_mark("--metrics", 1));
    OutputSet outputs(a.output_directory);
    outputs.add("window.json", window_json(window, spread));
    outputs.add("spread_samples.csv", spread_csv(spread));
    outputs.commit();
    // After the other outputs, so a failed study leaves no report (docs/report.md).
    if (!a.report.empty()) write_file_atomically(a.report, window_report_html(window, spread, metrics));
    if (!a.quiet) {
      std::cout << window_text(window, spread);
      std::cout << fmt::format("  wrote {} and {}\n", outputs.path("window.json").string(),
                               outputs.path("spread_samples.csv").string());
      if (!a.report.empty()) std::cout << fmt::format("  report {}\n", a.report);
    }
    if (window.matrix.solver_failure() || spread.results.any_solver_failure()) return kExitSolverFailure;
    return window.verified() ? kExitOk : kExitLimitFailed;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
