#pragma once
// Golden results of a stored case: the expected outcome, verdict and chosen metrics with tolerances.
// They live beside the case as <case>.golden.yaml, written by `linkrise check --update` and editable by hand
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

#include "app/evaluation/case_evaluation.h"

namespace linkrise::app {

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

/// The golden file that belongs to a case file.
std::filesystem::path golden_path(const std::filesystem::path& case_file);
/// Reads a golden file; throws netlist::InputError with file:line:column on a malformed one.
Golden read_golden(const std::filesystem::path& path);
/// Writes golden results as YAML text (deterministic layout, values with 10 significant digits).
std::string golden_text(const Golden& golden, const std::string& case_name);

/// One compared item: a metric, or the outcome/verdict (value fields unused, texts compared).
struct Comparison {
  std::string item;
  std::string expected;
  std::string actual;
  double deviation = 0.0;  // actual - expected, in the item's unit (metrics only)
  double allowed = 0.0;    // tolerance band half-width
  bool pass = true;
};

/// Compares an evaluation with its golden results, item by item.
std::vector<Comparison> compare_with_golden(const Golden& golden, const std::string& outcome,
                                            const std::string& verdict, const std::vector<MetricValue>& metrics);

/// Golden results from an evaluation: keeps the metric list (and tolerances) of `previous` when given,
/// otherwise takes every metric.
Golden golden_from(const std::string& outcome, const std::string& verdict, const std::vector<MetricValue>& metrics,
                   const Golden* previous);

}  // namespace linkrise::app
