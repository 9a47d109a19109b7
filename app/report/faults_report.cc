#include "app/report/faults_report.h"

#include <algorithm>
#include <cmath>
#include <utility>
#include <vector>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/report/report_html.h"
#include "app/output/text_format.h"
#include "app/report/svg_plot.h"

namespace linkrise::app {

namespace {

std::string against(double value, double rating, const std::string& unit) {
  if (std::isnan(value)) return "-";
  if (std::isnan(rating)) return display_metric(value, unit) + " (no rating)";
  return fmt::format("{} / {}", display_metric(value, unit), display_metric(rating, unit));
}

std::string result_word(const DetectionRow& row) {
  if (!row.applicable) return "not applicable";
  return row.pass ? "PASS" : "FAIL";
}

// One line per failing row with every reason, listed under the matrix (the page is too narrow for them in a cell).
std::vector<std::string> failure_lines(const DetectionMatrix& matrix) {
  std::vector<std::string> lines;
  for (const auto& row : matrix.rows) {
    if (row.pass) continue;
    std::string why;
    for (const auto& reason : failure_reasons(row)) why += (why.empty() ? "" : "; ") + reason;
    if (row.solver_failed && !row.note.empty()) why += " (" + row.note + ")";
    lines.push_back(fmt::format("{} \u2014 FAIL: {}", row.scenario, why));
  }
  return lines;
}

Tone row_tone(const DetectionRow& row) {
  if (!row.applicable) return Tone::Plain;
  return row.pass ? Tone::Pass : Tone::Fail;
}

// Share of a rating as a ten-cell text bar and a percentage, so it reads in grey-scale print and in plain text.
std::string share_bar(double value, double rating) {
  if (std::isnan(value) || std::isnan(rating) || rating <= 0.0) return "-";
  const double share = value / rating;
  const int filled = static_cast<int>(std::clamp(std::round(share * 10.0), 0.0, 10.0));
  std::string bar;
  for (int i = 0; i < 10; ++i) bar += i < filled ? "\u2588" : "\u2591";
  // No-break spaces keep the bar and its percentage on one line.
  return fmt::format("{}\u00a0{:.0f}\u00a0%{}", bar, share * 100.0, share > 1.0 ? " OVER RATING" : "");
}

std::string temperature_margin(const DetectionRow& row) {
  if (std::isnan(row.peak_temperature) || std::isnan(row.temperature_rating)) return "-";
  const double margin = row.temperature_rating - row.peak_temperature;
  // Kelvin without a prefix: a temperature difference reads like the °C columns beside it.
  if (margin < 0.0) return fmt::format("{:.4g} K over", -margin);
  return fmt::format("{:.4g} K", margin);
}

void add_overview(HtmlReport& report, const DetectionMatrix& matrix) {
  const auto& rows = matrix.rows;
  const auto applicable = std::count_if(rows.begin(), rows.end(), [](const DetectionRow& r) { return r.applicable; });
  const std::size_t failed = matrix.failed();
  report.section("Overview", "overview");
  if (matrix.pass()) {
    report.verdict(Tone::Pass, fmt::format("every applicable scenario ({} of {}) ended as expected with the "
                                           "pre-charge resistor inside its ratings",
                                           applicable, rows.size()));
  } else {
    std::string names;
    for (const auto& row : rows) {
      if (!row.pass) names += (names.empty() ? "" : ", ") + row.scenario;
    }
    report.verdict(Tone::Fail, fmt::format("{} of {} scenarios failed: {}{}", failed, rows.size(), names,
                                           matrix.solver_failure() ? " (the solver failed in at least one)" : ""));
  }
  report.facts({{"case file", matrix.case_file},
                {"case title", matrix.title},
                {"pre-charge resistor", matrix.resistor},
                {"scenarios", fmt::format("{} ({} simulated, {} not applicable)", rows.size(), applicable,
                                          rows.size() - static_cast<std::size_t>(applicable))},
                {"failed", fmt::format("{}", failed)}});
  report.note(
      "Each scenario is the case with one fault applied as an override and simulated with its BMS sequence. A "
      "row passes when the sequence ends with the expected outcome and the pre-charge resistor stays inside its "
      "temperature and energy ratings until the fault is cleared.");
}

void add_matrix_table(HtmlReport& report, const DetectionMatrix& matrix) {
  report.section("Detection matrix", "matrix-section");
  ReportTable table;
  table.id = "matrix";
  table.caption = "Outcome of every scenario against its expectation";
  table.columns = {"scenario", "expected", "actual", "attempt", "fault at",
                   "peak temperature / rating", "energy / rating", "result"};
  // Only the short columns are numeric (kept on one line); value / rating pairs may wrap to fit the page.
  table.numeric_columns = {3, 4};
  for (const auto& row : matrix.rows) {
    table.rows.push_back({row.scenario, row.expected_word(), row.applicable ? row.actual_word() : "-",
                          row.applicable ? fmt::format("{} of {}", row.attempt, row.attempts) : "-",
                          display_metric(row.detection_time, "s"),
                          against(row.peak_temperature, row.temperature_rating, "degC"),
                          against(row.energy, row.energy_rating, "J"), result_word(row)});
    table.row_tones.push_back(row_tone(row));
  }
  report.table(table);
  if (const auto lines = failure_lines(matrix); !lines.empty()) {
    report.paragraph("Why rows failed:");
    report.list(lines);
  }
  report.note(
      "First fault at: the run time at which the BMS raised its first fault (\"-\": none). Peak temperature and "
      "energy are those of the pre-charge resistor over the whole run, against the ratings the part declares.");

  ReportTable scenarios;
  scenarios.id = "scenarios";
  scenarios.caption = "What each scenario changes";
  scenarios.columns = {"scenario", "change", "note"};
  for (const auto& row : matrix.rows) scenarios.rows.push_back({row.scenario, row.description, row.note});
  report.table(scenarios);
}

void add_resistor_table(HtmlReport& report, const DetectionMatrix& matrix) {
  report.section("Pre-charge resistor against its ratings", "resistor");
  ReportTable table;
  table.id = "resistor-stress";
  table.caption = fmt::format("{}: peak temperature and energy per scenario", matrix.resistor);
  table.columns = {"scenario", "peak temperature", "margin to rating", "energy", "share of energy rating",
                   "every rating held"};
  table.numeric_columns = {1, 2, 3};
  for (const auto& row : matrix.rows) {
    if (!row.applicable) continue;
    table.rows.push_back({row.scenario, display_metric(row.peak_temperature, "degC"), temperature_margin(row),
                          display_metric(row.energy, "J"), share_bar(row.energy, row.energy_rating),
                          row.ratings_held ? "yes" : "NO"});
    table.row_tones.push_back(row.ratings_held ? Tone::Plain : Tone::Fail);
  }
  if (table.rows.empty()) {
    report.paragraph("No scenario was simulated.");
    return;
  }
  report.table(table);
  report.note(
      "Ratings as in the detection matrix. Margin: temperature rating minus peak temperature. The bar shows the "
      "energy as a share of the energy rating, one cell per 10 %. \"-\": the part has no thermal model or declares "
      "no such rating.");
}

void add_link_plots(HtmlReport& report, const DetectionMatrix& matrix) {
  report.section("Link voltage per scenario", "link-voltage");
  report.note(fmt::format(
      "The sensed link voltage of each simulated scenario, from the solver's steps reduced to at most four "
      "samples per {} drawing columns (first, lowest, highest, last), so a one-step spike still shows. A dashed "
      "marker shows the first fault.",
      kLinkTraceColumns));
  int drawn = 0;
  for (const auto& row : matrix.rows) {
    if (!row.applicable || row.link_time.empty()) continue;
    PlotSpec plot;
    plot.title = fmt::format("{}: {}", row.scenario, row.actual_word());
    plot.x_label = "time";
    plot.x_unit = "s";
    plot.y_label = "link voltage";
    plot.y_unit = "V";
    plot.height = 260;
    Series series;
    series.name = "link voltage";
    series.x = row.link_time;
    series.y = row.link_voltage;
    series.dash = "none";
    plot.series.push_back(std::move(series));
    if (std::isfinite(row.detection_time)) plot.markers.push_back({row.detection_time, "first fault"});
    report.line_plot(std::move(plot), fmt::format("{} \u2014 expected {}, ended {}: {}", row.scenario, row.expected_word(),
                                                  row.actual_word(), row.pass ? "pass" : "FAIL"));
    ++drawn;
  }
  if (drawn == 0) report.paragraph("No scenario was simulated, so there is no link voltage to show.");
}

void add_not_applicable(HtmlReport& report, const DetectionMatrix& matrix) {
  report.section("Scenarios not applicable", "not-applicable");
  std::vector<std::string> items;
  for (const auto& row : matrix.rows) {
    if (!row.applicable) items.push_back(fmt::format("{}: {}", row.scenario, row.note));
  }
  if (items.empty()) {
    report.paragraph("Every scenario applied to this case.");
    return;
  }
  report.paragraph(
      "The case lacks the structure these scenarios need, so they were not simulated and do not count against "
      "the verdict. Model the missing parts to have them judged.");
  report.list(items);
}

}  // namespace

std::string faults_report_html(const DetectionMatrix& matrix) {
  HtmlReport report(matrix.title.empty() ? "Detection matrix" : "Detection matrix: " + matrix.title,
                    fmt::format("linkrise faults {}", matrix.case_file));
  add_overview(report, matrix);
  add_matrix_table(report, matrix);
  add_resistor_table(report, matrix);
  add_link_plots(report, matrix);
  add_not_applicable(report, matrix);
  report.safety_section();
  return report.html();
}

}  // namespace linkrise::app
