#include "app/output/text_format.h"
#include "app/studies/spread.h"

#include <algorithm>
#include <cmath>
#include <iostream>
#include <ostream>
#include <sstream>
#include <tuple>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/studies/random_stream.h"
#include "app/output/json_fields.h"
#include "app/studies/study_parameters.h"
#include "netlist/case.h"

namespace linkrise::app {
using netlist::InputError;

namespace {
constexpr std::size_t kCornerWarning = 256;
constexpr std::size_t kCornerLimit = 65536;
}  // namespace

std::optional<std::pair<int, int>> read_shard(const std::string& text) {
  std::size_t slash = text.find('/');
  if (slash == std::string::npos) return std::nullopt;
  try {
    std::size_t used_k = 0, used_n = 0;
    int k = std::stoi(text.substr(0, slash), &used_k);
    int n = std::stoi(text.substr(slash + 1), &used_n);
    if (used_k != slash || used_n != text.size() - slash - 1 || n < 1 || k < 1 || k > n) return std::nullopt;
    return std::pair{k, n};
  } catch (const std::exception&) {
    return std::nullopt;  // not a number, or out of int's range
  }
}

void parse_shard(const std::string& text, SpreadPlan& plan) {
  auto shard = read_shard(text);
  if (!shard) {
    throw InputError(option_mark("--shard", 1), fmt::format("'{}' is not a shard k/n with 1 <= k <= n", text),
                     "write e.g. '--shard 2/4'");
  }
  std::tie(plan.shard, plan.shards) = *shard;
}

SpreadPlan spread_plan(bool corners, std::size_t samples, std::uint64_t seed, const std::string& shard,
                       const std::string& command) {
  SpreadPlan plan;
  if (corners == (samples > 0)) {
    throw InputError(netlist::SourceMark{"command line", 0, 0}, "choose one study: --corners or --samples N",
                     fmt::format("e.g. 'linkrise {} case.yaml --corners' or 'linkrise {} case.yaml --samples 1000 "
                                 "--seed 7'", command, command));
  }
  plan.corners = corners;
  plan.samples = samples;
  plan.seed = seed;
  if (!shard.empty()) parse_shard(shard, plan);
  return plan;
}

double spread_value(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan, std::size_t index,
                    std::size_t slot) {
  const Tolerance& t = tolerances.at(slot);
  if (plan.corners) return (index >> slot) & 1U ? t.upper : t.lower;
  return draw(t, uniform_draw(plan.seed, index, slot));
}

std::vector<netlist::Override> spread_overrides(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan,
                                                std::size_t index) {
  std::vector<netlist::Override> changes;
  for (std::size_t j = 0; j < tolerances.size(); ++j) {
    changes.push_back(netlist::Override{tolerances[j].path, tolerances[j].text(spread_value(tolerances, plan, index, j)),
                                        tolerances[j].mark});
  }
  return changes;
}

double quantile(const std::vector<double>& sorted, double p) {
  if (sorted.empty()) return std::numeric_limits<double>::quiet_NaN();
  double h = (static_cast<double>(sorted.size()) - 1.0) * p;
  auto low = static_cast<std::size_t>(std::floor(h));
  if (low + 1 >= sorted.size()) return sorted.back();
  return sorted[low] + (h - static_cast<double>(low)) * (sorted[low + 1] - sorted[low]);
}

std::size_t Spread::failed() const {
  return static_cast<std::size_t>(std::count_if(results.points.begin(), results.points.end(), [](const PointResult& p) {
    return p.evaluated() && p.verdict != analysis::Verdict::Pass;
  }));
}

std::size_t population_size(const std::vector<Tolerance>& tolerances, const SpreadPlan& plan) {
  if (!plan.corners) return plan.samples;
  std::size_t k = tolerances.size();
  if (k >= 63 || (std::size_t{1} << k) > kCornerLimit) {
    throw InputError(tolerances.front().mark,
                     fmt::format("{} tolerances make 2^{} corners, more than the {} a corner study runs", k, k,
                                 kCornerLimit),
                     "use Monte Carlo (--samples N) or fewer tolerances");
  }
  const std::size_t corners = std::size_t{1} << k;
  if (corners > kCornerWarning) {
    std::cerr << fmt::format("linkrise: warning: {} tolerances make 2^{} = {} corners; this takes a while\n", k, k,
                             corners);
  }
  return corners;
}

namespace {
// Statistics of metric column c over the points that reached it.
MetricSpread metric_spread(const StudyResults& results, std::size_t c) {
  MetricSpread s;
  s.name = results.columns[c].name;
  s.unit = results.columns[c].unit;
  std::vector<double> values;
  bool larger = larger_is_better(s.name);
  // The worst value is kept, not read again: the column is read point after point (app/studies/point_table.h).
  double worst = 0.0;
  for (std::size_t p = 0; p < results.points.size(); ++p) {
    double v = results.points.value(p, c);
    if (std::isnan(v)) continue;
    values.push_back(v);
    if (s.worst < 0 || (larger ? v < worst : v > worst)) {
      s.worst = static_cast<long>(p);
      worst = v;
    }
  }
  std::sort(values.begin(), values.end());
  s.reached = values.size();
  if (!values.empty()) {
    s.minimum = values.front();
    s.maximum = values.back();
    s.p0_1 = quantile(values, 0.001);
    s.p1 = quantile(values, 0.01);
    s.p50 = quantile(values, 0.5);
    s.p99 = quantile(values, 0.99);
    s.p99_9 = quantile(values, 0.999);
  }
  return s;
}
}  // namespace

Spread run_spread(const std::string& case_file, const std::vector<netlist::Override>& settings,
                  const SpreadPlan& plan, int jobs, const std::string& progress_label) {
  return run_spread(netlist::CaseDocument::load(case_file).with(settings), plan, jobs, progress_label);
}

Spread run_spread(const netlist::CaseDocument& base, const SpreadPlan& plan, int jobs,
                  const std::string& progress_label) {
  const std::string& case_file = base.file();
  Spread spread;
  spread.case_file = case_file;
  spread.plan = plan;
  const netlist::Case nominal = base.validate();
  spread.title = nominal.title;
  spread.tolerances = nominal.tolerances;
  for (const auto& tolerance : spread.tolerances) {
    if (tolerance.unresolved) throw *tolerance.unresolved;
  }
  if (spread.tolerances.empty()) {
    throw InputError(netlist::SourceMark{case_file, 1, 1}, "the case has no 'tolerances:' block to spread",
                     "add e.g. 'tolerances: {r_pre.resistance: {plus_minus: 5 %}}'");
  }
  spread.population = population_size(spread.tolerances, plan);
  spread.range = shard_range(spread.population, plan.shard, plan.shards);

  // The nominal run fixes the metric columns: every sample has the nominal's structure, so one number per
  // column is all a sample keeps.
  spread.nominal = run_study(1, [&](std::size_t) { return base; }, 1);
  reject_input_errors(spread.nominal, case_file, [](std::size_t) { return std::string("the nominal case"); });
  (void)base.with(spread_overrides(spread.tolerances, plan, spread.range.begin));  // paths checked up front
  spread.results = run_study(
      spread.range.size(),
      [&](std::size_t p) { return base.with(spread_overrides(spread.tolerances, plan, spread.index(p))); },
      jobs, progress_label, &spread.nominal.columns);
  reject_input_errors(spread.results, case_file, [&](std::size_t p) {
    std::string label = fmt::format("{} {}", plan.corners ? "corner" : "sample", spread.index(p));
    for (const auto& change : spread_overrides(spread.tolerances, plan, spread.index(p))) {
      label += fmt::format(" ({} = {})", change.path, change.value);
    }
    return label;
  });

  spread.results.accuracy = check_study_accuracy(base);
  summarise_spread(spread, nominal);
  return spread;
}

void summarise_spread(Spread& spread, const netlist::Case& nominal) {
  spread.statistics.clear();
  for (std::size_t c = 0; c < spread.results.columns.size(); ++c) {
    spread.statistics.push_back(metric_spread(spread.results, c));
  }
  spread.headline = headline_metrics(nominal, spread.results.columns);
}

std::string sample_parameters(const Spread& spread, std::size_t point) {
  std::string text;
  for (std::size_t j = 0; j < spread.tolerances.size(); ++j) {
    const Tolerance& t = spread.tolerances[j];
    text += fmt::format("{}{} = {}", text.empty() ? "" : ", ", t.path,
                        t.display(spread_value(spread.tolerances, spread.plan, spread.index(point), j)));
  }
  return text;
}

std::string spread_text(const Spread& spread, const std::vector<std::string>& metrics) {
  std::string out = fmt::format("linkrise spread — {}\n", spread.title);
  if (spread.plan.corners) {
    out += fmt::format("  corners: {} of {} (all combinations of the bounds)", spread.range.size(), spread.population);
  } else {
    out += fmt::format("  Monte Carlo: samples {}..{} of {}, seed {}", spread.range.begin, spread.range.end - 1,
                       spread.population, spread.plan.seed);
  }
  if (spread.plan.shards > 1) out += fmt::format(", shard {}/{}", spread.plan.shard, spread.plan.shards);
  out += "\n  tolerances:\n";
  for (const auto& t : spread.tolerances) out += fmt::format("    {:<28} {}\n", t.path, t.description);
  out += fmt::format("  accuracy: {}\n", accuracy_text(spread.results.accuracy));

  out += fmt::format("  outcomes: {}; verdict failed in {} of {}\n", spread.results.outcome_counts(), spread.failed(),
                     spread.results.points.size());

  std::vector<std::string> header{"metric", "nominal", "min", "p0.1", "p1", "p50", "p99", "p99.9", "max", "reached"};
  std::vector<std::vector<std::string>> rows;
  for (const auto& name : metrics) {
    int c = spread.results.column(name);
    if (c < 0) continue;
    const MetricSpread& s = spread.statistics[static_cast<std::size_t>(c)];
    auto f = [&](double v) { return analysis::format_metric(v, s.unit); };
    rows.push_back({name, f(spread.nominal.points.value(0, static_cast<std::size_t>(c))), f(s.minimum), f(s.p0_1),
                    f(s.p1), f(s.p50), f(s.p99), f(s.p99_9), f(s.maximum),
                    fmt::format("{}", s.reached)});
  }
  out += text_table(header, rows);
  out += "  quantiles: Hyndman & Fan type 7 over the samples that reached the metric\n";
  out += "  worst sample per metric (largest value; smallest for minimum_* metrics):\n";
  for (const auto& name : metrics) {
    int c = spread.results.column(name);
    if (c < 0) continue;
    const MetricSpread& s = spread.statistics[static_cast<std::size_t>(c)];
    if (s.worst < 0) continue;
    auto p = static_cast<std::size_t>(s.worst);
    out += fmt::format("    {} = {} at {} {}: {}\n", name,
                       analysis::format_metric(spread.results.points.value(p, static_cast<std::size_t>(c)), s.unit),
                       spread.plan.corners ? "corner" : "sample", spread.index(p), sample_parameters(spread, p));
  }
  for (std::size_t p = 0; p < spread.results.points.size(); ++p) {
    if (!spread.results.points[p].evaluated()) {
      out += fmt::format("  sample {}: {}\n", spread.index(p), spread.results.points[p].message);
    }
  }
  return out;
}

void write_spread_csv(std::ostream& stream, const Spread& spread) {
  std::string out = spread.plan.corners ? "corner" : "sample";
  for (const auto& t : spread.tolerances) {
    out.append(",").append(csv_text(fmt::format("{} [{}]", t.path, t.shown().symbol)));
  }
  out += ",status,outcome,verdict";
  for (const auto& column : spread.results.columns) out.append(",").append(csv_text(fmt::format("{} [{}]", column.name, column.unit)));
  out += "\n";
  stream << out;
  for (std::size_t p = 0; p < spread.results.points.size(); ++p) {
    const PointResult& point = spread.results.points[p];
    out = std::to_string(spread.index(p));
    for (std::size_t j = 0; j < spread.tolerances.size(); ++j) {
      double v = spread_value(spread.tolerances, spread.plan, spread.index(p), j);
      out.append(",").append(csv_number(spread.tolerances[j].shown().shown(v)));
    }
    out += fmt::format(",{},{},{}", csv_text(status_word(point.status)), csv_text(point.outcome), csv_text(analysis::verdict_word(point.verdict)));
    for (double value : point.values) out.append(",").append(csv_number(value));
    out += "\n";
    stream << out;
  }
}

std::string spread_csv(const Spread& spread) {
  std::ostringstream out;
  write_spread_csv(out, spread);
  return out.str();
}

namespace {
nlohmann::json spread_json_value(const Spread& spread) {
  nlohmann::json tolerances = nlohmann::json::array();
  for (const auto& t : spread.tolerances) {
    const netlist::ShownUnit unit = t.shown();
    tolerances.push_back({{"path", t.path},
                          {"description", t.description},
                          {"distribution", t.shape == Tolerance::Shape::Normal ? "normal" : "uniform"},
                          {"lower", quantity(unit.shown(t.lower), unit.symbol)},
                          {"upper", quantity(unit.shown(t.upper), unit.symbol)}});
  }
  nlohmann::json metrics = nlohmann::json::array();
  for (std::size_t c = 0; c < spread.statistics.size(); ++c) {
    const MetricSpread& s = spread.statistics[c];
    nlohmann::json entry = {{"name", s.name},
                            {"unit", s.unit},
                            {"better", larger_is_better(s.name) ? "larger" : "smaller"},
                            {"nominal", quantity(spread.nominal.points.value(0, c), s.unit)},
                            {"reached", s.reached},
                            {"min", quantity(s.minimum, s.unit)},
                            {"p0.1", quantity(s.p0_1, s.unit)},
                            {"p1", quantity(s.p1, s.unit)},
                            {"p50", quantity(s.p50, s.unit)},
                            {"p99", quantity(s.p99, s.unit)},
                            {"p99.9", quantity(s.p99_9, s.unit)},
                            {"max", quantity(s.maximum, s.unit)}};
    if (s.worst >= 0) {
      auto p = static_cast<std::size_t>(s.worst);
      nlohmann::json parameters = nlohmann::json::object();
      for (std::size_t j = 0; j < spread.tolerances.size(); ++j) {
        parameters[spread.tolerances[j].path] =
            spread.tolerances[j].text(spread_value(spread.tolerances, spread.plan, spread.index(p), j));
      }
      entry["worst"] = {{"sample", spread.index(p)}, {"value", quantity(spread.results.points.value(p, c), s.unit)},
                        {"parameters", parameters}};
    }
    metrics.push_back(entry);
  }
  return with_file_head({{"mode", spread.plan.corners ? "corners" : "monte_carlo"},
                         {"seed", spread.plan.seed},
                         {"population", spread.population},
                         {"shard", {{"k", spread.plan.shard}, {"n", spread.plan.shards},
                                    {"first", spread.range.begin}, {"count", spread.range.size()}}},
                         {"quantile_definition", "Hyndman & Fan type 7: h = (n-1)p, linear between order statistics"},
                         {"failed_verdicts", spread.failed()},
                         {"tolerances", tolerances},
                         {"metrics", metrics}},
                        spread.title, spread.case_file);
}
}  // namespace

std::string spread_json(const Spread& spread) { return json_text(spread_json_value(spread)); }

}  // namespace linkrise::app
