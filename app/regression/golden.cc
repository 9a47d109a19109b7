#include "app/regression/golden.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

namespace linkrise::app {

std::filesystem::path golden_path(const std::filesystem::path& case_file) {
  std::filesystem::path path = case_file;
  path.replace_extension(".golden.yaml");
  return path;
}

std::string golden_text(const Golden& golden, const std::string& case_name) {
  std::string text = fmt::format(
      "# Golden results for {} — written by `linkrise check --update`.\n"
      "# Tolerances may be edited: a metric passes when |actual - value| <= max(absolute, relative * |value|,\n"
      "# floor * scale), the scale being the largest |value| of the same owner (name before the first '.') and unit.\n",
      case_name);
  text += fmt::format("outcome: {}\nverdict: {}\n", golden.outcome, golden.verdict);
  text += fmt::format("defaults: {{relative: {:g}, absolute: {:g}, floor: {:g}}}\n", golden.relative, golden.absolute,
                      golden.floor);
  text += "metrics:\n";
  for (const auto& metric : golden.metrics) {
    std::string extra;
    if (metric.relative) extra += fmt::format(", relative: {:g}", *metric.relative);
    if (metric.absolute) extra += fmt::format(", absolute: {:g}", *metric.absolute);
    std::string value = std::isfinite(metric.value) ? fmt::format("{:.10g}", metric.value) : std::string(".nan");
    text += fmt::format("  {}: {{value: {}, unit: \"{}\"{}}}\n", metric.name, value, metric.unit, extra);
  }
  return text;
}

namespace {
std::string owner(const std::string& metric) { return metric.substr(0, metric.find('.')); }

// The largest finite |value| among the golden metrics of the same owner and unit: the scale a difference of them
// (an overshoot, a step, a margin) is judged against.
double owner_scale(const Golden& golden, const GoldenMetric& of) {
  double scale = 0.0;
  for (const auto& metric : golden.metrics) {
    if (metric.unit == of.unit && owner(metric.name) == owner(of.name) && std::isfinite(metric.value)) {
      scale = std::max(scale, std::fabs(metric.value));
    }
  }
  return scale;
}
}  // namespace

std::vector<Comparison> compare_with_golden(const Golden& golden, const std::string& outcome,
                                            const std::string& verdict, const std::vector<MetricValue>& metrics) {
  std::vector<Comparison> rows;
  if (!golden.outcome.empty()) rows.push_back({"outcome", golden.outcome, outcome, 0.0, 0.0, golden.outcome == outcome});
  if (!golden.verdict.empty()) rows.push_back({"verdict", golden.verdict, verdict, 0.0, 0.0, golden.verdict == verdict});
  for (const auto& expected : golden.metrics) {
    Comparison row;
    row.item = expected.name;
    row.expected = fmt::format("{:.6g} {}", expected.value, expected.unit);
    const MetricValue* actual = nullptr;
    for (const auto& metric : metrics) {
      if (metric.name == expected.name) actual = &metric;
    }
    if (actual == nullptr) {
      row.actual = "missing";
      row.pass = false;
      rows.push_back(row);
      continue;
    }
    row.actual = fmt::format("{:.6g} {}", actual->value, actual->unit);
    if (actual->unit != expected.unit) {
      row.actual += " (unit changed)";
      row.pass = false;
      rows.push_back(row);
      continue;
    }
    double relative = expected.relative.value_or(golden.relative);
    double absolute = expected.absolute.value_or(golden.absolute);
    row.allowed = std::max({absolute, relative * std::fabs(expected.value), golden.floor * owner_scale(golden, expected)});
    if (std::isnan(expected.value) || std::isnan(actual->value)) {
      row.pass = std::isnan(expected.value) && std::isnan(actual->value);
      row.deviation = 0.0;
    } else {
      row.deviation = actual->value - expected.value;
      row.pass = std::fabs(row.deviation) <= row.allowed;
    }
    rows.push_back(row);
  }
  return rows;
}

Golden golden_from(const std::string& outcome, const std::string& verdict, const std::vector<MetricValue>& metrics,
                   const Golden* previous) {
  Golden golden;
  golden.outcome = outcome;
  golden.verdict = verdict;
  if (previous) {
    golden.relative = previous->relative;
    golden.absolute = previous->absolute;
    golden.floor = previous->floor;
    for (const auto& old : previous->metrics) {
      for (const auto& metric : metrics) {
        if (metric.name != old.name) continue;
        GoldenMetric updated = old;
        updated.value = metric.value;
        updated.unit = metric.unit;
        golden.metrics.push_back(updated);
      }
    }
    if (!golden.metrics.empty()) return golden;
  }
  for (const auto& metric : metrics) golden.metrics.push_back({metric.name, metric.value, metric.unit, {}, {}});
  return golden;
}

}  // namespace linkrise::app
