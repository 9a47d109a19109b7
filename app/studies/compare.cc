#include "app/output/text_format.h"
#include "app/studies/compare.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/output/json_fields.h"
#include "app/studies/faults_json.h"
#include "app/studies/study_parameters.h"
#include "netlist/case_document.h"

namespace linkrise::app {
using netlist::InputError;

std::vector<std::size_t> VariantComparison::best(std::size_t column) const {
  const std::string& name = results.columns.at(column).name;
  bool larger = larger_is_better(name);
  std::vector<std::size_t> reached;
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    if (column < results.points.width() && !std::isnan(results.points.value(i, column))) reached.push_back(i);
  }
  if (reached.size() < 2) return {};
  auto value = [&](std::size_t i) { return results.points.value(i, column); };
  double best_value = value(reached.front());
  for (std::size_t i : reached) best_value = larger ? std::max(best_value, value(i)) : std::min(best_value, value(i));
  // Values that print the same (the terminal's and the report's precision) tie and share the mark: a difference
  // nobody can read is no reason to prefer a variant.
  const std::string& unit = results.columns.at(column).unit;
  const std::string best_text = analysis::format_metric(best_value, unit);
  std::vector<std::size_t> best;
  for (std::size_t i : reached) {
    if (analysis::format_metric(value(i), unit) == best_text) best.push_back(i);
  }
  if (best.size() == reached.size()) return {};
  return best;
}

bool VariantComparison::faults_failed() const {
  return std::any_of(matrices.begin(), matrices.end(), [](const DetectionMatrix& matrix) { return !matrix.pass(); });
}

VariantComparison compare_variants(const std::string& case_file, const std::vector<netlist::Override>& settings, int jobs,
                                   bool faults) {
  const netlist::CaseDocument base = netlist::CaseDocument::load(case_file).with(settings);
  const netlist::Case nominal = base.validate();
  const std::vector<netlist::VariantSpec>& variants = nominal.variants;
  if (variants.empty()) {
    throw InputError(netlist::SourceMark{case_file, 1, 1}, "the case has no 'variants:' to compare",
                     "add e.g. 'variants: [{name: r_56, set: {r_pre.resistance: 56 Ohm}}]'");
  }
  std::vector<netlist::CaseDocument> documents{base};
  for (const auto& variant : variants) documents.push_back(base.with_variant(variant));
  VariantComparison comparison;
  comparison.case_file = case_file;
  comparison.title = nominal.title;
  comparison.names.push_back("nominal");
  comparison.notes.push_back("the case as written");
  for (const auto& variant : variants) {
    comparison.names.push_back(variant.name);
    comparison.notes.push_back(variant.note);
  }
  comparison.results = run_study(documents.size(), [&](std::size_t i) { return documents[i]; }, jobs);
  comparison.results.accuracy = check_study_accuracy(base);
  comparison.headline = headline_metrics(nominal, comparison.results.columns);
  reject_input_errors(comparison.results, case_file,
                      [&](std::size_t i) { return i == 0 ? std::string("the nominal case") : fmt::format("variant '{}'", comparison.names[i]); });
  if (faults) {
    // Each matrix runs its scenarios on the worker pool; the variants go one after the other.
    for (std::size_t i = 0; i < documents.size(); ++i) {
      comparison.matrices.push_back(
          detection_matrix(documents[i], jobs, i == 0 ? ScenarioFit::MustFit : ScenarioFit::MayNotFit));
    }
  }
  return comparison;
}

namespace {
// The fault scenarios table: one row per scenario (in the nominal matrix's order), one column per variant.
std::string faults_table(const VariantComparison& comparison) {
  if (comparison.matrices.empty()) return "";
  std::vector<std::string> header{"scenario (expected)"};
  for (const auto& name : comparison.names) header.push_back(name);
  std::vector<std::vector<std::string>> rows;
  for (const auto& nominal_row : comparison.matrices.front().rows) {
    std::vector<std::string> row{fmt::format("{} ({})", nominal_row.scenario, nominal_row.expected_word())};
    for (const auto& matrix : comparison.matrices) {
      const DetectionRow* found = matrix.find(nominal_row.scenario);
      if (!found) {
        row.push_back("-");
        continue;
      }
      // A row whose expectation follows from the variant's own data (constant power from the start) says so.
      std::string expected = found->expected != nominal_row.expected ? " (expected " + found->expected_word() + ")" : "";
      row.push_back(found->actual_word() + expected + (found->pass ? "" : " FAIL"));
    }
    rows.push_back(std::move(row));
  }
  std::vector<std::string> verdict{"matrix"};
  for (const auto& matrix : comparison.matrices) verdict.push_back(matrix.pass() ? "pass" : "fail");
  rows.push_back(verdict);
  return "fault scenarios (outcome per variant; FAIL: not the expected outcome, or a part rating broken)\n" +
         text_table(header, rows);
}
}  // namespace

std::string comparison_text(const VariantComparison& comparison, bool all_metrics) {
  std::string out = fmt::format("linkrise compare — {}\n", comparison.title);
  out += fmt::format("  accuracy: {}\n", accuracy_text(comparison.results.accuracy));
  std::vector<std::string> header{"metric"};
  for (const auto& name : comparison.names) header.push_back(name);
  std::vector<std::vector<std::string>> rows;
  const StudyResults& results = comparison.results;
  std::size_t hidden = 0;
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    const auto& headline = comparison.headline;
    if (!all_metrics && std::find(headline.begin(), headline.end(), results.columns[c].name) == headline.end()) {
      ++hidden;
      continue;
    }
    std::vector<std::string> row{results.columns[c].name};
    auto best = comparison.best(c);
    for (std::size_t i = 0; i < results.points.size(); ++i) {
      std::string cell = analysis::format_metric(results.points.value(i, c), results.columns[c].unit);
      bool marked = std::find(best.begin(), best.end(), i) != best.end();
      row.push_back(cell + (marked ? " *" : "  "));
    }
    rows.push_back(std::move(row));
  }
  std::vector<std::string> outcome{"outcome"}, verdict{"verdict"};
  for (const auto& point : results.points) {
    outcome.push_back((point.evaluated() ? point.outcome : "-") + "  ");
    verdict.push_back(point.verdict_word() + "  ");
  }
  rows.push_back(outcome);
  rows.push_back(verdict);
  out += text_table(header, rows);
  out += "  * best in the row: smaller is better, except minimum_* metrics and sequence.stall_equilibrium (larger is\n"
         "    better); values that print the same tie, and a row where all tie is not marked; '-' is not reached\n";
  if (hidden > 0) out += fmt::format("  {} more metrics in compare.csv and compare.json (--all shows them here)\n", hidden);
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    if (!results.points[i].evaluated()) {
      out += fmt::format("  {}: {}\n", comparison.names[i], results.points[i].message);
    }
  }
  return out + faults_table(comparison);
}

std::string comparison_faults_csv(const VariantComparison& comparison) {
  std::string out =
      "variant,scenario,expected,actual,attempt [1],attempts [1],detection_time [s],energy [J],peak_temperature [degC],"
      "pass\n";
  for (std::size_t i = 0; i < comparison.matrices.size(); ++i) {
    for (const auto& row : comparison.matrices[i].rows) {
      out += fmt::format("{},{},{},{},{},{},{},{},{},{}\n", csv_text(comparison.names[i]), csv_text(row.scenario),
                         row.expected_word(), row.actual_word(), row.attempt, row.attempts, csv_number(row.detection_time),
                         csv_number(row.energy), csv_number(row.peak_temperature), row.pass ? "yes" : "no");
    }
  }
  return out;
}

std::string comparison_csv(const VariantComparison& comparison) {
  std::string out = "metric,unit,better";
  for (const auto& name : comparison.names) out.append(",").append(csv_text(name));
  out += ",best\n";
  const StudyResults& results = comparison.results;
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    const auto& column = results.columns[c];
    out += fmt::format("{},{},{}", csv_text(column.name), csv_text(column.unit),
                       larger_is_better(column.name) ? "larger" : "smaller");
    for (const auto& point : results.points) out.append(",").append(csv_number(point.values[c]));
    std::string best;
    for (std::size_t i : comparison.best(c)) best.append(best.empty() ? "" : ";").append(comparison.names[i]);
    out.append(",").append(csv_text(best) + "\n");
  }
  out += "outcome,,";
  for (const auto& point : results.points) out.append(",").append(csv_text(point.evaluated() ? point.outcome : ""));
  out += ",\nverdict,,";
  for (const auto& point : results.points) out.append(",").append(csv_text(point.verdict_word()));
  out += ",\n";
  return out;
}

namespace {
nlohmann::json comparison_json_value(const VariantComparison& comparison) {
  nlohmann::json variants = nlohmann::json::array();
  const StudyResults& results = comparison.results;
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    const auto& point = results.points[i];
    nlohmann::json metrics = nlohmann::json::object();
    for (std::size_t c = 0; c < results.columns.size(); ++c) {
      metrics[results.columns[c].name] = quantity(point.values[c], results.columns[c].unit);
    }
    variants.push_back({{"name", comparison.names[i]},
                        {"status", status_word(point.status)},
                        {"message", point.message},
                        {"outcome", point.outcome},
                        {"verdict", analysis::verdict_word(point.verdict)},
                        {"metrics", metrics}});
    if (i < comparison.matrices.size()) variants.back()["faults"] = detection_matrix_json(comparison.matrices[i]);
  }
  nlohmann::json best = nlohmann::json::object();
  for (std::size_t c = 0; c < results.columns.size(); ++c) {
    nlohmann::json names = nlohmann::json::array();
    for (std::size_t i : comparison.best(c)) names.push_back(comparison.names[i]);
    best[results.columns[c].name] = {{"better", larger_is_better(results.columns[c].name) ? "larger" : "smaller"},
                                     {"best", names}};
  }
  return with_file_head({{"variants", variants},
                         {"best", best}},
                        comparison.title, comparison.case_file);
}
}  // namespace

std::string comparison_json(const VariantComparison& comparison) {
  return json_text(comparison_json_value(comparison));
}

}  // namespace linkrise::app
