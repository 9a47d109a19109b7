#pragma once
// `linkrise check [PATH...]`: the stored-case regression suite. Every case found is evaluated (in parallel
// across cores) and compared with its golden results (<case>.golden.yaml); changes are tabulated, a JUnit XML
// report can be written, and the exit code is 1 on any regression.
#include <string>
#include <vector>

namespace linkrise::app {

struct CheckArguments {
  std::vector<std::string> paths = {"cases"};
  std::string junit_file;  // empty: none
  bool update = false;     // rewrite golden results after showing what changed
  bool show_all = false;   // table rows for unchanged items too
  int jobs = 0;            // 0: one per core
};

/// Case files below the given paths (files are taken as given; directories are searched recursively for
/// *.yaml except *.golden.yaml), sorted.
std::vector<std::string> find_case_files(const std::vector<std::string>& paths);

int check_command(const CheckArguments& arguments);

}  // namespace linkrise::app
