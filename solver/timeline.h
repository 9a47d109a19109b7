#pragma once
// The run's timeline: every switching, controller decision and state event with its time and reason.
#include <string>
#include <vector>

namespace linkrise::solver {

struct TimelineEntry {
  double time = 0.0;
  std::string event;
  std::string reason;
  bool state_event = false;  // a part's own threshold crossing (outputs collapse repeats: collapse_repeats())
  int count = 1;             // state events this entry stands for (collapse_repeats())
  double last_time = 0.0;    // s, the last of them when count > 1
};

/// The timeline as people read it: consecutive state events of one part (a converter chattering at its lockout)
/// become one entry at the first one's time, with the count and the last one's time. The run keeps every entry
/// (a fit leaves out the rows around each).
std::vector<TimelineEntry> collapse_repeats(const std::vector<TimelineEntry>& timeline);

}  // namespace linkrise::solver
