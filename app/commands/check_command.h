#pragma once
// `linkrise check [PATH...]`: the stored-case regression suite (app/regression/check.h). Prints the table of
// changes and the closing line, can write a JUnit XML report and rewrite the golden results; the exit code is 1
// on any regression.
#include <string>
#include <vector>

namespace linkrise::app {

struct CheckArguments {
  std::vector<std::string> paths = {"cases"};
  std::string junit_file;  // empty: none
  bool update = false;     // rewrite golden results after showing what changed
  std::vector<std::string> settings;  // --set path=value, applied to every case (not with --update)
  bool show_all = false;   // table rows for unchanged items too
  int jobs = 0;            // 0: one per core
};

int check_command(const CheckArguments& arguments);

}  // namespace linkrise::app
