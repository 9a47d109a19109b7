#pragma once
// The `run:` block: how long to simulate and how accurately.
#include <optional>

#include "netlist/tree.h"

namespace linkrise::netlist {

struct RunSpec {
  double duration = 0.0;               // s
  double relative_tolerance = 1e-7;    // CVODE rtol
  double absolute_tolerance = 1e-8;    // CVODE atol, in each state's SI unit (scaled per state kind)
  double max_step = 0.0;               // s; 0 means no limit
  std::optional<double> sample;        // s; uniform output grid from dense output
  long max_steps = 2'000'000;          // the solver gives up (exit 3) after this many steps
};

/// Reads and validates the case's `run:` block. Throws InputError at the offending value.
RunSpec read_run(const Tree& root);

}  // namespace linkrise::netlist
