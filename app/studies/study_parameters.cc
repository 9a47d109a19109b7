#include "app/studies/study_parameters.h"

#include <cmath>

#include <fmt/format.h>

#include "netlist/input_error.h"
#include "netlist/parameter_reader.h"

namespace linkrise::app {
using netlist::InputError;
using netlist::SourceMark;

SourceMark option_mark(const std::string& option, int position) {
  return SourceMark{fmt::format("command line ({} #{})", option, position), 0, 0};
}

namespace {
std::string trim(const std::string& text) {
  std::size_t begin = text.find_first_not_of(" \t");
  if (begin == std::string::npos) return "";
  std::size_t end = text.find_last_not_of(" \t");
  return text.substr(begin, end - begin + 1);
}

netlist::Quantity parse_or_throw(const std::string& text, const SourceMark& mark, const std::string& what) {
  std::string problem;
  auto quantity = netlist::parse_quantity(text, problem);
  if (!quantity) {
    throw InputError(mark, fmt::format("{} '{}' is not a quantity: {}", what, text, problem),
                     "write a number with a unit, e.g. '22 Ohm' or '1.5 mF'");
  }
  return *quantity;
}
}  // namespace

netlist::Override parse_assignment(const std::string& text, const SourceMark& mark) {
  std::size_t equals = text.find('=');
  if (equals == std::string::npos) {
    throw InputError(mark, fmt::format("'{}' is not an assignment", text),
                     "write <path>=<value>, e.g. r_pre.resistance=56Ohm");
  }
  std::string path = trim(text.substr(0, equals));
  std::string value = trim(text.substr(equals + 1));
  if (path.empty() || value.empty()) {
    throw InputError(mark, fmt::format("'{}' needs a path and a value on either side of '='", text),
                     "write <path>=<value>, e.g. r_pre.resistance=56Ohm");
  }
  return netlist::Override{path, value, mark};
}

std::vector<netlist::Override> parse_settings(const std::vector<std::string>& settings) {
  std::vector<netlist::Override> overrides;
  for (std::size_t i = 0; i < settings.size(); ++i) {
    overrides.push_back(parse_assignment(settings[i], option_mark("--set", static_cast<int>(i) + 1)));
  }
  return overrides;
}


namespace {
// The points of a range A..B[:lin|:log][:N] (`dots` is where ".." stands in `spec`), as case-file texts.
std::vector<std::string> range_values(const std::string& spec, std::size_t dots, const SourceMark& mark) {
  std::string first = trim(spec.substr(0, dots));
  std::string rest = spec.substr(dots + 2);
  std::vector<std::string> pieces;
  for (std::size_t start = 0;;) {
    std::size_t colon = rest.find(':', start);
    pieces.push_back(trim(rest.substr(start, colon == std::string::npos ? std::string::npos : colon - start)));
    if (colon == std::string::npos) break;
    start = colon + 1;
  }
  std::string last = pieces[0];
  bool logarithmic = false;
  int count = 5;
  for (std::size_t i = 1; i < pieces.size(); ++i) {
    if (pieces[i] == "lin" || pieces[i] == "log") {
      logarithmic = pieces[i] == "log";
    } else {
      try {
        std::size_t used = 0;
        count = std::stoi(pieces[i], &used);
        if (used != pieces[i].size()) throw std::invalid_argument("trailing text");
      } catch (const std::exception&) {
        throw InputError(mark, fmt::format("'{}' in the range '{}' is neither lin, log nor a point count", pieces[i], spec),
                         "write e.g. '22Ohm..68Ohm:log:5'");
      }
    }
  }
  if (count < 2) throw InputError(mark, fmt::format("the range '{}' needs at least 2 points", spec), "write e.g. ':5'");
  netlist::Quantity low = parse_or_throw(first, mark, "range start");
  netlist::Quantity high = parse_or_throw(last, mark, "range end");
  if (!(low.dimension == high.dimension) && !low.bare && !high.bare) {
    throw InputError(mark, fmt::format("the ends of '{}' have different units", spec), "give both ends in one unit");
  }
  if (low.absolute_temperature != high.absolute_temperature) {
    throw InputError(mark, fmt::format("the ends of '{}' mix degC with K", spec), "give both ends in degC");
  }
  if (logarithmic && (low.value <= 0.0 || high.value <= 0.0 || low.absolute_temperature)) {
    throw InputError(mark, fmt::format("a logarithmic range needs two positive ends, not '{}'", spec),
                     "use ':lin' or positive ends");
  }
  netlist::Dimension dimension = low.bare ? high.dimension : low.dimension;
  std::vector<std::string> values;
  for (int i = 0; i < count; ++i) {
    double fraction = static_cast<double>(i) / (count - 1);
    double value = logarithmic ? low.value * std::pow(high.value / low.value, fraction)
                               : low.value + (high.value - low.value) * fraction;
    if (i == count - 1) value = high.value;  // the end exactly as written
    values.push_back(netlist::quantity_text(value, dimension, low.absolute_temperature));
  }
  return values;
}
}  // namespace

VariedParameter parse_variation(const std::string& text, const SourceMark& mark) {
  netlist::Override assignment = parse_assignment(text, mark);
  VariedParameter varied{assignment.path, {}, mark};
  const std::string& spec = assignment.value;
  std::size_t dots = spec.find("..");
  if (dots == std::string::npos) {
    std::size_t start = 0;
    while (start <= spec.size()) {
      std::size_t comma = spec.find(',', start);
      std::string item = trim(spec.substr(start, comma == std::string::npos ? std::string::npos : comma - start));
      if (item.empty()) {
        throw InputError(mark, fmt::format("the list '{}' has an empty item", spec), "separate values by single commas");
      }
      varied.values.push_back(item);
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
    return varied;
  }
  varied.values = range_values(spec, dots, mark);
  return varied;
}

ParameterColumn parameter_column(const VariedParameter& parameter, const std::optional<netlist::Quantity>& nominal) {
  ParameterColumn column{parameter.path, {}, {}, parameter.values};
  std::vector<netlist::Quantity> quantities;
  std::optional<netlist::Quantity> unit_from;  // a value that carries the column's unit
  for (const auto& text : parameter.values) {
    std::string problem;
    auto quantity = netlist::parse_quantity(text, problem);
    if (!quantity) return column;
    if (!quantity->bare && !unit_from) unit_from = quantity;
    quantities.push_back(*quantity);
  }
  if (!unit_from && nominal && !nominal->bare) unit_from = nominal;
  if (!unit_from) unit_from = quantities.front();  // all bare: plain numbers
  for (const auto& quantity : quantities) {
    if (quantity.bare) {
      if (unit_from->absolute_temperature) return column;  // a bare number is kelvin, the others degC: no one unit
      continue;
    }
    const bool same_unit = quantity.dimension == unit_from->dimension &&
                           quantity.absolute_temperature == unit_from->absolute_temperature;
    if (!same_unit) return column;
  }
  column.unit = netlist::shown_unit(unit_from->dimension, unit_from->absolute_temperature,
                                    netlist::is_percent_path(parameter.path));
  for (const auto& quantity : quantities) column.values.push_back(quantity.value);
  return column;
}

std::string ParameterColumn::header() const {
  return numeric() ? fmt::format("{} [{}]", path, unit.symbol) : path;
}

std::string ParameterColumn::display(std::size_t k) const { return numeric() ? unit.display(values[k]) : texts[k]; }

}  // namespace linkrise::app
