#include "app/regression/check.h"

#include <algorithm>
#include <cmath>
#include <filesystem>

#include <fmt/format.h>

#include "app/evaluation/case_evaluation.h"
#include "app/regression/golden.h"
#include "app/regression/junit_xml.h"
#include "app/studies/study_pool.h"
#include "netlist/input_error.h"

namespace linkrise::app {

namespace fs = std::filesystem;

std::vector<std::string> find_case_files(const std::vector<std::string>& paths) {
  std::vector<std::string> files;
  auto is_case = [](const fs::path& path) {
    std::string name = path.filename().string();
    return path.extension() == ".yaml" && !name.ends_with(".golden.yaml") && !name.ends_with(".catalogue.yaml");
  };
  for (const auto& path : paths) {
    if (fs::is_directory(path)) {
      for (const auto& entry : fs::recursive_directory_iterator(path)) {
        if (entry.is_regular_file() && is_case(entry.path())) files.push_back(entry.path().string());
      }
    } else {
      files.push_back(path);
    }
  }
  std::sort(files.begin(), files.end());
  files.erase(std::unique(files.begin(), files.end()), files.end());
  return files;
}

namespace {

void check_one(CaseCheck& check, const std::vector<netlist::Override>& settings) {
  check.evaluation = evaluate_case_file(check.file, settings);
  fs::path golden_file = golden_path(check.file);
  if (fs::exists(golden_file)) {
    try {
      check.golden = read_golden(golden_file);
      check.has_golden = true;
    } catch (const netlist::InputError& error) {
      check.golden_problem = error.what();
    }
  }
  if (check.evaluation.status != CaseEvaluation::Status::Evaluated || !check.has_golden) {
    check.pass = false;
    return;
  }
  check.rows = compare_with_golden(check.golden, check.evaluation.outcome, analysis::verdict_word(check.evaluation.verdict),
                                   check.evaluation.metrics);
  check.pass = std::all_of(check.rows.begin(), check.rows.end(), [](const Comparison& row) { return row.pass; });
}

std::string deviation_text(const Comparison& row) {
  if (row.allowed == 0.0 && row.deviation == 0.0) return "";
  return fmt::format("{:+.3g} (±{:.3g})", row.deviation, row.allowed);
}

std::string case_name(const std::string& file) { return fs::path(file).filename().string(); }

}  // namespace

std::vector<CaseCheck> check_cases(const std::vector<std::string>& files, int jobs,
                                   const std::vector<netlist::Override>& settings) {
  std::vector<CaseCheck> checks(files.size());
  for (std::size_t i = 0; i < files.size(); ++i) checks[i].file = files[i];
  // Each case writes its own slot, so the table does not depend on the thread count.
  for_each_index(checks.size(), jobs, [&](std::size_t i) { check_one(checks[i], settings); });
  return checks;
}

std::string CheckSummary::closing_line() const {
  return fmt::format("check: {} passed, {} failed\n", total - failed, failed);
}

CheckSummary summarise_checks(const std::vector<CaseCheck>& checks, bool show_all) {
  // Table of changes (all rows with --all), then one JUnit case per stored case.
  std::string table = fmt::format("{:<34} {:<34} {:>18} {:>18} {:>22} {}\n", "case", "item", "expected", "actual",
                                  "deviation (allowed)", "status");
  bool any_row = false;
  CheckSummary summary;
  summary.total = checks.size();
  for (const auto& check : checks) {
    JunitCase item;
    item.name = case_name(check.file);
    item.seconds = check.evaluation.seconds;
    std::string detail;
    if (check.evaluation.status != CaseEvaluation::Status::Evaluated) {
      item.error = true;
      item.message = fmt::format("{}: {}", status_word(check.evaluation.status), check.evaluation.message);
      detail = check.evaluation.message;
      table += fmt::format("{:<34} {:<34} {:>18} {:>18} {:>22} {}\n", item.name, "(evaluation)", "-",
                           status_word(check.evaluation.status), "", "ERROR");
      any_row = true;
    } else if (!check.has_golden) {
      item.failed = true;
      item.message = check.golden_problem.empty() ? "no golden results; run `linkrise check --update` to create them"
                                                  : check.golden_problem;
      detail = item.message;
      table += fmt::format("{:<34} {:<34} {:>18} {:>18} {:>22} {}\n", item.name, "(golden file)", "-",
                           check.golden_problem.empty() ? "missing" : "unreadable", "",
                           check.golden_problem.empty() ? "NEW" : "ERROR");
      any_row = true;
    } else {
      for (const auto& row : check.rows) {
        std::string line = fmt::format("{:<34} {:<34} {:>18} {:>18} {:>22} {}\n", item.name, row.item, row.expected,
                                       row.actual, deviation_text(row), row.pass ? "ok" : "CHANGED");
        if (!row.pass) detail += line;
        if (!row.pass || show_all) {
          table += line;
          any_row = true;
        }
      }
      if (!check.pass) {
        item.failed = true;
        item.message = "results moved beyond tolerance";
      }
    }
    if (!check.pass) ++summary.failed;
    item.detail = detail;
    summary.junit.push_back(item);
  }
  if (any_row) summary.table = table;
  return summary;
}

std::vector<GoldenUpdate> golden_updates(const std::vector<CaseCheck>& checks) {
  std::vector<GoldenUpdate> updates;
  for (const auto& check : checks) {
    GoldenUpdate update;
    if (check.evaluation.status != CaseEvaluation::Status::Evaluated) {
      update.listing = fmt::format("not updated {}: {}\n", case_name(check.file), check.evaluation.message);
      update.error = true;
      updates.push_back(update);
      continue;
    }
    Golden updated = golden_from(check.evaluation.outcome, analysis::verdict_word(check.evaluation.verdict), check.evaluation.metrics,
                                 check.has_golden ? &check.golden : nullptr);
    if (check.has_golden) {
      // Every stored value that differs in the digits the golden file keeps, however small the change.
      std::vector<std::string> changes;
      if (check.golden.outcome != updated.outcome)
        changes.push_back(fmt::format("  {:<34} {} -> {}", "outcome", check.golden.outcome, updated.outcome));
      if (check.golden.verdict != updated.verdict)
        changes.push_back(fmt::format("  {:<34} {} -> {}", "verdict", check.golden.verdict, updated.verdict));
      for (const auto& old_metric : check.golden.metrics) {
        const GoldenMetric* now = nullptr;
        for (const auto& metric : updated.metrics) {
          if (metric.name == old_metric.name) now = &metric;
        }
        std::string before = fmt::format("{:.10g} {}", old_metric.value, old_metric.unit);
        std::string after = now ? fmt::format("{:.10g} {}", now->value, now->unit) : std::string("(dropped)");
        if (before != after) changes.push_back(fmt::format("  {:<34} {} -> {}", old_metric.name, before, after));
      }
      if (changes.empty()) continue;  // nothing moved: leave the file alone
      update.listing = fmt::format("updating {}:\n", golden_path(check.file).string());
      for (const auto& line : changes) update.listing += line + "\n";
    } else {
      update.listing = fmt::format("creating {} with {} metric(s), outcome {}, verdict {}\n",
                                   golden_path(check.file).string(), updated.metrics.size(), updated.outcome,
                                   updated.verdict);
    }
    update.file = golden_path(check.file);
    update.text = golden_text(updated, case_name(check.file));
    updates.push_back(update);
  }
  return updates;
}

}  // namespace linkrise::app
