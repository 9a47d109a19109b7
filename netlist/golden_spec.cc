#include "netlist/golden_spec.h"

#include <limits>

#include <fmt/format.h>

#include "netlist/parameter_reader.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

namespace {
double read_number(const Tree& node, const std::string& what) {
  // "not reached" metrics are stored as YAML's NaN.
  if (node.is_scalar() && (node.text == ".nan" || node.text == ".NaN" || node.text == "nan")) {
    return std::numeric_limits<double>::quiet_NaN();
  }
  return ParameterReader::read_value(node, Dimension::none(), Bound::Any, what);
}
}  // namespace

Golden read_golden(const std::filesystem::path& path) {
  Tree root = load_yaml_file(path.string());
  ParameterReader top(root, "the golden file");
  Golden golden;
  golden.outcome = top.text("outcome").value_or("");
  golden.verdict = top.text("verdict").value_or("");
  if (const Tree* defaults = top.child("defaults")) {
    ParameterReader reader(*defaults, "the golden defaults");
    golden.relative = reader.quantity("relative", Dimension::none(), Bound::NonNegative, golden.relative);
    golden.absolute = reader.quantity("absolute", Dimension::none(), Bound::NonNegative, golden.absolute);
    golden.floor = reader.quantity("floor", Dimension::none(), Bound::NonNegative, golden.floor);
    reader.finish();
  }
  if (const Tree* metrics = top.child("metrics")) {
    if (!metrics->is_map()) {
      throw InputError(metrics->mark, "golden 'metrics' must be a block of '<metric>: {value, unit}' lines");
    }
    for (std::size_t i = 0; i < metrics->entries.size(); ++i) {
      const auto& [name, node] = metrics->entries[i];
      ParameterReader reader(node, fmt::format("golden metric '{}'", name));
      GoldenMetric metric;
      metric.name = name;
      const Tree* value = reader.child("value");
      if (value == nullptr) reader.fail("value", "is missing", "add 'value: <number in the metric's unit>'");
      metric.value = read_number(*value, fmt::format("golden metric '{}' value", name));
      metric.unit = reader.text("unit").value_or("");
      metric.relative = reader.optional("relative", Dimension::none(), Bound::NonNegative);
      metric.absolute = reader.optional("absolute", Dimension::none(), Bound::NonNegative);
      reader.finish();
      golden.metrics.push_back(metric);
    }
  }
  top.finish();
  return golden;
}

}  // namespace linkrise::netlist
