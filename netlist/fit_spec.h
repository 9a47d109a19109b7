#pragma once
// The `fit:` block of a case: which parameters `linkrise fit` estimates from the measured capture, where each
// starts and between which bounds it may move.
//
//   fit:
//     parameters:
//       link.capacitance: {start: 1.2 mF, min: 0.5 mF, max: 3 mF}
//       r_pre.resistance: {start: 40 Ohm, min: 10 Ohm, max: 100 Ohm}
//     time_offset: {start: 0 s, min: -2 ms, max: 2 ms}   # optional: estimate the trigger's place too
//     noise: {link_plus: 0.5 V, r_pre.current: 20 mA}   # optional: each signal's expected noise (its weight)
//     iterations: 100                                   # optional: the most Levenberg–Marquardt iterations
//
// Paths are those of overrides (netlist/overrides.h); start, min and max carry the parameter's unit, and
// min < start < max. Without `time_offset` the measured block's offset is held fixed. A signal without a noise
// entry is weighted by the span of its measured values (so volts and amperes count alike).
#include <optional>
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::netlist {

struct FitParameterSpec {
  std::string path;  // "time_offset" for the capture's time offset
  double start = 0.0, lower = 0.0, upper = 0.0;  // SI
  Dimension dimension;
  bool absolute_temperature = false;
  SourceMark mark;
};

struct NoiseSpec {
  std::string signal;
  Quantity sigma;
  SourceMark mark;
};

struct FitSpec {
  std::vector<FitParameterSpec> parameters;
  std::optional<FitParameterSpec> time_offset;
  std::vector<NoiseSpec> noise;
  int iterations = 100;
  SourceMark mark;
};

/// Reads the `fit:` block; std::nullopt when the case has none.
std::optional<FitSpec> read_fit(const Tree& root);

}  // namespace linkrise::netlist
