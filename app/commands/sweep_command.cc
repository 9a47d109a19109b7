#include "app/commands/sweep_command.h"

#include <algorithm>

#include "app/commands/command_steps.h"
#include "app/report/study_report.h"
#include "app/studies/study_parameters.h"
#include "app/studies/sweep.h"

namespace linkrise::app {

int sweep_command(const SweepArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    std::vector<VariedParameter> parameters;
    for (std::size_t i = 0; i < arguments.vary.size(); ++i) {
      parameters.push_back(parse_variation(arguments.vary[i], option_mark("--vary", static_cast<int>(i) + 1)));
    }
    Sweep sweep = run_sweep(arguments.case_file, settings, parameters, arguments.jobs, "sweep");
    std::vector<std::string> metrics = shown_metrics(arguments.metrics, sweep.headline, sweep.results.columns);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"sweep.csv", sweep_csv(sweep)}};
    output.files_note = " (every metric per point)";
    output.report_file = arguments.report;
    if (!arguments.report.empty()) output.report = sweep_report_html(sweep, metrics);
    output.text = sweep_text(sweep, metrics);
    // A sweep looks for a value that works: when none does, say so in the exit code too.
    const bool any_passed = std::any_of(sweep.results.points.begin(), sweep.results.points.end(),
                                        [](const PointResult& point) { return point.passed(); });
    output.exit_code = sweep.results.any_solver_failure() ? kExitSolverFailure
                       : any_passed                      ? kExitOk
                                                         : kExitLimitFailed;
    return output;
  });
}

}  // namespace linkrise::app
