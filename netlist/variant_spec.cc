#include "netlist/variant_spec.h"

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

std::vector<VariantSpec> read_variants(const Tree& root) {
  std::vector<VariantSpec> variants;
  const Tree* block = root.find("variants");
  if (block == nullptr || block->kind == Tree::Kind::Null) return variants;
  if (!block->is_list()) {
    throw InputError(block->mark, "'variants' must be a list, each entry starting with '- name:'",
                     "write e.g. '- {name: r_56, set: {r_pre.resistance: 56 Ohm}}'");
  }
  for (const Tree& item : block->items) {
    if (!item.is_map()) throw InputError(item.mark, "a variant must be a block with 'name' and 'set' or 'replace'");
    ParameterReader reader(item, "variant");
    VariantSpec variant;
    variant.mark = item.mark;
    auto name = reader.text("name");
    if (!name || !valid_part_name(*name) || *name == "nominal") {
      throw InputError(name ? reader.mark("name") : item.mark,
                       name ? fmt::format("variant name '{}' must be letters, digits and '_' (and not 'nominal')", *name)
                            : "a variant needs a 'name'",
                       "write e.g. 'name: ptc_thermistor'");
    }
    variant.name = *name;
    for (const auto& other : variants) {
      if (other.name == variant.name) {
        throw InputError(reader.mark("name"), fmt::format("variant '{}' is defined twice", variant.name));
      }
    }
    variant.note = reader.text("note").value_or("");
    if (const Tree* replace = reader.child("replace")) {
      if (!replace->is_map()) {
        throw InputError(replace->mark, "'replace' must be a block of '<part>: {kind: ..., <parameters>}' entries");
      }
      for (std::size_t i = 0; i < replace->entries.size(); ++i) {
        const auto& [part, replacement] = replace->entries[i];
        if (!replacement.is_map() || replacement.find("kind") == nullptr) {
          throw InputError(replacement.mark, fmt::format("the replacement of '{}' must be a block with 'kind'", part),
                           "write e.g. 'r_pre: {kind: ntc_thermistor, resistance_at_25degC: 60 Ohm, b_value: 2800 K}'");
        }
        if (replacement.find("name") != nullptr || replacement.find("nodes") != nullptr) {
          throw InputError(replacement.mark, fmt::format("the replacement of '{}' keeps its name and nodes", part),
                           "remove 'name' and 'nodes' from the replacement");
        }
        variant.replaced_parts.push_back(part);
        variant.replacement_blocks_.push_back(replacement);
      }
    }
    if (const Tree* set = reader.child("set")) {
      variant.overrides = read_set_block(*set, "a variant's", "write e.g. 'set: {r_pre.resistance: 56 Ohm}'");
    }
    reader.finish();
    if (variant.replaced_parts.empty() && variant.overrides.empty()) {
      throw InputError(item.mark, fmt::format("variant '{}' changes nothing", variant.name),
                       "add 'set:' overrides or a 'replace:' block");
    }
    variants.push_back(std::move(variant));
  }
  return variants;
}

}  // namespace linkrise::netlist
