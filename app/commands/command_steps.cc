#include "app/commands/command_steps.h"

#include <iostream>
#include <optional>

#include <fmt/format.h>

#include "app/cluster/ranks.h"
#include "app/output/output_files.h"
#include "netlist/input_error.h"

namespace linkrise::app {
namespace {

std::string label(const char* word, ListingLayout layout) {
  return layout == ListingLayout::Columns ? fmt::format("{:<10}", word) : fmt::format("{} ", word);
}

std::string listing(const CommandOutput& output, const OutputSet* set) {
  std::string out;
  if (set != nullptr) {
    std::string names;
    for (const auto& file : output.files) names += (names.empty() ? "" : " and ") + set->path(file.name).string();
    out += fmt::format("  {}{}{}\n", label("wrote", output.layout), names, output.files_note);
  }
  if (!output.report_file.empty()) out += fmt::format("  {}{}\n", label("report", output.layout), output.report_file);
  return out;
}

int write_and_print(bool quiet, const CommandOutput& output) {
  // In an MPI job every rank computed the same output; the first writes it (app/cluster/ranks.h).
  if (!first_rank()) return output.exit_code;
  std::optional<OutputSet> set;
  if (!output.files.empty()) {
    set.emplace(output.directory);
    for (const auto& file : output.files) {
      if (file.write) {
        set->add(file.name, file.write);
      } else {
        set->add(file.name, file.content);
      }
    }
    set->commit();
  }
  // After the output set, so a failed command leaves no report (docs/report.md).
  if (!output.report_file.empty()) write_file_atomically(output.report_file, output.report);
  for (const auto& file : output.standalone) write_file_atomically(file.path, file.content);
  if (!quiet) std::cout << output.text << listing(output, set ? &*set : nullptr);
  return output.exit_code;
}

}  // namespace

int carry_out(bool quiet, const std::function<CommandOutput()>& compute) {
  try {
    return write_and_print(quiet, compute());
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  } catch (const CommandFailure& failure) {
    std::cerr << failure.what() << "\n";
    return failure.exit_code();
  }
}

}  // namespace linkrise::app
