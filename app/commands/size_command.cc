#include "app/commands/size_command.h"

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/studies/sizing.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"
#include "netlist/parameter_reader.h"

namespace linkrise::app {
namespace {

// "A..B" -> the two ends in SI, each read like a case-file value of any dimension (the case checks the unit
// against the sized parameter when it runs).
std::pair<double, double> read_range(const std::string& text) {
  const netlist::SourceMark mark{"option --range", 0, 0};
  const auto dots = text.find("..");
  if (dots == std::string::npos) {
    throw netlist::InputError(mark, fmt::format("'{}' is not a range A..B", text), "write e.g. '--range 10Ohm..200Ohm'");
  }
  auto end = [&](const std::string& part) {
    return netlist::ParameterReader::read_text(part, mark, netlist::Dimension::resistance(), netlist::Bound::Positive,
                                               "option --range");
  };
  return {end(text.substr(0, dots)), end(text.substr(dots + 2))};
}

}  // namespace

int size_command(const SizeArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    SizingRequest request;
    request.case_file = arguments.case_file;
    request.settings = parse_settings(arguments.settings);
    request.part = arguments.part;
    request.parameter = arguments.parameter;
    std::tie(request.lower, request.upper) = read_range(arguments.range);
    request.corners = !arguments.nominal;
    request.tolerance = netlist::ParameterReader::read_text(arguments.tolerance, {"option --tolerance", 0, 0},
                                                            netlist::Dimension::none(), netlist::Bound::Positive,
                                                            "option --tolerance");
    request.jobs = arguments.jobs;
    Sizing sizing = size_part(request);
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"sizing.csv", sizing_csv(sizing)}, {"sizing.json", sizing_json(sizing)}};
    output.text = sizing_text(sizing);
    output.exit_code = !sizing.solver_failures.empty() ? kExitSolverFailure
                       : sizing.feasible()              ? kExitOk
                                                        : kExitLimitFailed;
    return output;
  });
}

}  // namespace linkrise::app
