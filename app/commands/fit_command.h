#pragma once
// `linkrise fit CASE.yaml [--capture FILE] [--column NAME=HEADER]...`: the parameters of the case's `fit:` block
// estimated from the measured capture (app/studies/fit.h); writes fit.json and the fitted case
// (<case stem>.fitted.yaml, ready for `linkrise run`), optionally an HTML report. Exit 0 when the fit
// converged, 1 when it stopped without converging, 2 for bad input, 3 when the solver gave up.
#include <optional>
#include <string>
#include <vector>

namespace linkrise::app {

struct FitArguments {
  std::string case_file;
  std::optional<std::string> capture;  // replaces the measured block's file
  std::vector<std::string> columns;    // NAME=HEADER, replacing the measured block's columns
  std::vector<std::string> settings;
  std::string output_directory = "out";
  std::optional<std::string> report;
  bool quiet = false;
};

int fit_command(const FitArguments& arguments);

}  // namespace linkrise::app
