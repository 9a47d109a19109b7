#include "netlist/scenario_spec.h"

#include <algorithm>

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/parameter_reader.h"
#include "netlist/sequence_spec.h"

namespace linkrise::netlist {

std::vector<ScenarioSpec> read_scenarios(const Tree& root) {
  std::vector<ScenarioSpec> scenarios;
  const Tree* block = root.find("scenarios");
  if (block == nullptr || block->kind == Tree::Kind::Null) return scenarios;
  if (!block->is_list()) {
    throw InputError(block->mark, "'scenarios' must be a list of '- name: ...' entries",
                     "write '- {name: low_resistance, set: {r_pre.resistance: 20 Ohm}, expect: closed}'");
  }
  for (const Tree& item : block->items) {
    ParameterReader reader(item, "a scenario");
    ScenarioSpec scenario;
    scenario.mark = item.mark;
    auto name = reader.text("name");
    if (!name) throw InputError(item.mark, "a scenario needs a 'name'", "add 'name: <letters, digits, _>'");
    if (!valid_part_name(*name)) {
      throw InputError(reader.mark("name"), fmt::format("scenario name '{}' may only use letters, digits and '_'", *name),
                       "rename it, e.g. 'hot_ambient'");
    }
    scenario.name = *name;
    if (std::any_of(scenarios.begin(), scenarios.end(), [&](const ScenarioSpec& s) { return s.name == *name; })) {
      throw InputError(reader.mark("name"), fmt::format("scenario '{}' is defined twice", *name),
                       "give each scenario its own name");
    }
    if (const Tree* set = reader.child("set")) {
      scenario.overrides =
          read_set_block(*set, "a scenario's", "write e.g. 'set: {r_pre.resistance: 20 Ohm, ambient: 50 degC}'");
    }
    if (reader.has("expect")) {
      scenario.expected = outcome_from_word(reader.word("expect", sequence_outcomes(), "closed"));
    } else {
      reader.accept("expect");
    }
    scenario.note = reader.text("note").value_or("");
    reader.finish();
    scenarios.push_back(std::move(scenario));
  }
  return scenarios;
}

}  // namespace linkrise::netlist
