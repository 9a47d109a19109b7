#pragma once
// `linkrise faults CASE.yaml`: runs the detection matrix (app/studies/faults.h), writes faults.json and
// faults.csv, and with --report an HTML report (app/report/faults_report.h). Exit 0 when every applicable row
// passes, 1 otherwise, 2 for bad input, 3 when the solver failed in a scenario.
#include <optional>
#include <string>
#include <vector>

namespace linkrise::app {

struct FaultsArguments {
  std::string case_file;
  std::string output_directory = "out";
  std::vector<std::string> settings;  // --set path=value, applied before the scenarios' own edits
  int jobs = 0;  // 0: one per hardware thread
  bool quiet = false;
  std::optional<std::string> report;  // HTML report file (app/report/faults_report.h)
};

int faults_command(const FaultsArguments& arguments);

}  // namespace linkrise::app
