#include "solver/circuit.h"

#include <algorithm>
#include <map>
#include <numeric>
#include <set>
#include <stdexcept>

#include <fmt/format.h>

#include "models/registry.h"
#include "models/thermal_resistor.h"

namespace linkrise::solver {

namespace {
// True when the part integrates its own ∫i² dt as a state (a resistor with a thermal model).
bool has_current_squared_state(const models::Part& part, double ambient) {
  for (const auto& state : part.states(ambient))
    if (state.name == models::current_squared_state) return true;
  return false;
}

// Union-find over node indices; ground is index node_count.
struct Groups {
  explicit Groups(int size) : parent(size) { std::iota(parent.begin(), parent.end(), 0); }
  int find(int a) {
    while (parent[a] != a) a = parent[a] = parent[parent[a]];
    return a;
  }
  bool join(int a, int b) {
    a = find(a);
    b = find(b);
    if (a == b) return false;
    parent[a] = b;
    return true;
  }
  std::vector<int> parent;
};
}  // namespace

Circuit::Circuit(const netlist::Case& spec) : spec_(spec) {
  std::map<std::string, int> nodes;
  for (const auto& part_spec : spec.parts) {
    parts_.push_back(models::create_part(part_spec));
    for (const auto& node : part_spec.nodes) {
      if (node != spec_.ground && nodes.find(node) == nodes.end()) {
        int index = static_cast<int>(node_names_.size());
        nodes[node] = index;
        node_names_.push_back(node);
      }
    }
  }
  int unknown = static_cast<int>(node_names_.size());
  for (std::size_t p = 0; p < parts_.size(); ++p) {
    const models::Part& part = *parts_[p];
    models::Layout layout;
    for (int t = 0; t < 2; ++t) {
      const std::string& node = part.nodes()[t];
      layout.node[t] = node == spec_.ground ? -1 : nodes.at(node);
    }
    if (part.branch_count() > 0) {
      layout.branch = unknown;
      unknown += part.branch_count();
    }
    auto states = part.states(spec_.ambient);
    if (!states.empty()) layout.state = static_cast<int>(state_info_.size());
    for (auto& state : states) state_info_.push_back(std::move(state));
    auto modes = part.initial_modes();
    if (!modes.empty()) layout.mode = static_cast<int>(initial_modes_.size());
    initial_modes_.insert(initial_modes_.end(), modes.begin(), modes.end());
    root_first_.push_back(static_cast<int>(root_owner_.size()));
    for (int r = 0; r < part.root_count(); ++r) root_owner_.push_back(static_cast<int>(p));
    if (!part.linear_network()) linear_ = false;
    layouts_.push_back(layout);
  }
  unknown_count_ = unknown;
  for (std::size_t p = 0; p < parts_.size(); ++p) {
    auto channels = parts_[p]->power_channels();
    const int part = static_cast<int>(p);
    if (channels.source) accounts_.push_back({part, models::EnergyChannel::Source});
    if (channels.heat) accounts_.push_back({part, models::EnergyChannel::Heat});
    if (channels.load) accounts_.push_back({part, models::EnergyChannel::Load});
    if (channels.heat && !has_current_squared_state(*parts_[p], spec_.ambient)) current_squared_parts_.push_back(part);
    signal_first_.push_back(static_cast<int>(signal_columns_.size()));
    for (const auto& signal : parts_[p]->signals()) {
      signal_columns_.push_back(
          {static_cast<int>(p), fmt::format("{}.{} [{}]", parts_[p]->name(), signal.quantity, signal.unit)});
    }
  }
  check_topology();
  check_sequence_parts();
  // Scheduled events must name an action the target part accepts.
  for (const auto& event : spec_.events) {
    int index = find_part(event.target);
    std::vector<int> scratch = initial_modes_;
    auto change = parts_[index]->command(event.action, layouts_[index], scratch.data());
    if (!change.problem.empty()) {
      throw netlist::InputError(event.mark, change.problem, "switch contactors with close/open, loads with enable/disable");
    }
  }
}

// The sequence's contactors must be switches and its loads loads; the part kinds are known only here.
void Circuit::check_sequence_parts() const {
  if (!spec_.sequence) return;
  const netlist::SequenceSpec& sequence = *spec_.sequence;
  for (const auto& [name, mark] : sequence.moved_contactors()) {
    const models::Part& part = *parts_[find_part(name)];
    if (part.role() == models::Role::Switch) continue;
    std::string switches;
    for (const auto& other : parts_) {
      if (other->role() == models::Role::Switch) switches += (switches.empty() ? "" : ", ") + other->name();
    }
    throw netlist::InputError(mark,
                              fmt::format("the sequence moves '{}', a {} part ({}), which cannot switch", name,
                                          models::role_word(part.role()), part.kind()),
                              switches.empty() ? "add a contactor part for the sequence to move"
                                               : "name one of the case's switching parts: " + switches);
  }
  for (const auto& [name, mark] : {std::pair{sequence.pack_sensor, sequence.pack_sensor_mark},
                                   std::pair{sequence.link_sensor, sequence.link_sensor_mark}}) {
    if (name.empty()) continue;
    const models::Part& part = *parts_[find_part(name)];
    if (part.role() == models::Role::Sensor) continue;
    throw netlist::InputError(mark,
                              fmt::format("the sequence reads '{}', a {} part ({}), which measures nothing", name,
                                          models::role_word(part.role()), part.kind()),
                              "name a voltage_sensor part, or list the sensed nodes as [plus, minus]");
  }
  for (const auto& load : sequence.loads) {
    const models::Part& part = *parts_[find_part(load.part)];
    if (part.role() == models::Role::Load) continue;
    std::string loads;
    for (const auto& other : parts_) {
      if (other->role() == models::Role::Load) loads += (loads.empty() ? "" : ", ") + other->name();
    }
    throw netlist::InputError(load.mark,
                              fmt::format("the sequence switches '{}', a {} part ({}), which cannot be enabled",
                                          load.part, models::role_word(part.role()), part.kind()),
                              loads.empty() ? "add a load part (e.g. a constant_power_load) for the sequence to start"
                                            : "name one of the case's loads: " + loads);
  }
}

int Circuit::current_squared_index(int part) const {
  auto found = std::find(current_squared_parts_.begin(), current_squared_parts_.end(), part);
  if (found == current_squared_parts_.end()) return -1;
  return part_state_count() + static_cast<int>(accounts_.size() + (found - current_squared_parts_.begin()));
}

int Circuit::find_part(const std::string& name) const {
  for (std::size_t p = 0; p < parts_.size(); ++p) {
    if (parts_[p]->name() == name) return static_cast<int>(p);
  }
  return -1;
}

int Circuit::node_index(const std::string& name) const {
  if (name == spec_.ground) return -1;
  for (std::size_t i = 0; i < node_names_.size(); ++i) {
    if (node_names_[i] == name) return static_cast<int>(i);
  }
  throw std::out_of_range(fmt::format("no node '{}'", name));
}

bool Circuit::has_node(const std::string& name) const {
  return name == spec_.ground || std::find(node_names_.begin(), node_names_.end(), name) != node_names_.end();
}

std::vector<double> Circuit::initial_states() const {
  std::vector<double> x(ode_size(), 0.0);
  for (std::size_t i = 0; i < state_info_.size(); ++i) x[i] = state_info_[i].initial;
  return x;
}

namespace {

// A layout's node as a union-find index: ground (-1 in the layouts) is the index after the last node.
int group_index(const Circuit& circuit, int node) {
  return node < 0 ? static_cast<int>(circuit.node_names().size()) : node;
}

void check_no_self_connection(const Circuit& circuit) {
  for (int p = 0; p < circuit.part_count(); ++p) {
    const models::Part& part = circuit.part(p);
    if (circuit.layout(p).node[0] == circuit.layout(p).node[1]) {
      throw netlist::InputError(part.mark(),
                                fmt::format("part '{}' is connected to itself: both nodes are '{}'", part.name(),
                                            part.nodes()[0]),
                                "connect its two terminals to different nodes");
    }
  }
}

// 1. Every node must reach ground through some chain of parts.
void check_ground_paths(const Circuit& circuit) {
  const int count = static_cast<int>(circuit.node_names().size());
  const int ground = count;
  Groups any(count + 1);
  for (int p = 0; p < circuit.part_count(); ++p) {
    any.join(group_index(circuit, circuit.layout(p).node[0]), group_index(circuit, circuit.layout(p).node[1]));
  }
  for (int n = 0; n < count; ++n) {
    if (any.find(n) != any.find(ground)) {
      std::string part_name;
      for (int p = 0; p < circuit.part_count(); ++p) {
        if (circuit.layout(p).node[0] == n || circuit.layout(p).node[1] == n) part_name = circuit.part(p).name();
      }
      throw netlist::InputError(circuit.part(circuit.find_part(part_name)).mark(),
                                fmt::format("node '{}' has no path to ground '{}': it belongs to a separate "
                                            "circuit with no connection to the rest",
                                            circuit.node_names()[n], circuit.spec().ground),
                                "connect that sub-circuit to the rest, or to ground through a resistance");
    }
  }
}

// 2. Parts that fix a voltage must not form a loop (the loop's voltages could not all hold).
void check_voltage_loops(const Circuit& circuit) {
  Groups voltage(static_cast<int>(circuit.node_names().size()) + 1);
  for (int p = 0; p < circuit.part_count(); ++p) {
    const models::Part& part = circuit.part(p);
    if (part.link() != models::Link::VoltageDefined) continue;
    if (!voltage.join(group_index(circuit, circuit.layout(p).node[0]),
                      group_index(circuit, circuit.layout(p).node[1]))) {
      throw netlist::InputError(
          part.mark(),
          fmt::format("part '{}' closes a loop of voltage-defining parts (ideal sources, capacitors without ESR, "
                      "cell strings without resistance) between '{}' and '{}'",
                      part.name(), part.nodes()[0], part.nodes()[1]),
          "give one part in the loop a series resistance or an ESR above zero");
    }
  }
}

// The error for node n's group, which `conductive` does not join to ground: its nodes and boundary parts.
netlist::InputError cut_set_error(const Circuit& circuit, Groups& conductive, int n) {
  const int count = static_cast<int>(circuit.node_names().size());
  std::vector<std::string> members;
  for (int m = 0; m < count; ++m) {
    if (conductive.find(m) == conductive.find(n)) members.push_back(circuit.node_names()[m]);
  }
  std::string boundary;
  const models::Part* first = nullptr;
  for (int p = 0; p < circuit.part_count(); ++p) {
    bool a = conductive.find(group_index(circuit, circuit.layout(p).node[0])) == conductive.find(n);
    bool b = conductive.find(group_index(circuit, circuit.layout(p).node[1])) == conductive.find(n);
    if (a != b) {
      boundary += (boundary.empty() ? "" : ", ") + circuit.part(p).name();
      if (!first) first = &circuit.part(p);
    }
  }
  std::string list;
  for (const auto& member : members) list += (list.empty() ? "" : ", ") + member;
  return netlist::InputError(first ? first->mark() : circuit.part(0).mark(),
                             fmt::format("node(s) {} connect to the rest of the circuit only through inductors or "
                                         "current-drawing loads ({}): their currents cannot balance",
                                         list, boundary),
                             fmt::format("add a resistance, capacitor or other voltage path from '{}' to the rest "
                                         "(e.g. a bleed resistor or the load's capacitor)",
                                         circuit.node_names()[n]));
}

// 3. A node group reached only through inductors or current-drawing loads is a cut-set: the currents
//    into it would be fixed independently and could not balance.
void check_current_cut_sets(const Circuit& circuit) {
  const int count = static_cast<int>(circuit.node_names().size());
  const int ground = count;
  Groups conductive(count + 1);
  for (int p = 0; p < circuit.part_count(); ++p) {
    if (circuit.part(p).link() == models::Link::CurrentDefined) continue;
    conductive.join(group_index(circuit, circuit.layout(p).node[0]), group_index(circuit, circuit.layout(p).node[1]));
  }
  for (int n = 0; n < count; ++n) {
    if (conductive.find(n) == conductive.find(ground)) continue;
    throw cut_set_error(circuit, conductive, n);
  }
}

}  // namespace

void Circuit::check_topology() const {
  check_no_self_connection(*this);
  check_ground_paths(*this);
  check_voltage_loops(*this);
  check_current_cut_sets(*this);
}

}  // namespace linkrise::solver
