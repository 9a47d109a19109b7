#pragma once
// The `limits:` block: bounds on metrics, judged after the run (analysis/limits.h).
//
//   limits:
//     r_pre.energy: {max: 150 J}
//     sequence.precharge_time: {max: 250 ms, margin: 10 %}   # must stay 10 % of the bound inside it
//     sequence.minimum_pack_voltage: {min: 600 V}
//
// Keys are metric names (docs/sequence-and-limits.md); each entry has `min`, `max` or both, with units, and
// an optional required `margin` (a fraction of the bound). Metric names and units are checked against the
// run's metrics when judging.
#include <optional>
#include <string>
#include <vector>

#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::netlist {

struct LimitSpec {
  std::string metric;
  std::optional<Quantity> minimum, maximum;
  double margin = 0.0;  // required margin, fraction of |bound|
  std::string source = "limits block";
  std::string rated_part;  // the part whose declared rating this limit is; empty for the case's limits block
  std::string entry;  // the entry it was written as: "limits.<metric>" or a part's "ratings.<key>"
  bool protection = false;  // a protective device's operating point (models/part.h, Rating::protection)
  SourceMark mark;  // the metric key
  SourceMark minimum_mark, maximum_mark;
};

/// Reads the `limits:` block of a case tree (empty when absent). Throws InputError on a malformed entry.
std::vector<LimitSpec> read_limits(const Tree& root);

}  // namespace linkrise::netlist
