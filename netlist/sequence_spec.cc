#include "netlist/sequence_spec.h"

#include <algorithm>
#include <set>
#include <stdexcept>

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

const std::vector<std::string>& sequence_outcomes() {
  static const std::vector<std::string> outcomes = {"closed",  "timeout",     "no_rise",   "too_fast",
                                                      "live_bus", "welded",     "main_failed", "unfinished"};
  return outcomes;
}

const char* outcome_word(SequenceOutcome outcome) {
  return sequence_outcomes()[static_cast<std::size_t>(outcome)].c_str();
}

SequenceOutcome outcome_from_word(const std::string& word) {
  const auto& words = sequence_outcomes();
  const auto found = std::find(words.begin(), words.end(), word);
  if (found == words.end()) throw std::invalid_argument("not a sequence outcome: " + word);
  return static_cast<SequenceOutcome>(found - words.begin());
}

std::string SequenceSpec::rule_text() const {
  std::string text = rule == ClosingRule::Ratio ? fmt::format("link >= {:g} % of pack", 100.0 * rule_value)
                                                : fmt::format("pack - link <= {:g} V", rule_value);
  if (max_rate) text += fmt::format(" and |d(link)/dt| <= {:g} V/s", *max_rate);
  return text;
}

std::vector<std::pair<std::string, SourceMark>> SequenceSpec::moved_contactors() const {
  std::vector<std::pair<std::string, SourceMark>> moved;
  for (std::size_t i = 0; i < start_closed.size(); ++i) {
    moved.emplace_back(start_closed[i], i < start_closed_marks.size() ? start_closed_marks[i] : mark);
  }
  for (const auto& name : mains()) moved.emplace_back(name, main_mark);
  return moved;
}

std::vector<std::string> SequenceSpec::mains() const {
  std::vector<std::string> names{main};
  names.insert(names.end(), more_mains.begin(), more_mains.end());
  return names;
}

std::vector<std::string> SequenceSpec::precharges() const {
  std::vector<std::string> names{precharge};
  names.insert(names.end(), more_precharges.begin(), more_precharges.end());
  return names;
}

std::vector<std::string> SequenceSpec::moved_names() const {
  std::vector<std::string> names = start_closed;
  for (const auto& name : mains()) names.push_back(name);
  return names;
}

namespace {

// A part name that must name a contactor of the case.
std::string contactor_name(const Case& spec, const Tree& node, const std::string& what) {
  if (!node.is_scalar()) throw InputError(node.mark, fmt::format("the sequence's {} must be a part name", what));
  if (spec.find_part(node.text) == nullptr) {
    throw InputError(node.mark, fmt::format("the sequence's {} '{}' is not in the parts list", what, node.text),
                     did_you_mean(node.text, spec.part_names(), "name one of the case's contactors"));
  }
  return node.text;
}

NodePair node_pair(const Case& spec, ParameterReader& reader, const std::string& key, std::string& sensor,
                   SourceMark& sensor_mark) {
  const Tree* node = reader.child(key);
  if (node == nullptr) {
    throw InputError(reader.mark(key), fmt::format("the sequence needs '{}', the sensed node pair", key),
                     fmt::format("add '{}: [plus_node, minus_node]' or '{}: <voltage_sensor part>'", key, key));
  }
  if (node->is_scalar()) {
    // A sensor part: its nodes are the pair; that it is a voltage sensor is checked once the kinds are known.
    const PartSpec* part = spec.find_part(node->text);
    if (part == nullptr) {
      throw InputError(node->mark, fmt::format("the sequence's '{}' names part '{}', which is not in the parts list",
                                               key, node->text),
                       did_you_mean(node->text, spec.part_names(), "name a voltage_sensor part, or list two nodes"));
    }
    sensor = node->text;
    sensor_mark = node->mark;
    return NodePair{part->nodes[0], part->nodes[1]};
  }
  if (!node->is_list() || node->items.size() != 2 || !node->items[0].is_scalar() || !node->items[1].is_scalar()) {
    throw InputError(node->mark, fmt::format("the sequence's '{}' must list two nodes [plus, minus] or name a sensor", key),
                     fmt::format("write '{}: [plus_node, minus_node]' or '{}: <voltage_sensor part>'", key, key));
  }
  auto nodes = spec.node_names();
  for (const Tree& item : node->items) {
    if (std::find(nodes.begin(), nodes.end(), item.text) == nodes.end()) {
      throw InputError(item.mark, fmt::format("the sequence's '{}' names node '{}', which no part connects", key,
                                              item.text),
                       did_you_mean(item.text, nodes, "name a node that appears in some part's 'nodes'"));
    }
  }
  if (node->items[0].text == node->items[1].text) {
    throw InputError(node->mark, fmt::format("the sequence's '{}' names the same node twice", key),
                     "name the plus and the minus node");
  }
  return NodePair{node->items[0].text, node->items[1].text};
}

// The contactors closed when an attempt starts, each named once.
void read_start_closed(const Case& spec, ParameterReader& reader, const Tree& block, SequenceSpec& sequence) {
  const Tree* start_closed = reader.child("start_closed");
  if (start_closed == nullptr || !start_closed->is_list() || start_closed->items.empty()) {
    throw InputError(start_closed ? start_closed->mark : block.mark,
                     "the sequence needs 'start_closed', the contactors closed when an attempt starts",
                     "add e.g. 'start_closed: [k_neg, k_pre]'");
  }
  for (const Tree& item : start_closed->items) {
    std::string name = contactor_name(spec, item, "start_closed contactor");
    if (std::find(sequence.start_closed.begin(), sequence.start_closed.end(), name) != sequence.start_closed.end()) {
      throw InputError(item.mark, fmt::format("contactor '{}' is listed twice in start_closed", name),
                       "list each contactor once");
    }
    sequence.start_closed.push_back(name);
    sequence.start_closed_marks.push_back(item.mark);
  }
}

// One contactor, or a list of them (parallel strings: each string's own), the first being the primary one.
std::vector<std::string> required_contactors(const Case& spec, ParameterReader& reader, const Tree& block,
                                             const std::string& key, const std::string& what,
                                             const std::string& example) {
  const Tree* node = reader.child(key);
  if (node == nullptr) {
    throw InputError(block.mark, fmt::format("the sequence needs '{}' ({})", key, what),
                     fmt::format("add '{}: {}'", key, example));
  }
  if (!node->is_list()) return {contactor_name(spec, *node, fmt::format("'{}' contactor", key))};
  if (node->items.empty()) {
    throw InputError(node->mark, fmt::format("the sequence's '{}' lists no contactor", key),
                     fmt::format("write '{}: {}', or list one per string", key, example));
  }
  std::vector<std::string> names;
  for (const Tree& item : node->items) {
    std::string name = contactor_name(spec, item, fmt::format("'{}' contactor", key));
    if (std::find(names.begin(), names.end(), name) != names.end()) {
      throw InputError(item.mark, fmt::format("contactor '{}' is listed twice in '{}'", name, key),
                       "list each contactor once");
    }
    names.push_back(name);
  }
  return names;
}

// The main and pre-charge contactors: the main ones close only on the decision, the pre-charge ones at the start.
void read_switched_contactors(const Case& spec, ParameterReader& reader, const Tree& block,
                              SequenceSpec& sequence) {
  auto mains = required_contactors(spec, reader, block, "main", "the main contactor", "k_main");
  sequence.main = mains.front();
  sequence.more_mains.assign(mains.begin() + 1, mains.end());
  sequence.main_mark = reader.mark("main");
  auto precharges = required_contactors(spec, reader, block, "precharge", "the pre-charge contactor", "k_pre");
  sequence.precharge = precharges.front();
  sequence.more_precharges.assign(precharges.begin() + 1, precharges.end());
  sequence.precharge_mark = reader.mark("precharge");
  const auto& start = sequence.start_closed;
  for (const auto& main : mains) {
    if (std::find(start.begin(), start.end(), main) == start.end()) continue;
    reader.fail("main", fmt::format("'{}' is also in start_closed; the main contactor closes only on the decision",
                                    main),
                "remove it from start_closed");
  }
  for (const auto& precharge : precharges) {
    if (std::find(start.begin(), start.end(), precharge) != start.end()) continue;
    reader.fail("precharge", fmt::format("'{}' is not in start_closed, so the pre-charge path never closes",
                                         precharge),
                fmt::format("add '{}' to start_closed", precharge));
  }
}

void read_resistor(const Case& spec, ParameterReader& reader, const Tree& block, SequenceSpec& sequence) {
  const Tree* node = reader.child("resistor");
  if (node == nullptr) {
    throw InputError(block.mark, "the sequence needs 'resistor', the pre-charge resistor it judges",
                     "add e.g. 'resistor: r_pre'");
  }
  if (!node->is_scalar()) {
    throw InputError(node->mark, "the sequence's resistor must be one part name", "write e.g. 'resistor: r_pre'");
  }
  if (spec.find_part(node->text) == nullptr) {
    throw InputError(node->mark, fmt::format("the sequence's resistor '{}' is not in the parts list", node->text),
                     did_you_mean(node->text, spec.part_names(), "name the pre-charge resistor part"));
  }
  sequence.resistor = node->text;
  sequence.resistor_mark = node->mark;
}

// close_when: exactly one of ratio or difference, and optionally a rate limit.
void read_closing_rule(ParameterReader& reader, const Tree& block, SequenceSpec& sequence) {
  const Tree* rule = reader.child("close_when");
  if (rule == nullptr) {
    throw InputError(block.mark, "the sequence needs 'close_when', the rule for closing the main contactor",
                     "add 'close_when: {ratio: 95 %}' or 'close_when: {difference: 20 V}'");
  }
  ParameterReader rule_reader(*rule, "the sequence's close_when");
  auto ratio = rule_reader.optional("ratio", Dimension::none(), Bound::Fraction);
  auto difference = rule_reader.optional("difference", Dimension::voltage(), Bound::Positive);
  sequence.max_rate = rule_reader.optional("max_rate", Dimension::voltage() / Dimension::time(), Bound::Positive);
  rule_reader.finish();
  if (ratio.has_value() == difference.has_value()) {
    throw InputError(rule->mark, "close_when needs exactly one of 'ratio' (link/pack) or 'difference' (pack - link)",
                     "write 'close_when: {ratio: 95 %}' or 'close_when: {difference: 20 V}'");
  }
  if (ratio) {
    if (!(*ratio > 0.0)) rule_reader.fail("ratio", "must be above 0 %", "write e.g. '95 %'");
    sequence.rule = ClosingRule::Ratio;
    sequence.rule_value = *ratio;
  } else {
    sequence.rule = ClosingRule::Difference;
    sequence.rule_value = *difference;
  }
}

// The decision period, the attempt's start, and the fault checks' times.
void read_timing(ParameterReader& reader, SequenceSpec& sequence) {
  sequence.sample_period = reader.required("sample_period", Dimension::time(), Bound::Positive);
  sequence.start = reader.quantity("start", Dimension::time(), Bound::NonNegative, 0.0);
  sequence.minimum_time = reader.quantity("minimum_time", Dimension::time(), Bound::NonNegative, 0.0);
  sequence.timeout = reader.required("timeout", Dimension::time(), Bound::Positive);
  if (const Tree* rise = reader.child("rise_check")) {
    ParameterReader rise_reader(*rise, "the sequence's rise_check");
    sequence.rise_fraction = rise_reader.required("above", Dimension::none(), Bound::Fraction);
    sequence.rise_by = rise_reader.required("by", Dimension::time(), Bound::Positive);
    rise_reader.finish();
    if (!(sequence.rise_by < sequence.timeout)) {
      rise_reader.fail("by", "must come before the timeout, or the timeout fires first",
                       "shorten 'by' or lengthen 'timeout'");
    }
  }
}

// The attempts, the cool-down between them, and the outcome that counts as a pass.
void read_retries(ParameterReader& reader, SequenceSpec& sequence) {
  sequence.attempts = reader.count("attempts", 1, 1);
  auto cool_down = reader.optional("cool_down", Dimension::time(), Bound::NonNegative);
  if (sequence.attempts > 1 && !cool_down) {
    reader.fail("attempts", fmt::format("{} attempts need a 'cool_down' between them", sequence.attempts),
                "add e.g. 'cool_down: 2 s'");
  }
  sequence.cool_down = cool_down.value_or(0.0);
  sequence.expected_outcome = outcome_from_word(reader.word("expected_outcome", sequence_outcomes(), "closed"));
}

// weld_check: a list of steps, each closing some of the sequence's own contactors (or none) for a while.
void read_weld_check(const Case& spec, ParameterReader& reader, SequenceSpec& sequence) {
  const Tree* list = reader.child("weld_check");
  if (list == nullptr) return;
  if (!list->is_list() || list->items.empty()) {
    throw InputError(list->mark, "the sequence's weld_check must be a list of steps",
                     "write e.g. 'weld_check: [{close: [k_neg], hold: 50 ms, below: 10 %}]'");
  }
  const std::vector<std::string> moved = sequence.moved_names();
  for (const Tree& item : list->items) {
    ParameterReader step_reader(item, "a weld_check step");
    WeldCheckStep step;
    step.mark = item.mark;
    step.hold = step_reader.required("hold", Dimension::time(), Bound::Positive);
    step.below = step_reader.quantity("below", Dimension::none(), Bound::Fraction, 0.1);
    const Tree* close = step_reader.child("close");
    if (close == nullptr || !close->is_list()) {
      throw InputError(close ? close->mark : item.mark, "a weld_check step needs 'close', the coils it energises",
                       "write 'close: [k_neg]', or 'close: []' to watch the link with every contactor open");
    }
    for (const Tree& name : close->items) {
      std::string part = contactor_name(spec, name, "weld_check contactor");
      if (std::find(moved.begin(), moved.end(), part) == moved.end()) {
        throw InputError(name.mark, fmt::format("weld_check closes '{}', which the sequence does not move", part),
                         "name a contactor of start_closed or the main contactor");
      }
      step.close.push_back(part);
      step.close_marks.push_back(name.mark);
    }
    step_reader.finish();
    sequence.weld_check.push_back(std::move(step));
  }
}

void read_closure_check(ParameterReader& reader, SequenceSpec& sequence) {
  const Tree* block = reader.child("closure_check");
  if (block == nullptr) return;
  ParameterReader check(*block, "the sequence's closure_check");
  ClosureCheck closure;
  closure.after = check.required("after", Dimension::time(), Bound::Positive);
  closure.above = check.quantity("above", Dimension::none(), Bound::Fraction, 0.9);
  check.finish();
  sequence.closure_check = closure;
}

void read_key_cycles(ParameterReader& reader, SequenceSpec& sequence) {
  const Tree* block = reader.child("key_cycles");
  if (block == nullptr) return;
  ParameterReader cycles(*block, "the sequence's key_cycles");
  sequence.key_cycles.count = cycles.count("count", 1, 1);
  sequence.key_cycles.on_time = cycles.required("on_time", Dimension::time(), Bound::Positive);
  sequence.key_cycles.off_time = cycles.required("off_time", Dimension::time(), Bound::Positive);
  cycles.finish();
}

// The times against each other and against the run's duration.
void check_timing(const Case& spec, const ParameterReader& reader, const SequenceSpec& sequence) {
  if (!(sequence.sample_period < sequence.timeout)) {
    reader.fail("sample_period", "must be shorter than the timeout", "use a period of a few milliseconds");
  }
  if (!(sequence.minimum_time < sequence.timeout)) {
    reader.fail("minimum_time", "must be shorter than the timeout, or no attempt can ever close",
                "shorten minimum_time or lengthen timeout");
  }
  if (sequence.start > spec.run.duration) {
    reader.fail("start", "lies after the end of the run", "start earlier or lengthen 'run: duration'");
  }
}

// A contactor moved by both the controller and a scheduled event has no defined state.
void check_events(const Case& spec, const SequenceSpec& sequence) {
  const std::vector<std::string> moved = sequence.moved_names();
  for (const auto& event : spec.events) {
    if (std::find(moved.begin(), moved.end(), event.target) != moved.end()) {
      throw InputError(event.mark,
                       fmt::format("contactor '{}' is moved by the sequence and also by this event", event.target),
                       "remove the event; the sequence controller decides when it moves");
    }
  }
}

}  // namespace

std::optional<SequenceSpec> read_sequence(const Tree& root, const Case& spec) {
  const Tree* block = root.find("sequence");
  if (block == nullptr || block->kind == Tree::Kind::Null) return std::nullopt;
  ParameterReader reader(*block, "the sequence block");
  SequenceSpec sequence;
  sequence.mark = block->mark;

  read_start_closed(spec, reader, *block, sequence);
  read_switched_contactors(spec, reader, *block, sequence);
  read_resistor(spec, reader, *block, sequence);
  sequence.overlap = reader.quantity("overlap", Dimension::time(), Bound::NonNegative, 0.0);
  sequence.pack = node_pair(spec, reader, "pack", sequence.pack_sensor, sequence.pack_sensor_mark);
  sequence.link = node_pair(spec, reader, "link", sequence.link_sensor, sequence.link_sensor_mark);
  read_closing_rule(reader, *block, sequence);
  read_timing(reader, sequence);
  read_retries(reader, sequence);
  read_weld_check(spec, reader, sequence);
  read_closure_check(reader, sequence);
  read_key_cycles(reader, sequence);
  sequence.loads = read_sequence_loads(reader, spec);
  reader.finish();

  check_timing(spec, reader, sequence);
  check_events(spec, sequence);
  return sequence;
}

}  // namespace linkrise::netlist
