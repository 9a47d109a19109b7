#include "netlist/limit_spec.h"

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

std::vector<LimitSpec> read_limits(const Tree& root) {
  std::vector<LimitSpec> limits;
  const Tree* block = root.find("limits");
  if (block == nullptr || block->kind == Tree::Kind::Null) return limits;
  if (!block->is_map()) {
    throw InputError(block->mark, "'limits' must be a block of '<metric>: {min: ..., max: ...}' lines",
                     "write e.g. 'r_pre.energy: {max: 150 J}'");
  }
  for (std::size_t i = 0; i < block->entries.size(); ++i) {
    const auto& [metric, entry] = block->entries[i];
    LimitSpec limit;
    limit.metric = metric;
    limit.mark = i < block->key_marks.size() ? block->key_marks[i] : block->mark;
    limit.entry = "limits." + limit.metric;
    if (!entry.is_map()) {
      throw InputError(entry.mark, fmt::format("limit '{}' must be a block with 'min' and/or 'max'", metric),
                       fmt::format("write '{}: {{max: ...}}'", metric));
    }
    ParameterReader reader(entry, fmt::format("limit '{}'", metric));
    auto bound = [&](const std::string& key, SourceMark& mark) -> std::optional<Quantity> {
      const Tree* node = reader.child(key);
      if (node == nullptr) return std::nullopt;
      mark = node->mark;
      std::string problem;
      auto quantity = node->is_scalar() ? parse_quantity(node->text, problem) : std::nullopt;
      if (!quantity) {
        throw InputError(node->mark,
                         fmt::format("limit '{}' {}: '{}' is not a quantity{}", limit.metric, key, node->text,
                                     problem.empty() ? "" : " (" + problem + ")"),
                         "write a value with its unit, e.g. '150 J' or '250 ms'");
      }
      return quantity;
    };
    limit.minimum = bound("min", limit.minimum_mark);
    limit.maximum = bound("max", limit.maximum_mark);
    limit.margin = reader.quantity("margin", Dimension::none(), Bound::Fraction, 0.0);
    reader.finish();
    if (!limit.minimum && !limit.maximum) {
      throw InputError(entry.mark, fmt::format("limit '{}' has neither 'min' nor 'max'", metric),
                       "add 'max: <value>' or 'min: <value>'");
    }
    if (limit.minimum && limit.maximum && !(limit.minimum->value < limit.maximum->value)) {
      throw InputError(limit.minimum_mark, fmt::format("limit '{}': min must lie below max", metric),
                       "swap or correct the two bounds");
    }
    limits.push_back(std::move(limit));
  }
  return limits;
}

}  // namespace linkrise::netlist
