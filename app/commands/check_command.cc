#include "app/commands/check_command.h"

#include <iostream>

#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/regression/check.h"
#include "app/regression/junit_xml.h"

namespace linkrise::app {

int check_command(const CheckArguments& arguments) {
  std::vector<std::string> files = find_case_files(arguments.paths);
  if (files.empty()) {
    std::cerr << "linkrise check: no case files found under the given paths\n";
    return kExitInputError;
  }
  std::vector<CaseCheck> checks = check_cases(files, arguments.jobs);
  CheckSummary summary = summarise_checks(checks, arguments.show_all);
  std::cout << summary.table << summary.closing_line();

  if (!arguments.junit_file.empty()) {
    write_file_atomically(arguments.junit_file, junit_xml("linkrise check", summary.junit));
  }
  if (arguments.update) {
    int errors = 0;
    for (const auto& update : golden_updates(checks)) {
      std::cout << update.listing;
      if (!update.file.empty()) write_file_atomically(update.file, update.text);
      errors += update.error ? 1 : 0;
    }
    return errors > 0 ? kExitLimitFailed : kExitOk;
  }
  return summary.failed > 0 ? kExitLimitFailed : kExitOk;
}

}  // namespace linkrise::app
