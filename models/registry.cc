#include "models/registry.h"

#include <functional>
#include <utility>

#include <fmt/format.h>

#include "models/capacitor.h"
#include "models/cell_string.h"
#include "models/contactor.h"
#include "models/dc_source.h"
#include "models/diode.h"
#include "models/fuse.h"
#include "models/inductive_branch.h"
#include "models/ntc_thermistor.h"
#include "models/ptc_thermistor.h"
#include "models/resistor.h"
#include "models/switched_load.h"
#include "models/voltage_sensor.h"

namespace linkrise::models {
namespace {
using Factory = std::unique_ptr<Part> (*)(const netlist::PartSpec&);

const std::vector<std::pair<std::string, Factory>>& table() {
  static const std::vector<std::pair<std::string, Factory>> kinds = {
      {"dc_source", make_dc_source},
      {"cell_string", make_cell_string},
      {"resistor", make_resistor},
      {"ptc_thermistor", make_ptc_thermistor},
      {"ntc_thermistor", make_ntc_thermistor},
      {"inductor", make_inductor},
      {"cable", make_cable},
      {"capacitor", make_capacitor},
      {"contactor", make_contactor},
      {"constant_power_load", make_constant_power_load},
      {"constant_current_load", make_constant_current_load},
      {"diode", make_diode},
      {"fuse", make_fuse},
      {"voltage_sensor", make_voltage_sensor},
  };
  return kinds;
}
}  // namespace

std::vector<std::string> part_kinds() {
  std::vector<std::string> names;
  for (const auto& [name, factory] : table()) names.push_back(name);
  return names;
}

PartRecipe plain_resistance(const std::string& value) { return {"resistor", {{"resistance", value}}}; }

std::unique_ptr<Part> create_part(const netlist::PartSpec& spec) {
  for (const auto& [name, factory] : table()) {
    if (name == spec.kind) return factory(spec);
  }
  std::string list;
  for (const auto& name : part_kinds()) list += (list.empty() ? "" : ", ") + name;
  throw netlist::InputError(spec.kind_mark.line ? spec.kind_mark : spec.mark,
                            fmt::format("part '{}' has unknown kind '{}'", spec.name, spec.kind),
                            netlist::did_you_mean(spec.kind, part_kinds(), fmt::format("known kinds: {}", list)));
}

}  // namespace linkrise::models
