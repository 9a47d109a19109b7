#include "app/commands/compare_command.h"

#include "app/commands/command_steps.h"
#include "app/report/study_report.h"
#include "app/studies/compare.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {

int compare_command(const CompareArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    VariantComparison comparison =
        compare_variants(arguments.case_file, parse_settings(arguments.settings), arguments.jobs);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"compare.csv", comparison_csv(comparison)}, {"compare.json", comparison_json(comparison)}};
    output.report_file = arguments.report;
    if (!arguments.report.empty()) output.report = compare_report_html(comparison);
    output.text = comparison_text(comparison);
    output.exit_code = comparison.results.any_solver_failure() ? kExitSolverFailure : kExitOk;
    return output;
  });
}

}  // namespace linkrise::app
