#include "app/commands/fit_command.h"

#include <filesystem>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/report/fit_report.h"
#include "app/studies/fit.h"
#include "app/studies/study_parameters.h"
#include "netlist/measured_spec.h"

namespace linkrise::app {

int fit_command(const FitArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    FitRequest request;
    request.case_file = arguments.case_file;
    request.settings = parse_settings(arguments.settings);
    request.capture.file = arguments.capture;
    request.capture.columns = netlist::read_column_options(arguments.columns);
    request.fitted_case_folder = arguments.output_directory;
    FitResult fit = run_fit(request);
    if (!fit.solver_failure.empty()) {
      throw CommandFailure(kExitSolverFailure, fmt::format("linkrise: solver failure while fitting '{}': {}",
                                                           arguments.case_file, fit.solver_failure));
    }
    CommandOutput output;
    output.directory = arguments.output_directory;
    const std::string fitted_name = std::filesystem::path(arguments.case_file).stem().string() + ".fitted.yaml";
    output.files = {{"fit.json", fit_json(fit)}, {fitted_name, fit.fitted_case}};
    output.files_note = " (the fitted case is ready for 'linkrise run')";
    if (arguments.report) {
      output.report_file = *arguments.report;
      output.report = fit_report_html(fit);
    }
    output.text = fit_text(fit);
    output.exit_code = fit.stop_reason.rfind("stopped", 0) == 0 ? kExitLimitFailed : kExitOk;
    return output;
  });
}

}  // namespace linkrise::app
