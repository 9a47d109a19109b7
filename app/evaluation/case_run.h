#pragma once
// One case simulated with its BMS sequence (when it has one) and judged: the pipeline shared by `linkrise run`
// and `linkrise faults`. Held in place (the controller refers to the circuit, the options to the controller).
#include <functional>
#include <optional>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "netlist/case.h"
#include "solver/circuit.h"
#include "solver/sequence_controller.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::app {

class CaseRun {
 public:
  /// Builds and simulates; `adjust` may change the run options (command-line overrides) before the run.
  /// Throws netlist::InputError for bad input (also for a limit naming an unknown metric, after the run).
  explicit CaseRun(const netlist::Case& spec, const std::function<void(solver::Options&)>& adjust = {});
  CaseRun(const CaseRun&) = delete;
  CaseRun& operator=(const CaseRun&) = delete;

  const solver::Circuit& circuit() const { return circuit_; }
  const solver::Options& options() const { return options_; }
  const solver::Result& result() const { return result_; }
  bool solver_failed() const { return result_.outcome == solver::Outcome::SolverFailure; }
  /// The sequence report; null for a case without a sequence.
  const solver::SequenceReport* report() const { return report_ ? &*report_ : nullptr; }
  const analysis::EnergyAudit& audit() const { return audit_; }
  /// Metrics, judged limits and verdict; empty (passing) when the solver failed.
  const analysis::Evaluation& evaluation() const { return evaluation_; }
  /// Hands the step rows' storage back (for reuse through solver::Options::step_store); result() then has none.
  solver::Waveform release_steps() { return std::move(result_.steps); }

 private:
  solver::Circuit circuit_;
  solver::Options options_;
  std::optional<solver::SequenceController> controller_;
  solver::Result result_;
  std::optional<solver::SequenceReport> report_;
  analysis::EnergyAudit audit_;
  analysis::Evaluation evaluation_;
};

}  // namespace linkrise::app
