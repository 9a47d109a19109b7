#pragma once
// `linkrise compare CASE.yaml`: the case's variants side by side (app/studies/compare.h); writes compare.csv and
// compare.json, and with --report an HTML report.
#include <string>
#include <vector>

namespace linkrise::app {

struct CompareArguments {
  std::string case_file;
  std::string output_directory = "out";
  std::vector<std::string> settings;  // --set path=value, applied to the nominal and every variant
  int jobs = 0;
  std::string report;  // optional HTML report file
  bool quiet = false;
  bool faults = false;  // also run the fault scenarios per variant
  bool all = false;     // every metric in the terminal table, not only the headline ones
};

int compare_command(const CompareArguments& arguments);

}  // namespace linkrise::app
