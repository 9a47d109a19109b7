#include "app/evaluation/measured_capture.h"

#include <algorithm>

#include <fmt/format.h>

namespace linkrise::app {
namespace {
using netlist::InputError;

netlist::CaptureRequest request_for(const netlist::Case& spec, const CaptureChoice& choice) {
  netlist::CaptureRequest request;
  if (spec.measured) request = spec.measured->request();
  if (choice.file) {
    request.file = *choice.file;
    request.mark = netlist::SourceMark{"option --measured", 0, 0};
  }
  if (!choice.columns.empty()) request.columns = choice.columns;
  if (request.file.empty()) {
    throw InputError(netlist::SourceMark{spec.file, 1, 1}, "the case names no measured capture",
                     "add 'measured: {file: capture.csv}' to the case, or name the file on the command line");
  }
  return request;
}

netlist::Dimension dimension_of(const std::string& unit) {
  if (unit.empty() || unit == "1") return netlist::Dimension::none();
  std::string problem;
  auto quantity = netlist::parse_quantity("1 " + unit, problem);
  return quantity ? quantity->dimension : netlist::Dimension::none();
}

}  // namespace

MeasuredCapture load_measured(const netlist::Case& spec, const std::vector<std::string>& headers,
                              const CaptureChoice& choice) {
  const netlist::CaptureRequest request = request_for(spec, choice);
  MeasuredCapture measured;
  measured.time_offset = spec.measured ? spec.measured->time_offset : 0.0;
  measured.capture = netlist::read_capture(request);
  std::vector<std::string> names;
  for (const auto& header : headers) names.push_back(netlist::split_header(header).first);
  for (std::size_t c = 0; c < measured.capture.columns.size(); ++c) {
    const auto& column = measured.capture.columns[c];
    auto found = std::find(names.begin(), names.end(), column.name);
    if (found == names.end()) {
      if (request.columns.empty()) continue;  // a column of another case's waveforms, or of no interest
      const auto& mapping = request.columns[c];
      throw InputError(mapping.mark, fmt::format("'{}' is no signal of the case", column.name),
                       netlist::did_you_mean(column.name, names,
                                             "name a node ('link_plus') or a part's signal ('r_pre.current')"));
    }
    const int index = static_cast<int>(found - names.begin());
    const std::string unit = netlist::split_header(headers[static_cast<std::size_t>(index)]).second;
    if (!(dimension_of(unit) == column.dimension)) {
      throw InputError(column.header_mark,
                       fmt::format("column '{}' is {}, but '{}' is {}", column.header, column.dimension.describe(),
                                   column.name, dimension_of(unit).describe()),
                       "map the column to a signal of its unit, or correct the unit in its header");
    }
    measured.signals.push_back(MatchedSignal{c, index, column.name, unit});
  }
  if (measured.signals.empty()) {
    throw InputError(netlist::SourceMark{measured.capture.file, measured.capture.header_line, 1},
                     "no column of the capture is named like a signal of the case",
                     "map the columns, e.g. 'measured: {columns: {link_plus: \"CH2 [V]\"}}' or --column");
  }
  return measured;
}

}  // namespace linkrise::app
