#pragma once
// Runs the points of a study — variants, sweep points, corners, Monte Carlo samples — on the worker pool.
// Each point is the base case document with its overrides applied (netlist/case_document.h), evaluated end to
// end by evaluate_case_document (app/evaluation/case_evaluation.h). Only the outcome, the verdict and one number per metric are
// kept per point: no waveform outlives its evaluation.
#include <cstddef>
#include <functional>
#include <string>
#include <vector>

#include "app/evaluation/case_evaluation.h"
#include "app/studies/point_table.h"
#include "app/studies/study_accuracy.h"
#include "netlist/overrides.h"
#include "netlist/case.h"
#include "netlist/case_document.h"

namespace linkrise::app {

struct MetricColumn {
  std::string name;
  std::string unit;
};

struct StudyResults {
  std::vector<MetricColumn> columns;
  PointTable points;  // compact (app/studies/point_table.h); points[i] gives a PointResult
  StudyAccuracy accuracy;  // the points' rtol and the nominal case's agreement check (set by the study)
  /// Column index of a metric, or -1.
  int column(const std::string& name) const;
  /// The value of a metric at a point (NaN when absent).
  double value(std::size_t point, const std::string& name) const;
  /// The first point that was bad input (e.g. an override out of a parameter's range), or -1.
  long first_input_error() const;
  bool any_solver_failure() const;
  /// "3 closed, 1 timeout": how many points ended with each outcome word, in order of first appearance; empty
  /// without points.
  std::string outcome_counts() const;
};

/// The case document of point i (the base case with the point's overrides or replacements).
using DocumentOf = std::function<netlist::CaseDocument(std::size_t)>;

/// Evaluates `count` points, each at the study accuracy (app/studies/study_accuracy.h), on `jobs` threads (0: one per core) of every rank of an MPI job (app/studies/rank_pool.h);
/// results are in index order and independent of the thread and rank counts. With `fixed_columns` the metric columns are those (a metric outside them is dropped, which
/// keeps the memory per sample to one number per column); otherwise they are the union over the points in
/// point order. document_of may throw InputError (an override naming an unknown path); it is rethrown.
StudyResults run_study(std::size_t count, const DocumentOf& document_of, int jobs,
                       const std::string& progress_label = "",
                       const std::vector<MetricColumn>* fixed_columns = nullptr);

/// Throws InputError naming the point (label_of(i)) when a point was bad input, e.g. an override out of a
/// parameter's range: a study with an invalid point writes nothing.
void reject_input_errors(const StudyResults& results, const std::string& file,
                         const std::function<std::string(std::size_t)>& label_of);

/// Which way a metric improves: larger for minimum_* values and the stall equilibrium; smaller for everything
/// else (times, peaks, energies, temperatures, i²t, steps, overshoot, attempts).
bool larger_is_better(const std::string& metric);

/// Metrics a terminal table shows by default: those the case judges in `limits:`, then the sequence
/// resistor's temperature and energy, then the first metrics up to `at_least`.
std::vector<std::string> headline_metrics(const netlist::Case& spec, const std::vector<MetricColumn>& columns,
                                          std::size_t at_least = 6);

/// Splits "a,b,c" (a --metrics option) and checks every name against the columns (InputError with a
/// did-you-mean).
std::vector<std::string> chosen_metrics(const std::string& list, const std::vector<MetricColumn>& columns,
                                        const netlist::SourceMark& mark);

/// The metrics a terminal table shows: those of a --metrics option (checked as chosen_metrics does), or the
/// headline when the option is empty.
std::vector<std::string> shown_metrics(const std::string& option, const std::vector<std::string>& headline,
                                       const std::vector<MetricColumn>& columns);

/// A plain-text table: columns padded to their widest cell; the first `left` columns left-aligned, the others
/// right-aligned; each line indented by two spaces.
std::string text_table(const std::vector<std::string>& header, const std::vector<std::vector<std::string>>& rows,
                       std::size_t left = 1);

}  // namespace linkrise::app
