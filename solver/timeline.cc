#include "solver/timeline.h"

#include <fmt/format.h>

#include "netlist/units.h"

namespace linkrise::solver {

std::vector<TimelineEntry> collapse_repeats(const std::vector<TimelineEntry>& timeline) {
  std::vector<TimelineEntry> lines;
  for (const auto& entry : timeline) {
    TimelineEntry* previous = lines.empty() ? nullptr : &lines.back();
    if (previous != nullptr && entry.state_event && previous->state_event && previous->event == entry.event) {
      ++previous->count;
      previous->last_time = entry.time;
      previous->reason = fmt::format("{} threshold crossings until {} (the last: {})", previous->count,
                                     netlist::format_si(entry.time, "s"), entry.reason);
      continue;
    }
    lines.push_back(entry);
    lines.back().last_time = entry.time;
  }
  return lines;
}

}  // namespace linkrise::solver
