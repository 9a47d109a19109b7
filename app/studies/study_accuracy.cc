#include "app/studies/study_accuracy.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "app/evaluation/case_evaluation.h"
#include "netlist/run_spec.h"

namespace linkrise::app {

double study_tolerance(double rtol) {
  return std::max(rtol, std::min(kStudyToleranceFactor * rtol, kLoosestStudyTolerance));
}

double case_tolerance(const netlist::CaseDocument& document) {
  const netlist::SourceMark mark{document.file(), 0, 0};
  try {
    if (auto given = document.quantity_at("run.rtol", mark)) return given->value;
  } catch (const netlist::InputError&) {
    // No run block or no rtol in it: the default.
  }
  return netlist::RunSpec{}.relative_tolerance;
}

netlist::CaseDocument at_study_accuracy(netlist::CaseDocument document) {
  const double rtol = study_tolerance(case_tolerance(document));
  document.apply(
      netlist::Override{"run.rtol", fmt::format("{:.17g}", rtol), netlist::SourceMark{"study accuracy", 0, 0}});
  return document;
}

namespace {
// Deviation of `study` from `reference` relative to the larger of the reference and `scale` (the largest
// metric of its unit: an overshoot of nanovolts is judged against the volts of the case, not against itself);
// infinity when only one of them was reached.
double deviation(double study, double reference, double scale) {
  if (std::isnan(study) || std::isnan(reference)) return std::isnan(study) == std::isnan(reference) ? 0.0 : INFINITY;
  const double difference = std::fabs(study - reference);
  if (difference <= kStudyAgreementFloor) return 0.0;
  return difference / std::max({std::fabs(reference), scale, kStudyAgreementFloor});
}

// The largest finite |value| among the metrics of `unit`.
double unit_scale(const std::vector<MetricValue>& metrics, const std::string& unit) {
  double scale = 0.0;
  for (const auto& metric : metrics) {
    if (metric.unit == unit && std::isfinite(metric.value)) scale = std::max(scale, std::fabs(metric.value));
  }
  return scale;
}
}  // namespace

StudyAccuracy check_study_accuracy(const netlist::CaseDocument& nominal) {
  StudyAccuracy accuracy;
  accuracy.case_rtol = case_tolerance(nominal);
  accuracy.study_rtol = study_tolerance(accuracy.case_rtol);
  const CaseEvaluation reference = evaluate_case_document(nominal);
  const CaseEvaluation study = evaluate_case_document(at_study_accuracy(nominal));
  if (reference.status != CaseEvaluation::Status::Evaluated || study.status != CaseEvaluation::Status::Evaluated) {
    return accuracy;  // the study itself reports a nominal case that fails
  }
  accuracy.checked = true;
  for (const auto& metric : reference.metrics) {
    auto found = std::find_if(study.metrics.begin(), study.metrics.end(),
                              [&](const MetricValue& other) { return other.name == metric.name; });
    const double value = found == study.metrics.end() ? NAN : found->value;
    const double off = deviation(value, metric.value, unit_scale(reference.metrics, metric.unit));
    ++accuracy.compared;
    if (off > accuracy.bound) accuracy.disagreeing.push_back(metric.name);
    if (off > accuracy.worst_deviation) {
      accuracy.worst_deviation = off;
      accuracy.worst_metric = metric.name;
    }
  }
  if (reference.outcome != study.outcome) accuracy.disagreeing.push_back("outcome");
  return accuracy;
}

std::string accuracy_text(const StudyAccuracy& accuracy) {
  std::string text = fmt::format("study points at rtol {:.0e} ({:g} × the case's {:.0e}, at most {:.0e})",
                                 accuracy.study_rtol, kStudyToleranceFactor, accuracy.case_rtol,
                                 kLoosestStudyTolerance);
  if (!accuracy.checked) return text + "; the nominal case was not evaluated, so no agreement check";
  const std::string worst =
      accuracy.worst_metric.empty() ? "" : fmt::format("; largest deviation {:.1e}, {}", accuracy.worst_deviation,
                                                       accuracy.worst_metric);
  if (accuracy.agrees()) {
    return text + fmt::format("; the nominal case agrees with the case's accuracy within {:g} % ({} metrics{})",
                              100 * accuracy.bound, accuracy.compared, worst);
  }
  std::string names;
  for (const auto& name : accuracy.disagreeing) names += (names.empty() ? "" : ", ") + name;
  text += fmt::format("; WARNING: the nominal case differs from the case's accuracy by more than {:g} % in {}{}",
                      100 * accuracy.bound, names, worst);
  return text;
}

}  // namespace linkrise::app
