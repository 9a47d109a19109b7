#include "app/commands/check_command.h"

#include <filesystem>
#include <system_error>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/regression/check.h"
#include "app/regression/junit_xml.h"
#include "app/studies/study_parameters.h"

namespace linkrise::app {
namespace {

CommandOutput check_output(const CheckArguments& arguments) {
  for (const auto& path : arguments.paths) {
    std::error_code ignored;
    if (!std::filesystem::exists(path, ignored)) {
      throw CommandFailure(kExitInputError, fmt::format("linkrise check: '{}' does not exist (give case files or "
                                                        "directories of them, e.g. cases)", path));
    }
  }
  std::vector<std::string> files = find_case_files(arguments.paths);
  if (files.empty()) {
    throw CommandFailure(kExitInputError, "linkrise check: no case files found under the given paths");
  }
  if (arguments.update && !arguments.settings.empty()) {
    throw CommandFailure(kExitInputError,
                         "linkrise check: --update cannot be combined with --set (the golden results would store a "
                         "changed case); run --update without --set");
  }
  std::vector<CaseCheck> checks = check_cases(files, arguments.jobs, parse_settings(arguments.settings));
  CheckSummary summary = summarise_checks(checks, arguments.show_all);
  CommandOutput output;
  output.text = summary.table + summary.closing_line();
  if (!arguments.junit_file.empty()) {
    output.standalone.push_back({arguments.junit_file, junit_xml("linkrise check", summary.junit)});
  }
  output.exit_code = summary.failed > 0 ? kExitLimitFailed : kExitOk;
  if (!arguments.update) return output;
  int errors = 0;
  for (auto& update : golden_updates(checks)) {
    output.text += update.listing;
    if (!update.file.empty()) output.standalone.push_back({update.file, std::move(update.text)});
    errors += update.error ? 1 : 0;
  }
  output.exit_code = errors > 0 ? kExitLimitFailed : kExitOk;
  return output;
}

}  // namespace

int check_command(const CheckArguments& arguments) {
  return carry_out(false, [&] { return check_output(arguments); });
}

}  // namespace linkrise::app
