#include "app/studies/study_run.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <mutex>
#include <utility>

#include <fmt/format.h>

#include "app/studies/study_parameters.h"
#include "app/studies/rank_pool.h"
#include "app/studies/result_transfer.h"
#include "solver/waveform.h"
#include "netlist/input_error.h"

namespace linkrise::app {

int StudyResults::column(const std::string& name) const {
  for (std::size_t i = 0; i < columns.size(); ++i) {
    if (columns[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

double StudyResults::value(std::size_t point, const std::string& name) const {
  int c = column(name);
  if (point >= points.size()) points.at(point);  // throws out_of_range
  if (c < 0 || static_cast<std::size_t>(c) >= points.width()) return std::numeric_limits<double>::quiet_NaN();
  return points.value(point, static_cast<std::size_t>(c));
}

long StudyResults::first_input_error() const {
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (points.status(i) == CaseEvaluation::Status::InputError) return static_cast<long>(i);
  }
  return -1;
}

bool StudyResults::any_solver_failure() const {
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (points.status(i) == CaseEvaluation::Status::SolverFailure) return true;
  }
  return false;
}

std::string StudyResults::outcome_counts() const {
  std::vector<std::pair<std::string, std::size_t>> counts;
  for (const auto& point : points) {
    const std::string word = point.outcome_word();
    auto it = std::find_if(counts.begin(), counts.end(), [&](const auto& entry) { return entry.first == word; });
    if (it == counts.end()) {
      counts.emplace_back(word, 1);
    } else {
      ++it->second;
    }
  }
  std::string text;
  for (const auto& [word, count] : counts) text += fmt::format("{}{} {}", text.empty() ? "" : ", ", count, word);
  return text;
}

void reject_input_errors(const StudyResults& results, const std::string& file,
                         const std::function<std::string(std::size_t)>& label_of) {
  long bad = results.first_input_error();
  if (bad < 0) return;
  auto index = static_cast<std::size_t>(bad);
  throw netlist::InputError(netlist::SourceMark{file, 0, 0},
                            fmt::format("{} is not a valid case:\n{}", label_of(index), results.points[index].message),
                            "change the value the study gives it");
}

namespace {
// `values` holds one NaN per column on entry.
void align_into(const std::vector<MetricValue>& metrics, const std::vector<MetricColumn>& columns,
                std::vector<double>& values) {
  // The metric order is the same from run to run of one circuit structure, so try the same position first.
  for (std::size_t i = 0; i < metrics.size(); ++i) {
    if (i < columns.size() && columns[i].name == metrics[i].name) {
      values[i] = metrics[i].value;
      continue;
    }
    for (std::size_t c = 0; c < columns.size(); ++c) {
      if (columns[c].name == metrics[i].name) {
        values[c] = metrics[i].value;
        break;
      }
    }
  }
}

std::vector<double> aligned(const std::vector<MetricValue>& metrics, const std::vector<MetricColumn>& columns) {
  std::vector<double> values(columns.size(), std::numeric_limits<double>::quiet_NaN());
  align_into(metrics, columns, values);
  return values;
}
}  // namespace

StudyResults run_study(std::size_t count, const DocumentOf& document_of, int jobs,
                       const std::string& progress_label, const std::vector<MetricColumn>* fixed_columns) {
  StudyResults results;
  results.points.resize(count, fixed_columns ? fixed_columns->size() : 0);
  // Without fixed columns a point's named metrics wait here until the union of the columns is known.
  std::vector<PointResult> pending(fixed_columns ? 0 : count);
  std::mutex storing;  // the point table is shared by the workers
  auto keep = [&](std::size_t i, PointResult point) {
    if (!fixed_columns) {
      pending[i] = std::move(point);
      return;
    }
    std::lock_guard<std::mutex> lock(storing);
    results.points.store(i, point);
  };
  std::vector<std::vector<MetricValue>> raw(fixed_columns ? 0 : count);
  // Between ranks travel the point and, until the columns are known, its named metrics.
  const PointTransfer transfer{[&](std::size_t i, ByteWriter& out) {
                                 if (fixed_columns) {
                                   std::unique_lock<std::mutex> lock(storing);
                                   const PointResult point = results.points[i];
                                   lock.unlock();
                                   save_point(out, point);
                                 } else {
                                   save_point(out, pending[i]);
                                 }
                                 if (!fixed_columns) save_metrics(out, raw[i]);
                               },
                               [&](std::size_t i, ByteReader& in) {
                                 keep(i, load_point(in));
                                 if (!fixed_columns) raw[i] = load_metrics(in);
                               }};
  for_each_index_on_ranks(
      count, jobs,
      [&](std::size_t i) {
        // One row store per worker thread, reused by every sample it runs: no waveform allocation per sample.
        thread_local solver::Waveform row_store;
        CaseEvaluation evaluation = evaluate_case_document(at_study_accuracy(document_of(i)), &row_store);
        PointResult point;
        point.status = evaluation.status;
        point.message = std::move(evaluation.message);
        point.outcome = std::move(evaluation.outcome);
        point.verdict = evaluation.verdict;
        if (fixed_columns) {
          point.values = aligned(evaluation.metrics, *fixed_columns);
        } else {
          raw[i] = std::move(evaluation.metrics);
        }
        keep(i, std::move(point));
      },
      transfer, progress_label);
  if (fixed_columns) {
    results.columns = *fixed_columns;
    return results;
  }
  for (const auto& metrics : raw) {
    for (const auto& metric : metrics) {
      if (results.column(metric.name) < 0) results.columns.push_back(MetricColumn{metric.name, metric.unit});
    }
  }
  results.points.resize(count, results.columns.size());
  for (std::size_t i = 0; i < count; ++i) {
    pending[i].values = aligned(raw[i], results.columns);
    results.points.store(i, pending[i]);
  }
  return results;
}

bool larger_is_better(const std::string& metric) {
  std::size_t dot = metric.rfind('.');
  std::string last = dot == std::string::npos ? metric : metric.substr(dot + 1);
  return last.rfind("minimum_", 0) == 0 || last == "stall_equilibrium";
}

std::vector<std::string> headline_metrics(const netlist::Case& spec, const std::vector<MetricColumn>& columns,
                                          std::size_t at_least) {
  std::vector<std::string> names;
  auto add = [&](const std::string& name) {
    bool known = std::any_of(columns.begin(), columns.end(), [&](const MetricColumn& c) { return c.name == name; });
    if (known && std::find(names.begin(), names.end(), name) == names.end()) names.push_back(name);
  };
  for (const auto& limit : spec.limits) add(limit.metric);
  if (spec.sequence) {
    add("sequence.precharge_time");
    add(spec.sequence->resistor + ".peak_temperature");
    add(spec.sequence->resistor + ".energy");
  }
  for (const auto& column : columns) {
    if (names.size() >= at_least) break;
    add(column.name);
  }
  return names;
}

std::vector<std::string> chosen_metrics(const std::string& list, const std::vector<MetricColumn>& columns,
                                        const netlist::SourceMark& mark) {
  std::vector<std::string> names, known;
  for (const auto& column : columns) known.push_back(column.name);
  std::size_t start = 0;
  while (start <= list.size()) {
    std::size_t comma = list.find(',', start);
    std::string name = list.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    if (!name.empty()) {
      if (std::find(known.begin(), known.end(), name) == known.end()) {
        std::string suggestion = netlist::closest_match(name, known);
        throw netlist::InputError(mark, fmt::format("'{}' is not a metric of this case", name),
                                  suggestion.empty() ? "see the CSV header for the metric names"
                                                     : fmt::format("did you mean '{}'?", suggestion));
      }
      names.push_back(name);
    }
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  return names;
}

std::vector<std::string> shown_metrics(const std::string& option, const std::vector<std::string>& headline,
                                       const std::vector<MetricColumn>& columns) {
  return option.empty() ? headline : chosen_metrics(option, columns, option_mark("--metrics", 1));
}

std::string text_table(const std::vector<std::string>& header, const std::vector<std::vector<std::string>>& rows,
                       std::size_t left) {
  // Display width in code points, so 'µ', '²' and '…' do not push the columns apart.
  auto width = [](const std::string& text) {
    std::size_t n = 0;
    for (unsigned char c : text) n += (c & 0xC0) != 0x80;
    return n;
  };
  std::vector<std::size_t> widths(header.size(), 0);
  auto measure = [&](const std::vector<std::string>& row) {
    for (std::size_t i = 0; i < row.size() && i < widths.size(); ++i) widths[i] = std::max(widths[i], width(row[i]));
  };
  measure(header);
  for (const auto& row : rows) measure(row);
  auto line = [&](const std::vector<std::string>& row) {
    std::string out = " ";
    for (std::size_t i = 0; i < widths.size(); ++i) {
      std::string cell = i < row.size() ? row[i] : "";
      std::string pad(widths[i] - std::min(widths[i], width(cell)), ' ');
      out.append(" ").append((i < left ? cell + pad : pad + cell));
    }
    while (!out.empty() && out.back() == ' ') out.pop_back();
    return out + "\n";
  };
  std::string out = line(header);
  for (const auto& row : rows) out += line(row);
  return out;
}

}  // namespace linkrise::app
