#pragma once
// Golden results of a stored case (read by netlist/golden_spec.h): where they live, how they are written, how an
// evaluation compares with them.
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "app/evaluation/case_evaluation.h"
#include "netlist/golden_spec.h"

namespace linkrise::app {

using netlist::Golden;
using netlist::GoldenMetric;
using netlist::read_golden;

/// The golden file that belongs to a case file.
std::filesystem::path golden_path(const std::filesystem::path& case_file);
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
