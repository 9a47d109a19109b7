#pragma once
// `linkrise run CASE.yaml`: simulate one case, write waveforms.csv and summary.json, print a summary.
#include <optional>
#include <string>
#include <vector>

namespace linkrise::app {

struct RunArguments {
  std::string case_file;
  std::string output_directory = "out";
  std::vector<std::string> settings;  // --set path=value, applied to the case before anything else
  std::optional<std::string> sample;  // a time such as "1 ms"
  std::optional<double> relative_tolerance;
  std::optional<double> absolute_tolerance;
  std::optional<std::string> report;  // HTML report file (self-contained)
  std::optional<std::string> measured;  // a capture overlaid on the report (needs report)
  std::vector<std::string> columns;     // NAME=HEADER mappings of the capture's columns
  bool quiet = false;
  bool strict = false;  // values outside the trade's ranges (netlist/plausibility.h) are input errors
};

/// Returns the process exit code (0 ok, 2 input error, 3 solver failure).
int run_command(const RunArguments& arguments);

}  // namespace linkrise::app
