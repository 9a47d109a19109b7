#pragma once
// `linkrise sweep CASE.yaml --vary PATH=VALUES [--vary PATH=VALUES]`: one or two parameters over lists or
// ranges (app/studies/study_parameters.h for the forms). With two, every combination is run (the first parameter
// varies slowest). Each point is the case with the point's overrides, evaluated like `linkrise run`.
// Prints a table of the headline metrics per point (--metrics to choose) and writes sweep.csv with every
// metric. Exit 0 when every point was evaluated, 2 for bad input, 3 when the solver failed at a point.
#include <string>
#include <vector>

#include "app/studies/study_parameters.h"
#include "app/studies/study_run.h"

namespace linkrise::app {

struct Sweep {
  std::string case_file;
  std::string title;
  std::vector<VariedParameter> parameters;
  std::vector<ParameterColumn> columns;  // per parameter, its values as numbers in one unit (when they are)
  std::vector<std::vector<std::size_t>> points;  // per point, the value index of each parameter
  StudyResults results;
  std::vector<std::string> headline;  // metrics for the terminal table
  /// The overrides of point i.
  std::vector<netlist::Override> overrides(std::size_t point) const;
};

/// Runs a sweep over `parameters` (one or two) on the case with `settings` applied. Throws InputError.
Sweep run_sweep(const std::string& case_file, const std::vector<netlist::Override>& settings,
                const std::vector<VariedParameter>& parameters, int jobs, const std::string& progress_label = "");

std::string sweep_text(const Sweep& sweep, const std::vector<std::string>& metrics);
std::string sweep_csv(const Sweep& sweep);

}  // namespace linkrise::app
