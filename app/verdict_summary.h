#pragma once
// The verdict, judged limits, metrics and sequence sections of summary.json, and their terminal table.
#include <string>

#include <nlohmann/json.hpp>

#include "analysis/verdict.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::app {

/// Adds "verdict", "failures", "limits" and "metrics" to `summary`.
void add_verdict(nlohmann::json& summary, const analysis::Evaluation& evaluation);
/// Adds "sequence": outcome, attempts, closing rule, attempts in detail, stall diagnostic, timeline.
/// `summary` must already hold run_summary's "timeline".
void add_sequence(nlohmann::json& summary, const solver::SequenceReport& report,
                  const analysis::Evaluation& evaluation);
/// The compact metrics/limits table and the verdict line for the terminal.
std::string verdict_terminal(const analysis::Evaluation& evaluation, const solver::SequenceReport* report);

}  // namespace linkrise::app
