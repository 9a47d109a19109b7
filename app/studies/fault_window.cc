#include "app/studies/fault_window.h"

#include <cmath>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/output/json_fields.h"
#include "app/output/text_format.h"
#include "app/studies/faults_json.h"
#include "app/studies/study_parameters.h"
#include "netlist/case.h"
#include "netlist/sequence_spec.h"

namespace linkrise::app {
using netlist::InputError;

namespace {
// Wide enough that no sample of any run times out; read_sequence only needs it above the other times.
constexpr const char* kWideTimeout = "1e6 s";
}  // namespace

bool FaultWindow::verified() const {
  if (!problems.empty() || matrix.rows.empty() || !matrix.pass()) return false;
  for (const auto& outcome : extreme_outcomes) {
    if (outcome != "closed") return false;
  }
  return extreme_outcomes.size() == 2;
}

std::vector<netlist::Override> window_overrides(double minimum_time, double timeout) {
  netlist::SourceMark mark{"fault window", 0, 0};
  const netlist::Dimension time = netlist::Dimension::time();
  return {netlist::Override{"sequence.minimum_time", netlist::quantity_text(minimum_time, time, false), mark},
          netlist::Override{"sequence.timeout", netlist::quantity_text(timeout, time, false), mark}};
}

FaultWindow recommend_window(const Spread& spread, double margin, double sample_period) {
  FaultWindow window;
  window.margin = margin;
  window.sample_period = sample_period;
  const StudyResults& results = spread.results;
  for (std::size_t p = 0; p < results.points.size(); ++p) {
    const PointResult& point = results.points[p];
    if (!point.evaluated() || point.outcome != "closed") continue;
    ++window.closed;
    double threshold = results.value(p, "sequence.time_to_threshold");
    double start = results.value(p, "sequence.main_close_time") - results.value(p, "sequence.precharge_time");
    double decision = results.value(p, "sequence.decision_time") - start;
    if (!std::isnan(threshold) && (window.fastest_point < 0 || threshold < window.fastest)) {
      window.fastest = threshold;
      window.fastest_point = static_cast<long>(p);
    }
    if (!std::isnan(decision) && (window.slowest_point < 0 || decision > window.slowest)) {
      window.slowest = decision;
      window.slowest_point = static_cast<long>(p);
    }
  }
  std::size_t others = results.points.size() - window.closed;
  if (others > 0) {
    window.problems.push_back(fmt::format(
        "{} of {} samples did not close even with the minimum time and timeout opened wide (see the spread "
        "outcomes): the rise check or the circuit itself stops them, and no window can fix that",
        others, results.points.size()));
  }
  if (window.fastest_point < 0 || window.slowest_point < 0) {
    window.problems.push_back("no sample closed, so there is no charge time to set a window around");
    return window;
  }
  // A tiny allowance keeps an exact multiple of the period from rounding one period the wrong way.
  window.minimum_time = std::floor((1.0 - margin) * window.fastest / sample_period + 1e-9) * sample_period;
  window.timeout = std::ceil((1.0 + margin) * window.slowest / sample_period - 1e-9) * sample_period;
  if (window.minimum_time <= 0.0) {
    window.problems.push_back(fmt::format(
        "the fastest charge ({}) less the margin is under one sample period ({}): the too-fast check cannot be "
        "set; shorten the sample period or reduce the margin",
        display_seconds(window.fastest), display_seconds(sample_period)));
  }
  return window;
}

FaultWindow fault_window(const std::string& case_file, const std::vector<netlist::Override>& settings,
                         const SpreadPlan& plan, double margin, int jobs, Spread* spread_out,
                         const std::string& progress_label) {
  return fault_window(netlist::CaseDocument::load(case_file).with(settings), plan, margin, jobs, spread_out,
                      progress_label);
}

FaultWindow fault_window(const netlist::CaseDocument& base, const SpreadPlan& plan, double margin, int jobs,
                         Spread* spread_out, const std::string& progress_label) {
  const std::string& case_file = base.file();
  if (!(margin >= 0.0 && margin < 1.0)) {
    throw InputError(option_mark("--margin", 1), fmt::format("a margin of {} is outside 0 … 100 %", margin),
                     "write e.g. '--margin 20%'");
  }
  const netlist::Case nominal = base.validate();
  const auto& sequence = nominal.sequence;
  if (!sequence) {
    throw InputError(netlist::SourceMark{case_file, 1, 1}, "a fault window needs the case's 'sequence:' block",
                     "add a sequence block (see docs/sequence-and-limits.md)");
  }
  netlist::SourceMark mark{"fault window (opened wide for the spread)", 0, 0};
  const std::vector<netlist::Override> wide{{"sequence.minimum_time", "0 s", mark},
                                            {"sequence.timeout", kWideTimeout, mark}};
  Spread spread = run_spread(base.with(wide), plan, jobs, progress_label);

  FaultWindow window = recommend_window(spread, margin, sequence->sample_period);
  window.case_minimum_time = sequence->minimum_time;
  window.case_timeout = sequence->timeout;
  if (window.problems.empty()) {
    std::vector<netlist::Override> installed = window_overrides(window.minimum_time, window.timeout);
    const netlist::CaseDocument windowed = base.with(installed);
    std::vector<std::size_t> extremes{static_cast<std::size_t>(window.fastest_point),
                                      static_cast<std::size_t>(window.slowest_point)};
    StudyResults rerun = run_study(
        extremes.size(),
        [&](std::size_t i) { return windowed.with(spread_overrides(spread.tolerances, plan, spread.index(extremes[i]))); },
        jobs);
    for (const auto& point : rerun.points) {
      window.extreme_outcomes.push_back(point.outcome_word());
    }
    window.matrix = detection_matrix(windowed, jobs);
  }
  if (spread_out) *spread_out = std::move(spread);
  return window;
}

std::string window_text(const FaultWindow& window, const Spread& spread) {
  std::string out = fmt::format("linkrise window — {}\n", spread.title);
  out += fmt::format("  spread: {} {}, fault window opened wide while sampling; {} closed\n",
                     spread.results.points.size(), spread.plan.corners ? "corners" : "Monte Carlo samples",
                     window.closed);
  if (!spread.plan.corners) out += fmt::format("          seed {}\n", spread.plan.seed);
  out += fmt::format("  accuracy: {}\n", accuracy_text(spread.results.accuracy));
  for (const auto& t : spread.tolerances) out += fmt::format("    {:<28} {}\n", t.path, t.description);
  if (window.fastest_point >= 0) {
    out += fmt::format("  fastest to the closing level  {:>10}  ({} {}: {})\n", display_seconds(window.fastest),
                       spread.plan.corners ? "corner" : "sample",
                       spread.index(static_cast<std::size_t>(window.fastest_point)),
                       sample_parameters(spread, static_cast<std::size_t>(window.fastest_point)));
    out += fmt::format("  slowest decision to close     {:>10}  ({} {}: {})\n", display_seconds(window.slowest),
                       spread.plan.corners ? "corner" : "sample",
                       spread.index(static_cast<std::size_t>(window.slowest_point)),
                       sample_parameters(spread, static_cast<std::size_t>(window.slowest_point)));
  }
  out += fmt::format("  margin {:g} %, BMS sample period {}\n", window.margin * 100.0, display_seconds(window.sample_period));
  if (!std::isnan(window.minimum_time)) {
    out += fmt::format("  recommended minimum_time {:>10}  = (1 − margin) × fastest, down to a whole period (case: {})\n",
                       display_seconds(window.minimum_time), display_seconds(window.case_minimum_time));
    out += fmt::format("  recommended timeout      {:>10}  = (1 + margin) × slowest, up to a whole period (case: {})\n",
                       display_seconds(window.timeout), display_seconds(window.case_timeout));
  }
  for (const auto& problem : window.problems) out += fmt::format("  problem: {}\n", problem);
  if (window.extreme_outcomes.size() == 2) {
    out += fmt::format("  with the window: fastest sample ended '{}', slowest sample ended '{}' (both must close)\n",
                       window.extreme_outcomes[0], window.extreme_outcomes[1]);
  }
  if (!window.matrix.rows.empty()) {
    out += "  fault scenarios with the recommended window:\n";
    out += matrix_text(window.matrix);
  }
  out += fmt::format("  window {}\n", window.verified() ? "VERIFIED" : "NOT VERIFIED");
  return out;
}

namespace {
nlohmann::json window_json_value(const FaultWindow& window, const Spread& spread) {
  auto sample = [&](long point) -> nlohmann::json {
    if (point < 0) return nullptr;
    auto p = static_cast<std::size_t>(point);
    nlohmann::json parameters = nlohmann::json::object();
    for (const auto& change : spread_overrides(spread.tolerances, spread.plan, spread.index(p))) {
      parameters[change.path] = change.value;
    }
    return {{"index", spread.index(p)}, {"parameters", parameters}};
  };
  const nlohmann::json scenarios =
      window.matrix.rows.empty() ? nlohmann::json(nullptr) : detection_matrix_json(window.matrix)["rows"];
  return with_file_head(
      {{"spread", {{"mode", spread.plan.corners ? "corners" : "monte_carlo"},
                   {"seed", spread.plan.seed},
                   {"samples", spread.results.points.size()},
                   {"closed", window.closed}}},
       {"margin", quantity(100.0 * window.margin, "%")},
       {"sample_period", quantity(window.sample_period, "s")},
       {"fastest", {{"time_to_threshold", quantity(window.fastest, "s")}, {"sample", sample(window.fastest_point)}}},
       {"slowest",
        {{"decision_after_start", quantity(window.slowest, "s")}, {"sample", sample(window.slowest_point)}}},
       {"case_window", {{"minimum_time", quantity(window.case_minimum_time, "s")},
                        {"timeout", quantity(window.case_timeout, "s")}}},
       {"recommended",
        {{"minimum_time", quantity(window.minimum_time, "s")}, {"timeout", quantity(window.timeout, "s")}}},
       {"problems", window.problems},
       {"extreme_outcomes", window.extreme_outcomes},
       {"fault_scenarios", scenarios},
       {"verified", window.verified()}},
      spread.title, spread.case_file);
}
}  // namespace

std::string window_json(const FaultWindow& window, const Spread& spread) {
  return json_text(window_json_value(window, spread));
}

}  // namespace linkrise::app
