#pragma once
// One case evaluated end to end — parse, build, simulate, analyse — reduced to what regression checks and
// studies compare: status, outcome, verdict and named metrics. Errors are values here, never exceptions, so
// a broken case in a library run is one failed row, not a crash.
#include <string>
#include <vector>

#include "analysis/verdict.h"
#include "netlist/case_document.h"
#include "solver/waveform.h"

namespace linkrise::app {

/// One named metric of an evaluation, in its unit.
struct MetricValue {
  std::string name;
  double value = 0.0;
  std::string unit;
};

/// One judged bound of an evaluation: its margin beyond the required one, as a fraction of the bound (>= 0
/// passes), or the sequence outcome as a bound of its own (+1 when the expected outcome was reached, −1 not).
struct LimitMargin {
  std::string constraint;  // constraint_name(), or "sequence outcome"
  double margin = 0.0;     // NaN when the metric was not reached (not judged)
};

/// The name of a judged bound as the studies show it: "<metric> max" or "<metric> min" for the case's limits,
/// "<metric> max (rating)" for a part's rating, so a limit and a rating on one metric stay apart.
std::string constraint_name(const analysis::JudgedLimit& limit);
/// Its margin beyond the required one, as a fraction of the bound; NaN when not judged.
double constraint_margin(const analysis::JudgedLimit& limit);

struct CaseEvaluation {
  enum class Status { Evaluated, InputError, SolverFailure };
  Status status = Status::Evaluated;
  std::string message;  // the error text when not evaluated
  std::string outcome;  // sequence outcome ("closed", "timeout"...) or run outcome ("completed")
  analysis::Verdict verdict = analysis::Verdict::Fail;
  std::vector<MetricValue> metrics;
  std::vector<LimitMargin> margins;  // every judged bound (case limits and part ratings), then the outcome
  double seconds = 0.0;  // wall time of the evaluation
};

/// Evaluates a case file, with `settings` (--set) applied first.
CaseEvaluation evaluate_case_file(const std::string& path, const std::vector<netlist::Override>& settings = {});
/// Evaluates a case document (after its overrides). With `row_store`, the run records its step rows in that
/// storage and gives it back afterwards (a study's worker reuses one).
CaseEvaluation evaluate_case_document(const netlist::CaseDocument& document, solver::Waveform* row_store = nullptr);

const char* status_word(CaseEvaluation::Status status);

}  // namespace linkrise::app
