#include "app/studies/sizing.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <map>

#include <fmt/format.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "analysis/metrics.h"
#include "app/evaluation/case_evaluation.h"
#include "app/output/json_fields.h"
#include "app/output/text_format.h"
#include "app/studies/faults_json.h"
#include "app/studies/spread.h"
#include "app/studies/rank_pool.h"
#include "app/studies/result_transfer.h"
#include "app/studies/study_run.h"
#include "netlist/case_document.h"
#include "netlist/catalogue_spec.h"
#include "netlist/units.h"
#include "solver/circuit.h"

namespace linkrise::app {
namespace {
using netlist::InputError;
using netlist::SizingSpread;

// The case's sizing block with the command line's choices on top.
netlist::SizingSpec resolve_spec(const SizingRequest& request, const netlist::Case& nominal) {
  netlist::SizingSpec spec = nominal.sizing.value_or(netlist::SizingSpec{});
  if (!nominal.sizing) spec.mark = netlist::SourceMark{request.case_file, 1, 1};
  if (request.part) spec.part = *request.part;
  if (request.parameter) spec.parameter = *request.parameter;
  if (request.range) std::tie(spec.lower, spec.upper) = *request.range;
  if (request.spread) spec.spread = *request.spread;
  if (request.samples) spec.samples = *request.samples;
  if (request.seed) spec.seed = *request.seed;
  if (request.quantile) spec.quantile = *request.quantile;
  if (request.faults) {
    spec.all_faults = *request.faults;
    spec.faults.clear();
  }
  if (request.attempts) spec.attempts = *request.attempts;
  if (request.faults_over_spread) spec.faults_over_spread = *request.faults_over_spread;
  if (request.tolerance) spec.tolerance = *request.tolerance;
  if (request.catalogue) {
    spec.catalogue = *request.catalogue;
    spec.catalogue_mark = netlist::SourceMark{"option --catalogue", 0, 0};
  }
  if (spec.part.empty()) {
    throw InputError(spec.mark, "the sizing names no part to size",
                     "give '--part r_pre' or a 'sizing:' block with 'part: r_pre' (docs/studies.md)");
  }
  if (!(spec.lower > 0.0) || !(spec.upper > spec.lower) || !std::isfinite(spec.upper)) {
    throw InputError(request.range ? netlist::SourceMark{"option --range", 0, 0} : spec.mark,
                     "the range to size over must have 0 < lower < upper",
                     "give '--range 10Ohm..200Ohm' or 'range: [10 Ohm, 200 Ohm]' in the sizing block");
  }
  if (!(spec.tolerance > 0.0 && spec.tolerance < 0.1)) {
    throw InputError(netlist::SourceMark{"option --tolerance", 0, 0}, "the boundary tolerance must lie in (0, 10 %)",
                     "write e.g. '--tolerance 0.5%'");
  }
  if (spec.spread == SizingSpread::Samples && (spec.samples == 0 || !(spec.quantile > 0.0 && spec.quantile <= 1.0))) {
    throw InputError(netlist::SourceMark{"option --samples", 0, 0},
                     "a Monte Carlo sizing needs at least one sample and a quantile in (0, 100 %]",
                     "write e.g. '--samples 200 --quantile 99%'");
  }
  return spec;
}

// Judges one design (the case at a sized value, or with a candidate part) over the counted spread and scenarios.
class DesignJudge {
 public:
  DesignJudge(const netlist::SizingSpec& spec, Sizing& sizing, int jobs, bool progress)
      : spec_(spec), sizing_(sizing), jobs_(jobs), progress_(progress) {}

  SizingPoint judge(const netlist::CaseDocument& design, double value, const std::string& label,
                    ScenarioFit fit = ScenarioFit::MustFit) {
    SizingPoint point;
    point.value = value;
    const netlist::Case spec = design.validate();  // its tolerances follow the sized value
    take_spread(point, design, spec, label);
    if (spec.sequence && (spec_.all_faults || !spec_.faults.empty())) {
      // The scenarios at the nominal point, or at every point of the spread (the worst counts).
      const std::size_t points = spec_.faults_over_spread ? population(spec) + 1 : 1;
      for (std::size_t i = 0; i < points; ++i) {
        const std::string at = i == 0 ? "" : fmt::format(" at {} {}", plan().corners ? "corner" : "sample", i - 1);
        take_faults(point, i == 0 ? design : design.with(spread_overrides(spec.tolerances, plan(), i - 1)), label, at,
                    fit);
      }
    }
    return point;
  }

  /// Points of the spread per design (the nominal point not counted).
  std::size_t population(const netlist::Case& spec) const {
    if (spec_.spread == SizingSpread::Nominal || spec.tolerances.empty()) return 0;
    for (const auto& tolerance : spec.tolerances) {
      if (tolerance.unresolved) throw *tolerance.unresolved;
    }
    return population_size(spec.tolerances, plan());
  }

  SpreadPlan plan() const {
    SpreadPlan plan;
    plan.corners = spec_.spread != SizingSpread::Samples;
    plan.samples = spec_.samples;
    plan.seed = spec_.seed;
    return plan;
  }

 private:
  void take_spread(SizingPoint& point, const netlist::CaseDocument& design, const netlist::Case& spec,
                   const std::string& label) {
    const std::size_t count = population(spec);
    std::vector<CaseEvaluation> evaluations(count + 1);
    const PointTransfer transfer{
        [&](std::size_t i, ByteWriter& out) { save_evaluation(out, evaluations[i]); },
        [&](std::size_t i, ByteReader& in) { evaluations[i] = load_evaluation(in); }};
    for_each_index_on_ranks(
        count + 1, jobs_,
        [&](std::size_t i) {
          evaluations[i] = evaluate_case_document(
              at_study_accuracy(i == 0 ? design : design.with(spread_overrides(spec.tolerances, plan(), i - 1))));
        },
        transfer, progress_ ? label : "");
    sizing_.runs += count + 1;
    std::vector<std::vector<double>> sampled;  // per constraint, the samples' margins (Monte Carlo)
    for (std::size_t i = 0; i < evaluations.size(); ++i) {
      const std::string where = i == 0 ? "nominal" : fmt::format("{} {}", plan().corners ? "corner" : "sample", i - 1);
      if (!usable(evaluations[i], label, where)) continue;
      for (const auto& margin : evaluations[i].margins) {
        const std::size_t c = constraint_index(margin.constraint);
        if (i == 0 || plan().corners) {
          fold(point, c, margin.margin, where);
          continue;
        }
        if (sampled.size() <= c) sampled.resize(c + 1);
        if (!std::isnan(margin.margin)) sampled[c].push_back(margin.margin);
      }
    }
    for (std::size_t c = 0; c < sampled.size(); ++c) {
      if (sampled[c].empty()) continue;
      std::sort(sampled[c].begin(), sampled[c].end());
      fold(point, c, quantile(sampled[c], 1.0 - spec_.quantile),
           fmt::format("{:g} % of {} samples", spec_.quantile * 100.0, count));
    }
  }

  void take_faults(SizingPoint& point, const netlist::CaseDocument& design, const std::string& label,
                   const std::string& at, ScenarioFit fit) {
    netlist::CaseDocument document = design;
    if (spec_.attempts) {
      document.apply({"sequence.attempts", std::to_string(*spec_.attempts), spec_.mark});
    }
    const ScenarioSelection selection{spec_.all_faults, spec_.faults, spec_.mark};
    const DetectionMatrix matrix = detection_matrix(document, jobs_, fit, selection);
    for (const auto& row : matrix.rows) {
      if (row.scenario == "nominal" || !row.applicable) continue;
      ++sizing_.runs;
      const std::string where = "scenario " + row.scenario + at;
      if (row.solver_failed) {
        sizing_.solver_failures.push_back(fmt::format("{} ({}): {}", label, where, row.note));
        continue;
      }
      fold(point, constraint_index("fault " + row.scenario), row.actual == row.expected ? 1.0 : -1.0, where);
      for (const auto& [constraint, margin] : row.rating_margins) fold(point, constraint_index(constraint), margin, where);
      if (std::find(sizing_.scenarios.begin(), sizing_.scenarios.end(), row.scenario) == sizing_.scenarios.end()) {
        sizing_.scenarios.push_back(row.scenario);
      }
    }
  }

  bool usable(const CaseEvaluation& evaluation, const std::string& label, const std::string& where) {
    if (evaluation.status == CaseEvaluation::Status::SolverFailure) {
      sizing_.solver_failures.push_back(fmt::format("{} ({}): {}", label, where, evaluation.message));
      return false;  // not an input error: listed, its margins stay unjudged
    }
    if (evaluation.status != CaseEvaluation::Status::Evaluated) {
      throw InputError(spec_.mark, fmt::format("{} ({}): {}", label, where, evaluation.message),
                       "narrow the range to values the case can run with");
    }
    return true;
  }

  static void fold(SizingPoint& point, std::size_t c, double margin, const std::string& where) {
    if (point.margins.size() <= c) {
      point.margins.resize(c + 1, Sizing::kNaN);
      point.worst.resize(c + 1);
    }
    if (std::isnan(margin)) return;
    if (std::isnan(point.margins[c]) || margin < point.margins[c]) {
      point.margins[c] = margin;
      point.worst[c] = where;
    }
  }

  std::size_t constraint_index(const std::string& name) {
    auto& list = sizing_.constraints;
    auto found = std::find(list.begin(), list.end(), name);
    if (found != list.end()) return static_cast<std::size_t>(found - list.begin());
    list.push_back(name);
    return list.size() - 1;
  }

  const netlist::SizingSpec& spec_;
  Sizing& sizing_;
  int jobs_;
  bool progress_;
};

// The case at values of the sized parameter, every value judged once (a cache shared by the bracket and the root
// finders of all constraints).
class MarginTable {
 public:
  MarginTable(const netlist::CaseDocument& base, DesignJudge& judge, Sizing& sizing)
      : base_(base), judge_(judge), sizing_(sizing) {
    mark_ = sizing.spec.mark;
    auto written = base_.quantity_at(sizing_.path, mark_);
    if (!written) {
      throw InputError(mark_, fmt::format("the case writes no value at '{}' to size", sizing_.path),
                       "name a parameter the part's block gives, e.g. 'parameter: resistance'");
    }
    dimension_ = written->dimension;
    if (!(dimension_ == netlist::Dimension::resistance())) {
      throw InputError(mark_, fmt::format("'{}' is not a resistance; linkrise sizes resistances", sizing_.path),
                       "name a resistance: a fixed resistor's resistance, a thermistor's resistance_at_25degC or "
                       "minimum_resistance");
    }
    sizing_.unit = netlist::shown_unit(dimension_, false, false).symbol;
  }

  const SizingPoint& at(double value) {
    auto found = cache_.find(value);
    if (found != cache_.end()) return found->second;
    const std::string label = fmt::format("{} = {}", sizing_.path, netlist::format_si(value, sizing_.unit));
    return cache_.emplace(value, judge_.judge(document_at(value), value, label)).first->second;
  }
  netlist::CaseDocument document_at(double value) const {
    return base_.with({{sizing_.path, netlist::quantity_text(value, dimension_, false), mark_}});
  }
  std::vector<SizingPoint> points() const {
    std::vector<SizingPoint> all;
    for (const auto& [value, point] : cache_) all.push_back(point);
    return all;
  }

 private:
  const netlist::CaseDocument& base_;
  DesignJudge& judge_;
  Sizing& sizing_;
  netlist::SourceMark mark_;
  netlist::Dimension dimension_;
  std::map<double, SizingPoint> cache_;
};

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

// Finds each constraint's boundaries on the bracket, refined by Brent where the margin is monotonic there.
void find_boundaries(MarginTable& table, Sizing& sizing, const std::vector<double>& bracket, double tolerance) {
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    std::vector<std::size_t> changes;
    for (std::size_t k = 0; k + 1 < bracket.size(); ++k) {
      double a = margin_of(table.at(bracket[k]), c), b = margin_of(table.at(bracket[k + 1]), c);
      if (!std::isnan(a) && !std::isnan(b) && (a >= 0.0) != (b >= 0.0)) changes.push_back(k);
    }
    // Brent refines every sign change of a margin that is monotonic on the bracket or passes in one band (fails,
    // passes, fails: a sequence that trips "too fast" at low values and times out at high ones). Anything else
    // is located on the bracket grid only, on the passing side, with the failing side's binding point.
    const bool one_band = changes.size() == 2 && margin_of(table.at(bracket[changes[0]]), c) < 0.0;
    const bool refine = changes.size() <= 1 || one_band;
    if (!refine) {
      sizing.notes.push_back(fmt::format("{}: the margin changes sign {} times over the range (neither monotonic nor "
                                         "one passing band); its boundaries are located on the bracket grid only",
                                         sizing.constraints[c], changes.size()));
    }
    for (std::size_t k : changes) {
      const bool lower = margin_of(table.at(bracket[k + 1]), c) >= 0.0;
      if (refine) {
        sizing.boundaries.push_back({c, boundary_between(table, c, bracket[k], bracket[k + 1], tolerance), lower, ""});
        continue;
      }
      const SizingPoint& failing = table.at(lower ? bracket[k] : bracket[k + 1]);
      sizing.boundaries.push_back(
          {c, lower ? bracket[k + 1] : bracket[k], lower, c < failing.worst.size() ? failing.worst[c] : ""});
    }
  }
}

// A stretch of values where constraints hold, with the boundaries (index into Sizing::boundaries) that end it.
struct Span {
  double low = 0.0, high = 0.0;
  std::optional<std::size_t> low_binding, high_binding;
};

// Where constraint c holds over the range: its boundaries in ascending order toggle it, starting from whether it
// holds at the range's low end (a value it does not judge holds).
std::vector<Span> passing_spans(MarginTable& table, const Sizing& sizing, std::size_t c, const std::vector<double>& bracket) {
  std::vector<std::size_t> own;
  for (std::size_t b = 0; b < sizing.boundaries.size(); ++b) {
    if (sizing.boundaries[b].constraint == c) own.push_back(b);
  }
  std::sort(own.begin(), own.end(),
            [&](std::size_t a, std::size_t b) { return sizing.boundaries[a].value < sizing.boundaries[b].value; });
  std::vector<Span> spans;
  std::optional<Span> open;
  if (!(margin_of(table.at(bracket.front()), c) < 0.0)) open = Span{bracket.front(), 0.0, {}, {}};
  for (std::size_t b : own) {
    const Boundary& boundary = sizing.boundaries[b];
    if (boundary.lower && !open) open = Span{boundary.value, 0.0, b, {}};
    if (!boundary.lower && open) {
      open->high = boundary.value;
      open->high_binding = b;
      spans.push_back(*open);
      open.reset();
    }
  }
  if (open) {
    open->high = bracket.back();
    spans.push_back(*open);
  }
  return spans;
}

std::vector<Span> overlap(const std::vector<Span>& a, const std::vector<Span>& b) {
  std::vector<Span> both;
  for (const Span& x : a) {
    for (const Span& y : b) {
      Span s;
      s.low = std::max(x.low, y.low);
      s.low_binding = x.low >= y.low ? x.low_binding : y.low_binding;
      s.high = std::min(x.high, y.high);
      s.high_binding = x.high <= y.high ? x.high_binding : y.high_binding;
      if (s.low <= s.high) both.push_back(s);
    }
  }
  return both;
}

// The feasible window: the widest stretch (in log value) where every constraint holds, and which constraints bind
// its ends. Without one, the largest lower and the smallest upper boundary name the pair that conflicts.
void feasible_window(MarginTable& table, Sizing& sizing, const std::vector<double>& bracket) {
  for (Boundary& boundary : sizing.boundaries) {
    const SizingPoint& at = table.at(boundary.value);
    if (boundary.where.empty() && boundary.constraint < at.worst.size()) boundary.where = at.worst[boundary.constraint];
  }
  std::vector<Span> feasible{Span{bracket.front(), bracket.back(), {}, {}}};
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    const std::vector<Span> spans = passing_spans(table, sizing, c, bracket);
    if (spans.empty()) sizing.notes.push_back(fmt::format("{} fails over the whole range", sizing.constraints[c]));
    feasible = overlap(feasible, spans);
  }
  if (!feasible.empty()) {
    const Span& widest = *std::max_element(feasible.begin(), feasible.end(), [](const Span& a, const Span& b) {
      return std::log(a.high / a.low) < std::log(b.high / b.low);
    });
    sizing.lower = widest.low;
    sizing.upper = widest.high;
    sizing.lower_binding = widest.low_binding;
    sizing.upper_binding = widest.high_binding;
    if (feasible.size() > 1) {
      sizing.notes.push_back(fmt::format("every constraint holds in {} separate stretches of the range; the window is "
                                         "the widest",
                                         feasible.size()));
    }
    return;
  }
  sizing.lower = sizing.upper = Sizing::kNaN;
  double largest_lower = 0.0, smallest_upper = std::numeric_limits<double>::infinity();
  std::optional<std::size_t> low, high;
  for (std::size_t b = 0; b < sizing.boundaries.size(); ++b) {
    const Boundary& boundary = sizing.boundaries[b];
    if (boundary.lower && boundary.value >= largest_lower) std::tie(largest_lower, low) = std::pair{boundary.value, b};
    if (!boundary.lower && boundary.value <= smallest_upper) std::tie(smallest_upper, high) = std::pair{boundary.value, b};
  }
  if (low && high && largest_lower > smallest_upper) {  // a plain conflict of one lower and one upper bound
    sizing.lower = largest_lower;
    sizing.upper = smallest_upper;
    sizing.lower_binding = low;
    sizing.upper_binding = high;
  }
}

// The smallest margin of a design and the constraint it belongs to; how many constraints fail.
void summarise(CandidateResult& result) {
  for (std::size_t c = 0; c < result.point.margins.size(); ++c) {
    const double margin = result.point.margins[c];
    if (std::isnan(margin)) continue;
    if (margin < 0.0) ++result.failed;
    if (!result.binding || margin < result.smallest_margin) {
      result.smallest_margin = margin;
      result.binding = c;
    }
  }
}

void rank_candidates(const netlist::CaseDocument& base, const std::vector<netlist::CandidateSpec>& catalogue,
                     DesignJudge& judge, Sizing& sizing) {
  for (const auto& candidate : catalogue) {
    CandidateResult result{candidate.name, candidate.note, candidate.kind, {}, Sizing::kNaN, std::nullopt, 0};
    const netlist::CaseDocument design = base.with_candidate(sizing.spec.part, candidate);
    // The candidate's own defining value (a thermistor's R25 or minimum resistance), whatever its kind.
    double value = Sizing::kNaN;
    const solver::Circuit circuit(design.validate());
    if (auto defining = circuit.part(circuit.find_part(sizing.spec.part)).defining_value()) {
      const std::string path = sizing.spec.part + "." + defining->parameter;
      if (auto written = design.quantity_at(path, candidate.mark)) value = written->value;
    }
    result.point = judge.judge(design, value, "candidate " + candidate.name, ScenarioFit::MayNotFit);
    summarise(result);
    sizing.candidates.push_back(std::move(result));
  }
  // Passing parts first, by their smallest margin (largest first); then the failing ones, least bad first. The
  // catalogue's order breaks ties.
  std::stable_sort(sizing.candidates.begin(), sizing.candidates.end(),
                   [](const CandidateResult& a, const CandidateResult& b) {
                     if (a.pass() != b.pass()) return a.pass();
                     return a.smallest_margin > b.smallest_margin;
                   });
}

// The design to verify: the best passing candidate, else a preferred value inside the window.
std::optional<std::pair<SizingChoice, netlist::CaseDocument>> choose(const netlist::CaseDocument& base,
                                                                     const std::vector<netlist::CandidateSpec>& catalogue,
                                                                     MarginTable& table, Sizing& sizing) {
  if (!sizing.candidates.empty() && sizing.candidates.front().pass()) {
    const CandidateResult& best = sizing.candidates.front();
    SizingChoice choice;
    choice.label = "candidate " + best.name;
    choice.why = "the passing catalogue part with the largest smallest margin";
    choice.point = best.point;
    for (const auto& candidate : catalogue) {
      if (candidate.name == best.name) return std::pair{choice, base.with_candidate(sizing.spec.part, candidate)};
    }
  }
  if (!sizing.feasible()) return std::nullopt;
  const double middle = std::sqrt(sizing.lower * sizing.upper);
  const double preferred = preferred_value(middle, sizing.lower, sizing.upper);
  const double value = std::isnan(preferred) ? middle : preferred;
  SizingChoice choice;
  choice.label = fmt::format("{} = {}", sizing.path, netlist::format_si(value, sizing.unit));
  choice.why = std::isnan(preferred) ? "the window's geometric middle (no E24 value lies inside the window)"
                                     : "the E24 value nearest the window's geometric middle";
  choice.point = table.at(value);
  return std::pair{choice, table.document_at(value)};
}

void verify(SizingChoice& choice, const netlist::CaseDocument& design, DesignJudge& judge, const SizingRequest& request,
            const netlist::SizingSpec& spec) {
  const netlist::Case validated = design.validate();
  if (!validated.sequence) {
    choice.window_skipped = "the case has no sequence block: no fault matrix or BMS window to verify";
    return;
  }
  const ScenarioFit fit = choice.label.rfind("candidate ", 0) == 0 ? ScenarioFit::MayNotFit : ScenarioFit::MustFit;
  choice.matrix = detection_matrix(design, request.jobs, fit);
  choice.verified_run = true;
  if (spec.spread == SizingSpread::Nominal || validated.tolerances.empty()) {
    choice.window_skipped = "the sizing counts the nominal point only: a BMS window needs a tolerance spread";
    return;
  }
  choice.window = fault_window(design, judge.plan(), request.window_margin, request.jobs);
}

}  // namespace

double margin_of(const SizingPoint& point, std::size_t constraint) {
  return constraint < point.margins.size() ? point.margins[constraint] : Sizing::kNaN;
}

bool SizingChoice::verified() const {
  if (!verified_run) return false;
  return window ? window->verified() : matrix.pass();
}

bool Sizing::found() const {
  return feasible() || std::any_of(candidates.begin(), candidates.end(), [](const auto& c) { return c.pass(); });
}

double preferred_value(double value, double lower, double upper) {
  // IEC 60063, series E24 (docs/references.md [R-IEC60063]).
  static constexpr std::array<int, 24> kE24{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
                                            33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91};
  double best = std::numeric_limits<double>::quiet_NaN();
  const int decade = static_cast<int>(std::floor(std::log10(value)));
  for (int d = decade - 1; d <= decade + 1; ++d) {
    for (int mantissa : kE24) {
      const double candidate = d >= 1 ? mantissa * std::pow(10.0, d - 1) : mantissa / std::pow(10.0, 1 - d);
      if (candidate < lower || candidate > upper) continue;
      if (std::isnan(best) || std::abs(std::log(candidate / value)) < std::abs(std::log(best / value))) best = candidate;
    }
  }
  return best;
}

Sizing size_part(const SizingRequest& request) {
  Sizing sizing;
  sizing.case_file = request.case_file;
  const netlist::CaseDocument base = netlist::CaseDocument::load(request.case_file).with(request.settings);
  const netlist::Case nominal = base.validate();
  sizing.title = nominal.title;
  sizing.spec = resolve_spec(request, nominal);
  if (!nominal.find_part(sizing.spec.part)) {
    throw InputError(sizing.spec.mark, fmt::format("the case has no part '{}' to size", sizing.spec.part),
                     netlist::did_you_mean(sizing.spec.part, nominal.part_names(), "name a part of the case"));
  }
  sizing.path = sizing.spec.part + "." + (sizing.spec.parameter.empty() ? "resistance" : sizing.spec.parameter);
  DesignJudge judge(sizing.spec, sizing, request.jobs, request.progress);
  MarginTable table(base, judge, sizing);
  sizing.corners = judge.population(nominal);
  sizing.spread_text = sizing.corners == 0 ? "the nominal point"
                       : judge.plan().corners
                           ? fmt::format("the nominal point and {} tolerance corners", sizing.corners)
                           : fmt::format("the nominal point and {} Monte Carlo samples (seed {}) at the {:g} % quantile",
                                         sizing.corners, sizing.spec.seed, sizing.spec.quantile * 100.0);
  std::vector<double> bracket;
  for (std::size_t k = 0; k < kBracketPoints; ++k) {
    double fraction = static_cast<double>(k) / static_cast<double>(kBracketPoints - 1);
    bracket.push_back(k + 1 == kBracketPoints ? sizing.spec.upper
                                              : sizing.spec.lower * std::pow(sizing.spec.upper / sizing.spec.lower, fraction));
  }
  for (double value : bracket) (void)table.at(value);
  find_boundaries(table, sizing, bracket, sizing.spec.tolerance);
  feasible_window(table, sizing, bracket);
  // Read once: the ranking and the choice work from the same candidates.
  const std::vector<netlist::CandidateSpec> catalogue =
      sizing.spec.catalogue.empty() ? std::vector<netlist::CandidateSpec>{} : netlist::read_catalogue(sizing.spec.catalogue);
  rank_candidates(base, catalogue, judge, sizing);
  if (auto chosen = choose(base, catalogue, table, sizing)) {
    sizing.choice = std::move(chosen->first);
    if (request.verify) {
      verify(*sizing.choice, chosen->second, judge, request, sizing.spec);
    } else {
      sizing.choice->window_skipped = "not asked for (--no-verify)";
    }
  }
  sizing.points = table.points();
  sizing.accuracy = check_study_accuracy(base);
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

std::string window_lines(const Sizing& sizing) {
  if (sizing.feasible()) {
    return fmt::format("  window    {} … {}\n  lower     {}\n  upper     {}\n", shown(sizing, sizing.lower),
                       shown(sizing, sizing.upper), end_text(sizing, sizing.lower, sizing.lower_binding, "lower end"),
                       end_text(sizing, sizing.upper, sizing.upper_binding, "upper end"));
  }
  if (!std::isnan(sizing.lower)) {
    const Boundary& low = sizing.boundaries[*sizing.lower_binding];
    const Boundary& high = sizing.boundaries[*sizing.upper_binding];
    return fmt::format(
        "  window    no feasible value: {} needs at least {}, {} at most {} (apart by a factor {:.3g}); relax one of "
        "them or change what drives it\n",
        sizing.constraints[low.constraint], shown(sizing, low.value), sizing.constraints[high.constraint],
        shown(sizing, high.value), low.value / high.value);
  }
  return "  window    no feasible value in the range: the stretches where each constraint holds do not overlap (see the "
         "boundaries and notes)\n";
}

std::string percent(double fraction) { return std::isnan(fraction) ? "-" : fmt::format("{:+.1f} %", fraction * 100.0); }

std::string candidates_table(const Sizing& sizing) {
  std::vector<std::vector<std::string>> rows;
  for (std::size_t i = 0; i < sizing.candidates.size(); ++i) {
    const CandidateResult& c = sizing.candidates[i];
    const std::string binding = c.binding ? sizing.constraints[*c.binding] : "-";
    const std::string where = c.binding ? c.point.worst[*c.binding] : "";
    rows.push_back({std::to_string(i + 1), c.name, c.kind, std::isnan(c.point.value) ? "-" : shown(sizing, c.point.value),
                    percent(c.smallest_margin), c.binding ? binding + " at " + where : "-",
                    c.pass() ? "pass" : fmt::format("FAIL ({} failed)", c.failed)});
  }
  return text_table({"rank", "candidate", "kind", "resistance", "smallest margin", "where", "result"}, rows, 3);
}

std::string choice_lines(const SizingChoice& choice) {
  std::string out = fmt::format("  chosen    {} ({})\n", choice.label, choice.why);
  if (!choice.verified_run) {
    out += fmt::format("  verified  not run: {}\n", choice.window_skipped);
    return out;
  }
  out += fmt::format("  faults    with the case's BMS window: {} ({} of {} rows failed)\n",
                     choice.matrix.pass() ? "pass" : "FAIL", choice.matrix.failed(), choice.matrix.rows.size());
  if (!choice.window) {
    out += fmt::format("  BMS       {}\n", choice.window_skipped);
  } else if (!choice.window->problems.empty()) {
    for (const auto& problem : choice.window->problems) out += fmt::format("  BMS       no window: {}\n", problem);
  } else {
    const FaultWindow& w = *choice.window;
    out += fmt::format("  BMS       minimum time {}, timeout {} (margin {:g} %); the faults with this window: {} ({} of "
                       "{} rows failed)\n",
                       display_seconds(w.minimum_time), display_seconds(w.timeout), w.margin * 100.0,
                       w.matrix.pass() ? "pass" : "FAIL", w.matrix.failed(), w.matrix.rows.size());
  }
  out += fmt::format("  verdict   {} and its BMS window: {}\n", choice.label,
                     choice.verified() ? "VERIFIED together" : "NOT verified");
  return out;
}
}  // namespace

std::string sizing_text(const Sizing& sizing) {
  std::string out = fmt::format("linkrise size — {}\n", sizing.title);
  out += fmt::format("  sized     {} over {} values, each at {}\n", sizing.path, sizing.points.size(), sizing.spread_text);
  out += fmt::format("  accuracy  {}\n", accuracy_text(sizing.accuracy));
  if (!sizing.scenarios.empty()) {
    std::string list;
    for (const auto& s : sizing.scenarios) list += (list.empty() ? "" : ", ") + s;
    out += fmt::format("  faults    {} ({}, {})\n", list,
                       sizing.spec.attempts ? fmt::format("{} attempts each", *sizing.spec.attempts)
                                            : "the sequence's own attempts",
                       sizing.spec.faults_over_spread ? "at every point of the spread" : "at the nominal point");
  }
  out += fmt::format("  runs      {}\n", sizing.runs);
  std::vector<std::vector<std::string>> rows;
  for (const auto& b : sizing.boundaries) {
    rows.push_back({sizing.constraints[b.constraint], b.lower ? "holds above" : "holds below", shown(sizing, b.value),
                    b.where});
  }
  if (!rows.empty()) out += text_table({"constraint", "side", "boundary", "binding point"}, rows);
  for (const auto& note : sizing.notes) out += fmt::format("  note: {}\n", note);
  for (const auto& failure : sizing.solver_failures) out += fmt::format("  solver failure: {}\n", failure);
  out += window_lines(sizing);
  if (!sizing.candidates.empty()) {
    out += fmt::format("  candidates from {} (ranked; margins relative to each bound)\n", sizing.spec.catalogue);
    out += candidates_table(sizing);
  }
  if (sizing.choice) {
    out += choice_lines(*sizing.choice);
  } else {
    out += "  chosen    nothing: no value in the range and no candidate passes\n";
  }
  return out;
}

std::string sizing_csv(const Sizing& sizing) {
  std::string out = "design," + csv_text(fmt::format("{} [{}]", sizing.path, sizing.unit));
  for (const auto& name : sizing.constraints) out += "," + csv_text(name + " margin [1]");
  out += "\n";
  auto row = [&](const std::string& design, const SizingPoint& point) {
    std::string line = csv_text(design) + "," + csv_number(point.value);
    for (std::size_t c = 0; c < sizing.constraints.size(); ++c) line += "," + csv_number(margin_of(point, c));
    return line + "\n";
  };
  for (const auto& point : sizing.points) out += row("value", point);
  for (const auto& candidate : sizing.candidates) out += row(candidate.name, candidate.point);
  return out;
}

namespace {
nlohmann::json margins_json(const Sizing& sizing, const SizingPoint& point) {
  nlohmann::json margins = nlohmann::json::object();
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    if (std::isnan(margin_of(point, c))) continue;
    margins[sizing.constraints[c]] = {{"margin", quantity(margin_of(point, c), "1")}, {"where", point.worst[c]}};
  }
  return margins;
}

nlohmann::json choice_json(const Sizing& sizing, const SizingChoice& choice) {
  nlohmann::json out{{"design", choice.label},
                     {"why", choice.why},
                     {"margins", margins_json(sizing, choice.point)},
                     {"verified", choice.verified()}};
  if (choice.verified_run) out["faults_with_case_window"] = detection_matrix_json(choice.matrix);
  if (choice.window) {
    const FaultWindow& w = *choice.window;
    out["bms_window"] = {{"minimum_time", quantity(w.minimum_time, "s")},
                         {"timeout", quantity(w.timeout, "s")},
                         {"margin", quantity(w.margin * 100.0, "%")},
                         {"fastest", quantity(w.fastest, "s")},
                         {"slowest", quantity(w.slowest, "s")},
                         {"problems", w.problems},
                         {"verified", w.verified()},
                         {"faults", detection_matrix_json(w.matrix)}};
  } else {
    out["bms_window_skipped"] = choice.window_skipped;
  }
  return out;
}
}  // namespace

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
    points.push_back({{"value", quantity(point.value, sizing.unit)}, {"margins", margins_json(sizing, point)}});
  }
  nlohmann::json candidates = nlohmann::json::array();
  for (std::size_t i = 0; i < sizing.candidates.size(); ++i) {
    const CandidateResult& c = sizing.candidates[i];
    candidates.push_back({{"rank", i + 1},
                          {"name", c.name},
                          {"note", c.note},
                          {"kind", c.kind},
                          {"value", quantity(c.point.value, sizing.unit)},
                          {"pass", c.pass()},
                          {"smallest_margin", quantity(c.smallest_margin, "1")},
                          {"binding_constraint", c.binding ? sizing.constraints[*c.binding] : ""},
                          {"failed_constraints", c.failed},
                          {"margins", margins_json(sizing, c.point)}});
  }
  return json_text(with_file_head({{"parameter", sizing.path},
                                   {"spread", sizing.spread_text},
                                   {"fault_scenarios", sizing.scenarios},
                                   {"runs", sizing.runs},
                                   {"feasible", sizing.feasible()},
                                   {"lower", quantity(sizing.feasible() ? sizing.lower : Sizing::kNaN, sizing.unit)},
                                   {"upper", quantity(sizing.feasible() ? sizing.upper : Sizing::kNaN, sizing.unit)},
                                   {"boundaries", boundaries},
                                   {"notes", sizing.notes},
                                   {"solver_failures", sizing.solver_failures},
                                   {"points", points},
                                   {"candidates", candidates},
                                   {"choice", sizing.choice ? choice_json(sizing, *sizing.choice) : nlohmann::json()}},
                                  sizing.title, sizing.case_file));
}

}  // namespace linkrise::app
