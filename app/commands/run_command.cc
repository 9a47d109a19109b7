#include "app/commands/run_command.h"

#include <iostream>

#include <fmt/format.h>

#include "app/commands/command_steps.h"
#include "app/evaluation/case_run.h"
#include "app/evaluation/measured_capture.h"
#include "app/output/run_summary.h"
#include "app/output/verdict_summary.h"
#include "app/output/waveform_csv.h"
#include "app/report/measured_plots.h"
#include "app/report/report_html.h"
#include "app/studies/study_parameters.h"
#include "netlist/case_document.h"
#include "netlist/measured_spec.h"
#include "netlist/parameter_reader.h"
#include "netlist/run_spec.h"

namespace linkrise::app {
namespace {

// The command line's run options replace the case's and pass the same check, marked with the option's name.
void apply_run_options(const RunArguments& arguments, netlist::RunSpec& run) {
  if (arguments.sample) {
    netlist::SourceMark mark{"option --sample", 0, 0};
    run.sample = netlist::ParameterReader::read_text(*arguments.sample, mark, netlist::Dimension::time(),
                                                     netlist::Bound::Any, "the grid spacing");
    run.marks.sample = mark;
  }
  if (arguments.relative_tolerance) {
    run.relative_tolerance = *arguments.relative_tolerance;
    run.marks.rtol = netlist::SourceMark{"option --rtol", 0, 0};
  }
  if (arguments.absolute_tolerance) {
    run.absolute_tolerance = *arguments.absolute_tolerance;
    run.absolute_tolerance_given = true;
    run.marks.atol = netlist::SourceMark{"option --atol", 0, 0};
  }
  netlist::require_valid_run(run);
}

// Values the trade does not use: printed before the run, or with --strict an input error.
void report_warnings(const RunArguments& arguments, const netlist::Case& spec) {
  if (spec.warnings.empty()) return;
  const auto& first = spec.warnings.front();
  if (arguments.strict) {
    throw netlist::InputError(first.mark, first.message + " (" + first.reason + ")",
                              "correct the value, or run without --strict to simulate it anyway");
  }
  for (const auto& warning : spec.warnings) {
    std::cerr << fmt::format("{}: warning: {}\n  why: {}\n", warning.mark.to_string(), warning.message, warning.reason);
  }
}

// The capture beside the simulated columns it measures, in case time; no fit, so no residuals.
void add_measured(const RunArguments& arguments, const netlist::Case& spec, const CaseRun& run,
                  RunReportInput& report) {
  CaptureChoice choice;
  choice.file = arguments.measured;
  choice.columns = netlist::read_column_options(arguments.columns);
  const MeasuredCapture measured = load_measured(spec, solver::waveform_headers(run.circuit()), choice);
  const solver::Waveform& simulated = run.options().sample ? run.result().samples : run.result().steps;
  report.measured = measured_curves(measured, measured.time_offset);
  for (std::size_t s = 0; s < report.measured.size(); ++s) {
    report.measured[s].simulated_times = simulated.times();
    report.measured[s].simulated = simulated.series(measured.signals[s].waveform_column);
  }
  report.measured_source = fmt::format("The capture {} ({} rows) drawn over the simulation, shifted by the time "
                                       "offset {} (case time at the capture's zero). No fit was made.",
                                       measured.capture.file, measured.capture.row_count(),
                                       netlist::format_si(measured.time_offset, "s"));
}

CommandOutput run_output(const RunArguments& arguments) {
  netlist::Case spec =
      netlist::CaseDocument::load(arguments.case_file).with(parse_settings(arguments.settings)).validate();
  apply_run_options(arguments, spec.run);
  report_warnings(arguments, spec);
  CaseRun run(spec);
  const solver::Circuit& circuit = run.circuit();
  const solver::Result& result = run.result();
  const analysis::EnergyAudit& audit = run.audit();
  if (run.solver_failed()) {
    throw CommandFailure(kExitSolverFailure,
                         fmt::format("linkrise: solver failure in '{}': {}", arguments.case_file, result.message));
  }
  const solver::SequenceReport* sequence = run.report();
  const analysis::Evaluation& evaluation = run.evaluation();
  CommandOutput output;
  output.directory = arguments.output_directory;
  output.files = {{"waveforms.csv", waveform_csv(run.options().sample ? result.samples : result.steps)},
                  {"summary.json", summary_json(circuit, result, audit, evaluation, sequence)}};
  if (arguments.report) {
    RunReportInput report_input(circuit, result, audit);
    add_evaluation(report_input, evaluation, sequence);
    if (arguments.measured) add_measured(arguments, spec, run, report_input);
    output.report_file = *arguments.report;
    output.report = run_report_html(report_input);
  }
  output.text = terminal_summary(circuit, result, audit) + verdict_terminal(evaluation, sequence);
  output.layout = ListingLayout::Columns;
  output.exit_code = evaluation.pass ? kExitOk : kExitLimitFailed;
  return output;
}

}  // namespace

int run_command(const RunArguments& arguments) {
  return carry_out(arguments.quiet, [&] { return run_output(arguments); });
}

}  // namespace linkrise::app
