#include "app/commands/size_command.h"

#include <unistd.h>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/report/sizing_report.h"
#include "app/studies/sizing.h"
#include "app/studies/study_parameters.h"
#include "netlist/input_error.h"
#include "netlist/parameter_reader.h"

namespace linkrise::app {
namespace {

// "A..B" -> the two ends in SI, each read as a resistance.
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

double fraction_option(const std::string& text, const std::string& option) {
  return netlist::ParameterReader::read_text(text, {"option " + option, 0, 0}, netlist::Dimension::none(),
                                             netlist::Bound::Positive, "option " + option);
}

SizingRequest sizing_request(const SizeArguments& arguments) {
  SizingRequest request;
  request.case_file = arguments.case_file;
  request.settings = parse_settings(arguments.settings);
  if (!arguments.part.empty()) request.part = arguments.part;
  if (!arguments.parameter.empty()) request.parameter = arguments.parameter;
  if (!arguments.range.empty()) request.range = read_range(arguments.range);
  if (arguments.nominal) request.spread = netlist::SizingSpread::Nominal;
  if (arguments.corners) request.spread = netlist::SizingSpread::Corners;
  if (arguments.samples > 0) {
    request.spread = netlist::SizingSpread::Samples;
    request.samples = arguments.samples;
  }
  if (arguments.seed > 0) request.seed = arguments.seed;
  if (!arguments.quantile.empty()) request.quantile = fraction_option(arguments.quantile, "--quantile");
  if (arguments.no_faults) request.faults = false;
  if (arguments.attempts > 0) request.attempts = arguments.attempts;
  if (!arguments.faults_at.empty()) request.faults_over_spread = arguments.faults_at == "spread";
  if (!arguments.tolerance.empty()) request.tolerance = fraction_option(arguments.tolerance, "--tolerance");
  if (!arguments.catalogue.empty()) request.catalogue = arguments.catalogue;
  request.verify = !arguments.no_verify;
  request.window_margin = fraction_option(arguments.margin, "--margin");
  if (!(request.window_margin < 1.0)) {
    throw netlist::InputError(option_mark("--margin", 1), "the window margin must lie below 100 %",
                              "write e.g. '--margin 20%'");
  }
  request.jobs = arguments.jobs;
  request.progress = !arguments.quiet && isatty(STDERR_FILENO);
  return request;
}

}  // namespace

int size_command(const SizeArguments& arguments) {
  return carry_out(arguments.quiet, [&] {
    Sizing sizing = size_part(sizing_request(arguments));
    CommandOutput output;
    output.directory = arguments.output_directory;
    output.files = {{"sizing.csv", sizing_csv(sizing)}, {"sizing.json", sizing_json(sizing)}};
    output.report_file = arguments.report;
    if (!arguments.report.empty()) output.report = sizing_report_html(sizing);
    output.text = sizing_text(sizing);
    output.exit_code = !sizing.solver_failures.empty() ? kExitSolverFailure
                       : sizing.found()                 ? kExitOk
                                                        : kExitLimitFailed;
    return output;
  });
}

}  // namespace linkrise::app
