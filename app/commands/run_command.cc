#include "app/commands/run_command.h"

#include <cstdio>
#include <iostream>

#include <fmt/format.h>

#include "analysis/energy_audit.h"
#include "app/evaluation/case_run.h"
#include "app/commands/exit_codes.h"
#include "app/output/output_files.h"
#include "app/report/report_html.h"
#include "app/output/run_summary.h"
#include "app/output/verdict_summary.h"
#include "app/output/waveform_csv.h"
#include "netlist/parameter_reader.h"
#include "netlist/run_spec.h"
#include "solver/circuit.h"
#include "solver/transient.h"

namespace linkrise::app {

namespace {
// The command line's run options replace the case's and pass the same check, marked with the option's name.
void apply_run_options(const RunArguments& arguments, netlist::RunSpec& run) {
  if (arguments.sample) {
    netlist::SourceMark mark{"option --sample", 0, 0};
    run.sample = netlist::ParameterReader::read_text(*arguments.sample, mark, netlist::Dimension::time(),
                                                     netlist::Bound::Any, "option --sample");
    run.marks.sample = mark;
  }
  if (arguments.relative_tolerance) {
    run.relative_tolerance = *arguments.relative_tolerance;
    run.marks.rtol = netlist::SourceMark{"option --rtol", 0, 0};
  }
  if (arguments.absolute_tolerance) {
    run.absolute_tolerance = *arguments.absolute_tolerance;
    run.marks.atol = netlist::SourceMark{"option --atol", 0, 0};
  }
  netlist::require_valid_run(run);
}
}  // namespace

int run_command(const RunArguments& arguments) {
  try {
    netlist::Case spec = netlist::load_case(arguments.case_file);
    apply_run_options(arguments, spec.run);
    CaseRun run(spec);
    const solver::Circuit& circuit = run.circuit();
    const solver::Options& options = run.options();
    const solver::Result& result = run.result();
    const analysis::EnergyAudit& audit = run.audit();
    if (run.solver_failed()) {
      std::cerr << fmt::format("linkrise: solver failure in '{}': {}\n", arguments.case_file, result.message);
      return kExitSolverFailure;
    }
    const solver::SequenceReport* sequence_data = run.report();
    const analysis::Evaluation& evaluation = run.evaluation();
    OutputSet outputs(arguments.output_directory);
    outputs.add("waveforms.csv", waveform_csv(options.sample ? result.samples : result.steps));
    outputs.add("summary.json", summary_json(circuit, result, audit, evaluation, sequence_data));
    // Built before anything is committed, so a failure leaves no half-written set.
    std::string report;
    if (arguments.report) {
      RunReportInput report_input(circuit, result, audit);
      add_evaluation(report_input, evaluation, sequence_data);
      report = run_report_html(report_input);
    }
    outputs.commit();
    if (arguments.report) write_file_atomically(*arguments.report, report);
    if (!arguments.quiet) {
      std::cout << terminal_summary(circuit, result, audit);
      std::cout << verdict_terminal(evaluation, sequence_data);
      std::cout << fmt::format("  wrote     {} and {}\n", outputs.path("waveforms.csv").string(),
                               outputs.path("summary.json").string());
      if (arguments.report) std::cout << fmt::format("  report    {}\n", *arguments.report);
    }
    return evaluation.pass ? kExitOk : kExitLimitFailed;
  } catch (const netlist::InputError& error) {
    std::cerr << error.what() << "\n";
    return kExitInputError;
  }
}

}  // namespace linkrise::app
