#include "app/output/text_format.h"
#include "app/studies/sweep.h"


#include <fmt/format.h>

#include "analysis/metrics.h"
#include "netlist/case.h"

namespace linkrise::app {
using netlist::InputError;

std::vector<netlist::Override> Sweep::overrides(std::size_t point) const {
  std::vector<netlist::Override> changes;
  for (std::size_t p = 0; p < parameters.size(); ++p) {
    const VariedParameter& parameter = parameters[p];
    changes.push_back(netlist::Override{parameter.path, parameter.values[points[point][p]], parameter.mark});
  }
  return changes;
}

Sweep run_sweep(const std::string& case_file, const std::vector<netlist::Override>& settings,
                const std::vector<VariedParameter>& parameters, int jobs, const std::string& progress_label) {
  if (parameters.empty() || parameters.size() > 2) {
    throw InputError(netlist::SourceMark{"command line", 0, 0}, "a sweep varies one or two parameters",
                     "give --vary once or twice");
  }
  Sweep sweep;
  sweep.case_file = case_file;
  sweep.parameters = parameters;
  const netlist::CaseDocument base = netlist::CaseDocument::load(case_file).with(settings);
  const netlist::Case nominal = base.validate();
  sweep.title = nominal.title;
  for (std::size_t a = 0; a < parameters[0].values.size(); ++a) {
    if (parameters.size() == 1) {
      sweep.points.push_back({a});
      continue;
    }
    for (std::size_t b = 0; b < parameters[1].values.size(); ++b) sweep.points.push_back({a, b});
  }
  // Paths are checked once up front, so a misspelt one fails before any simulation.
  (void)base.with(sweep.overrides(0));
  for (const auto& parameter : parameters) {
    std::optional<netlist::Quantity> nominal;
    try {
      nominal = base.quantity_at(parameter.path, parameter.mark);
    } catch (const InputError&) {
      // The case writes no quantity there (a word, a block): the column's unit comes from the values alone.
    }
    sweep.columns.push_back(parameter_column(parameter, nominal));
  }
  sweep.results = run_study(
      sweep.points.size(), [&](std::size_t i) { return base.with(sweep.overrides(i)); }, jobs, progress_label);
  reject_input_errors(sweep.results, case_file, [&](std::size_t i) {
    std::string label = fmt::format("sweep point {}", i + 1);
    for (const auto& change : sweep.overrides(i)) label += fmt::format(" ({} = {})", change.path, change.value);
    return label;
  });
  sweep.results.accuracy = check_study_accuracy(base);
  sweep.headline = headline_metrics(nominal, sweep.results.columns);
  return sweep;
}

std::string sweep_text(const Sweep& sweep, const std::vector<std::string>& metrics) {
  std::string out = fmt::format("linkrise sweep — {}\n", sweep.title);
  out += fmt::format("  accuracy: {}\n", accuracy_text(sweep.results.accuracy));
  std::vector<std::string> header{"point"};
  for (const auto& parameter : sweep.parameters) header.push_back(parameter.path);
  for (const auto& metric : metrics) header.push_back(metric);
  header.push_back("outcome");
  header.push_back("verdict");
  std::vector<std::vector<std::string>> rows;
  const StudyResults& results = sweep.results;
  for (std::size_t i = 0; i < sweep.points.size(); ++i) {
    const PointResult& point = results.points[i];
    std::vector<std::string> row{std::to_string(i + 1)};
    for (std::size_t p = 0; p < sweep.columns.size(); ++p) row.push_back(sweep.columns[p].display(sweep.points[i][p]));
    for (const auto& metric : metrics) {
      row.push_back(analysis::format_metric(results.value(i, metric), results.columns[results.column(metric)].unit));
    }
    row.push_back(point.evaluated() ? point.outcome : "-");
    row.push_back(point.verdict_word());
    rows.push_back(std::move(row));
  }
  out += text_table(header, rows, 1 + sweep.parameters.size());
  for (std::size_t i = 0; i < results.points.size(); ++i) {
    if (!results.points[i].evaluated()) out += fmt::format("  point {}: {}\n", i + 1, results.points[i].message);
  }
  return out;
}

std::string sweep_csv(const Sweep& sweep) {
  std::string out = "point";
  for (const auto& column : sweep.columns) out.append(",").append(csv_text(column.header()));
  out += ",status,outcome,verdict";
  for (const auto& column : sweep.results.columns) out.append(",").append(csv_text(fmt::format("{} [{}]", column.name, column.unit)));
  out += "\n";
  for (std::size_t i = 0; i < sweep.points.size(); ++i) {
    const PointResult& point = sweep.results.points[i];
    out += std::to_string(i + 1);
    for (std::size_t p = 0; p < sweep.columns.size(); ++p) {
      const ParameterColumn& column = sweep.columns[p];
      const std::size_t k = sweep.points[i][p];
      out.append(",").append(column.numeric() ? csv_number(column.unit.shown(column.values[k]))
                                              : csv_text(column.texts[k]));
    }
    out += fmt::format(",{},{},{}", csv_text(status_word(point.status)), csv_text(point.outcome), csv_text(analysis::verdict_word(point.verdict)));
    for (double value : point.values) out.append(",").append(csv_number(value));
    out += "\n";
  }
  return out;
}

}  // namespace linkrise::app
