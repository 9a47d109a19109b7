#include "netlist/tolerance_spec.h"

#include <cmath>
#include <optional>

#include <fmt/format.h>

#include "netlist/overrides.h"
#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

namespace {

Quantity quantity_of(const Tree& node, const std::string& what) {
  if (!node.is_scalar()) {
    throw InputError(node.mark, fmt::format("{} must be a single value", what), "write e.g. '5 %' or '2 ms'");
  }
  std::string problem;
  auto quantity = parse_quantity(node.text, problem);
  if (!quantity) {
    throw InputError(node.mark, fmt::format("{}: '{}' is not a quantity ({})", what, node.text, problem),
                     "write e.g. '5 %' or '2 ms'");
  }
  return *quantity;
}

// An offset from the nominal value: a fraction of it (dimensionless) or a quantity in the parameter's unit.
double offset(const Tree& node, const std::string& what, const std::optional<Quantity>& nominal,
              const std::string& path) {
  Quantity amount = quantity_of(node, what);
  if (!nominal) {
    throw InputError(node.mark, fmt::format("'{}' has no nominal value in the case to take {} from", path, what),
                     "give the parameter a value in the case, or write 'range: [low, high]'");
  }
  if (amount.value < 0.0) {
    throw InputError(node.mark, fmt::format("{} '{}' of tolerance '{}' must not be negative", what, node.text, path),
                     "give the size of the deviation; 'minus' and 'plus' set the two sides");
  }
  bool relative = amount.dimension == Dimension::none() && !amount.absolute_temperature;
  bool same_unit = amount.dimension == nominal->dimension && !amount.absolute_temperature;
  if (relative && !(nominal->dimension == Dimension::none())) {
    if (nominal->absolute_temperature) {
      throw InputError(node.mark, fmt::format("{} of an absolute temperature cannot be a percentage", what),
                       "give it in K, e.g. 'plus_minus: 10 K', or write 'range: [-20 degC, 45 degC]'");
    }
    return amount.value * std::fabs(nominal->value);
  }
  if (relative) return amount.value * std::fabs(nominal->value);  // a fraction of a dimensionless value
  if (!same_unit) {
    throw InputError(node.mark,
                     fmt::format("{} '{}' is {}, but '{}' is {}", what, node.text, amount.dimension.describe(), path,
                                 nominal->dimension.describe()),
                     "give a percentage of the nominal value or a quantity in the parameter's unit");
  }
  if (amount.value < 0.0) throw InputError(node.mark, fmt::format("{} must not be negative", what));
  return amount.value;
}

// The keys of one tolerance entry; which form it takes is checked once all are read.
struct ToleranceKeys {
  const Tree* plus_minus = nullptr;
  const Tree* minus = nullptr;
  const Tree* plus = nullptr;
  const Tree* range = nullptr;
  const Tree* sigma = nullptr;
  std::string distribution;
};

// The range form: two ends in one unit, low before high; the centre is their middle.
void read_range(const Tree& range, const std::string& path, const std::optional<Quantity>& nominal,
                ToleranceSpec& t) {
  if (!range.is_list() || range.items.size() != 2) {
    throw InputError(range.mark, fmt::format("tolerance '{}': range must be a list [low, high]", path),
                     "write e.g. 'range: [20 %, 90 %]'");
  }
  Quantity low = quantity_of(range.items[0], "range start");
  Quantity high = quantity_of(range.items[1], "range end");
  if (!(low.dimension == high.dimension) || low.absolute_temperature != high.absolute_temperature) {
    throw InputError(range.mark, fmt::format("tolerance '{}': the range ends have different units", path),
                     "give both ends in one unit");
  }
  if (nominal && !nominal->bare && !(nominal->dimension == low.dimension)) {
    throw InputError(range.mark,
                     fmt::format("tolerance '{}': the range is {}, but the parameter is {}", path,
                                 low.dimension.describe(), nominal->dimension.describe()));
  }
  if (!(low.value < high.value)) {
    throw InputError(range.mark, fmt::format("tolerance '{}': the range must run from low to high", path),
                     "write the lower end first, e.g. 'range: [-20 degC, 45 degC]'");
  }
  t.lower = low.value;
  t.upper = high.value;
  t.centre = 0.5 * (low.value + high.value);
  t.dimension = low.dimension;
  t.absolute_temperature = low.absolute_temperature;
  t.description = fmt::format("{} … {}", t.display(t.lower), t.display(t.upper));
}

// The offset form: plus_minus, or minus and/or plus, around the nominal value the case gives.
void read_offsets(const ToleranceKeys& keys, const std::string& path, const SourceMark& mark,
                  const std::optional<Quantity>& nominal, ToleranceSpec& t) {
  double below = 0.0, above = 0.0;
  if (keys.plus_minus != nullptr) {
    below = above = offset(*keys.plus_minus, "plus_minus", nominal, path);
  } else {
    if (keys.minus != nullptr) below = offset(*keys.minus, "minus", nominal, path);
    if (keys.plus != nullptr) above = offset(*keys.plus, "plus", nominal, path);
  }
  t.lower = nominal->value - below;
  t.upper = nominal->value + above;
  t.centre = nominal->value;
  t.dimension = nominal->dimension;
  t.absolute_temperature = nominal->absolute_temperature;
  if (!(t.lower < t.upper)) {
    throw InputError(mark, fmt::format("tolerance '{}' spans no range", path), "give a non-zero tolerance");
  }
  t.description = fmt::format("{} ({} … {})", t.display(t.centre), t.display(t.lower), t.display(t.upper));
}

// The distribution: uniform, or normal with a sigma taken like an offset (from the centre for a range).
void read_distribution(const ToleranceKeys& keys, const Tree& entry, const std::string& path,
                       const std::optional<Quantity>& nominal, ToleranceSpec& t) {
  if (keys.distribution == "normal") {
    t.shape = ToleranceSpec::Shape::Normal;
    if (keys.sigma == nullptr) {
      throw InputError(entry.mark, fmt::format("tolerance '{}': a normal distribution needs 'sigma'", path),
                       "add e.g. 'sigma: 2 %' (of the nominal value) or a quantity such as 'sigma: 1 Ohm'");
    }
    std::optional<Quantity> scale = nominal;
    if (!scale) {
      Quantity middle;
      middle.value = t.centre;
      middle.dimension = t.dimension;
      middle.absolute_temperature = t.absolute_temperature;
      scale = middle;
    }
    t.sigma = offset(*keys.sigma, "sigma", scale, path);
    if (!(t.sigma > 0.0)) {
      throw InputError(keys.sigma->mark, fmt::format("tolerance '{}': sigma must be positive", path));
    }
    t.description += fmt::format(", normal σ = {} truncated", t.shown().difference().display(t.sigma));
  } else if (keys.sigma != nullptr) {
    throw InputError(keys.sigma->mark, fmt::format("tolerance '{}': sigma belongs to a normal distribution", path),
                     "add 'distribution: normal' or remove sigma");
  } else {
    t.description += ", uniform";
  }
}

// "did you mean 'r_pre.resistance'?" when the part of `path` is in the case and one of its keys is close to the
// parameter (a misspelt parameter, not a default, is then the likelier reason it has no value).
std::string no_value_fix(const Tree& root, const std::string& path) {
  const std::string otherwise = "give the parameter a value in the case, or write 'range: [low, high]'";
  const std::size_t dot = path.find('.');
  const Tree* parts = root.find("parts");
  if (dot == std::string::npos || parts == nullptr || !parts->is_list()) return otherwise;
  for (const Tree& part : parts->items) {
    const Tree* name = part.find("name");
    if (name == nullptr || !name->is_scalar() || name->text != path.substr(0, dot)) continue;
    std::vector<std::string> keys;
    for (const auto& [key, value] : part.entries) keys.push_back(key);
    std::string closest = closest_match(path.substr(dot + 1), keys);
    if (!closest.empty()) return fmt::format("did you mean '{}.{}'?", path.substr(0, dot), closest);
  }
  return otherwise;
}

// One entry of the block, `path: {...}`, written at `mark`.
ToleranceSpec read_tolerance(const Tree& root, const std::string& path, const Tree& entry, const SourceMark& mark) {
  ParameterReader reader(entry, fmt::format("tolerance '{}'", path));
  ToleranceSpec t;
  t.path = path;
  t.mark = mark;
  t.percent = is_percent_path(path);
  ToleranceKeys keys;
  keys.plus_minus = reader.child("plus_minus");
  keys.minus = reader.child("minus");
  keys.plus = reader.child("plus");
  keys.range = reader.child("range");
  keys.sigma = reader.child("sigma");
  keys.distribution = reader.word("distribution", {"uniform", "normal"}, "uniform");
  reader.finish();
  int forms =
      (keys.plus_minus != nullptr) + (keys.minus != nullptr || keys.plus != nullptr) + (keys.range != nullptr);
  if (forms != 1) {
    throw InputError(entry.mark, fmt::format("tolerance '{}' needs exactly one of plus_minus, minus/plus or range", path),
                     "write e.g. '{plus_minus: 5 %}'");
  }

  // The nominal value, when the case gives one (a range does not need it).
  const std::optional<Quantity> nominal = quantity_at(
      root, path, mark, "give it a value in the case file (a default cannot carry a tolerance), or use 'range:'");

  if (keys.range != nullptr) {
    read_range(*keys.range, path, nominal, t);
  } else if (!nominal) {
    // Reported when a study draws it: a variant may have replaced the part that carried the value.
    t.unresolved = InputError(mark, fmt::format("tolerance '{}': the case gives no value for it", path),
                              no_value_fix(root, path));
    return t;
  } else {
    read_offsets(keys, path, mark, nominal, t);
  }
  read_distribution(keys, entry, path, nominal, t);
  return t;
}

}  // namespace

std::vector<ToleranceSpec> read_tolerances(const Tree& root) {
  std::vector<ToleranceSpec> tolerances;
  const Tree* block = root.find("tolerances");
  if (block == nullptr || block->kind == Tree::Kind::Null) return tolerances;
  if (!block->is_map()) {
    throw InputError(block->mark, "'tolerances' must be a block of '<path>: {...}' entries",
                     "write e.g. 'r_pre.resistance: {plus_minus: 5 %}'");
  }
  for (std::size_t i = 0; i < block->entries.size(); ++i) {
    const auto& [path, entry] = block->entries[i];
    SourceMark mark = i < block->key_marks.size() ? block->key_marks[i] : block->mark;
    if (!entry.is_map()) {
      throw InputError(entry.mark, fmt::format("tolerance '{}' must be a block", path),
                       "write e.g. '{plus_minus: 5 %}', '{minus: 10 %, plus: 20 %}' or '{range: [20 %, 90 %]}'");
    }
    for (const auto& other : tolerances) {
      if (other.path == path) throw InputError(mark, fmt::format("tolerance '{}' is given twice", path));
    }
    tolerances.push_back(read_tolerance(root, path, entry, mark));
  }
  return tolerances;
}

}  // namespace linkrise::netlist
