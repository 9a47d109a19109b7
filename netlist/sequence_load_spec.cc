#include "netlist/sequence_load_spec.h"

#include <algorithm>

#include <fmt/format.h>

#include "netlist/case.h"

namespace linkrise::netlist {

namespace {
const std::vector<std::string>& moment_words() {
  static const std::vector<std::string> words = {"attempt_start", "main_closed", "precharge_opened"};
  return words;
}

SequenceLoadSpec read_one(ParameterReader& item, const Case& spec) {
  SequenceLoadSpec load;
  auto part = item.text("part");
  if (!part) {
    item.reject_misspelling("part");
    item.fail("part", "each of the sequence's loads needs 'part', the load it switches",
              "write e.g. '{part: aux_dcdc, after: main_closed, delay: 50 ms}'");
  }
  if (spec.find_part(*part) == nullptr) {
    throw InputError(item.mark("part"), fmt::format("the sequence's load '{}' is not in the parts list", *part),
                     did_you_mean(*part, spec.part_names(), "name one of the case's loads"));
  }
  load.part = *part;
  load.mark = item.mark("part");
  const std::string after = item.word("after", moment_words(), "main_closed");
  load.after = static_cast<LoadMoment>(std::find(moment_words().begin(), moment_words().end(), after) -
                                       moment_words().begin());
  load.delay = item.quantity("delay", Dimension::time(), Bound::NonNegative, 0.0);
  item.finish();
  return load;
}
}  // namespace

const char* moment_word(LoadMoment moment) { return moment_words()[static_cast<std::size_t>(moment)].c_str(); }

std::vector<SequenceLoadSpec> read_sequence_loads(ParameterReader& reader, const Case& spec) {
  std::vector<SequenceLoadSpec> loads;
  for (ParameterReader& item : reader.blocks("loads", "load", 64, "'loads' must be a list of loads",
                                             "write e.g. 'loads: [{part: aux_dcdc, after: main_closed, delay: 50 ms}]'")) {
    SequenceLoadSpec load = read_one(item, spec);
    auto same = [&](const SequenceLoadSpec& other) { return other.part == load.part; };
    if (std::any_of(loads.begin(), loads.end(), same)) {
      throw InputError(load.mark, fmt::format("load '{}' is listed twice in the sequence's loads", load.part),
                       "list each load once");
    }
    for (const auto& event : spec.events) {
      if (event.target != load.part) continue;
      throw InputError(event.mark,
                       fmt::format("load '{}' is switched by the sequence and also by this event", load.part),
                       "remove the event; the sequence's loads list decides when it runs");
    }
    loads.push_back(std::move(load));
  }
  return loads;
}

}  // namespace linkrise::netlist
