#include "app/report/report_html.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/output/text_format.h"
#include "app/report/measured_plots.h"
#include "linkrise/version.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {

// Our own light style. No '<', '>' or '&' in here, so the <style> text stays valid XML character data.
constexpr const char* style_sheet = R"css(
:root { color-scheme: light; }
body { margin: 0; background: #efece5; color: #262626; font-family: system-ui, "DejaVu Sans", sans-serif;
  font-size: 15px; line-height: 1.45; }
.page { max-width: 780px; margin: 0 auto; padding: 22px 30px 36px; background: #fcfbf8; }
header.top { border-bottom: 3px solid #1d4e89; padding-bottom: 10px; }
h1 { font-size: 22px; margin: 0 0 4px; font-weight: 650; }
.subtitle { color: #555555; font-size: 13px; margin: 0; overflow-wrap: anywhere; }
nav.contents { font-size: 13px; margin: 12px 0 0; }
nav.contents ol { margin: 4px 0 0; padding-left: 22px; columns: 2; }
nav.contents a { color: #1d4e89; }
.contents-title { font-weight: 600; }
section { margin-top: 26px; }
h2 { font-size: 17px; margin: 0 0 8px; border-bottom: 1px solid #d9d4c7; padding-bottom: 3px; }
p { margin: 6px 0; }
p.note { font-size: 12.5px; color: #555555; }
figure { margin: 14px 0; }
figure svg { display: block; max-width: 100%; height: auto; border: 1px solid #e6e3dc; }
figcaption { font-size: 12.5px; color: #555555; margin-top: 4px; }
table { border-collapse: collapse; width: 100%; font-size: 13.5px; margin: 8px 0 14px; }
caption { text-align: left; font-weight: 600; padding-bottom: 4px; }
th { text-align: left; border-bottom: 2px solid #6f6f6f; padding: 4px 6px; font-weight: 600; }
td { border-bottom: 1px solid #e6e3dc; padding: 3px 6px; vertical-align: top; }
th.number, td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.fail td { background: #f6e4e1; font-weight: 600; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 18px; margin: 6px 0; font-size: 14px; }
dl.facts dt { color: #555555; }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
.verdict { border: 2px solid #6f6f6f; padding: 8px 12px; margin: 10px 0; font-weight: 650; font-size: 16px; }
.verdict.pass { border-color: #2f7d4f; background: #e8f1ea; }
.verdict.fail { border: 5px double #9a3b3b; background: #f6e4e1; }
.caution { border-left: 6px solid #8c6d1f; background: #f5eedd; padding: 10px 14px; margin: 8px 0; }
footer { margin-top: 30px; padding-top: 8px; border-top: 1px solid #d9d4c7; font-size: 12px; color: #555555; }
@media print {
  body { background: #ffffff; }
  .page { max-width: none; padding: 0; }
  figure, table, .caution { break-inside: avoid; }
  nav.contents { display: none; }
}
)css";

bool contains(const std::vector<int>& list, int value) {
  return std::find(list.begin(), list.end(), value) != list.end();
}

}  // namespace

// ---------------------------------------------------------------------------------------------------------
// HtmlReport

HtmlReport::HtmlReport(std::string title, std::string subtitle)
    : title_(std::move(title)), subtitle_(std::move(subtitle)) {}

void HtmlReport::close_section() {
  if (in_section_) body_ += "</section>\n";
  in_section_ = false;
}

void HtmlReport::section(const std::string& heading, const std::string& id) {
  close_section();
  std::string wanted = id.empty() ? fmt::format("section-{}", contents_.size() + 1) : id;
  body_ += fmt::format("<section id=\"{}\">\n<h2>{}</h2>\n", escape_xml(wanted), escape_xml(heading));
  contents_.emplace_back(wanted, heading);
  in_section_ = true;
}

void HtmlReport::paragraph(const std::string& text) { body_ += fmt::format("<p>{}</p>\n", escape_xml(text)); }

void HtmlReport::note(const std::string& text) { body_ += fmt::format("<p class=\"note\">{}</p>\n", escape_xml(text)); }

void HtmlReport::list(const std::vector<std::string>& items) {
  if (items.empty()) return;
  body_ += "<ul>\n";
  for (const auto& item : items) body_ += fmt::format("<li>{}</li>\n", escape_xml(item));
  body_ += "</ul>\n";
}

void HtmlReport::facts(const std::vector<std::pair<std::string, std::string>>& items) {
  if (items.empty()) return;
  body_ += "<dl class=\"facts\">\n";
  for (const auto& [label, value] : items) {
    body_ += fmt::format("<dt>{}</dt><dd>{}</dd>\n", escape_xml(label), escape_xml(value));
  }
  body_ += "</dl>\n";
}

void HtmlReport::table(const ReportTable& table) {
  body_ += table.id.empty() ? std::string("<table>\n") : fmt::format("<table id=\"{}\">\n", escape_xml(table.id));
  if (!table.caption.empty()) body_ += fmt::format("<caption>{}</caption>\n", escape_xml(table.caption));
  const auto cell_class = [&](int column) {
    return contains(table.numeric_columns, column) ? std::string(" class=\"number\"") : std::string();
  };
  body_ += "<thead><tr>";
  for (std::size_t c = 0; c < table.columns.size(); ++c) {
    body_ += fmt::format("<th{}>{}</th>", cell_class(static_cast<int>(c)), escape_xml(table.columns[c]));
  }
  body_ += "</tr></thead>\n<tbody>\n";
  for (std::size_t r = 0; r < table.rows.size(); ++r) {
    const Tone tone = r < table.row_tones.size() ? table.row_tones[r] : Tone::Plain;
    body_ += tone == Tone::Pass ? "<tr class=\"pass\">" : tone == Tone::Fail ? "<tr class=\"fail\">" : "<tr>";
    for (std::size_t c = 0; c < table.rows[r].size(); ++c) {
      body_ += fmt::format("<td{}>{}</td>", cell_class(static_cast<int>(c)), escape_xml(table.rows[r][c]));
    }
    body_ += "</tr>\n";
  }
  body_ += "</tbody>\n</table>\n";
}

std::string HtmlReport::next_figure_id() { return fmt::format("figure-{}", ++figures_); }

void HtmlReport::line_plot(PlotSpec spec, const std::string& caption) {
  if (spec.id.empty()) spec.id = next_figure_id();
  body_ += "<figure class=\"plot\">\n" + render_line_plot(spec);
  if (!caption.empty()) body_ += fmt::format("<figcaption>{}</figcaption>\n", escape_xml(caption));
  body_ += "</figure>\n";
}

void HtmlReport::histogram(HistogramSpec spec, const std::string& caption) {
  if (spec.id.empty()) spec.id = next_figure_id();
  body_ += "<figure class=\"plot\">\n" + render_histogram(spec);
  if (!caption.empty()) body_ += fmt::format("<figcaption>{}</figcaption>\n", escape_xml(caption));
  body_ += "</figure>\n";
}

void HtmlReport::verdict(Tone tone, const std::string& text) {
  const char* word = tone == Tone::Pass ? "PASS" : tone == Tone::Fail ? "FAIL" : "NOTE";
  const char* kind = tone == Tone::Pass ? "pass" : tone == Tone::Fail ? "fail" : "plain";
  body_ += fmt::format("<p class=\"verdict {}\">{} \u2014 {}</p>\n", kind, word, escape_xml(text));
}

void HtmlReport::safety_section() {
  section("Safety", "safety");
  caution(safety_caution());
}

void HtmlReport::caution(const std::string& text) {
  body_ += fmt::format("<p class=\"caution\">{}</p>\n", escape_xml(text));
}

std::string HtmlReport::html() const {
  std::string out;
  out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n";
  // Nothing may be fetched: the page must look the same offline as online.
  out += "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'\"/>\n";
  out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n";
  out += fmt::format("<meta name=\"generator\" content=\"linkrise {}\"/>\n", kVersion);
  out += fmt::format("<title>{}</title>\n<style>{}</style>\n</head>\n<body>\n<div class=\"page\">\n",
                     escape_xml(title_), style_sheet);
  out += fmt::format("<header class=\"top\">\n<h1>{}</h1>\n", escape_xml(title_));
  if (!subtitle_.empty()) out += fmt::format("<p class=\"subtitle\">{}</p>\n", escape_xml(subtitle_));
  out += "</header>\n";
  if (contents_.size() > 1) {
    out += "<nav class=\"contents\">\n<span class=\"contents-title\">Contents</span>\n<ol>\n";
    for (const auto& [id, heading] : contents_) {
      out += fmt::format("<li><a href=\"#{}\">{}</a></li>\n", escape_xml(id), escape_xml(heading));
    }
    out += "</ol>\n</nav>\n";
  }
  out += "<main>\n" + body_;
  if (in_section_) out += "</section>\n";
  out += "</main>\n";
  out += fmt::format(
      "<footer>Written by linkrise {}. The report carries no timestamp: the same input and version give the "
      "same file, byte for byte. Self-contained: no scripts, fonts or images are loaded.</footer>\n",
      kVersion);
  out += "</div>\n</body>\n</html>\n";
  return out;
}

// ---------------------------------------------------------------------------------------------------------
// Choosing what to plot

namespace {

// Voltage between two nodes, sample by sample; ground (or an empty name) is 0 V.
std::vector<double> pair_voltage(const solver::Circuit& circuit, const solver::Waveform& waveform,
                                 const NodePair& pair) {
  const auto column_of = [&](const std::string& node) {
    if (node.empty() || node == circuit.spec().ground) return -2;  // ground
    return waveform.column(node);
  };
  const int plus = column_of(pair.plus);
  const int minus = column_of(pair.minus);
  if (plus == -1 || minus == -1) return {};
  std::vector<double> values(waveform.row_count());
  for (std::size_t r = 0; r < waveform.row_count(); ++r) {
    values[r] = (plus >= 0 ? waveform.value(r, plus) : 0.0) - (minus >= 0 ? waveform.value(r, minus) : 0.0);
  }
  return values;
}

std::string column_unit(const solver::Waveform& waveform, int column) {
  const std::string& header = waveform.headers()[column];
  const auto open = header.rfind('[');
  const auto close = header.rfind(']');
  if (open == std::string::npos || close == std::string::npos || close < open) return "";
  return header.substr(open + 1, close - open - 1);
}

std::string pair_text(const NodePair& pair) { return fmt::format("{} \u2212 {}", pair.plus, pair.minus); }

}  // namespace

SensedVoltages sensed_voltages(const solver::Circuit& circuit, const SequenceHints& hints) {
  SensedVoltages sensed;
  sensed.pack = hints.pack;
  sensed.link = hints.link;
  if (const auto& sequence = circuit.spec().sequence) {
    if (!sensed.pack) sensed.pack = sequence->pack;
    if (!sensed.link) sensed.link = sequence->link;
  }
  std::vector<std::string> chosen;
  if (sensed.pack || sensed.link) chosen.push_back("the sequence block's sensed nodes");
  bool from_parts = false;
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    if (!sensed.pack && part.role() == models::Role::Source) {
      sensed.pack = NodePair{part.nodes()[0], part.nodes()[1]};
      from_parts = true;
    }
    if (!sensed.link && part.role() == models::Role::Storage) {
      sensed.link = NodePair{part.nodes()[0], part.nodes()[1]};
      from_parts = true;
    }
  }
  if (from_parts) chosen.push_back("the nodes of the first source part (pack) and the first capacitor (link)");
  sensed.origin = chosen.empty() ? "no pack or link voltage could be identified"
                                 : "Voltages read across " + fmt::format("{}", fmt::join(chosen, " and ")) + ".";
  return sensed;
}

namespace {
// First open -> closed step of a part's "closed" signal, between consecutive rows.
std::optional<double> first_closing(const solver::Waveform& waveform, const std::string& part) {
  const int closed = waveform.column(part + ".closed");
  if (closed < 0) return std::nullopt;
  for (std::size_t r = 1; r < waveform.row_count(); ++r) {
    if (waveform.value(r - 1, closed) < 0.5 && waveform.value(r, closed) >= 0.5) return waveform.time(r);
  }
  return std::nullopt;
}

struct Contactor {
  int part;
  int current;
  int closed;
};

// Contactors with both a current and a "closed" column in the waveform.
std::vector<Contactor> contactor_columns(const solver::Circuit& circuit, const solver::Waveform& waveform) {
  std::vector<Contactor> contactors;
  for (int p = 0; p < circuit.part_count(); ++p) {
    if (circuit.part(p).role() != models::Role::Switch) continue;
    const std::string& name = circuit.part(p).name();
    const int current = waveform.column(name + ".current");
    const int closed = waveform.column(name + ".closed");
    if (current >= 0 && closed >= 0) contactors.push_back({p, current, closed});
  }
  return contactors;
}

struct Closing {
  std::size_t row;
  const Contactor* contactor;
};

// Every closing (open -> closed between consecutive rows), in time order; `largest` gets the largest contactor
// current of the run.
std::vector<Closing> closings_in_order(const solver::Waveform& waveform, const std::vector<Contactor>& contactors,
                                       double& largest) {
  std::vector<Closing> closings;
  largest = 0.0;
  for (const auto& c : contactors) {
    for (std::size_t r = 1; r < waveform.row_count(); ++r) {
      largest = std::max(largest, std::fabs(waveform.value(r, c.current)));
      if (waveform.value(r - 1, c.closed) < 0.5 && waveform.value(r, c.closed) >= 0.5) closings.push_back({r, &c});
    }
  }
  std::stable_sort(closings.begin(), closings.end(),
                   [](const Closing& a, const Closing& b) { return a.row < b.row; });
  return closings;
}

// The contactor a closing bypasses: another closed contactor that conducted before the closing and carries on
// average less than half of that current afterwards (over 1 % of the run); null when there is none. Open-contact
// leakage (below 1e-6 of the largest contactor current) does not count as conducting.
const Contactor* bypassed_by(const solver::Waveform& waveform, const std::vector<Contactor>& contactors,
                             const Closing& closing, double largest) {
  const std::size_t rows = waveform.row_count();
  const double run_span = waveform.time(rows - 1) - waveform.time(0);
  const double window_end = waveform.time(closing.row) + 0.01 * run_span;
  const Contactor* bypassed = nullptr;
  double smallest_ratio = 0.5;
  for (const auto& c : contactors) {
    if (&c == closing.contactor || waveform.value(closing.row - 1, c.closed) < 0.5) continue;
    const double before = std::fabs(waveform.value(closing.row - 1, c.current));
    if (!(before > 1e-6 * largest)) continue;
    // Time-weighted mean, so the short pulse while the link voltage settles does not hide the bypass.
    double area = 0.0;
    double span = 0.0;
    for (std::size_t r = closing.row + 1; r < rows && waveform.time(r) <= window_end; ++r) {
      const double dt = waveform.time(r) - waveform.time(r - 1);
      area += 0.5 * dt * (std::fabs(waveform.value(r - 1, c.current)) + std::fabs(waveform.value(r, c.current)));
      span += dt;
    }
    if (!(span > 0.0)) continue;
    const double after = area / span;
    if (after / before < smallest_ratio) {
      smallest_ratio = after / before;
      bypassed = &c;
    }
  }
  return bypassed;
}

// Without a main closure, the pre-charge contactor is the one whose closing made current flow: the last closing
// before the largest contactor current.
int precharge_without_main(const solver::Waveform& waveform, const std::vector<Contactor>& contactors,
                           const std::vector<Closing>& closings) {
  std::size_t peak_row = 0;
  double peak = -1.0;
  for (const auto& c : contactors) {
    for (std::size_t r = 0; r < waveform.row_count(); ++r) {
      if (std::fabs(waveform.value(r, c.current)) > peak) {
        peak = std::fabs(waveform.value(r, c.current));
        peak_row = r;
      }
    }
  }
  int precharge = -1;
  for (const Closing& closing : closings) {
    if (closing.row <= peak_row) precharge = closing.contactor->part;
  }
  return precharge;
}
}  // namespace

ContactorRoles contactor_roles(const solver::Circuit& circuit, const solver::Waveform& waveform,
                               const SequenceHints& hints) {
  ContactorRoles roles;
  if (!hints.main_contactor.empty() || !hints.precharge_contactor.empty()) {
    roles.main = hints.main_contactor.empty() ? -1 : circuit.find_part(hints.main_contactor);
    roles.precharge = hints.precharge_contactor.empty() ? -1 : circuit.find_part(hints.precharge_contactor);
    if (roles.main >= 0) roles.main_closed = first_closing(waveform, hints.main_contactor);
    return roles;
  }
  const std::vector<Contactor> contactors = contactor_columns(circuit, waveform);
  if (contactors.empty() || waveform.row_count() < 2) return roles;
  double largest = 0.0;
  const std::vector<Closing> closings = closings_in_order(waveform, contactors, largest);
  if (closings.empty()) return roles;
  // The main contactor is the first whose closing bypasses another one: the pre-charge path.
  for (const Closing& closing : closings) {
    if (const Contactor* bypassed = bypassed_by(waveform, contactors, closing, largest)) {
      roles.main = closing.contactor->part;
      roles.precharge = bypassed->part;
      roles.main_closed = waveform.time(closing.row);
      return roles;
    }
  }
  // No closing bypassed anything (the run ends before main closure).
  roles.precharge = precharge_without_main(waveform, contactors, closings);
  return roles;
}

// ---------------------------------------------------------------------------------------------------------
// The run report

namespace {

const solver::Waveform& plotted_waveform(const solver::Result& result) {
  return result.steps.row_count() > 0 ? result.steps : result.samples;
}

std::vector<Marker> timeline_markers(const std::vector<solver::TimelineEntry>& timeline) {
  std::vector<Marker> markers;
  for (const auto& entry : solver::collapse_repeats(timeline)) markers.push_back({entry.time, entry.event});
  return markers;
}

// A plot against time with a marker at every timeline event.
PlotSpec time_plot(const std::string& title, const std::string& y_label, const std::string& y_unit,
                   const solver::Result& result) {
  PlotSpec plot;
  plot.title = title;
  plot.x_label = "time";
  plot.x_unit = "s";
  plot.y_label = y_label;
  plot.y_unit = y_unit;
  plot.markers = timeline_markers(result.timeline);
  return plot;
}

// Resistive parts that take the pre-charge heat (role resistive: resistors and thermistors, not contactors,
// cables, sources or loads), dissipating at least 5 % of the largest such heat (so a bleed resistor across the
// link does not crowd the plot).
std::vector<int> heated_resistors(const solver::Circuit& circuit, const analysis::EnergyAudit& audit,
                                  const SequenceHints& hints) {
  if (!hints.precharge_resistor.empty() && circuit.find_part(hints.precharge_resistor) >= 0) {
    return {circuit.find_part(hints.precharge_resistor)};
  }
  std::vector<int> parts;
  double largest = 0.0;
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    if (!part.power_channels().heat || part.role() != models::Role::Resistive) continue;
    parts.push_back(p);
    largest = std::max(largest, audit.parts[p].dissipated);
  }
  std::erase_if(parts, [&](int p) { return audit.parts[p].dissipated < 0.05 * largest; });
  return parts;
}

Series make_series(std::string name, std::vector<double> x, std::vector<double> y) {
  Series series;
  series.name = std::move(name);
  series.x = std::move(x);
  series.y = std::move(y);
  return series;
}

Series column_series(const solver::Waveform& waveform, int column, std::string name) {
  return make_series(std::move(name), waveform.times(), waveform.series(column));
}

double peak_abs(const std::vector<double>& values) {
  double peak = 0.0;
  for (double v : values) peak = std::max(peak, std::fabs(v));
  return peak;
}

// Window after main closure that holds the current pulse: from closure until the main current last differs
// from its end-of-run value by more than 5 % of the pulse, stretched by half again so the tail shows.
Range closure_window(const solver::Waveform& waveform, int current_column, double closed_at) {
  const std::size_t rows = waveform.row_count();
  const double end_value = waveform.value(rows - 1, current_column);
  double pulse = 0.0;
  for (std::size_t r = 0; r < rows; ++r) {
    if (waveform.time(r) >= closed_at) pulse = std::max(pulse, std::fabs(waveform.value(r, current_column) - end_value));
  }
  double settled = closed_at;
  for (std::size_t r = 0; r < rows; ++r) {
    if (waveform.time(r) >= closed_at && std::fabs(waveform.value(r, current_column) - end_value) > 0.05 * pulse) {
      settled = waveform.time(r);
    }
  }
  const double run_span = waveform.time(rows - 1) - waveform.time(0);
  double span = std::max(1.5 * (settled - closed_at), 1e-4 * run_span);
  const double high = std::min(closed_at + span, waveform.time(rows - 1));
  return {closed_at - 0.1 * (high - closed_at), high};
}

std::string outcome_text(const solver::Result& result) {
  switch (result.outcome) {
    case solver::Outcome::Completed: return "completed";
    case solver::Outcome::SupervisorFinished: return "sequence finished";
    case solver::Outcome::SolverFailure: return "solver failure: " + result.message;
  }
  return "unknown";
}

void add_overview(HtmlReport& report, const RunReportInput& input, const SensedVoltages& sensed) {
  const auto& result = input.result;
  report.section("Overview", "overview");
  if (input.assessment) {
    const Assessment& assessment = *input.assessment;
    int judged = 0;
    int failed = 0;
    for (const auto& row : assessment.rows) {
      judged += row.judged ? 1 : 0;
      failed += row.judged && !row.pass ? 1 : 0;
    }
    const bool pass = assessment.verdict != "fail" && failed == 0 && assessment.failures.empty();
    std::string text = judged == 0 ? std::string("no limit was judged (the case sets none)")
                                   : fmt::format("{} of {} judged limits met", judged - failed, judged);
    if (assessment.verdict != "pass" && assessment.verdict != "fail") text = assessment.verdict + "; " + text;
    report.verdict(pass ? Tone::Pass : Tone::Fail, text);
    report.list(assessment.failures);
  }
  std::vector<std::pair<std::string, std::string>> facts = {
      {"case file", input.circuit.spec().file},
      {"outcome", fmt::format("{} at t = {}", outcome_text(result), display_si(result.end_time, "s"))},
      {"parts", fmt::format("{}", input.circuit.part_count())},
      {"solver", fmt::format("CVODE BDF, {} steps, {} events, rtol {:g}", result.statistics.steps,
                             result.statistics.events, input.circuit.spec().run.relative_tolerance)},
  };
  const SequenceHints& hints = input.sequence;
  if (!hints.outcome.empty()) {
    facts.emplace_back("sequence", fmt::format("{} after {} attempt{}", hints.outcome, hints.attempts,
                                               hints.attempts == 1 ? "" : "s"));
  }
  if (!hints.rule_text.empty()) facts.emplace_back("closing rule", hints.rule_text);
  if (sensed.pack) facts.emplace_back("pack voltage", pair_text(*sensed.pack));
  if (sensed.link) facts.emplace_back("link voltage", pair_text(*sensed.link));
  report.facts(facts);
  report.note(sensed.origin);
}

void add_timeline(HtmlReport& report, const solver::Result& result) {
  report.section("Sequence timeline", "timeline-section");
  if (result.timeline.empty()) {
    report.paragraph("No switching events or decisions were recorded.");
    return;
  }
  ReportTable table;
  table.id = "timeline";
  table.columns = {"#", "time", "event", "reason"};
  table.numeric_columns = {0, 1};
  const auto lines = solver::collapse_repeats(result.timeline);
  for (std::size_t i = 0; i < lines.size(); ++i) {
    const auto& entry = lines[i];
    const std::string event = entry.count > 1 ? fmt::format("{} (×{})", entry.event, entry.count) : entry.event;
    table.rows.push_back({fmt::format("{}", i + 1), display_si(entry.time, "s"), event, entry.reason});
  }
  report.table(table);
}

void add_voltage_plot(HtmlReport& report, const RunReportInput& input, const SensedVoltages& sensed,
                      const solver::Waveform& waveform) {
  report.section("Pack and link voltage", "voltages");
  PlotSpec plot = time_plot("Pack and link voltage", "voltage", "V", input.result);
  std::vector<double> pack;
  if (sensed.pack) pack = pair_voltage(input.circuit, waveform, *sensed.pack);
  if (!pack.empty()) plot.series.push_back(make_series("pack (" + pair_text(*sensed.pack) + ")", waveform.times(), pack));
  if (sensed.link) {
    std::vector<double> link = pair_voltage(input.circuit, waveform, *sensed.link);
    if (!link.empty()) plot.series.push_back(make_series("link (" + pair_text(*sensed.link) + ")", waveform.times(), link));
  }
  std::string caption = "Dashed vertical lines mark the timeline events.";
  const SequenceHints& hints = input.sequence;
  if ((hints.closing_ratio || hints.closing_difference) && !pack.empty()) {
    std::vector<double> level = pack;
    for (double& v : level) v = hints.closing_ratio ? *hints.closing_ratio * v : v - *hints.closing_difference;
    const std::string name = hints.closing_ratio
                                 ? fmt::format("closing level ({:g} % of pack)", 100.0 * *hints.closing_ratio)
                                 : "closing level (pack − " + display_si(*hints.closing_difference, "V") + ")";
    plot.series.push_back(make_series(name, waveform.times(), level));
  }
  if (input.closing_threshold) {
    plot.reference_lines.push_back({*input.closing_threshold,
                                    "closing threshold " + display_si(*input.closing_threshold, "V")});
    caption += " The dash-dot horizontal line is the closing threshold.";
  }
  if (plot.series.empty()) {
    report.paragraph("No pack or link voltage could be identified in this case.");
    return;
  }
  report.line_plot(plot, caption);
}

void add_current_plots(HtmlReport& report, const RunReportInput& input, const solver::Waveform& waveform) {
  report.section("Contactor currents", "currents");
  const ContactorRoles roles = contactor_roles(input.circuit, waveform, input.sequence);
  PlotSpec plot = time_plot("Pre-charge and main contactor current", "current", "A", input.result);
  const auto add = [&](int part, const std::string& role) {
    if (part < 0) return;
    const std::string& name = input.circuit.part(part).name();
    const int column = waveform.column(name + ".current");
    if (column >= 0) plot.series.push_back(column_series(waveform, column, fmt::format("{} ({})", name, role)));
  };
  add(roles.precharge, "pre-charge");
  add(roles.main, "main");
  if (plot.series.empty()) {
    report.paragraph("The case has no contactor that conducts, so there are no contactor currents to plot.");
    return;
  }
  const bool named = !input.sequence.main_contactor.empty() || !input.sequence.precharge_contactor.empty();
  report.line_plot(plot, named ? "Current entering each contactor's first node; the roles are named by the case's "
                                 "sequence block."
                               : "Current entering each contactor's first node. The roles are read from the "
                                 "waveform: the main contactor is the first whose closing bypasses another closed "
                                 "contactor, the pre-charge contactor.");
  if (!roles.main_closed || roles.main < 0) {
    report.note("No main closure was found, so there is no closure close-up.");
    return;
  }
  const int main_column = waveform.column(input.circuit.part(roles.main).name() + ".current");
  PlotSpec zoom = plot;
  zoom.title = "Close-up at main closure";
  zoom.x_range = closure_window(waveform, main_column, *roles.main_closed);
  const std::vector<double> main_current = waveform.series(main_column);
  report.line_plot(zoom, fmt::format("Main closure at t = {}; peak main current {}.",
                                     display_si(*roles.main_closed, "s"),
                                     display_si(peak_abs(main_current), "A")));
}

void add_resistor_plots(HtmlReport& report, const RunReportInput& input, const solver::Waveform& waveform) {
  const std::vector<int> resistors = heated_resistors(input.circuit, input.audit, input.sequence);
  if (resistors.empty()) return;
  report.section("Pre-charge resistor", "resistor");
  PlotSpec power = time_plot("Resistor heat power", "heat power", "W", input.result);
  PlotSpec temperature = time_plot("Resistor temperature", "temperature", "degC", input.result);
  std::vector<std::string> notes;
  for (int p : resistors) {
    const std::string& name = input.circuit.part(p).name();
    const int power_column = waveform.column(name + ".heat_power");
    if (power_column >= 0) {
      power.series.push_back(column_series(waveform, power_column, name));
      notes.push_back(fmt::format("{}: peak {}, heat {}", name,
                                  display_si(peak_abs(power.series.back().y), "W"),
                                  display_si(input.audit.parts[p].dissipated, "J")));
    }
    const int temperature_column = waveform.column(name + ".temperature");
    if (temperature_column >= 0) {
      temperature.y_unit = column_unit(waveform, temperature_column);
      temperature.series.push_back(column_series(waveform, temperature_column, name));
    }
  }
  if (!power.series.empty()) {
    report.line_plot(power, fmt::format("Power dissipated in the resistive parts that take the pre-charge heat ({}).",
                                        fmt::join(notes, "; ")));
  }
  if (!temperature.series.empty()) {
    std::vector<std::string> peaks;
    for (const auto& s : temperature.series) {
      double hottest = -std::numeric_limits<double>::infinity();
      for (double v : s.y) hottest = std::max(hottest, v);
      peaks.push_back(fmt::format("{}: peak {}", s.name, display_si(hottest, temperature.y_unit)));
    }
    report.line_plot(temperature, fmt::format("Temperature of the resistive element ({}).", fmt::join(peaks, "; ")));
  } else {
    report.note("This case models no resistor temperature (no thermal parameters), so only power is shown.");
  }
}

void add_limits(HtmlReport& report, const RunReportInput& input) {
  report.section("Metrics, limits and verdict", "limits-section");
  if (!input.assessment) {
    report.paragraph("No metrics were judged against limits in this run.");
    return;
  }
  const Assessment& assessment = *input.assessment;
  if (assessment.rows.empty()) {
    report.paragraph("Verdict: " + assessment.verdict + ". The case sets no limits and its parts declare no ratings.");
  } else {
    ReportTable table;
    table.id = "limits";
    table.columns = {"metric", "value", "limit", "margin", "from", "result"};
    table.numeric_columns = {1, 3};
    for (const auto& row : assessment.rows) {
      const std::string result = !row.judged ? "not judged" : row.pass ? "pass" : "FAIL";
      table.rows.push_back({row.metric, display_metric(row.value, row.unit), row.bound,
                            row.judged ? display_metric(row.margin, row.margin_unit) : "-", row.source, result});
      table.row_tones.push_back(!row.judged ? Tone::Plain : row.pass ? Tone::Pass : Tone::Fail);
    }
    report.table(table);
    report.note("Margin is the distance from the value to the limit, positive inside it. A metric the run did not "
                "reach (\"-\") is not judged; the sequence outcome judges that run.");
  }
  if (!assessment.metrics.empty()) {
    ReportTable metrics;
    metrics.id = "metrics";
    metrics.caption = "All metrics of the run";
    metrics.columns = {"metric", "value", "definition"};
    metrics.numeric_columns = {1};
    for (const auto& metric : assessment.metrics) {
      metrics.rows.push_back({metric.name, display_metric(metric.value, metric.unit), metric.definition});
    }
    report.table(metrics);
  }
}

void add_energy(HtmlReport& report, const RunReportInput& input) {
  const auto& audit = input.audit;
  report.section("Energy audit", "energy-section");
  report.paragraph("Energy delivered by the sources equals the heat dissipated, plus the energy taken by loads, "
                   "plus the change of stored energy. Each term is integrated by the solver as a state, so the "
                   "residual measures the solver's accuracy.");
  ReportTable totals;
  totals.id = "energy";
  totals.columns = {"term", "energy"};
  totals.numeric_columns = {1};
  totals.rows = {
      {"delivered by sources", display_si(audit.delivered, "J")},
      {"dissipated as heat", display_si(audit.dissipated, "J")},
      {"taken by loads", display_si(audit.to_loads, "J")},
      {"change of stored energy", display_si(audit.stored_change, "J")},
      {"stored by fast states settled at a switching", display_si(audit.settled, "J")},
      {"residual", display_si(audit.residual, "J")},
      {"residual relative to the largest term", fmt::format("{:.2e}", audit.relative_residual)},
  };
  report.table(totals);

  const auto& circuit = input.circuit;
  const solver::Waveform& waveform = plotted_waveform(input.result);
  ReportTable parts;
  parts.id = "parts";
  parts.caption = "Per part";
  parts.columns = {"part",  "kind",        "peak |I|", "peak heat power", "peak |P| into storage",
                   "heat",  "from source", "to load",  "stored at end"};
  parts.numeric_columns = {2, 3, 4, 5, 6, 7, 8};
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    const auto channels = part.power_channels();
    const auto& energy = audit.parts[p];
    const int current = waveform.column(part.name() + ".current");
    // Heat and the power into stored energy apart (a cable's terminal power is mostly its inductance's).
    const int heat_power = waveform.column(part.name() + ".heat_power");
    const int stored_power = waveform.column(part.name() + ".stored_power");
    parts.rows.push_back({
        part.name(), part.kind(),
        current >= 0 ? display_si(peak_abs(waveform.series(current)), "A") : "-",
        heat_power >= 0 ? display_si(peak_abs(waveform.series(heat_power)), "W") : "-",
        stored_power >= 0 ? display_si(peak_abs(waveform.series(stored_power)), "W") : "-",
        channels.heat ? display_si(energy.dissipated, "J") : "-",
        channels.source ? display_si(energy.delivered, "J") : "-",
        channels.load ? display_si(energy.to_load, "J") : "-",
        energy.stored_start != 0.0 || energy.stored_end != 0.0 ? display_si(energy.stored_end, "J") : "-",
    });
  }
  report.table(parts);

  ReportTable derived;
  derived.id = "derived";
  derived.caption = "Values the parts derived from their inputs";
  derived.columns = {"part", "quantity", "value", "how"};
  derived.numeric_columns = {2};
  for (int p = 0; p < circuit.part_count(); ++p) {
    for (const auto& value : circuit.part(p).derived_values()) {
      derived.rows.push_back({circuit.part(p).name(), value.name, display_si(value.value, value.unit), value.origin});
    }
  }
  if (!derived.rows.empty()) report.table(derived);
}

}  // namespace

void add_evaluation(RunReportInput& input, const analysis::Evaluation& evaluation,
                    const solver::SequenceReport* sequence) {
  Assessment assessment;
  assessment.verdict = analysis::verdict_word(evaluation.verdict());
  assessment.failures = evaluation.failures;
  for (const auto& limit : evaluation.limits) {
    LimitRow row;
    row.metric = limit.metric;
    row.value = limit.value;
    row.unit = limit.unit;
    row.bound = (limit.bound == analysis::BoundSide::Minimum ? "\u2265 " : "\u2264 ") + display_metric(limit.limit, limit.unit);
    if (limit.required_margin > 0.0) row.bound += fmt::format(" with {:g} % margin", 100.0 * limit.required_margin);
    row.margin = limit.margin;
    row.margin_unit = limit.margin_unit;
    row.pass = limit.pass;
    row.judged = limit.judged;
    row.source = limit.source;
    if (!limit.origin.empty()) row.source += "; " + limit.origin;
    if (!limit.detail.empty()) row.source += " — " + limit.detail;
    assessment.rows.push_back(row);
  }
  for (const auto& metric : evaluation.metrics.list()) {
    assessment.metrics.push_back({metric.name, metric.value, metric.unit, metric.definition});
  }
  input.assessment = std::move(assessment);
  if (sequence == nullptr) return;
  const netlist::SequenceSpec& spec = sequence->spec;
  SequenceHints& hints = input.sequence;
  hints.main_contactor = spec.main;
  hints.precharge_contactor = spec.precharge;
  hints.precharge_resistor = spec.resistor;
  hints.pack = NodePair{spec.pack.plus, spec.pack.minus};
  hints.link = NodePair{spec.link.plus, spec.link.minus};
  if (spec.rule == netlist::ClosingRule::Ratio) {
    hints.closing_ratio = spec.rule_value;
  } else {
    hints.closing_difference = spec.rule_value;
  }
  hints.rule_text = spec.rule_text();
  hints.outcome = netlist::outcome_word(sequence->outcome);
  hints.attempts = sequence->attempts;
}

std::string run_report_html(const RunReportInput& input) {
  HtmlReport report(input.circuit.spec().title.empty() ? "linkrise run" : input.circuit.spec().title,
                    "Pre-charge run report for " + input.circuit.spec().file);
  const SensedVoltages sensed = sensed_voltages(input.circuit, input.sequence);
  const solver::Waveform& waveform = plotted_waveform(input.result);
  add_overview(report, input, sensed);
  add_timeline(report, input.result);
  if (waveform.row_count() >= 2) {
    add_voltage_plot(report, input, sensed, waveform);
    add_current_plots(report, input, waveform);
    add_resistor_plots(report, input, waveform);
  }
  add_limits(report, input);
  add_energy(report, input);
  if (!input.measured.empty()) {
    report.section("Measured and simulated", "measured");
    report.paragraph(input.measured_source);
    add_measured_plots(report, input.measured);
  }
  report.safety_section();
  return report.html();
}

const char* safety_caution() {
  return "High-voltage caution: battery packs and DC links hold lethal voltage and energy. Work on them only as a "
         "qualified person, on de-energised circuits whose absence of voltage you have verified, with insulated "
         "tools and the required PPE. linkrise results are design aids: they defer to local codes, the applicable "
         "standards and licensed engineering practice, and never replace testing the real hardware.";
}

}  // namespace linkrise::app
