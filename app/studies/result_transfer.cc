#include "app/studies/result_transfer.h"

#include <cstdint>

namespace linkrise::app {
namespace {

template <class Enum>
void put_word(ByteWriter& out, Enum value) {
  out.put(static_cast<std::uint64_t>(value));
}

template <class Enum>
Enum word(ByteReader& in) {
  return static_cast<Enum>(in.count());
}

void put_flag(ByteWriter& out, bool flag) { out.put(static_cast<std::uint64_t>(flag ? 1 : 0)); }
bool flag(ByteReader& in) { return in.count() != 0; }

}  // namespace

void save_point(ByteWriter& out, const PointResult& point) {
  put_word(out, point.status);
  out.put(point.message);
  out.put(point.outcome);
  put_word(out, point.verdict);
  out.put(point.values);
}

PointResult load_point(ByteReader& in) {
  PointResult point;
  point.status = word<CaseEvaluation::Status>(in);
  point.message = in.text();
  point.outcome = in.text();
  point.verdict = word<analysis::Verdict>(in);
  point.values = in.numbers();
  return point;
}

void save_metrics(ByteWriter& out, const std::vector<MetricValue>& metrics) {
  out.put(static_cast<std::uint64_t>(metrics.size()));
  for (const auto& metric : metrics) {
    out.put(metric.name);
    out.put(metric.value);
    out.put(metric.unit);
  }
}

std::vector<MetricValue> load_metrics(ByteReader& in) {
  std::vector<MetricValue> metrics(in.count());
  for (auto& metric : metrics) {
    metric.name = in.text();
    metric.value = in.number();
    metric.unit = in.text();
  }
  return metrics;
}

void save_evaluation(ByteWriter& out, const CaseEvaluation& evaluation) {
  put_word(out, evaluation.status);
  out.put(evaluation.message);
  out.put(evaluation.outcome);
  put_word(out, evaluation.verdict);
  save_metrics(out, evaluation.metrics);
  out.put(static_cast<std::uint64_t>(evaluation.margins.size()));
  for (const auto& margin : evaluation.margins) {
    out.put(margin.constraint);
    out.put(margin.margin);
  }
  out.put(evaluation.seconds);
}

CaseEvaluation load_evaluation(ByteReader& in) {
  CaseEvaluation evaluation;
  evaluation.status = word<CaseEvaluation::Status>(in);
  evaluation.message = in.text();
  evaluation.outcome = in.text();
  evaluation.verdict = word<analysis::Verdict>(in);
  evaluation.metrics = load_metrics(in);
  evaluation.margins.resize(in.count());
  for (auto& margin : evaluation.margins) {
    margin.constraint = in.text();
    margin.margin = in.number();
  }
  evaluation.seconds = in.number();
  return evaluation;
}

void save_row(ByteWriter& out, const DetectionRow& row) {
  out.put(row.scenario);
  out.put(row.description);
  put_word(out, row.expected);
  put_word(out, row.actual);
  put_flag(out, row.applicable);
  put_flag(out, row.solver_failed);
  out.put(row.note);
  out.put(static_cast<std::uint64_t>(row.attempt));
  out.put(static_cast<std::uint64_t>(row.attempts));
  out.put(std::vector<double>{row.detection_time, row.peak_temperature, row.temperature_rating, row.energy,
                              row.energy_rating, row.end_time});
  put_flag(out, row.ratings_held);
  out.put(row.broken_rating);
  put_flag(out, row.pass);
  out.put(static_cast<std::uint64_t>(row.rating_margins.size()));
  for (const auto& [constraint, margin] : row.rating_margins) {
    out.put(constraint);
    out.put(margin);
  }
  out.put(row.link_time);
  out.put(row.link_voltage);
}

DetectionRow load_row(ByteReader& in) {
  DetectionRow row;
  row.scenario = in.text();
  row.description = in.text();
  row.expected = word<netlist::SequenceOutcome>(in);
  row.actual = word<netlist::SequenceOutcome>(in);
  row.applicable = flag(in);
  row.solver_failed = flag(in);
  row.note = in.text();
  row.attempt = static_cast<int>(in.count());
  row.attempts = static_cast<int>(in.count());
  const std::vector<double> numbers = in.numbers();
  row.detection_time = numbers.at(0);
  row.peak_temperature = numbers.at(1);
  row.temperature_rating = numbers.at(2);
  row.energy = numbers.at(3);
  row.energy_rating = numbers.at(4);
  row.end_time = numbers.at(5);
  row.ratings_held = flag(in);
  row.broken_rating = in.text();
  row.pass = flag(in);
  row.rating_margins.resize(in.count());
  for (auto& [constraint, margin] : row.rating_margins) {
    constraint = in.text();
    margin = in.number();
  }
  row.link_time = in.numbers();
  row.link_voltage = in.numbers();
  return row;
}

void save_path(ByteWriter& out, const std::optional<analysis::ChargePath>& path) {
  put_flag(out, path.has_value());
  if (!path) return;
  put_flag(out, path->measured);
  out.put(std::vector<double>{path->source_voltage, path->path_resistance, path->at_time, path->closing_level});
  out.put(path->explanation);
}

std::optional<analysis::ChargePath> load_path(ByteReader& in) {
  if (!flag(in)) return std::nullopt;
  analysis::ChargePath path;
  path.measured = flag(in);
  const std::vector<double> numbers = in.numbers();
  path.source_voltage = numbers.at(0);
  path.path_resistance = numbers.at(1);
  path.at_time = numbers.at(2);
  path.closing_level = numbers.at(3);
  path.explanation = in.text();
  return path;
}

void save_stall(ByteWriter& out, const std::optional<analysis::StallDiagnostic>& stall) {
  put_flag(out, stall.has_value());
  if (!stall) return;
  put_flag(out, stall->applicable);
  out.put(std::vector<double>{stall->source_voltage, stall->path_resistance, stall->load_power, stall->maximum_power,
                              stall->equilibrium, stall->lower_root, stall->resistive_below, stall->closing_level,
                              stall->link_voltage});
  put_flag(out, stall->stalls);
  put_flag(out, stall->latched);
  out.put(stall->explanation);
}

std::optional<analysis::StallDiagnostic> load_stall(ByteReader& in) {
  if (!flag(in)) return std::nullopt;
  analysis::StallDiagnostic stall;
  stall.applicable = flag(in);
  const std::vector<double> numbers = in.numbers();
  stall.source_voltage = numbers.at(0);
  stall.path_resistance = numbers.at(1);
  stall.load_power = numbers.at(2);
  stall.maximum_power = numbers.at(3);
  stall.equilibrium = numbers.at(4);
  stall.lower_root = numbers.at(5);
  stall.resistive_below = numbers.at(6);
  stall.closing_level = numbers.at(7);
  stall.link_voltage = numbers.at(8);
  stall.stalls = flag(in);
  stall.latched = flag(in);
  stall.explanation = in.text();
  return stall;
}

}  // namespace linkrise::app
