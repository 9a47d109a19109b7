#include "app/case_evaluation.h"

#include <chrono>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "netlist/case.h"
#include "netlist/sequence_spec.h"
#include "solver/circuit.h"
#include "solver/sequence_controller.h"
#include "solver/transient.h"

namespace linkrise::app {

const char* status_word(CaseEvaluation::Status status) {
  switch (status) {
    case CaseEvaluation::Status::Evaluated: return "evaluated";
    case CaseEvaluation::Status::InputError: return "input error";
    case CaseEvaluation::Status::SolverFailure: return "solver failure";
  }
  return "unknown";
}

CaseEvaluation evaluate_case_tree(const netlist::Tree& root, const std::string& file) {
  auto started = std::chrono::steady_clock::now();
  CaseEvaluation evaluation;
  try {
    netlist::Case spec = netlist::read_case(root, file);
    solver::Circuit circuit(spec);
    solver::Options options = solver::options_from(circuit);
    options.record_steps = true;
    std::optional<netlist::SequenceSpec> sequence = netlist::read_sequence(spec);
    std::optional<solver::SequenceController> controller;
    if (sequence) solver::attach(controller.emplace(circuit, *sequence), options);
    solver::Result result = solver::simulate(circuit, options);
    if (result.outcome == solver::Outcome::SolverFailure) {
      evaluation.status = CaseEvaluation::Status::SolverFailure;
      evaluation.message = result.message;
    } else {
      analysis::EnergyAudit audit = analysis::audit_energy(circuit, result);
      std::optional<solver::SequenceReport> report;
      if (controller) report = controller->report(result.end_time);
      analysis::Evaluation verdict = analysis::evaluate(circuit, result, audit, report ? &*report : nullptr);
      evaluation.outcome = report ? report->outcome : "completed";
      evaluation.verdict = verdict.pass ? "pass" : "fail";
      for (const auto& metric : verdict.metrics.list()) {
        evaluation.metrics.push_back(MetricValue{metric.name, metric.value, metric.unit});
      }
    }
  } catch (const netlist::InputError& error) {
    evaluation.status = CaseEvaluation::Status::InputError;
    evaluation.message = error.what();
  }
  evaluation.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return evaluation;
}

CaseEvaluation evaluate_case_file(const std::string& path) {
  try {
    return evaluate_case_tree(netlist::load_yaml_file(path), path);
  } catch (const netlist::InputError& error) {
    CaseEvaluation evaluation;
    evaluation.status = CaseEvaluation::Status::InputError;
    evaluation.message = error.what();
    return evaluation;
  }
}

}  // namespace linkrise::app
