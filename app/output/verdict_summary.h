#pragma once
// The verdict, judged limits, metrics and sequence sections of summary.json, and their terminal table.
#include <string>

#include <nlohmann/json.hpp>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "solver/circuit.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::app {

/// Adds "verdict", "failures", "limits" and "metrics" to `summary`.
void add_verdict(nlohmann::json& summary, const analysis::Evaluation& evaluation);
/// Adds "sequence": outcome, attempts, closing rule, attempts in detail, stall diagnostic, timeline.
/// `summary` must already hold run_summary's "timeline".
void add_sequence(nlohmann::json& summary, const solver::SequenceReport& report,
                  const analysis::Evaluation& evaluation);
/// The whole summary.json of a run as text: run_summary, the verdict and, for a sequence case (`report` not
/// null), the sequence.
std::string summary_json(const solver::Circuit& circuit, const solver::Result& result,
                         const analysis::EnergyAudit& audit, const analysis::Evaluation& evaluation,
                         const solver::SequenceReport* report);
/// The compact metrics/limits table and the verdict line for the terminal.
std::string verdict_terminal(const analysis::Evaluation& evaluation, const solver::SequenceReport* report);

}  // namespace linkrise::app
