#include "analysis/verdict.h"

#include <fmt/format.h>


namespace linkrise::analysis {

const char* verdict_word(Verdict verdict) { return verdict == Verdict::Pass ? "pass" : "fail"; }

Evaluation evaluate(const solver::Circuit& circuit, const solver::Result& result, const EnergyAudit& audit,
                    const solver::SequenceReport* report) {
  Evaluation evaluation;
  if (report != nullptr) {
    evaluation.stall = diagnose_stall(result.steps, *report, constant_power_loads(circuit));
    evaluation.metrics.append(sequence_metrics(result.steps, *report, *evaluation.stall));
  }
  evaluation.metrics.append(part_metrics(circuit, result, audit, report ? duty_length(*report) : std::nan("")));

  std::vector<netlist::LimitSpec> limits = circuit.spec().limits;
  for (auto& rating : rating_limits(circuit)) limits.push_back(std::move(rating));
  evaluation.limits = judge_limits(limits, evaluation.metrics);

  for (const auto& limit : evaluation.limits) {
    if (limit.pass) continue;
    std::string where = limit.margin < 0.0 ? (limit.bound == BoundSide::Maximum ? "above" : "below")
                                           : fmt::format("within, but short of the {:g} % margin to,",
                                                         100.0 * limit.required_margin);
    std::string origin = limit.origin.empty() ? "" : "; " + limit.origin;
    std::string detail = limit.detail.empty() ? "" : " — " + limit.detail;
    evaluation.failures.push_back(fmt::format("{} = {} is {} its {} {} ({}{}){}", limit.metric,
                                              format_metric(limit.value, limit.unit), where, bound_word(limit.bound),
                                              format_metric(limit.limit, limit.unit), limit.source, origin, detail));
  }
  if (report != nullptr && report->outcome != report->spec.expected_outcome) {
    std::string unfinished;
    if (report->outcome == netlist::SequenceOutcome::Unfinished) {
      unfinished = circuit.spec().run.follows_sequence()
                       ? " (the run reached 'run: max_duration' first: raise it)"
                       : " (the run ended first: write 'run: {duration: sequence, settle: ...}' to let the run "
                         "follow the sequence, or lengthen 'run: duration')";
    }
    evaluation.failures.push_back(fmt::format("the sequence ended '{}' after {} attempt(s), expected '{}'{}",
                                              netlist::outcome_word(report->outcome), report->attempts,
                                              netlist::outcome_word(report->spec.expected_outcome), unfinished));
  }
  evaluation.pass = evaluation.failures.empty();
  return evaluation;
}

}  // namespace linkrise::analysis
