#pragma once
// The `scenarios:` block: fault or what-if scenarios the case defines for `linkrise faults`.
//
//   scenarios:
//     - name: weak_resistor_batch          # letters, digits, '_'
//       set: {r_pre.resistance: 24 Ohm}    # overrides (netlist/overrides.h), applied to the nominal case
//       expect: closed                     # closed | timeout | no_rise | too_fast | unfinished
//     - name: oversize_capacitance         # the name of a built-in scenario: changes its expectation
//       expect: timeout                    #   (and `set` adds overrides on top of it)
#include <optional>
#include <string>
#include <vector>

#include "netlist/overrides.h"
#include "netlist/sequence_spec.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

struct ScenarioSpec {
  std::string name;
  std::vector<Override> overrides;
  std::optional<SequenceOutcome> expected;  // absent: a built-in scenario's own expectation (checked by `faults`)
  std::string note;
  SourceMark mark;
};

/// Reads the `scenarios:` block of a case tree (empty when absent). Throws InputError for a malformed entry.
/// `expect` may be left out only for a built-in scenario, which the faults study checks (it owns that list).
std::vector<ScenarioSpec> read_scenarios(const Tree& root);

}  // namespace linkrise::netlist
