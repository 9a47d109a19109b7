#include "app/commands/sweep_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/study_report.h"
#include "app/studies/study_parameters.h"
#include "app/studies/sweep.h"
#include "netlist/input_error.h"

namespace linkrise::app {

int sweep_command(const SweepArguments& arguments) {
  try {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    std::vector<VariedParameter> parameters;
    for (std::size_t i = 0; i < arguments.vary.size(); ++i) {
      parameters.push_back(parse_variation(arguments.vary[i], option_mark("--vary", static_cast<int>(i) + 1)));
    }
    Sweep sweep = run_sweep(arguments.case_file, settings, parameters, arguments.jobs, "sweep");
    std::vector<std::string> metrics = arguments.metrics.empty()
                                           ? sweep.headline
                                           : chosen_metrics(arguments.metrics, sweep.results.columns,
                                                            option_mark("--metrics", 1));
    OutputSet outputs(arguments.output_directory);
    outputs.add("sweep.csv", sweep_csv(sweep));
    outputs.commit();
    // After the other outputs, so a failed study leaves no report (docs/report.md).
    if (!arguments.report.empty()) write_file_atomically(arguments.report, sweep_report_html(sweep, metrics));
    if (!arguments.quiet) {
      std::cout << sweep_text(sweep, metrics);
      std::cout << fmt::format("  wrote {} (every metric per point)\n", outputs.path("sweep.csv").string());
      if (!arguments.report.empty()) std::cout << fmt::format("  report {}\n", arguments.report);
    }
    return sweep.results.any_solver_failure() ? kExitSolverFailure : kExitOk;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
