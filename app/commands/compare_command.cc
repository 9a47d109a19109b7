#include "app/commands/compare_command.h"

#include <algorithm>

#include "app/commands/command_steps.h"
#include "app/report/study_report.h"
#include "app/studies/compare.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {

int compare_command(const CompareArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    VariantComparison comparison =
        compare_variants(arguments.case_file, parse_settings(arguments.settings), arguments.jobs, arguments.faults);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"compare.csv", comparison_csv(comparison)}, {"compare.json", comparison_json(comparison)}};
    if (arguments.faults) output.files.push_back({"compare_faults.csv", comparison_faults_csv(comparison)});
    output.report_file = arguments.report;
    if (!arguments.report.empty()) output.report = compare_report_html(comparison);
    output.text = comparison_text(comparison, arguments.all);
    const bool solver_failure = comparison.results.any_solver_failure() ||
                                std::any_of(comparison.matrices.begin(), comparison.matrices.end(),
                                            [](const DetectionMatrix& matrix) { return matrix.solver_failure(); });
    output.exit_code = solver_failure                ? kExitSolverFailure
                       : comparison.faults_failed() ? kExitLimitFailed
                                                    : kExitOk;
    return output;
  });
}

}  // namespace linkrise::app
