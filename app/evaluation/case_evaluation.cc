#include "app/evaluation/case_evaluation.h"

#include <chrono>
#include <cmath>

#include "app/evaluation/case_run.h"
#include "netlist/case.h"

namespace linkrise::app {

const char* status_word(CaseEvaluation::Status status) {
  switch (status) {
    case CaseEvaluation::Status::Evaluated: return "evaluated";
    case CaseEvaluation::Status::InputError: return "input error";
    case CaseEvaluation::Status::SolverFailure: return "solver failure";
  }
  return "unknown";
}

std::string constraint_name(const analysis::JudgedLimit& limit) {
  return limit.metric + " " + analysis::bound_word(limit.bound) + (limit.rated_part.empty() ? "" : " (rating)");
}

double constraint_margin(const analysis::JudgedLimit& limit) {
  return limit.judged ? limit.relative_margin - limit.required_margin : std::nan("");
}

CaseEvaluation evaluate_case_document(const netlist::CaseDocument& document, solver::Waveform* row_store) {
  auto started = std::chrono::steady_clock::now();
  CaseEvaluation evaluation;
  try {
    netlist::Case spec = document.validate();
    CaseRun run(spec, [row_store](solver::Options& options) { options.step_store = row_store; });
    if (run.solver_failed()) {
      evaluation.status = CaseEvaluation::Status::SolverFailure;
      evaluation.message = run.result().message;
    } else {
      evaluation.outcome = run.report() ? netlist::outcome_word(run.report()->outcome) : "completed";
      evaluation.verdict = run.evaluation().verdict();
      for (const auto& metric : run.evaluation().metrics.list()) {
        evaluation.metrics.push_back(MetricValue{metric.name, metric.value, metric.unit});
      }
      for (const auto& limit : run.evaluation().limits) {
        evaluation.margins.push_back({constraint_name(limit), constraint_margin(limit)});
      }
      if (run.report()) {
        evaluation.margins.push_back(
            {"sequence outcome", run.report()->outcome == spec.sequence->expected_outcome ? 1.0 : -1.0});
      }
    }
    if (row_store) *row_store = run.release_steps();
  } catch (const netlist::InputError& error) {
    evaluation.status = CaseEvaluation::Status::InputError;
    evaluation.message = error.what();
  } catch (const std::exception& error) {
    // Anything else (an output or model error) is still one failed case, never the end of a library run.
    evaluation.status = CaseEvaluation::Status::InputError;
    evaluation.message = std::string("could not evaluate: ") + error.what();
  }
  evaluation.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return evaluation;
}

CaseEvaluation evaluate_case_file(const std::string& path, const std::vector<netlist::Override>& settings) {
  try {
    return evaluate_case_document(netlist::CaseDocument::load(path).with(settings));
  } catch (const netlist::InputError& error) {
    CaseEvaluation evaluation;
    evaluation.status = CaseEvaluation::Status::InputError;
    evaluation.message = error.what();
    return evaluation;
  }
}

}  // namespace linkrise::app
