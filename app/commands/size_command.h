#pragma once
// `linkrise size CASE.yaml --part NAME --range A..B [--parameter P] [--nominal] [--tolerance 0.5%]`: the window
// of values of one part parameter that passes every limit, rating and the expected outcome at every tolerance
// corner (app/studies/sizing.h); writes sizing.csv and sizing.json. Exit 0 when a feasible value exists, 1 when
// none does, 2 for bad input, 3 when the solver gave up at some point (listed; its margins are not judged).
#include <string>
#include <vector>

namespace linkrise::app {

struct SizeArguments {
  std::string case_file;
  std::string part;
  std::string parameter;  // empty: resistance
  std::string range;      // "A..B", values as in a case file
  bool nominal = false;   // judge the nominal point only, no tolerance corners
  std::string tolerance = "0.5 %";
  std::vector<std::string> settings;
  std::string output_directory = "out";
  int jobs = 0;
  bool quiet = false;
};

int size_command(const SizeArguments& arguments);

}  // namespace linkrise::app
