#pragma once
// Golden results of a stored case: the expected outcome, verdict and chosen metrics with tolerances.
// They live beside the case as <case>.golden.yaml, written by `linkrise check --update` (app/regression/) and editable by hand
// (tolerances especially):
//
//   outcome: closed
//   verdict: pass
//   defaults: {relative: 1e-4, absolute: 1e-9}   # optional; these are the built-in defaults
//   metrics:
//     time_to_threshold: {value: 0.21073, unit: s}
//     k_main.peak_current: {value: 274.31, unit: A, relative: 1e-3}
//
// A metric passes when |actual - expected| <= max(absolute, relative * |expected|), in the metric's unit.
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

namespace linkrise::netlist {

struct GoldenMetric {
  std::string name;
  double value = 0.0;
  std::string unit;
  std::optional<double> relative;  // overrides the defaults for this metric
  std::optional<double> absolute;
};

struct Golden {
  std::string outcome;
  std::string verdict;
  double relative = 1e-4;
  double absolute = 1e-9;
  std::vector<GoldenMetric> metrics;
};

/// Reads a golden file; throws InputError with file:line:column on a malformed one.
Golden read_golden(const std::filesystem::path& path);

}  // namespace linkrise::netlist
