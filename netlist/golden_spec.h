#pragma once
// Golden results of a stored case: the expected outcome, verdict and chosen metrics with tolerances.
// They live beside the case as <case>.golden.yaml, written by `linkrise check --update` (app/regression/) and editable by hand
// (tolerances especially):
//
//   outcome: closed
//   verdict: pass
//   defaults: {relative: 1e-4, absolute: 0, floor: 1e-6}   # optional; these are the built-in defaults
//   metrics:
//     time_to_threshold: {value: 0.21073, unit: s}
//     k_main.peak_current: {value: 274.31, unit: A, relative: 1e-3}
//
// A metric passes when |actual - expected| <= max(absolute, relative * |expected|, floor * scale), in the metric's
// unit. The scale is the largest |expected| among the metrics of the same owner (the name before the first '.')
// and the same unit: a difference such as sequence.link_overshoot is judged against the link voltages it is the
// difference of (a 4e-7 V overshoot of a 400 V link is solver noise), while a part's tiny I²t beside nothing
// larger of its own keeps its own relative band. One fixed absolute floor cannot do both: 1e-9 lets a
// 5.7e-13 A²s value take any value and pins a 3.8e-7 V noise.
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
  double absolute = 0.0;
  double floor = 1e-6;  // ten times the default rtol (1e-7): the solver's own error at the scale of the quantity
  std::vector<GoldenMetric> metrics;
};

/// Reads a golden file; throws InputError with file:line:column on a malformed one.
Golden read_golden(const std::filesystem::path& path);

}  // namespace linkrise::netlist
