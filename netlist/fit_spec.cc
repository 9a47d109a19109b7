#include "netlist/fit_spec.h"

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {
namespace {

Quantity quantity_of(const Tree* node, const std::string& what, const SourceMark& mark) {
  if (node == nullptr) {
    throw InputError(mark, fmt::format("{} is missing", what), "write e.g. '{start: 1 mF, min: 0.5 mF, max: 2 mF}'");
  }
  std::string problem;
  auto quantity = node->is_scalar() ? parse_quantity(node->text, problem) : std::nullopt;
  if (!quantity) {
    throw InputError(node->mark, fmt::format("{}: '{}' is not a quantity ({})", what, node->text, problem),
                     "write a value with its unit, e.g. '1.2 mF'");
  }
  return *quantity;
}

// {start, min, max}: one unit, min < start < max.
FitParameterSpec read_parameter(const std::string& path, const Tree& entry, const SourceMark& mark) {
  if (!entry.is_map()) {
    throw InputError(entry.mark, fmt::format("fit parameter '{}' must be a block {{start, min, max}}", path),
                     "write e.g. '{start: 1.2 mF, min: 0.5 mF, max: 3 mF}'");
  }
  ParameterReader reader(entry, fmt::format("fit parameter '{}'", path));
  for (const char* key : {"start", "min", "max"}) reader.accept(key);
  reader.finish();
  FitParameterSpec spec;
  spec.path = path;
  spec.mark = mark;
  Quantity start = quantity_of(entry.find("start"), fmt::format("the start of '{}'", path), entry.mark);
  Quantity low = quantity_of(entry.find("min"), fmt::format("the min of '{}'", path), entry.mark);
  Quantity high = quantity_of(entry.find("max"), fmt::format("the max of '{}'", path), entry.mark);
  for (const auto& [bound, key] : {std::pair{low, "min"}, std::pair{high, "max"}}) {
    if (!(bound.dimension == start.dimension) || bound.absolute_temperature != start.absolute_temperature) {
      throw InputError(entry.find(key)->mark,
                       fmt::format("the {} of '{}' is {}, but its start is {}", key, path,
                                   bound.dimension.describe(), start.dimension.describe()),
                       "give start, min and max in one unit");
    }
  }
  if (!(low.value < start.value && start.value < high.value)) {
    throw InputError(entry.mark, fmt::format("fit parameter '{}' needs min < start < max", path),
                     "start strictly inside its bounds, e.g. '{start: 1 mF, min: 0.5 mF, max: 2 mF}'");
  }
  spec.start = start.value;
  spec.lower = low.value;
  spec.upper = high.value;
  spec.dimension = start.dimension;
  spec.absolute_temperature = start.absolute_temperature;
  return spec;
}

}  // namespace

std::optional<FitSpec> read_fit(const Tree& root) {
  const Tree* block = root.find("fit");
  if (block == nullptr || block->kind == Tree::Kind::Null) return std::nullopt;
  if (!block->is_map()) {
    throw InputError(block->mark, "'fit' must be a block with 'parameters'",
                     "write e.g. 'fit: {parameters: {link.capacitance: {start: 1 mF, min: 0.5 mF, max: 2 mF}}}'");
  }
  ParameterReader reader(*block, "the fit block");
  FitSpec spec;
  spec.mark = block->mark;
  const Tree* parameters = reader.child("parameters");
  if (parameters == nullptr || !parameters->is_map() || parameters->entries.empty()) {
    reader.reject_misspelling("parameters");
    throw InputError(parameters ? parameters->mark : block->mark, "the fit block names no parameters to estimate",
                     "add e.g. 'parameters: {link.capacitance: {start: 1 mF, min: 0.5 mF, max: 2 mF}}'");
  }
  for (std::size_t i = 0; i < parameters->entries.size(); ++i) {
    const auto& [path, entry] = parameters->entries[i];
    SourceMark mark = i < parameters->key_marks.size() ? parameters->key_marks[i] : parameters->mark;
    for (const auto& other : spec.parameters) {
      if (other.path == path) throw InputError(mark, fmt::format("fit parameter '{}' is given twice", path));
    }
    spec.parameters.push_back(read_parameter(path, entry, mark));
  }
  if (const Tree* offset = reader.child("time_offset"); offset != nullptr) {
    spec.time_offset = read_parameter("time_offset", *offset, reader.mark("time_offset"));
    if (!(spec.time_offset->dimension == Dimension::time())) {
      throw InputError(offset->mark, "the time offset must be a time", "write e.g. '{start: 0 s, min: -2 ms, max: 2 ms}'");
    }
  }
  if (const Tree* noise = reader.child("noise"); noise != nullptr) {
    if (!noise->is_map()) {
      throw InputError(noise->mark, "'noise' must be a block of '<signal>: <value>' lines",
                       "write e.g. 'noise: {link_plus: 0.5 V}'");
    }
    for (std::size_t i = 0; i < noise->entries.size(); ++i) {
      const auto& [signal, value] = noise->entries[i];
      NoiseSpec entry{signal, quantity_of(&value, fmt::format("the noise of '{}'", signal), value.mark),
                      i < noise->key_marks.size() ? noise->key_marks[i] : noise->mark};
      if (!(entry.sigma.value > 0.0)) {
        throw InputError(value.mark, fmt::format("the noise of '{}' must be positive", signal),
                         "give the signal's expected noise, e.g. '0.5 V'");
      }
      spec.noise.push_back(entry);
    }
  }
  spec.iterations = reader.count("iterations", 100, 1);
  reader.finish();
  return spec;
}

}  // namespace linkrise::netlist
