#include "app/commands/faults_command.h"

#include "app/commands/command_steps.h"
#include "app/report/faults_report.h"
#include "app/studies/faults.h"
#include "app/studies/study_parameters.h"
#include "netlist/case_document.h"

namespace linkrise::app {

int faults_command(const FaultsArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    DetectionMatrix matrix = detection_matrix(
        netlist::CaseDocument::load(arguments.case_file).with(parse_settings(arguments.settings)), arguments.jobs);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"faults.json", matrix_json(matrix)}, {"faults.csv", matrix_csv(matrix)}};
    if (arguments.report) {
      output.report_file = *arguments.report;
      output.report = faults_report_html(matrix);
    }
    output.text = matrix_text(matrix);
    output.layout = ListingLayout::Columns;
    output.exit_code = matrix.solver_failure() ? kExitSolverFailure : matrix.pass() ? kExitOk : kExitLimitFailed;
    return output;
  });
}

}  // namespace linkrise::app
