#include "models/part.h"

#include <cassert>
#include <stdexcept>

#include <fmt/format.h>

namespace linkrise::models {

Part::Part(const netlist::PartSpec& spec)
    : name_(spec.name), kind_(spec.kind), nodes_(spec.nodes), mark_(spec.mark) {}

std::vector<SignalInfo> Part::signals() const {
  std::vector<SignalInfo> list = {{"current", "A"}, {"voltage", "V"}, {"power", "W"}};
  if (power_channels().heat) list.push_back({"heat_power", "W"});
  if (stores_energy()) list.push_back({"stored_power", "W"});
  for (auto& extra : do_extra_signals()) list.push_back(std::move(extra));
  return list;
}

void Part::stamp(const Point& point, const Layout& layout, Stamp& stamp) const {
  assert(point.unknowns != nullptr);
  if (branch_count() > 0 && layout.branch < 0) {
    throw std::logic_error(fmt::format("part '{}' needs a branch unknown but the layout has none", name_));
  }
  do_stamp(point, layout, stamp);
}

void Part::signal_values(const Point& point, const Layout& layout, double* out) const {
  double sign = do_output_sign();
  double current = do_current(point, layout);
  double voltage = point.voltage(layout);
  out[0] = sign * current;
  out[1] = voltage;
  out[2] = sign * current * voltage;
  int next = 3;
  const bool heat = power_channels().heat, stores = stores_energy();
  if (heat || stores) {
    const Powers powers = do_powers(point, layout);
    if (heat) out[next++] = powers.heat;
    // The part's own balance: what enters at the terminals and from its source goes to heat, to the load or into
    // the stored energy (the cable's ½·L·i², not its I²R).
    if (stores) out[next++] = current * voltage + powers.source - powers.heat - powers.load;
  }
  do_extra_signal_values(point, layout, out + next);
}

void Part::roots(const Point& point, const Layout& layout, double* out) const {
  if (root_count() > 0) do_roots(point, layout, out);
}

ModeChange Part::on_root(int index, int direction, const Layout& layout, int* modes) const {
  if (index < 0 || index >= root_count()) {
    throw std::logic_error(fmt::format("part '{}' has no root {}", name_, index));
  }
  return do_on_root(index, direction, layout, modes);
}

netlist::ParameterReader open_parameters(const netlist::PartSpec& spec) { return spec.parameters(); }

const char* role_word(Role role) {
  switch (role) {
    case Role::Source: return "source";
    case Role::Storage: return "storage";
    case Role::Switch: return "switch";
    case Role::Load: return "load";
    case Role::Resistive: return "resistive";
    case Role::Conductor: return "conductor";
    case Role::Sensor: return "sensor";
    case Role::Rectifier: return "rectifier";
  }
  return "unknown";
}

ModeChange Part::command(netlist::Action action, const Layout& layout, int* modes, double* states,
                         const Point* before) const {
  return do_command(action, layout, modes, states, before);
}

ModeChange Part::do_command(netlist::Action action, const Layout&, int*, double*, const Point*) const {
  return ModeChange{false, fmt::format("part '{}' of kind {} cannot '{}'", name_, kind_, netlist::action_word(action))};
}

}  // namespace linkrise::models
