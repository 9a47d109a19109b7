#pragma once
// Self-contained HTML reports: one file with inline CSS and inline SVG plots, no scripts, no fonts or images
// fetched from anywhere (a Content-Security-Policy in the head forbids it), so a report attached to a design
// record opens offline years later. The document is XHTML-compatible (every element closed, attributes quoted,
// only the five XML entities) and byte-reproducible: no timestamp, no host or user name, fixed number formats.
//
// Two layers:
//  - HtmlReport: generic building blocks (section, paragraph, facts, table, line plot, histogram, verdict,
//    caution). Every command that writes a report (run; later faults, compare, sweeps, the spread study)
//    composes its page from these; see docs/report.md.
//  - run_report_html(): the report of one `linkrise run`.
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "app/report/svg_plot.h"
#include "netlist/case.h"
#include "netlist/sequence_spec.h"
#include "solver/circuit.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"
#include "solver/waveform.h"

namespace linkrise::app {

/// How a table row or verdict is marked. Pass/fail rows also carry the word in a cell, so the marking is
/// readable in grey-scale print; the colour only helps on screen.
enum class Tone { Plain, Pass, Fail };

struct ReportTable {
  std::string id;  // optional element id, unique in the page
  std::string caption;
  std::vector<std::string> columns;
  /// Indices of columns holding numbers: right-aligned with tabular figures.
  std::vector<int> numeric_columns;
  std::vector<std::vector<std::string>> rows;
  /// Optional, one per row (missing entries are Plain).
  std::vector<Tone> row_tones;
};

class HtmlReport {
 public:
  /// `title` becomes the <title> and the page heading; `subtitle` one line below it (e.g. the case file).
  HtmlReport(std::string title, std::string subtitle);

  /// Starts a section (closing the previous one); it is listed in the page's contents. `id` must be unique;
  /// empty derives "section-N".
  void section(const std::string& heading, const std::string& id = "");
  void paragraph(const std::string& text);
  /// Small muted text, e.g. how a plot's curves were chosen.
  void note(const std::string& text);
  /// A bulleted list.
  void list(const std::vector<std::string>& items);
  /// A two-column list of label/value pairs.
  void facts(const std::vector<std::pair<std::string, std::string>>& items);
  void table(const ReportTable& table);
  /// Plots get ids "figure-N" when their spec leaves the id empty, so ids never collide within a page.
  void line_plot(PlotSpec spec, const std::string& caption = "");
  void histogram(HistogramSpec spec, const std::string& caption = "");
  /// A prominent one-line outcome ("PASS — …"), boxed; fail is drawn with a heavier double border.
  void verdict(Tone tone, const std::string& text);
  /// The high-voltage caution box.
  void caution(const std::string& text);
  /// The closing "Safety" section with the high-voltage caution (safety_caution()) that every report ends with.
  void safety_section();

  /// The complete document.
  std::string html() const;

 private:
  void close_section();
  std::string next_figure_id();

  std::string title_;
  std::string subtitle_;
  std::string body_;
  std::vector<std::pair<std::string, std::string>> contents_;  // id, heading
  bool in_section_ = false;
  int figures_ = 0;
};

// ---------------------------------------------------------------------------------------------------------
// The run report.

/// One judged limit as the analyser reports it.
struct LimitRow {
  std::string metric;
  double value = 0.0;  // NaN: not reached in the run
  std::string unit;
  std::string bound;    // as displayed, e.g. "<= 500 ms"
  double margin = 0.0;  // in margin_unit; positive means inside the limit
  std::string margin_unit;  // the value's unit, K for a temperature (a difference)
  bool pass = true;
  bool judged = true;  // false: the metric was not reached, so the limit was not judged
  std::string source;  // e.g. "limits block", "rating of r_pre"
};

/// One metric of the run with its definition.
struct MetricRow {
  std::string name;
  double value = 0.0;  // NaN: not reached
  std::string unit;
  std::string definition;
};

/// Metrics judged against limits, with the overall verdict ("pass", "fail" or a sentence).
struct Assessment {
  std::vector<LimitRow> rows;
  std::string verdict;
  std::vector<std::string> failures;  // one line per reason the verdict failed
  std::vector<MetricRow> metrics;     // every metric of the run, judged or not
};

/// A voltage between two nodes; an empty `minus` (or the ground node) is ground.
using NodePair = netlist::NodePair;

/// Where pack and link voltage are read for the plots, and why those nodes.
struct SensedVoltages {
  std::optional<NodePair> pack;
  std::optional<NodePair> link;
  std::string origin;  // one sentence for the report
};

/// What a case's `sequence:` block says about the circuit, when the caller has read it. Empty or absent
/// fields are identified from the circuit and the waveform instead.
struct SequenceHints {
  std::string main_contactor;
  std::string precharge_contactor;
  std::string precharge_resistor;
  std::optional<NodePair> pack;
  std::optional<NodePair> link;
  std::optional<double> closing_ratio;       // closes when link >= ratio * pack (fraction)
  std::optional<double> closing_difference;  // closes when pack - link <= difference, V
  std::string rule_text;                     // the closing rule in words
  std::string outcome;                       // how the sequence ended: closed, timeout, no_rise, ...
  int attempts = 0;
};

/// Pack and link voltage for the plots: the hints' pairs first; else, with a `sequence:` block, its sensed
/// node pairs; else the first part of role source gives the pack and the first of role storage the link.
SensedVoltages sensed_voltages(const solver::Circuit& circuit, const SequenceHints& hints = {});

/// The contactors that matter for the current plots and the instant of main closure.
struct ContactorRoles {
  int main = -1;       // part index, -1 when not found
  int precharge = -1;  // part index, -1 when not found
  std::optional<double> main_closed;  // s, the main contactor's first closing
};

/// Named contactors from the hints are taken as given. Otherwise they are read from the waveform alone (each
/// contactor's "closed" signal and current): the main contactor is the first to close while bypassing another
/// closed contactor (one that conducted before and carries on average less than half of that current over
/// 1 % of the run after the closing); the bypassed one is the pre-charge contactor. Without such a closing there is no main
/// closure, and the pre-charge contactor is the last to close before the largest contactor current.
ContactorRoles contactor_roles(const solver::Circuit& circuit, const solver::Waveform& waveform,
                               const SequenceHints& hints = {});

/// A measured signal beside its simulation, in case time (a capture shifted by its time offset).
struct MeasuredCurve {
  std::string name, unit;
  std::vector<double> measured_times, measured;
  std::vector<double> simulated_times, simulated;
  std::vector<double> residuals;  // simulated − measured at residual_times; empty: not drawn
  std::vector<double> residual_times;  // empty: measured_times
};

struct RunReportInput {
  RunReportInput(const solver::Circuit& circuit_, const solver::Result& result_,
                 const analysis::EnergyAudit& audit_)
      : circuit(circuit_), result(result_), audit(audit_) {}

  const solver::Circuit& circuit;
  const solver::Result& result;
  const analysis::EnergyAudit& audit;
  /// The case's sequence block, when the caller read it.
  SequenceHints sequence;
  /// A fixed closing threshold on the link voltage, V, drawn as a reference line.
  std::optional<double> closing_threshold;
  /// Metrics, limits and verdict when the analyser judged the run.
  std::optional<Assessment> assessment;
  /// A measured capture overlaid on the run (`run --measured`); empty: none.
  std::vector<MeasuredCurve> measured;
  std::string measured_source;  // the capture file and its time offset, one sentence
};

/// Fills `input.assessment` from the analyser's evaluation and, for a sequence case (`sequence` not null),
/// `input.sequence` from the controller's report (named parts, sensed nodes, closing rule, outcome).
void add_evaluation(RunReportInput& input, const analysis::Evaluation& evaluation,
                    const solver::SequenceReport* sequence);

/// The complete HTML report of one run.
std::string run_report_html(const RunReportInput& input);

/// The high-voltage caution every report ends with (the README ends with the same words).
const char* safety_caution();

}  // namespace linkrise::app
