#pragma once
// The study accuracy: compare, sweep, spread, window and size run their points at a looser relative tolerance
// than a single run — 100 × the case's rtol, at most 1e-4 (never looser than the case's own): from the default
// 1e-7, rtol 1e-5, which halves the steps of a sequence run (cases/study_precharge_window.yaml: 724 -> 368).
// The agreement check runs the study's nominal case at both and compares every metric: they agree when
// |study − case| ≤ 1 % × max(|case|, the largest metric of its unit in the case) or ≤ 1e-9 in its unit (a link
// overshoot of nanovolts is judged against the case's volts). Measured at rtol 1e-5 against 1e-7 on the
// stored cases: the largest deviation 3.1e-3 (a peak pulse energy of cases/reference_180s_speed.yaml), most
// metrics below 1e-5. A metric decided at a BMS sample (a decision time) can move a whole sample when a
// crossing falls next to one; the check names such a metric rather than hiding it.
#include <cstddef>
#include <string>
#include <vector>

#include "netlist/case_document.h"

namespace linkrise::app {

inline constexpr double kStudyToleranceFactor = 100.0;
inline constexpr double kLoosestStudyTolerance = 1e-4;
inline constexpr double kStudyAgreement = 1e-2;        // relative bound of the check
inline constexpr double kStudyAgreementFloor = 1e-9;   // absolute, in the metric's unit

/// The relative tolerance study points run at, for a case whose run block asks `rtol`.
double study_tolerance(double rtol);

/// The case's relative tolerance (its run block's, or the default).
double case_tolerance(const netlist::CaseDocument& document);

/// The document with its run.rtol at the study accuracy (a study point's document is moved in, not copied).
netlist::CaseDocument at_study_accuracy(netlist::CaseDocument document);

struct StudyAccuracy {
  bool checked = false;
  double case_rtol = 0.0, study_rtol = 0.0;
  double bound = kStudyAgreement;
  std::size_t compared = 0;            // metrics reached at both accuracies (or at neither)
  std::vector<std::string> disagreeing;  // metrics beyond the bound
  std::string worst_metric;            // the largest relative deviation, and its size
  double worst_deviation = 0.0;
  bool agrees() const { return checked && disagreeing.empty(); }
};

/// Evaluates the nominal case at its own and at the study accuracy and compares every metric.
StudyAccuracy check_study_accuracy(const netlist::CaseDocument& nominal);

/// One line for the terminal and the reports: "study points at rtol 1e-05 (100 × the case's 1e-07); the
/// nominal case agrees within 1 % (largest deviation 4.5e-04, k_main.peak_pulse_energy)".
std::string accuracy_text(const StudyAccuracy& accuracy);

}  // namespace linkrise::app
