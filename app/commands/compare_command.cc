#include "app/commands/compare_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/study_report.h"
#include "app/studies/compare.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"

namespace linkrise::app {

int compare_command(const CompareArguments& arguments) {
  try {
    std::vector<netlist::Override> settings = parse_settings(arguments.settings);
    VariantComparison comparison = compare_variants(arguments.case_file, settings, arguments.jobs);
    OutputSet outputs(arguments.output_directory);
    outputs.add("compare.csv", comparison_csv(comparison));
    outputs.add("compare.json", comparison_json(comparison));
    outputs.commit();
    // After the other outputs, so a failed study leaves no report (docs/report.md).
    if (!arguments.report.empty()) write_file_atomically(arguments.report, compare_report_html(comparison));
    if (!arguments.quiet) {
      std::cout << comparison_text(comparison);
      std::cout << fmt::format("  wrote {} and {}\n", outputs.path("compare.csv").string(),
                               outputs.path("compare.json").string());
      if (!arguments.report.empty()) std::cout << fmt::format("  report {}\n", arguments.report);
    }
    return comparison.results.any_solver_failure() ? kExitSolverFailure : kExitOk;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
