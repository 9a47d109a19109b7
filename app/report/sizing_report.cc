#include "app/report/sizing_report.h"

#include <cmath>

#include <fmt/format.h>

#include "app/output/text_format.h"
#include "app/report/report_html.h"
#include "app/report/svg_plot.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {

std::string shown(const Sizing& sizing, double value) {
  return std::isnan(value) ? "-" : netlist::format_si(value, sizing.unit);
}

std::string percent(double fraction) { return std::isnan(fraction) ? "-" : fmt::format("{:+.1f} %", fraction * 100.0); }

void add_overview(HtmlReport& report, const Sizing& sizing) {
  report.section("Overview", "overview");
  if (sizing.feasible()) {
    report.verdict(Tone::Pass, fmt::format("{} may lie between {} and {}", sizing.path, shown(sizing, sizing.lower),
                                           shown(sizing, sizing.upper)));
  } else {
    report.verdict(sizing.found() ? Tone::Plain : Tone::Fail,
                   fmt::format("no value of {} in {} … {} passes every constraint", sizing.path,
                               shown(sizing, sizing.spec.lower), shown(sizing, sizing.spec.upper)));
  }
  std::string scenarios;
  for (const auto& s : sizing.scenarios) scenarios += (scenarios.empty() ? "" : ", ") + s;
  report.facts({{"sized", sizing.path},
                {"range searched", fmt::format("{} … {}", shown(sizing, sizing.spec.lower), shown(sizing, sizing.spec.upper))},
                {"each value judged at", sizing.spread_text},
                {"accuracy", accuracy_text(sizing.accuracy)},
                {"fault scenarios", scenarios.empty() ? "none" : scenarios},
                {"values evaluated", std::to_string(sizing.points.size())},
                {"simulations", std::to_string(sizing.runs)}});
  std::vector<std::string> notes = sizing.notes;
  for (const auto& failure : sizing.solver_failures) notes.push_back("solver failure: " + failure);
  if (!notes.empty()) report.list(notes);
}

void add_boundaries(HtmlReport& report, const Sizing& sizing) {
  if (sizing.boundaries.empty()) return;
  ReportTable table;
  table.id = "boundaries";
  table.caption = "Where each constraint starts or stops holding (Brent's method on log value)";
  table.columns = {"constraint", "side", "boundary", "binding point"};
  table.numeric_columns = {2};
  for (const auto& b : sizing.boundaries) {
    table.rows.push_back({sizing.constraints[b.constraint], b.lower ? "holds above" : "holds below",
                          shown(sizing, b.value), b.where});
  }
  report.table(table);
}

void add_margin_plots(HtmlReport& report, const Sizing& sizing) {
  report.section("Margins against the value", "margins");
  report.note("Each plot shows a constraint's worst margin over the counted points and scenarios, relative to its "
              "bound (above zero passes), at every value evaluated; the shaded band is the feasible window.");
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    Series series;
    series.name = "margin";
    series.dash = "none";
    for (const auto& point : sizing.points) {
      const double margin = margin_of(point, c);
      if (std::isnan(margin)) continue;
      series.x.push_back(point.value);
      series.y.push_back(margin * 100.0);
    }
    if (series.x.size() < 2) continue;
    PlotSpec plot;
    plot.title = sizing.constraints[c];
    plot.x_label = sizing.path;
    plot.x_unit = sizing.unit;
    plot.y_label = "margin";
    plot.y_unit = "%";
    plot.height = 260;
    plot.x_range = Range{sizing.spec.lower, sizing.spec.upper};  // every plot over the whole range searched
    plot.series.push_back(std::move(series));
    plot.reference_lines.push_back({0.0, "bound"});
    if (sizing.feasible()) plot.bands.push_back({sizing.lower, sizing.upper, "feasible"});
    report.line_plot(plot);
  }
}

void add_candidates(HtmlReport& report, const Sizing& sizing) {
  if (sizing.candidates.empty()) return;
  report.section("Catalogue", "catalogue");
  ReportTable table;
  table.id = "candidates";
  table.caption = fmt::format("Candidates from {}, ranked by their smallest margin", sizing.spec.catalogue);
  table.columns = {"rank", "candidate", "kind", "resistance", "smallest margin", "constraint", "where", "result"};
  table.numeric_columns = {0, 3, 4};
  for (std::size_t i = 0; i < sizing.candidates.size(); ++i) {
    const CandidateResult& c = sizing.candidates[i];
    table.rows.push_back({std::to_string(i + 1), c.name, c.kind, shown(sizing, c.point.value), percent(c.smallest_margin),
                          c.binding ? sizing.constraints[*c.binding] : "-", c.binding ? c.point.worst[*c.binding] : "-",
                          c.pass() ? "pass" : fmt::format("FAIL ({} constraints)", c.failed)});
    table.row_tones.push_back(c.pass() ? Tone::Pass : Tone::Fail);
  }
  report.table(table);
}

void add_matrix(HtmlReport& report, const DetectionMatrix& matrix, const std::string& id, const std::string& caption) {
  ReportTable table;
  table.id = id;
  table.caption = caption;
  table.columns = {"scenario", "expected", "actual", "attempt", "fault at", "result"};
  table.numeric_columns = {3, 4};
  for (const auto& row : matrix.rows) {
    const std::string result = !row.applicable ? "not applicable" : row.pass ? "pass" : "FAIL";
    table.rows.push_back({row.scenario, row.expected_word(), row.actual_word(),
                          row.applicable ? fmt::format("{} of {}", row.attempt, row.attempts) : "-",
                          std::isnan(row.detection_time) ? "-" : display_seconds(row.detection_time), result});
    table.row_tones.push_back(!row.applicable ? Tone::Plain : row.pass ? Tone::Pass : Tone::Fail);
  }
  report.table(table);
}

void add_verification(HtmlReport& report, const Sizing& sizing) {
  report.section("Chosen design and its verification", "verification");
  if (!sizing.choice) {
    report.paragraph("Nothing was chosen: no value in the range and no candidate passes every constraint.");
    return;
  }
  const SizingChoice& choice = *sizing.choice;
  report.verdict(choice.verified() ? Tone::Pass : Tone::Fail,
                 fmt::format("{} with its BMS window: {}", choice.label, choice.verified() ? "verified" : "not verified"));
  report.paragraph(fmt::format("Chosen as {}.", choice.why));
  if (!choice.verified_run) {
    report.paragraph(choice.window_skipped);
    return;
  }
  add_matrix(report, choice.matrix, "faults-case-window", "Fault scenarios with the case's own BMS window");
  if (!choice.window) {
    report.paragraph(choice.window_skipped);
    return;
  }
  const FaultWindow& w = *choice.window;
  if (!w.problems.empty()) {
    report.list(w.problems);
    return;
  }
  report.facts({{"recommended minimum time", display_seconds(w.minimum_time)},
                {"recommended timeout", display_seconds(w.timeout)},
                {"fastest to the closing level", display_seconds(w.fastest)},
                {"slowest decision to close", display_seconds(w.slowest)},
                {"margin", fmt::format("{:g} %", w.margin * 100.0)}});
  add_matrix(report, w.matrix, "faults-recommended-window", "Fault scenarios with the recommended BMS window");
}

}  // namespace

std::string sizing_report_html(const Sizing& sizing) {
  HtmlReport report(sizing.title.empty() ? "Resistor sizing" : "Resistor sizing: " + sizing.title,
                    fmt::format("linkrise size {}", sizing.case_file));
  add_overview(report, sizing);
  add_boundaries(report, sizing);
  add_margin_plots(report, sizing);
  add_candidates(report, sizing);
  add_verification(report, sizing);
  report.safety_section();
  return report.html();
}

}  // namespace linkrise::app
