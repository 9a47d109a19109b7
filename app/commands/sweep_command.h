#pragma once
// `linkrise sweep CASE.yaml --vary PATH=VALUES`: one or two parameters over lists or ranges (app/studies/sweep.h);
// writes sweep.csv, and with --report an HTML report.
#include <string>
#include <vector>

namespace linkrise::app {

struct SweepArguments {
  std::string case_file;
  std::vector<std::string> vary;      // --vary
  std::vector<std::string> settings;  // --set
  std::string metrics;                // --metrics a,b,c
  std::string output_directory = "out";
  int jobs = 0;
  std::string report;  // optional HTML report file
  bool quiet = false;
};

int sweep_command(const SweepArguments& arguments);

}  // namespace linkrise::app
