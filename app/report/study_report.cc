#include "app/report/study_report.h"

#include <algorithm>
#include <cmath>
#include <optional>
#include <utility>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/report/report_html.h"
#include "app/output/text_format.h"
#include "app/studies/study_parameters.h"
#include "app/report/svg_plot.h"
#include "netlist/units.h"

namespace linkrise::app {

namespace {

Tone tone_of(const PointResult& point) { return point.passed() ? Tone::Pass : Tone::Fail; }

// "3 closed, 1 timeout" in order of first appearance.
std::string outcome_counts(const StudyResults& results) {
  const std::string counts = results.outcome_counts();
  return counts.empty() ? "none" : counts;
}

std::string page_title(const std::string& kind, const std::string& title) {
  return title.empty() ? kind : kind + ": " + title;
}

// ---------------------------------------------------------------------------------------------------------
// compare

std::string variant_label(const VariantComparison& comparison, std::size_t i) {
  return i < comparison.names.size() ? comparison.names[i] : fmt::format("variant {}", i);
}

void add_compare_overview(HtmlReport& report, const VariantComparison& comparison) {
  const auto& points = comparison.results.points;
  report.section("Overview", "overview");
  std::vector<std::string> failing;
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (!points[i].passed()) failing.push_back(fmt::format("{} ({})", variant_label(comparison, i), points[i].verdict_word()));
  }
  if (failing.empty()) {
    report.verdict(Tone::Pass, fmt::format("every variant ({} including the nominal case) passed its limits", points.size()));
  } else {
    std::string names;
    for (const auto& name : failing) names += (names.empty() ? "" : ", ") + name;
    report.verdict(Tone::Fail, fmt::format("{} of {} variants did not pass: {}", failing.size(), points.size(), names));
  }
  report.facts({{"case file", comparison.case_file},
                {"case title", comparison.title},
                {"variants", fmt::format("{} (the nominal case and {} from the case's variants block)", points.size(),
                                         points.empty() ? 0 : points.size() - 1)},
                {"metrics compared", fmt::format("{}", comparison.results.columns.size())},
                {"accuracy", accuracy_text(comparison.results.accuracy)}});
}

void add_variant_verdicts(HtmlReport& report, const VariantComparison& comparison) {
  report.section("Verdict per variant", "verdicts");
  ReportTable table;
  table.id = "variants";
  table.caption = "Outcome and verdict of every variant, each judged against the case's limits and ratings";
  table.columns = {"variant", "what it changes", "outcome", "verdict"};
  const auto& points = comparison.results.points;
  for (std::size_t i = 0; i < points.size(); ++i) {
    const std::string note = i < comparison.notes.size() ? comparison.notes[i] : "";
    table.rows.push_back({variant_label(comparison, i), note, points[i].evaluated() ? points[i].outcome : "-",
                          points[i].passed() ? "PASS" : "FAIL: " + points[i].verdict_word()});
    table.row_tones.push_back(tone_of(points[i]));
  }
  report.table(table);
  std::vector<std::string> problems;
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (!points[i].evaluated()) problems.push_back(fmt::format("{}: {}", variant_label(comparison, i), points[i].message));
  }
  if (!problems.empty()) {
    report.paragraph("Variants that were not evaluated:");
    report.list(problems);
  }
}

void add_comparison_table(HtmlReport& report, const VariantComparison& comparison) {
  report.section("Comparison", "comparison-section");
  const StudyResults& results = comparison.results;
  ReportTable table;
  table.id = "comparison";
  table.caption = "Every metric of every variant; the best value of a row is marked \u201cbest\u201d";
  table.columns = {"metric", "better"};
  for (std::size_t i = 0; i < results.points.size(); ++i) table.columns.push_back(variant_label(comparison, i));
  table.columns.push_back("best");
  for (std::size_t i = 0; i < results.points.size(); ++i) table.numeric_columns.push_back(static_cast<int>(i) + 2);
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    const MetricColumn& column = results.columns[c];
    const std::vector<std::size_t> best = comparison.best(c);
    std::vector<std::string> row{column.name, larger_is_better(column.name) ? "larger" : "smaller"};
    std::string best_names;
    for (std::size_t i = 0; i < results.points.size(); ++i) {
      const double value = c < results.points[i].values.size() ? results.points.value(i, c) : std::nan("");
      const bool marked = std::find(best.begin(), best.end(), i) != best.end();
      // A no-break space keeps the mark beside its value.
      row.push_back(display_metric(value, column.unit) + (marked ? "\u00a0best" : ""));
      if (marked) best_names += (best_names.empty() ? "" : ", ") + variant_label(comparison, i);
    }
    row.push_back(best_names.empty() ? "-" : best_names);
    table.rows.push_back(std::move(row));
  }
  std::vector<std::string> outcome{"outcome", ""}, verdict{"verdict", ""};
  for (const auto& point : results.points) {
    outcome.push_back(point.evaluated() ? point.outcome : "-");
    verdict.push_back(point.passed() ? "PASS" : "FAIL: " + point.verdict_word());
  }
  outcome.push_back("");
  verdict.push_back("");
  table.rows.push_back(std::move(outcome));
  table.rows.push_back(std::move(verdict));
  report.table(table);
  report.note(
      "Smaller is better for every metric (times, peaks, energies, temperatures, i\u00b2t, voltage step, overshoot, "
      "attempts) except minimum_* metrics and sequence.stall_equilibrium, where larger is better. Values within "
      "1e-9 of the row's largest magnitude tie; a row where every reached value ties is not marked. \"-\": the "
      "variant did not reach the metric (e.g. a closing time when the sequence faulted).");
}

// ---------------------------------------------------------------------------------------------------------
// spread and window

bool has_column(const StudyResults& results, const std::string& name) { return results.column(name) >= 0; }

std::string sample_word(const Spread& spread) { return spread.plan.corners ? "corner" : "sample"; }

std::string study_description(const Spread& spread) {
  std::string text;
  if (spread.plan.corners) {
    text = fmt::format("corners: {} of {} (every combination of the {} tolerance bounds)", spread.range.size(),
                       spread.population, spread.tolerances.size());
  } else {
    text = fmt::format("Monte Carlo: samples {}\u2026{} of {}, seed {}", spread.range.begin,
                       spread.range.end == 0 ? 0 : spread.range.end - 1, spread.population, spread.plan.seed);
  }
  if (spread.plan.shards > 1) text += fmt::format(", shard {}/{}", spread.plan.shard, spread.plan.shards);
  return text;
}

void add_tolerances_table(HtmlReport& report, const Spread& spread) {
  ReportTable table;
  table.id = "tolerances";
  table.caption = "The case's tolerances block";
  table.columns = {"parameter", "tolerance"};
  for (const auto& t : spread.tolerances) table.rows.push_back({t.path, t.description});
  report.table(table);
}

std::vector<double> reached_values(const StudyResults& results, std::size_t column) {
  std::vector<double> values;
  if (column >= results.points.width()) return values;
  for (std::size_t p = 0; p < results.points.size(); ++p) {
    const double value = results.points.value(p, column);
    if (std::isfinite(value)) values.push_back(value);
  }
  return values;
}

double nominal_value(const Spread& spread, std::size_t column) {
  if (spread.nominal.points.empty() || column >= spread.nominal.points.width()) return std::nan("");
  return spread.nominal.points.value(0, column);
}

void add_statistics(HtmlReport& report, const Spread& spread, const std::vector<std::string>& metrics) {
  report.section("Distribution statistics", "statistics-section");
  ReportTable table;
  table.id = "statistics";
  table.caption = fmt::format("Per metric over the {}s that reached it", sample_word(spread));
  table.columns = {"metric", "nominal", "min", "p0.1", "p1", "p50", "p99", "p99.9", "max", "reached"};
  table.numeric_columns = {1, 2, 3, 4, 5, 6, 7, 8, 9};
  ReportTable worst;
  worst.id = "worst";
  worst.caption = fmt::format("The worst {} of each metric", sample_word(spread));
  worst.columns = {"metric", "worst value", sample_word(spread), "parameters"};
  worst.numeric_columns = {1, 2};
  for (const auto& name : metrics) {
    const int c = spread.results.column(name);
    if (c < 0) continue;
    const auto column = static_cast<std::size_t>(c);
    const MetricSpread& s = spread.statistics[column];
    auto f = [&](double v) { return display_metric(v, s.unit); };
    table.rows.push_back({name, f(nominal_value(spread, column)), f(s.minimum), f(s.p0_1), f(s.p1), f(s.p50), f(s.p99),
                          f(s.p99_9), f(s.maximum), fmt::format("{} of {}", s.reached, spread.results.points.size())});
    if (s.worst >= 0) {
      const auto p = static_cast<std::size_t>(s.worst);
      worst.rows.push_back({name, f(spread.results.points.value(p, column)), fmt::format("{}", spread.index(p)),
                            sample_parameters(spread, p)});
    }
  }
  report.table(table);
  report.note(
      "Quantiles of Hyndman & Fan type 7 (the default of R and NumPy): h = (n \u2212 1)\u00b7p, linear between the "
      "order statistics. A sample that did not reach a metric (e.g. a closing time when it faulted) is left out of "
      "that metric's statistics; \"reached\" says how many were left.");
  if (!worst.rows.empty()) {
    report.table(worst);
    report.note("Worst: the largest value (the smallest for minimum_* metrics), the lowest index on a tie.");
  }
}

void add_histograms(HtmlReport& report, const Spread& spread, const std::vector<std::string>& metrics) {
  report.section("Histograms", "histograms");
  report.note(fmt::format(
      "One histogram per metric over the {}s that reached it; the dashed marker is the nominal case (the case "
      "without tolerances).",
      sample_word(spread)));
  for (const auto& name : metrics) {
    const int c = spread.results.column(name);
    if (c < 0) continue;
    const auto column = static_cast<std::size_t>(c);
    const MetricSpread& s = spread.statistics[column];
    HistogramSpec histogram;
    histogram.title = name;
    histogram.x_label = name;
    histogram.x_unit = s.unit;
    histogram.values = reached_values(spread.results, column);
    const double nominal = nominal_value(spread, column);
    if (std::isfinite(nominal)) histogram.markers.push_back({nominal, "nominal"});
    report.histogram(std::move(histogram),
                     fmt::format("{}: {} of {} {}s reached it; nominal {}, p50 {}, max {}", name, s.reached,
                                 spread.results.points.size(), sample_word(spread), display_metric(nominal, s.unit),
                                 display_metric(s.p50, s.unit), display_metric(s.maximum, s.unit)));
  }
}

void add_not_evaluated(HtmlReport& report, const Spread& spread) {
  std::vector<std::string> items;
  for (std::size_t p = 0; p < spread.results.points.size(); ++p) {
    const PointResult& point = spread.results.points[p];
    if (!point.evaluated()) items.push_back(fmt::format("{} {}: {}", sample_word(spread), spread.index(p), point.message));
  }
  if (items.empty()) return;
  report.section(fmt::format("{}s not evaluated", spread.plan.corners ? "Corners" : "Samples"), "not-evaluated");
  report.list(items);
}

void add_spread_body(HtmlReport& report, const Spread& spread, const std::vector<std::string>& metrics) {
  const std::vector<std::string> plotted = spread_plot_metrics(spread, metrics);
  add_statistics(report, spread, plotted);
  add_histograms(report, spread, plotted);
  add_not_evaluated(report, spread);
}

std::string extreme_text(const Spread& spread, long point, double value) {
  if (point < 0) return "-";
  const auto p = static_cast<std::size_t>(point);
  return fmt::format("{} ({} {}: {})", display_seconds(value), sample_word(spread), spread.index(p),
                     sample_parameters(spread, p));
}

void add_window_overview(HtmlReport& report, const FaultWindow& window, const Spread& spread) {
  report.section("Overview", "overview");
  if (window.verified()) {
    report.verdict(Tone::Pass, fmt::format("window VERIFIED: minimum time {} and timeout {} close every {} of the "
                                           "spread and catch every fault scenario as expected",
                                           display_seconds(window.minimum_time), display_seconds(window.timeout),
                                           sample_word(spread)));
  } else {
    std::vector<std::string> reasons = window.problems;
    for (std::size_t i = 0; i < window.extreme_outcomes.size(); ++i) {
      if (window.extreme_outcomes[i] != "closed") {
        reasons.push_back(fmt::format("the {} {} ended '{}' with the window", i == 0 ? "fastest" : "slowest",
                                      sample_word(spread), window.extreme_outcomes[i]));
      }
    }
    for (const auto& row : window.matrix.rows) {
      if (!row.pass) reasons.push_back(fmt::format("scenario {} ended '{}', expected '{}'", row.scenario, row.actual_word(), row.expected_word()));
    }
    std::string why;
    for (const auto& reason : reasons) why += (why.empty() ? "" : "; ") + reason;
    report.verdict(Tone::Fail, "window NOT VERIFIED" + (why.empty() ? std::string() : ": " + why));
  }
  report.facts({{"case file", spread.case_file},
                {"case title", spread.title},
                {"spread", study_description(spread) + ", the case's fault window opened wide while sampling"},
                {"closed", fmt::format("{} of {}", window.closed, spread.results.points.size())},
                {"accuracy", accuracy_text(spread.results.accuracy)},
                {"fastest to the closing level", extreme_text(spread, window.fastest_point, window.fastest)},
                {"slowest decision to close", extreme_text(spread, window.slowest_point, window.slowest)},
                {"margin", fmt::format("{:g} %", window.margin * 100.0)},
                {"BMS sample period", display_seconds(window.sample_period)},
                {"recommended minimum time",
                 fmt::format("{} (the case has {})", display_seconds(window.minimum_time),
                             display_seconds(window.case_minimum_time))},
                {"recommended timeout",
                 fmt::format("{} (the case has {})", display_seconds(window.timeout),
                             display_seconds(window.case_timeout))}});
  if (!window.problems.empty()) {
    report.paragraph("Problems:");
    report.list(window.problems);
  }
  report.note(
      "minimum time = (1 \u2212 margin) \u00d7 fastest, rounded down to a whole sample period; timeout = (1 + margin) "
      "\u00d7 slowest, rounded up to a whole period (docs/studies.md).");
}

// The window as a band and two markers on a time axis.
void mark_window(HistogramSpec& histogram, const FaultWindow& window) {
  if (std::isfinite(window.minimum_time) && std::isfinite(window.timeout)) {
    histogram.bands.push_back({window.minimum_time, window.timeout, "recommended window"});
  }
  if (std::isfinite(window.minimum_time)) histogram.markers.push_back({window.minimum_time, "minimum time"});
  if (std::isfinite(window.timeout)) histogram.markers.push_back({window.timeout, "timeout"});
}

void add_window_histograms(HtmlReport& report, const FaultWindow& window, const Spread& spread) {
  report.section("Recommended window", "window");
  report.note(
      "The shaded band is the recommended window, from the minimum time to the timeout. The too-fast check "
      "compares the time to the closing level with the minimum time; the timeout bounds the time from the "
      "attempt's start to the BMS sample that decides to close.");
  const StudyResults& results = spread.results;
  HistogramSpec threshold;
  threshold.title = "time to the closing level";
  threshold.x_label = "sequence.time_to_threshold";
  threshold.x_unit = "s";
  HistogramSpec decision;
  decision.title = "decision to close after the attempt's start";
  decision.x_label = "decision time \u2212 attempt start";
  decision.x_unit = "s";
  for (std::size_t p = 0; p < results.points.size(); ++p) {
    const PointResult& point = results.points[p];
    if (!point.evaluated() || point.outcome != "closed") continue;
    threshold.values.push_back(results.value(p, "sequence.time_to_threshold"));
    // As recommend_window measures it: the attempt starts precharge_time before the main closing.
    const double start = results.value(p, "sequence.main_close_time") - results.value(p, "sequence.precharge_time");
    decision.values.push_back(results.value(p, "sequence.decision_time") - start);
  }
  mark_window(threshold, window);
  mark_window(decision, window);
  report.histogram(std::move(threshold), fmt::format("Time to the closing level of the {} {}s that closed; fastest {}",
                                                     window.closed, sample_word(spread), display_seconds(window.fastest)));
  report.histogram(std::move(decision), fmt::format("Decision to close of the {} {}s that closed; slowest {}",
                                                    window.closed, sample_word(spread), display_seconds(window.slowest)));
}

void add_window_verification(HtmlReport& report, const FaultWindow& window, const Spread& spread) {
  report.section("Verification", "verification-section");
  if (window.extreme_outcomes.empty() && window.matrix.rows.empty()) {
    report.paragraph("No window was recommended, so nothing was verified.");
    return;
  }
  ReportTable table;
  table.id = "verification";
  table.caption = "Re-run with the recommended minimum time and timeout installed";
  table.columns = {"check", "expected", "actual", "first fault at", "result"};
  table.numeric_columns = {3};
  const long extremes[] = {window.fastest_point, window.slowest_point};
  for (std::size_t i = 0; i < window.extreme_outcomes.size() && i < 2; ++i) {
    const bool ok = window.extreme_outcomes[i] == "closed";
    const std::string index = extremes[i] >= 0 ? fmt::format(" {}", spread.index(static_cast<std::size_t>(extremes[i]))) : "";
    table.rows.push_back({fmt::format("{} {}{}", i == 0 ? "fastest" : "slowest", sample_word(spread), index), "closed",
                          window.extreme_outcomes[i], "-", ok ? "PASS" : "FAIL"});
    table.row_tones.push_back(ok ? Tone::Pass : Tone::Fail);
  }
  for (const auto& row : window.matrix.rows) {
    if (!row.applicable) {
      table.rows.push_back({"scenario " + row.scenario, row.expected_word(), "-", "-", "not applicable"});
      table.row_tones.push_back(Tone::Plain);
      continue;
    }
    table.rows.push_back({"scenario " + row.scenario, row.expected_word(), row.actual_word(), display_seconds(row.detection_time),
                          row.pass ? "PASS" : "FAIL"});
    table.row_tones.push_back(row.pass ? Tone::Pass : Tone::Fail);
  }
  report.table(table);
  report.note(
      "The fastest and the slowest sample must still close; each fault scenario of `linkrise faults` must end as "
      "expected, and the BMS must catch it (\"first fault at\": the run time of its first fault).");
}

// ---------------------------------------------------------------------------------------------------------
// sweep

void add_sweep_overview(HtmlReport& report, const Sweep& sweep) {
  const auto& points = sweep.results.points;
  report.section("Overview", "overview");
  std::vector<std::string> failing;
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (!points[i].passed()) failing.push_back(fmt::format("{}", i + 1));
  }
  if (failing.empty()) {
    report.verdict(Tone::Pass, fmt::format("every point ({}) passed its limits", points.size()));
  } else {
    std::string list;
    for (const auto& point : failing) list += (list.empty() ? "" : ", ") + point;
    report.verdict(Tone::Fail, fmt::format("{} of {} points did not pass: {}", failing.size(), points.size(), list));
  }
  std::vector<std::pair<std::string, std::string>> facts{{"case file", sweep.case_file}, {"case title", sweep.title}};
  for (const auto& column : sweep.columns) {
    std::string values;
    for (std::size_t k = 0; k < column.texts.size(); ++k) values += (values.empty() ? "" : ", ") + column.display(k);
    facts.emplace_back(column.path, values);
  }
  facts.emplace_back("points", fmt::format("{}{}", points.size(),
                                           sweep.parameters.size() == 2 ? " (every combination, the first varies slowest)" : ""));
  facts.emplace_back("outcomes", outcome_counts(sweep.results));
  facts.emplace_back("accuracy", accuracy_text(sweep.results.accuracy));
  report.facts(facts);
}

void add_sweep_plots(HtmlReport& report, const Sweep& sweep, const std::vector<std::string>& metrics) {
  const VariedParameter& first = sweep.parameters.front();
  const ParameterColumn& axis = sweep.columns.front();
  report.section(fmt::format("Metrics against {}", first.path), "curves");
  if (!axis.numeric()) {
    report.paragraph(fmt::format("The values of {} are not quantities of one unit, so there is no axis to plot "
                                 "them on; the table below lists every point.",
                                 first.path));
    return;
  }
  const bool two = sweep.parameters.size() == 2;
  report.note(two ? fmt::format("One curve per value of {}. A point that did not reach a metric is left out of its "
                                "curve. The axis is linear even for a logarithmic range.",
                                sweep.parameters[1].path)
                  : "A point that did not reach a metric is left out of the curve. The axis is linear even for a "
                    "logarithmic range.");
  const std::size_t curves = two ? sweep.parameters[1].values.size() : 1;
  for (const auto& metric : metrics) {
    const int c = sweep.results.column(metric);
    if (c < 0) continue;
    const MetricColumn& column = sweep.results.columns[static_cast<std::size_t>(c)];
    PlotSpec plot;
    plot.title = metric;
    plot.x_label = first.path;
    plot.x_unit = axis.unit.symbol == "1" ? "" : axis.unit.symbol;
    plot.y_label = metric;
    plot.y_unit = column.unit;
    plot.height = 300;
    for (std::size_t b = 0; b < curves; ++b) {
      Series series;
      series.name = two ? fmt::format("{} = {}", sweep.parameters[1].path, sweep.columns[1].display(b))
                        : metric;
      for (std::size_t i = 0; i < sweep.points.size(); ++i) {
        if (two && sweep.points[i][1] != b) continue;
        const double y = sweep.results.value(i, metric);
        if (!std::isfinite(y)) continue;
        series.x.push_back(axis.unit.shown(axis.values[sweep.points[i][0]]));
        series.y.push_back(y);
      }
      plot.series.push_back(std::move(series));
    }
    report.line_plot(std::move(plot), fmt::format("{} against {}", metric, first.path));
  }
}

void add_sweep_table(HtmlReport& report, const Sweep& sweep, const std::vector<std::string>& metrics) {
  report.section("Points", "points-section");
  ReportTable table;
  table.id = "points";
  table.caption = "Every point of the sweep";
  table.columns = {"point"};
  for (const auto& parameter : sweep.parameters) table.columns.push_back(parameter.path);
  std::vector<int> shown;
  for (const auto& metric : metrics) {
    const int c = sweep.results.column(metric);
    if (c < 0) continue;
    shown.push_back(c);
    table.columns.push_back(metric);
  }
  table.columns.push_back("outcome");
  table.columns.push_back("verdict");
  for (int i = 0; i < static_cast<int>(table.columns.size()) - 2; ++i) table.numeric_columns.push_back(i);
  for (std::size_t i = 0; i < sweep.points.size(); ++i) {
    const PointResult& point = sweep.results.points[i];
    std::vector<std::string> row{fmt::format("{}", i + 1)};
    for (std::size_t p = 0; p < sweep.columns.size(); ++p) row.push_back(sweep.columns[p].display(sweep.points[i][p]));
    for (int c : shown) {
      row.push_back(display_metric(sweep.results.value(i, sweep.results.columns[static_cast<std::size_t>(c)].name),
                               sweep.results.columns[static_cast<std::size_t>(c)].unit));
    }
    row.push_back(point.evaluated() ? point.outcome : "-");
    row.push_back(point.passed() ? "PASS" : "FAIL: " + point.verdict_word());
    table.rows.push_back(std::move(row));
    table.row_tones.push_back(tone_of(point));
  }
  report.table(table);
  std::vector<std::string> problems;
  for (std::size_t i = 0; i < sweep.points.size(); ++i) {
    if (!sweep.results.points[i].evaluated()) problems.push_back(fmt::format("point {}: {}", i + 1, sweep.results.points[i].message));
  }
  if (!problems.empty()) report.list(problems);
  report.note("Every metric of every point is in sweep.csv.");
}

}  // namespace

std::vector<std::string> spread_plot_metrics(const Spread& spread, const std::vector<std::string>& chosen) {
  std::vector<std::string> names;
  auto add = [&](const std::string& name) {
    if (has_column(spread.results, name) && std::find(names.begin(), names.end(), name) == names.end()) {
      names.push_back(name);
    }
  };
  for (const auto& name : chosen) add(name);
  add("sequence.precharge_time");
  add("sequence.time_to_threshold");
  // The headline names the sequence resistor's metrics when the case has one.
  for (const auto& name : spread.headline) {
    const auto ends_with = [&](const std::string& suffix) {
      return name.size() > suffix.size() && name.compare(name.size() - suffix.size(), suffix.size(), suffix) == 0;
    };
    if (ends_with(".peak_temperature") || ends_with(".energy")) add(name);
  }
  add("sequence.peak_main_current");
  return names;
}

std::string compare_report_html(const VariantComparison& comparison) {
  HtmlReport report(page_title("Variant comparison", comparison.title),
                    fmt::format("linkrise compare {}", comparison.case_file));
  add_compare_overview(report, comparison);
  add_variant_verdicts(report, comparison);
  add_comparison_table(report, comparison);
  report.safety_section();
  return report.html();
}

std::string spread_report_html(const Spread& spread, const std::vector<std::string>& metrics) {
  HtmlReport report(page_title("Tolerance spread", spread.title), fmt::format("linkrise spread {}", spread.case_file));
  report.section("Overview", "overview");
  const std::size_t count = spread.results.points.size();
  const std::size_t failed = spread.failed();
  const auto not_evaluated = static_cast<std::size_t>(std::count_if(
      spread.results.points.begin(), spread.results.points.end(), [](const PointResult& p) { return !p.evaluated(); }));
  if (failed == 0 && not_evaluated == 0) {
    report.verdict(Tone::Pass, fmt::format("every {} of the spread ({}) passed its limits", sample_word(spread), count));
  } else {
    report.verdict(Tone::Fail, fmt::format("the verdict failed in {} of {} {}s{}", failed, count, sample_word(spread),
                                           not_evaluated > 0 ? fmt::format("; {} were not evaluated", not_evaluated) : ""));
  }
  report.facts({{"case file", spread.case_file},
                {"case title", spread.title},
                {"study", study_description(spread)},
                {"outcomes", outcome_counts(spread.results)},
                {"failed verdicts", fmt::format("{}", failed)},
                {"accuracy", accuracy_text(spread.results.accuracy)}});
  add_tolerances_table(report, spread);
  add_spread_body(report, spread, metrics);
  report.safety_section();
  return report.html();
}

std::string window_report_html(const FaultWindow& window, const Spread& spread, const std::vector<std::string>& metrics) {
  HtmlReport report(page_title("BMS fault window", spread.title), fmt::format("linkrise window {}", spread.case_file));
  add_window_overview(report, window, spread);
  add_tolerances_table(report, spread);
  report.note("The spread was sampled with the case's minimum time and timeout opened wide, so its statistics are "
              "not censored by the window under review.");
  add_window_histograms(report, window, spread);
  add_window_verification(report, window, spread);
  add_spread_body(report, spread, metrics);
  report.safety_section();
  return report.html();
}

std::string sweep_report_html(const Sweep& sweep, const std::vector<std::string>& metrics) {
  HtmlReport report(page_title("Parameter sweep", sweep.title), fmt::format("linkrise sweep {}", sweep.case_file));
  add_sweep_overview(report, sweep);
  if (!sweep.parameters.empty()) add_sweep_plots(report, sweep, metrics);
  add_sweep_table(report, sweep, metrics);
  report.safety_section();
  return report.html();
}

}  // namespace linkrise::app
