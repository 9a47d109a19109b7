#pragma once
// The stored-case regression suite behind `linkrise check`: every case found is evaluated (in parallel across
// cores) and compared with its golden results (<case>.golden.yaml, app/regression/golden.h); the changes are
// tabulated for people, as JUnit cases for CI, and as golden files to rewrite after an intended change.
#include <cstddef>
#include <filesystem>
#include <string>
#include <vector>

#include "app/evaluation/case_evaluation.h"
#include "app/regression/golden.h"
#include "app/regression/junit_xml.h"
#include "netlist/overrides.h"

namespace linkrise::app {

/// Case files below the given paths (files are taken as given; directories are searched recursively for
/// *.yaml except *.golden.yaml), sorted.
std::vector<std::string> find_case_files(const std::vector<std::string>& paths);

/// One stored case evaluated and compared with its golden results.
struct CaseCheck {
  std::string file;
  CaseEvaluation evaluation;
  bool has_golden = false;
  std::string golden_problem;  // unreadable golden file
  Golden golden;
  std::vector<Comparison> rows;
  bool pass = false;
};

/// Checks every file on `jobs` threads (0: one per core); in file order, whatever the thread count.
/// `settings` (--set) are applied to every case before it runs; a case without the overridden path is an input
/// error of that case.
std::vector<CaseCheck> check_cases(const std::vector<std::string>& files, int jobs,
                                   const std::vector<netlist::Override>& settings = {});

struct CheckSummary {
  std::string table;  // the table of changes (every item with show_all); empty when there is nothing to list
  std::size_t failed = 0;
  std::vector<JunitCase> junit;
  /// "check: N passed, N failed", the plain form that CI log readers recognise.
  std::string closing_line() const;
  std::size_t total = 0;
};
CheckSummary summarise_checks(const std::vector<CaseCheck>& checks, bool show_all);

/// What `--update` does for one case: the golden file to write (empty path: nothing to write) and the lines it
/// prints (every stored value that moved, or why the case was not updated).
struct GoldenUpdate {
  std::filesystem::path file;
  std::string text;
  std::string listing;
  bool error = false;  // the case could not be evaluated
};
std::vector<GoldenUpdate> golden_updates(const std::vector<CaseCheck>& checks);

}  // namespace linkrise::app
