#include "netlist/case.h"

#include <algorithm>
#include <cctype>
#include <map>
#include <set>

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

const PartSpec* Case::find_part(const std::string& name) const {
  for (const auto& part : parts) {
    if (part.name == name) return &part;
  }
  return nullptr;
}

std::vector<std::string> Case::part_names() const {
  std::vector<std::string> names;
  for (const auto& part : parts) names.push_back(part.name);
  return names;
}

std::vector<std::string> Case::node_names() const {
  std::set<std::string> nodes;
  for (const auto& part : parts) nodes.insert(part.nodes.begin(), part.nodes.end());
  return {nodes.begin(), nodes.end()};
}

ParameterReader PartSpec::parameters() const {
  ParameterReader reader(block_, fmt::format("part '{}' ({})", name, kind));
  reader.accept("name");
  reader.accept("kind");
  reader.accept("nodes");
  return reader;
}

const std::vector<std::string>& case_sections() {
  static const std::vector<std::string> sections = {"title",    "ground",    "ambient",   "parts",
                                                    "events",   "run",       "sequence",  "limits",
                                                    "scenarios", "variants", "tolerances", "sizing",
                                                    "expect",    "notes",    "measured",  "fit"};
  return sections;
}

const char* action_word(Action action) {
  switch (action) {
    case Action::Close: return "close";
    case Action::Open: return "open";
    case Action::Bounce: return "bounce";
    case Action::Enable: return "enable";
    case Action::Disable: return "disable";
  }
  return "unknown";
}

const std::vector<Action>& all_actions() {
  static const std::vector<Action> actions = {Action::Close, Action::Open, Action::Bounce, Action::Enable,
                                              Action::Disable};
  return actions;
}

bool valid_part_name(const std::string& name) {
  if (name.empty() || name.size() > 64 || std::isdigit(static_cast<unsigned char>(name[0]))) return false;
  return std::all_of(name.begin(), name.end(),
                     [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

bool valid_node_name(const std::string& name) {
  if (name.empty() || name.size() > 64) return false;
  return std::all_of(name.begin(), name.end(),
                     [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

namespace {
std::string scalar_text(const Tree& node, const std::string& what) {
  if (!node.is_scalar()) throw InputError(node.mark, fmt::format("{} must be a single word", what));
  return node.text;
}

}  // namespace

PartSpec read_part(const Tree& block, std::size_t index) {
  std::string owner = fmt::format("part #{}", index + 1);
  if (!block.is_map()) {
    throw InputError(block.mark, fmt::format("{} must be a block with name, kind, nodes and parameters", owner),
                     "write '- name: r_pre' and indent its kind, nodes and parameters below");
  }
  PartSpec part;
  part.mark = block.mark;
  part.block_ = block;
  const Tree* name = block.find("name");
  if (name == nullptr) {
    throw InputError(block.mark, fmt::format("{} has no 'name'", owner), "add 'name: <letters, digits, _>'");
  }
  part.name = scalar_text(*name, "a part's name");
  if (!valid_part_name(part.name)) {
    throw InputError(name->mark,
                     fmt::format("part name '{}' may only contain letters, digits and '_' and must not start "
                                 "with a digit (it becomes an output column '<name>.current [A]')",
                                 part.name),
                     "rename it, e.g. 'r_pre' or 'link_capacitor'");
  }
  owner = fmt::format("part '{}'", part.name);
  const Tree* kind = block.find("kind");
  if (kind == nullptr) {
    throw InputError(block.mark, fmt::format("{} has no 'kind'", owner), "add e.g. 'kind: resistor'");
  }
  part.kind = scalar_text(*kind, "a part's kind");
  part.kind_mark = kind->mark;
  const Tree* nodes = block.find("nodes");
  if (nodes == nullptr) {
    throw InputError(block.mark, fmt::format("{} has no 'nodes'", owner),
                     "add 'nodes: [positive, negative]' naming the two nodes it connects");
  }
  if (!nodes->is_list() || nodes->items.size() != 2) {
    throw InputError(nodes->mark, fmt::format("{}: 'nodes' must list exactly two nodes", owner),
                     "write 'nodes: [positive, negative]'");
  }
  for (int i = 0; i < 2; ++i) {
    const Tree& node = nodes->items[i];
    part.nodes[i] = scalar_text(node, "a node name");
    if (!valid_node_name(part.nodes[i])) {
      throw InputError(node.mark,
                       fmt::format("{}: node name '{}' may only contain letters, digits and '_'", owner,
                                   part.nodes[i]),
                       "rename the node, e.g. 'link_plus'");
    }
  }
  return part;
}

namespace {

// A node that only one part terminal touches joins nothing: almost always a misspelt node name. Several such
// nodes are reported together, since two of them are often one node spelt two ways.
void reject_lone_nodes(const Tree& parts, const Case& result) {
  std::map<std::string, int> uses;
  for (const auto& part : result.parts) {
    for (const auto& node : part.nodes) ++uses[node];
  }
  std::vector<std::string> joined;
  for (const auto& [node, count] : uses) {
    if (count > 1 || node == result.ground) joined.push_back(node);
  }
  std::vector<std::pair<std::string, SourceMark>> lone;  // "'node' (part 'p')", where it is written
  std::string first_node;
  for (std::size_t i = 0; i < result.parts.size(); ++i) {
    for (int t = 0; t < 2; ++t) {
      const std::string& node = result.parts[i].nodes[t];
      if (uses[node] > 1 || node == result.ground) continue;
      if (first_node.empty()) first_node = node;
      lone.emplace_back(fmt::format("'{}' (part '{}')", node, result.parts[i].name),
                        parts.items[i].find("nodes")->items[t].mark);
    }
  }
  if (lone.empty()) return;
  if (lone.size() == 1) {
    throw InputError(lone[0].second,
                     fmt::format("node {} joins nothing: a node connects at least two parts", lone[0].first),
                     did_you_mean(first_node, joined, "connect another part to it, or name the node it should join"));
  }
  std::string list;
  for (const auto& [what, mark] : lone) list += fmt::format("\n  {} at {}", what, mark.to_string());
  throw InputError(lone[0].second, "these nodes each connect to one part only:" + list,
                   "a node connects at least two parts: give the nodes that belong together one name");
}

// The parts list; every part's name unique, the ground node used by some part.
void read_parts(const Tree& root, Case& result) {
  const Tree* parts = root.find("parts");
  if (parts == nullptr || !parts->is_list() || parts->items.empty()) {
    throw InputError(parts ? parts->mark : root.mark, "the case needs a non-empty list 'parts'",
                     "list the parts, each starting with '- name:'");
  }
  std::set<std::string> names;
  bool ground_used = false;
  for (std::size_t i = 0; i < parts->items.size(); ++i) {
    PartSpec part = read_part(parts->items[i], i);
    if (!names.insert(part.name).second) {
      throw InputError(parts->items[i].find("name")->mark, fmt::format("part name '{}' is used twice", part.name),
                       "give every part its own name");
    }
    if (part.nodes[0] == result.ground || part.nodes[1] == result.ground) ground_used = true;
    result.parts.push_back(std::move(part));
  }
  if (!ground_used) {
    throw InputError(root.find("ground")->mark,
                     fmt::format("ground node '{}' is not connected to any part", result.ground),
                     "name a node that appears in some part's 'nodes'");
  }
  reject_lone_nodes(*parts, result);
}

std::vector<EventSpec> read_events(const Tree& root, const Case& spec) {
  std::vector<EventSpec> events;
  const Tree* block = root.find("events");
  if (block == nullptr || block->kind == Tree::Kind::Null) return events;
  {
    if (!block->is_list()) {
      throw InputError(block->mark, "'events' must be a list such as '- {at: 10 ms, close: k_main}'");
    }
    for (const Tree& item : block->items) {
      ParameterReader reader(item, "an event");
      EventSpec event;
      event.mark = item.mark;
      event.at = reader.required("at", Dimension::time(), Bound::NonNegative);
      int found = 0;
      for (Action action : all_actions()) {
        if (auto target = reader.text(action_word(action))) {
          event.action = action;
          event.target = *target;
          ++found;
        }
      }
      reader.finish();
      if (found != 1) {
        throw InputError(item.mark, "an event needs exactly one action: close, open, bounce, enable or disable",
                         "write e.g. '- {at: 250 ms, close: k_main}'");
      }
      if (spec.find_part(event.target) == nullptr) {
        throw InputError(reader.mark(action_word(event.action)),
                         fmt::format("event at {} s names part '{}', which is not in the parts list", event.at,
                                     event.target),
                         did_you_mean(event.target, spec.part_names(), "name one of the parts"));
      }
      events.push_back(event);
    }
    std::stable_sort(events.begin(), events.end(),
                     [](const EventSpec& a, const EventSpec& b) { return a.at < b.at; });
  }
  return events;
}

}  // namespace

Case read_case(const Tree& root, const std::string& file) {
  Case result;
  result.file = file;
  if (!root.is_map()) {
    throw InputError(root.mark.line ? root.mark : SourceMark{file, 1, 1},
                     "a case file must be a block of top-level keys (title, ground, parts, run...)",
                     "start from a stored case in cases/");
  }
  ParameterReader top(root, "the case");
  for (const auto& section : case_sections()) top.accept(section);
  top.finish();

  result.title = top.text("title").value_or("untitled case");
  auto ground = top.text("ground");
  if (!ground) {
    throw InputError(root.mark, "the case has no 'ground' (the node at 0 V)", "add e.g. 'ground: pack_minus'");
  }
  result.ground = *ground;
  result.ambient = top.quantity("ambient", Dimension::temperature(), Bound::Positive, 298.15);
  result.ambient_mark = top.has("ambient") ? top.mark("ambient") : SourceMark{file, 1, 1};

  read_parts(root, result);
  result.events = read_events(root, result);
  const Tree* run = root.find("run");
  if (run == nullptr) {
    throw InputError(root.mark, "the case has no 'run' block", "add 'run: {duration: 2 s}'");
  }
  result.run = read_run(*run);
  for (const auto& event : result.events) {
    if (event.at > result.run.duration) {
      throw InputError(event.mark,
                       fmt::format("event at {} s lies after the end of the run ({} s)", event.at, result.run.duration),
                       "move the event earlier or lengthen 'run: duration'");
    }
  }
  result.sequence = read_sequence(root, result);
  if (result.run.follows_sequence() && !result.sequence) {
    throw InputError(run->find("duration") ? run->find("duration")->mark : run->mark,
                     "'duration: sequence' ends the run after the sequence, but the case has no 'sequence:' block",
                     "give the run a fixed length, e.g. 'duration: 2 s', or add a sequence block");
  }
  result.limits = read_limits(root);
  result.scenarios = read_scenarios(root);
  result.variants = read_variants(root);
  result.tolerances = read_tolerances(root);
  result.sizing = read_sizing(root, file);
  result.measured = read_measured(root, file);
  result.fit = read_fit(root);
  result.warnings = plausibility_warnings(result);
  return result;
}

Case load_case(const std::string& path) { return read_case(load_yaml_file(path), path); }

}  // namespace linkrise::netlist
