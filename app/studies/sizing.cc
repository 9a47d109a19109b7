#include "app/studies/sizing.h"

#include <algorithm>
#include <cmath>
#include <map>

#include <fmt/format.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "analysis/metrics.h"
#include "app/evaluation/case_evaluation.h"
#include "app/output/json_fields.h"
#include "app/output/text_format.h"
#include "app/studies/spread.h"
#include "app/studies/study_pool.h"
#include "app/studies/study_run.h"
#include "netlist/case_document.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {
using netlist::InputError;

// Evaluates the case at values of the sized parameter, every value once (a cache shared by the bracket and the
// root finders of all constraints).
class MarginTable {
 public:
  MarginTable(const SizingRequest& request, Sizing& sizing) : request_(request), sizing_(sizing) {
    base_ = netlist::CaseDocument::load(request.case_file).with(request.settings);
    const netlist::Case nominal = base_.validate();
    sizing_.title = nominal.title;
    mark_ = netlist::SourceMark{"option --part", 0, 0};
    dimension_ = written_quantity().dimension;
    if (!(dimension_ == netlist::Dimension::resistance())) {
      throw InputError(mark_, fmt::format("'{}' is not a resistance; linkrise sizes resistances", sizing_.path),
                       "name a resistance: a fixed resistor's resistance, a thermistor's resistance_at_25degC or "
                       "minimum_resistance");
    }
    sizing_.unit = netlist::shown_unit(dimension_, false, false).symbol;
    if (request.corners) {
      for (const auto& tolerance : nominal.tolerances) {
        if (tolerance.unresolved) throw *tolerance.unresolved;
      }
      SpreadPlan plan;
      plan.corners = true;
      sizing_.corners = nominal.tolerances.empty() ? 0 : population_size(nominal.tolerances, plan);
    }
  }

  const SizingPoint& at(double value) {
    auto found = cache_.find(value);
    if (found != cache_.end()) return found->second;
    return cache_.emplace(value, evaluate(value)).first->second;
  }
  std::vector<SizingPoint> points() const {
    std::vector<SizingPoint> all;
    for (const auto& [value, point] : cache_) all.push_back(point);
    return all;
  }

 private:
  netlist::Quantity written_quantity() const {
    auto written = base_.quantity_at(sizing_.path, mark_);
    if (!written) {
      throw InputError(mark_, fmt::format("the case writes no value at '{}' to size", sizing_.path),
                       "name a parameter the part's block gives, e.g. --parameter resistance");
    }
    return *written;
  }

  netlist::CaseDocument document_at(double value) const {
    return base_.with({{sizing_.path, netlist::quantity_text(value, dimension_, false), mark_}});
  }

  SizingPoint evaluate(double value) {
    const netlist::CaseDocument sized = document_at(value);
    std::vector<netlist::CaseDocument> documents{sized};
    if (sizing_.corners > 0) {
      const netlist::Case spec = sized.validate();  // its tolerances follow the sized value
      SpreadPlan plan;
      plan.corners = true;
      for (std::size_t c = 0; c < sizing_.corners; ++c) {
        documents.push_back(sized.with(spread_overrides(spec.tolerances, plan, c)));
      }
    }
    std::vector<CaseEvaluation> evaluations(documents.size());
    for_each_index(documents.size(), request_.jobs,
                   [&](std::size_t i) { evaluations[i] = evaluate_case_document(documents[i]); });
    SizingPoint point;
    point.value = value;
    for (std::size_t i = 0; i < evaluations.size(); ++i) take(point, evaluations[i], i);
    return point;
  }

  // Folds one evaluation (point i: 0 nominal, then corner i − 1) into the worst margins.
  void take(SizingPoint& point, const CaseEvaluation& evaluation, std::size_t i) {
    const std::string where = i == 0 ? "nominal" : fmt::format("corner {}", i - 1);
    const std::string label = fmt::format("{} = {} ({}): {}", sizing_.path,
                                          netlist::format_si(point.value, sizing_.unit), where, evaluation.message);
    if (evaluation.status == CaseEvaluation::Status::SolverFailure) {
      sizing_.solver_failures.push_back(label);  // not an input error: listed, its margins stay unjudged
      return;
    }
    if (evaluation.status != CaseEvaluation::Status::Evaluated) {
      throw InputError(mark_, label, "narrow the range to values the case can run with");
    }
    for (const auto& margin : evaluation.margins) {
      std::size_t c = constraint_index(margin.constraint);
      if (point.margins.size() <= c) {
        point.margins.resize(c + 1, Sizing::kNaN);
        point.worst.resize(c + 1);
      }
      if (std::isnan(margin.margin)) continue;
      if (std::isnan(point.margins[c]) || margin.margin < point.margins[c]) {
        point.margins[c] = margin.margin;
        point.worst[c] = where;
      }
    }
  }

  std::size_t constraint_index(const std::string& name) {
    auto& list = sizing_.constraints;
    auto found = std::find(list.begin(), list.end(), name);
    if (found != list.end()) return static_cast<std::size_t>(found - list.begin());
    list.push_back(name);
    return list.size() - 1;
  }

  const SizingRequest& request_;
  Sizing& sizing_;
  netlist::CaseDocument base_;
  netlist::SourceMark mark_;
  netlist::Dimension dimension_;
  std::map<double, SizingPoint> cache_;
};

double margin_of(const SizingPoint& point, std::size_t constraint) {
  return constraint < point.margins.size() ? point.margins[constraint] : Sizing::kNaN;
}

// Brent's method on log x between two bracket values whose margins differ in sign.
double boundary_between(MarginTable& table, std::size_t constraint, double low, double high, double tolerance) {
  // The ends map back to the bracket values themselves, so the cache answers for them (exp(log x) may differ
  // from x in the last bit, which would cost two more full evaluations per boundary).
  struct Context {
    MarginTable* table;
    std::size_t constraint;
    double low, high, log_low, log_high;
  } context{&table, constraint, low, high, std::log(low), std::log(high)};
  gsl_function f;
  f.function = [](double log_value, void* data) {
    auto* c = static_cast<Context*>(data);
    const double value = log_value == c->log_low ? c->low : log_value == c->log_high ? c->high : std::exp(log_value);
    double m = margin_of(c->table->at(value), c->constraint);
    return std::isnan(m) ? -1.0 : m;
  };
  f.params = &context;
  gsl_root_fsolver* solver = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
  gsl_root_fsolver_set(solver, &f, context.log_low, context.log_high);
  double root = 0.5 * (context.log_low + context.log_high);
  for (int iteration = 0; iteration < 100; ++iteration) {
    if (gsl_root_fsolver_iterate(solver) != GSL_SUCCESS) break;
    root = gsl_root_fsolver_root(solver);
    double a = gsl_root_fsolver_x_lower(solver), b = gsl_root_fsolver_x_upper(solver);
    if (gsl_root_test_interval(a, b, std::log1p(tolerance), 0.0) == GSL_SUCCESS) break;
  }
  gsl_root_fsolver_free(solver);
  return std::exp(root);
}

void check_request(const SizingRequest& request) {
  netlist::SourceMark mark{"option --range", 0, 0};
  if (!(request.lower > 0.0) || !(request.upper > request.lower) || !std::isfinite(request.upper)) {
    throw InputError(mark, "the range to size over must have 0 < lower < upper",
                     "write e.g. '--range 10Ohm..200Ohm'");
  }
  if (!(request.tolerance > 0.0 && request.tolerance < 0.1)) {
    throw InputError(netlist::SourceMark{"option --tolerance", 0, 0}, "the boundary tolerance must lie in (0, 10 %)",
                     "write e.g. '--tolerance 0.5%'");
  }
}

// Finds each constraint's boundaries on the bracket, refined by Brent where the margin is monotonic there.
void find_boundaries(MarginTable& table, Sizing& sizing, const std::vector<double>& bracket, double tolerance) {
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    std::vector<std::size_t> changes;
    for (std::size_t k = 0; k + 1 < bracket.size(); ++k) {
      double a = margin_of(table.at(bracket[k]), c), b = margin_of(table.at(bracket[k + 1]), c);
      if (!std::isnan(a) && !std::isnan(b) && (a >= 0.0) != (b >= 0.0)) changes.push_back(k);
    }
    const bool monotonic = changes.size() <= 1;
    if (!monotonic) {
      sizing.notes.push_back(fmt::format("{}: the margin changes sign {} times over the range (not monotonic); its "
                                         "boundaries are located on the bracket grid only",
                                         sizing.constraints[c], changes.size()));
    }
    for (std::size_t k : changes) {
      const bool lower = margin_of(table.at(bracket[k + 1]), c) >= 0.0;
      double value = monotonic ? boundary_between(table, c, bracket[k], bracket[k + 1], tolerance)
                               : (lower ? bracket[k + 1] : bracket[k]);
      sizing.boundaries.push_back({c, value, lower, ""});
    }
  }
}

// The window between the largest lower and the smallest upper boundary, and which constraints bind it.
void feasible_window(MarginTable& table, Sizing& sizing, const std::vector<double>& bracket) {
  sizing.lower = bracket.front();
  sizing.upper = bracket.back();
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    bool passes_somewhere = false;
    for (double value : bracket) passes_somewhere |= !(margin_of(table.at(value), c) < 0.0);
    if (!passes_somewhere) {
      sizing.notes.push_back(fmt::format("{} fails over the whole range", sizing.constraints[c]));
      sizing.lower = sizing.upper = Sizing::kNaN;
    }
  }
  for (std::size_t b = 0; b < sizing.boundaries.size(); ++b) {
    Boundary& boundary = sizing.boundaries[b];
    const SizingPoint& at = table.at(boundary.value);
    boundary.where = boundary.constraint < at.worst.size() ? at.worst[boundary.constraint] : "";
    if (std::isnan(sizing.lower)) continue;
    if (boundary.lower && boundary.value >= sizing.lower) {
      sizing.lower = boundary.value;
      sizing.lower_binding = b;
    }
    if (!boundary.lower && boundary.value <= sizing.upper) {
      sizing.upper = boundary.value;
      sizing.upper_binding = b;
    }
  }
}

}  // namespace

Sizing size_part(const SizingRequest& request) {
  check_request(request);
  Sizing sizing;
  sizing.case_file = request.case_file;
  std::string parameter = request.parameter.empty() ? "resistance" : request.parameter;
  sizing.path = request.part + "." + parameter;
  MarginTable table(request, sizing);
  std::vector<double> bracket;
  for (std::size_t k = 0; k < kBracketPoints; ++k) {
    double fraction = static_cast<double>(k) / static_cast<double>(kBracketPoints - 1);
    bracket.push_back(k + 1 == kBracketPoints ? request.upper
                                              : request.lower * std::pow(request.upper / request.lower, fraction));
  }
  for (double value : bracket) (void)table.at(value);
  find_boundaries(table, sizing, bracket, request.tolerance);
  feasible_window(table, sizing, bracket);
  sizing.points = table.points();
  return sizing;
}

namespace {
std::string shown(const Sizing& sizing, double value) { return netlist::format_si(value, sizing.unit); }

std::string end_text(const Sizing& sizing, double value, const std::optional<std::size_t>& binding,
                     const std::string& range_end) {
  if (!binding) return fmt::format("{} (the {} of the range; nothing binds inside it)", shown(sizing, value), range_end);
  const Boundary& b = sizing.boundaries[*binding];
  return fmt::format("{}, bound by {} at {}", shown(sizing, value), sizing.constraints[b.constraint], b.where);
}
}  // namespace

std::string sizing_text(const Sizing& sizing) {
  std::string out = fmt::format("linkrise size — {}\n", sizing.title);
  out += fmt::format("  sized     {} over {} values, each at the nominal point{}\n", sizing.path, sizing.points.size(),
                     sizing.corners > 0 ? fmt::format(" and {} tolerance corners", sizing.corners) : "");
  std::vector<std::vector<std::string>> rows;
  for (const auto& b : sizing.boundaries) {
    rows.push_back({sizing.constraints[b.constraint], b.lower ? "holds above" : "holds below", shown(sizing, b.value),
                    b.where});
  }
  if (!rows.empty()) out += text_table({"constraint", "side", "boundary", "binding point"}, rows);
  for (const auto& note : sizing.notes) out += fmt::format("  note: {}\n", note);
  for (const auto& failure : sizing.solver_failures) out += fmt::format("  solver failure: {}\n", failure);
  if (sizing.feasible()) {
    out += fmt::format("  window    {} … {}\n", shown(sizing, sizing.lower), shown(sizing, sizing.upper));
    out += fmt::format("  lower     {}\n", end_text(sizing, sizing.lower, sizing.lower_binding, "lower end"));
    out += fmt::format("  upper     {}\n", end_text(sizing, sizing.upper, sizing.upper_binding, "upper end"));
  } else if (!std::isnan(sizing.lower)) {
    const Boundary& low = sizing.boundaries[*sizing.lower_binding];
    const Boundary& high = sizing.boundaries[*sizing.upper_binding];
    out += fmt::format("  window    no feasible value: {} needs at least {}, {} at most {} (apart by a factor {:.3g})\n",
                       sizing.constraints[low.constraint], shown(sizing, low.value), sizing.constraints[high.constraint],
                       shown(sizing, high.value), low.value / high.value);
  } else {
    out += "  window    no feasible value in the range (see the notes)\n";
  }
  return out;
}

std::string sizing_csv(const Sizing& sizing) {
  std::string out = csv_text(fmt::format("{} [{}]", sizing.path, sizing.unit));
  for (const auto& name : sizing.constraints) out += "," + csv_text(name + " margin");
  out += "\n";
  for (const auto& point : sizing.points) {
    out += csv_number(point.value);
    for (std::size_t c = 0; c < sizing.constraints.size(); ++c) out += "," + csv_number(margin_of(point, c));
    out += "\n";
  }
  return out;
}

std::string sizing_json(const Sizing& sizing) {
  nlohmann::json boundaries = nlohmann::json::array();
  for (const auto& b : sizing.boundaries) {
    boundaries.push_back({{"constraint", sizing.constraints[b.constraint]},
                          {"side", b.lower ? "holds_above" : "holds_below"},
                          {"value", quantity(b.value, sizing.unit)},
                          {"binding_point", b.where}});
  }
  nlohmann::json points = nlohmann::json::array();
  for (const auto& point : sizing.points) {
    nlohmann::json margins = nlohmann::json::object();
    for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
      margins[sizing.constraints[c]] = quantity(margin_of(point, c), "1");
    }
    points.push_back({{"value", quantity(point.value, sizing.unit)}, {"margins", margins}});
  }
  return json_text(with_file_head({{"parameter", sizing.path},
                                   {"corners", sizing.corners},
                                   {"feasible", sizing.feasible()},
                                   {"lower", quantity(sizing.feasible() ? sizing.lower : Sizing::kNaN, sizing.unit)},
                                   {"upper", quantity(sizing.feasible() ? sizing.upper : Sizing::kNaN, sizing.unit)},
                                   {"boundaries", boundaries},
                                   {"notes", sizing.notes},
                                   {"solver_failures", sizing.solver_failures},
                                   {"points", points}},
                                  sizing.title, sizing.case_file));
}

}  // namespace linkrise::app
