#include "analysis/limits.h"

#include <cmath>

#include <fmt/format.h>

namespace linkrise::analysis {
namespace {

// A bound in the metric's unit: temperatures are held in kelvin by the parser, metrics in degC.
double in_metric_unit(const netlist::Quantity& bound, const std::string& unit) {
  if (bound.bare) return bound.value;
  if (unit == "degC") return bound.value - netlist::kelvin_offset;
  return bound.value;
}
}  // namespace

const char* bound_word(BoundSide side) { return side == BoundSide::Minimum ? "min" : "max"; }

std::vector<netlist::LimitSpec> rating_limits(const solver::Circuit& circuit) {
  std::vector<netlist::LimitSpec> limits;
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    for (const auto& rating : part.ratings()) {
      netlist::LimitSpec limit;
      limit.metric = fmt::format("{}.{}", part.name(), rating.metric);
      netlist::Quantity bound;
      std::string problem;
      if (auto parsed = netlist::parse_quantity(fmt::format("{} {}", rating.value, rating.unit), problem)) {
        bound = *parsed;
      } else {
        bound.value = rating.value;
        bound.bare = true;  // already in the metric's unit
      }
      limit.maximum = bound;
      limit.rated_part = part.name();
      limit.source = rating.note.empty() ? fmt::format("rating of {}", part.name())
                                         : fmt::format("rating of {} ({})", part.name(), rating.note);
      limit.mark = rating.mark.file.empty() && rating.mark.line <= 0 ? part.mark() : rating.mark;
      limit.maximum_mark = limit.mark;
      limit.entry = rating.entry.empty() ? "ratings" : rating.entry;
      limit.protection = rating.protection;
      limits.push_back(std::move(limit));
    }
  }
  return limits;
}

std::vector<JudgedLimit> judge_limits(const std::vector<netlist::LimitSpec>& limits, const MetricSet& metrics) {
  std::vector<JudgedLimit> judged;
  for (const auto& limit : limits) {
    const Metric* metric = metrics.find(limit.metric);
    if (metric == nullptr) {
      std::string suggestion = netlist::closest_match(limit.metric, metrics.names());
      throw netlist::InputError(limit.mark, fmt::format("limit on '{}': this run has no such metric", limit.metric),
                                suggestion.empty() ? "see docs/sequence-and-limits.md for the metric names"
                                                   : fmt::format("did you mean '{}'?", suggestion));
    }
    auto judge_one = [&](const netlist::Quantity& bound, BoundSide side, const netlist::SourceMark& mark) {
      netlist::Dimension wanted = metric_dimension(metric->unit);
      if (!bound.bare && !(bound.dimension == wanted)) {
        throw netlist::InputError(mark,
                                  fmt::format("limit on '{}' is {}, but the metric is {}", limit.metric,
                                              bound.dimension.describe(), wanted.describe()),
                                  fmt::format("give the bound in {}", metric->unit));
      }
      JudgedLimit j;
      j.metric = limit.metric;
      j.bound = side;
      j.unit = metric->unit;
      j.margin_unit = difference_unit(metric->unit);
      j.source = limit.source;
      j.rated_part = limit.rated_part;
      j.origin = limit.entry.empty() ? std::string() : fmt::format("{} at {}", limit.entry, mark.to_string());
      j.detail = metric->detail;
      j.protection = limit.protection;
      j.limit = in_metric_unit(bound, metric->unit);
      j.value = metric->value;
      j.required_margin = limit.margin;
      if (std::isnan(j.value)) {
        j.judged = false;
        j.margin = j.relative_margin = std::nan("");
      } else {
        j.margin = side == BoundSide::Maximum ? j.limit - j.value : j.value - j.limit;
        j.relative_margin = j.limit != 0.0 ? j.margin / std::fabs(j.limit) : std::nan("");
        j.pass = j.margin >= limit.margin * std::fabs(j.limit);
      }
      judged.push_back(j);
    };
    if (limit.minimum) judge_one(*limit.minimum, BoundSide::Minimum, limit.minimum_mark);
    if (limit.maximum) judge_one(*limit.maximum, BoundSide::Maximum, limit.maximum_mark);
  }
  return judged;
}

}  // namespace linkrise::analysis
