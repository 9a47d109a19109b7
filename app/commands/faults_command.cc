#include "app/commands/faults_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/faults_report.h"
#include "app/studies/faults.h"
#include "netlist/input_error.h"

namespace linkrise::app {

int faults_command(const FaultsArguments& arguments) {
  try {
    DetectionMatrix matrix = detection_matrix(arguments.case_file, arguments.jobs);
    OutputSet outputs(arguments.output_directory);
    outputs.add("faults.json", matrix_json(matrix));
    outputs.add("faults.csv", matrix_csv(matrix));
    outputs.commit();
    // After the other outputs, so a failed run leaves no report (docs/report.md).
    if (arguments.report) write_file_atomically(*arguments.report, faults_report_html(matrix));
    if (!arguments.quiet) {
      std::cout << matrix_text(matrix);
      std::cout << fmt::format("  wrote     {} and {}\n", outputs.path("faults.json").string(),
                               outputs.path("faults.csv").string());
      if (arguments.report) std::cout << fmt::format("  report    {}\n", *arguments.report);
    }
    if (matrix.solver_failure()) return kExitSolverFailure;
    return matrix.pass() ? kExitOk : kExitLimitFailed;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
