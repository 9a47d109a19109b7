#pragma once
// The verdict of one run: metrics, judged limits (case block and part ratings), and the sequence outcome
// against the expected one. Fails when any judged limit fails or the sequence ended otherwise than expected
// (an unexpected fault, or a run too short to finish the sequence).
#include <optional>
#include <string>
#include <vector>

#include "analysis/energy_audit.h"
#include "analysis/limits.h"
#include "analysis/metrics.h"
#include "analysis/stall.h"
#include "solver/circuit.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::analysis {

/// The judgement of one run: every limit, rating and the expected sequence outcome held, or not.
enum class Verdict { Pass, Fail };
/// "pass" or "fail", as outputs and golden files write it.
const char* verdict_word(Verdict verdict);

struct Evaluation {
  MetricSet metrics;
  std::optional<StallDiagnostic> stall;  // with a sequence only
  std::vector<JudgedLimit> limits;
  bool pass = true;
  std::vector<std::string> failures;  // one line per reason, empty when passing
  Verdict verdict() const { return pass ? Verdict::Pass : Verdict::Fail; }
};

/// `report` is null for a case without a sequence. Throws netlist::InputError for a limit that names an
/// unknown metric or has the wrong unit.
Evaluation evaluate(const solver::Circuit& circuit, const solver::Result& result, const EnergyAudit& audit,
                    const solver::SequenceReport* report);

}  // namespace linkrise::analysis
