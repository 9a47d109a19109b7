#include "app/output/verdict_summary.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "app/output/json_fields.h"
#include "app/output/run_summary.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {
nlohmann::json time_or_null(double time) { return quantity(time, "s"); }

// A margin with its sign, "+169.5 K", like the relative margins beside it.
std::string signed_metric(double value, const std::string& unit) {
  const std::string text = analysis::format_metric(value, unit);
  return value >= 0.0 ? "+" + text : text;
}
}  // namespace

void add_verdict(nlohmann::json& summary, const analysis::Evaluation& evaluation) {
  summary["verdict"] = evaluation.pass ? "pass" : "fail";
  summary["failures"] = evaluation.failures;
  nlohmann::json limits = nlohmann::json::array();
  for (const auto& limit : evaluation.limits) {
    limits.push_back({{"metric", limit.metric},
                      {"bound", analysis::bound_word(limit.bound)},
                      {"limit", quantity(limit.limit, limit.unit)},
                      {"value", quantity(limit.value, limit.unit)},
                      {"margin", quantity(limit.margin, limit.margin_unit)},
                      {"relative_margin", quantity(100.0 * limit.relative_margin, "%")},
                      {"required_margin", quantity(100.0 * limit.required_margin, "%")},
                      {"judged", limit.judged},
                      {"pass", limit.pass},
                      {"source", limit.source},
                      {"origin", limit.origin},
                      {"detail", limit.detail}});
  }
  summary["limits"] = limits;
  nlohmann::json metrics = nlohmann::json::object();
  for (const auto& metric : evaluation.metrics.list()) {
    nlohmann::json entry = quantity(metric.value, metric.unit);
    entry["definition"] = metric.definition;
    metrics[metric.name] = entry;
  }
  summary["metrics"] = metrics;
}

void add_sequence(nlohmann::json& summary, const solver::SequenceReport& report,
                  const analysis::Evaluation& evaluation) {
  nlohmann::json sequence;
  sequence["outcome"] = netlist::outcome_word(report.outcome);
  sequence["expected_outcome"] = netlist::outcome_word(report.spec.expected_outcome);
  sequence["attempts"] = report.attempts;
  sequence["key_cycles"] = report.cycles;
  sequence["closing_rule"] = report.spec.rule_text();
  sequence["sample_period"] = quantity(report.spec.sample_period, "s");
  nlohmann::json history = nlohmann::json::array();
  for (const auto& attempt : report.history) {
    history.push_back({{"number", attempt.number},
                       {"key_cycle", attempt.cycle},
                       {"start", time_or_null(attempt.start)},
                       {"contacts_closed", time_or_null(attempt.contacts_closed)},
                       {"decision", time_or_null(attempt.decision)},
                       {"main_closed", time_or_null(attempt.main_closed)},
                       {"precharge_released", time_or_null(attempt.released)},
                       {"fault", attempt.fault ? nlohmann::json(netlist::outcome_word(*attempt.fault)) : nlohmann::json(nullptr)},
                       {"fault_time", time_or_null(attempt.fault_time)},
                       {"reason", attempt.reason}});
  }
  sequence["history"] = history;
  if (evaluation.stall) {
    const auto& stall = *evaluation.stall;
    sequence["stall"] = {{"applicable", stall.applicable},
                         {"stalls", stall.stalls},
                         {"source_voltage", quantity(stall.source_voltage, "V")},
                         {"path_resistance", quantity(stall.path_resistance, "Ohm")},
                         {"load_power", quantity(stall.load_power, "W")},
                         {"maximum_power", quantity(stall.maximum_power, "W")},
                         {"equilibrium", quantity(stall.equilibrium, "V")},
                         {"lower_root", quantity(stall.lower_root, "V")},
                         {"link_voltage", quantity(stall.link_voltage, "V")},
                         {"latched", stall.latched},
                         {"closing_level", quantity(stall.closing_level, "V")},
                         {"explanation", stall.explanation}};
  }
  sequence["timeline"] = summary["timeline"];  // written by run_summary from the same result
  summary["sequence"] = sequence;
}

std::string summary_json(const solver::Circuit& circuit, const solver::Result& result,
                         const analysis::EnergyAudit& audit, const analysis::Evaluation& evaluation,
                         const solver::SequenceReport* report) {
  nlohmann::json summary = run_summary(circuit, result, audit);
  add_verdict(summary, evaluation);
  if (report) add_sequence(summary, *report, evaluation);
  return json_text(summary);
}

std::string verdict_terminal(const analysis::Evaluation& evaluation, const solver::SequenceReport* report) {
  std::string out;
  if (report != nullptr) {
    out += fmt::format("  sequence  {} after {} attempt(s) (expected {}); rule: {}\n",
                       netlist::outcome_word(report->outcome), report->attempts,
                       netlist::outcome_word(report->spec.expected_outcome), report->spec.rule_text());
    if (evaluation.stall && evaluation.stall->applicable) out += fmt::format("  stall     {}\n", evaluation.stall->explanation);
  }
  std::string table;
  // Compact: the sequence metrics, the sequence resistor's, and every metric with a limit; the rest are in
  // summary.json.
  std::string resistor = report != nullptr ? report->spec.resistor + "." : std::string();
  int hidden = 0;
  for (const auto& metric : evaluation.metrics.list()) {
    bool limited = std::any_of(evaluation.limits.begin(), evaluation.limits.end(),
                               [&](const analysis::JudgedLimit& limit) { return limit.metric == metric.name; });
    bool shown = limited || metric.name.starts_with("sequence.") ||
                 (!resistor.empty() && metric.name.starts_with(resistor));
    if (!shown) {
      ++hidden;
      continue;
    }
    std::string limit_text, margin_text, mark;
    double smallest = std::numeric_limits<double>::infinity();
    for (const auto& limit : evaluation.limits) {
      if (limit.metric != metric.name) continue;
      if (!limit_text.empty()) limit_text += ", ";
      limit_text += fmt::format("{} {}", analysis::bound_word(limit.bound), analysis::format_metric(limit.limit, limit.unit));
      // The tightest limit's margin, relative to its bound; a temperature's in K, since a fraction of a bound
      // in degC depends on where the scale has its zero.
      if (limit.judged && !(limit.relative_margin >= smallest)) {
        smallest = limit.relative_margin;
        const bool absolute = std::isnan(limit.relative_margin) || limit.margin_unit != limit.unit;
        margin_text = absolute ? signed_metric(limit.margin, limit.margin_unit)
                               : fmt::format("{:+.1f} %", 100.0 * limit.relative_margin);
      }
      mark = !limit.judged ? "not judged" : limit.pass ? (mark == "FAIL" ? "FAIL" : "ok") : "FAIL";
    }
    table += fmt::format("  {:<34} {:>14}   {:<26} {:>9}  {}\n", metric.name,
                       analysis::format_metric(metric.value, metric.unit), limit_text, margin_text, mark);
  }
  if (!table.empty()) {
    out += fmt::format("  {:<34} {:>14}   {:<26} {:>9}  {}\n", "metric", "value", "limit", "margin", "") + table;
  }
  if (hidden > 0) {
    out += fmt::format("  ({} {}metrics without limits in summary.json)\n", hidden, table.empty() ? "" : "more ");
  }
  out += fmt::format("  verdict   {}\n", evaluation.pass ? "PASS" : "FAIL");
  for (const auto& failure : evaluation.failures) out += fmt::format("    - {}\n", failure);
  return out;
}

}  // namespace linkrise::app
