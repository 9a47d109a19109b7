#include "app/output/text_format.h"
#include "app/studies/faults.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <optional>
#include <thread>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "analysis/stall.h"
#include "app/evaluation/case_evaluation.h"
#include "app/evaluation/case_run.h"
#include "app/output/decimation.h"
#include "app/output/json_fields.h"
#include "app/studies/faults_json.h"
#include "app/studies/rank_pool.h"
#include "app/studies/result_transfer.h"
#include "app/studies/study_run.h"
#include "models/registry.h"
#include "netlist/case_document.h"
#include "netlist/sequence_spec.h"
#include "netlist/units.h"
#include "solver/equations.h"

namespace linkrise::app {

std::string DetectionRow::actual_word() const {
  if (!applicable) return "not_applicable";
  if (solver_failed) return "solver_failure";
  return netlist::outcome_word(actual);
}

bool DetectionMatrix::pass() const {
  return std::all_of(rows.begin(), rows.end(), [](const DetectionRow& row) { return row.pass; });
}

bool DetectionMatrix::solver_failure() const {
  return std::any_of(rows.begin(), rows.end(), [](const DetectionRow& row) { return row.solver_failed; });
}

std::size_t DetectionMatrix::failed() const {
  return static_cast<std::size_t>(
      std::count_if(rows.begin(), rows.end(), [](const DetectionRow& row) { return !row.pass; }));
}

const DetectionRow* DetectionMatrix::find(const std::string& scenario) const {
  auto found = std::find_if(rows.begin(), rows.end(), [&](const DetectionRow& row) { return row.scenario == scenario; });
  return found == rows.end() ? nullptr : &*found;
}

namespace {

struct Planned {
  DetectionRow row;
  netlist::CaseDocument document;
  bool expect_from_stall = false;  // the expectation follows from the nominal path and the case's loads
  bool from_case = false;          // a row of the case's `scenarios:` block
  std::optional<netlist::Case> spec;
  std::optional<analysis::ChargePath> path;            // the nominal row: its measured charging path
  std::optional<analysis::StallDiagnostic> run_stall;  // the run's own stall finding, when it made one
};

bool across_link(const models::Part& part, const netlist::NodePair& link) {
  return (part.nodes()[0] == link.plus && part.nodes()[1] == link.minus) ||
         (part.nodes()[0] == link.minus && part.nodes()[1] == link.plus);
}

// Parts of a role, optionally only those connected across the sensed link nodes.
std::vector<const models::Part*> parts_where(const solver::Circuit& circuit, const netlist::SequenceSpec& sequence,
                                             models::Role role, bool only_across_link) {
  std::vector<const models::Part*> found;
  for (int p = 0; p < circuit.part_count(); ++p) {
    const models::Part& part = circuit.part(p);
    if (part.role() == role && (!only_across_link || across_link(part, sequence.link))) found.push_back(&part);
  }
  return found;
}

// A scenario of the case's own may set a parameter a design alternative's part lacks: on such a design the row is
// not applicable, with the reason; on the case itself (or for a built-in row) it is bad input.
void mark_unfit(Planned& p, const netlist::InputError& error, ScenarioFit fit) {
  if (fit == ScenarioFit::MustFit || !p.from_case) throw error;
  p.row.applicable = false;
  p.row.note = fmt::format("the scenario does not fit this design: {}", error.problem());
}

// False for a load the sequence starts only once the charge is over (after the main closure or the pre-charge
// opening, sequence.loads): it cannot draw while the link charges. A load the sequence starts with the attempt
// can.
bool draws_during_charge(const netlist::SequenceSpec& sequence, const std::string& name) {
  return std::none_of(sequence.loads.begin(), sequence.loads.end(), [&](const netlist::SequenceLoadSpec& load) {
    return load.part == name && load.after != netlist::LoadMoment::AttemptStart;
  });
}

// What a caught fault ends as: no_rise with a rise check, timeout without.
netlist::SequenceOutcome caught_outcome(const netlist::SequenceSpec& sequence) {
  return sequence.rise_fraction ? netlist::SequenceOutcome::NoRise : netlist::SequenceOutcome::Timeout;
}

// The sensed pack voltage at t = 0 (every contactor as the case starts it): the pack at rest.
double pack_at_rest(const solver::Circuit& circuit, const netlist::SequenceSpec& sequence) {
  solver::Equations equations(circuit);
  std::vector<double> states = circuit.initial_states(), unknowns(circuit.unknown_count(), 0.0);
  std::vector<int> modes = circuit.initial_modes();
  if (!equations.solve_network(0.0, states.data(), modes.data(), unknowns.data())) return std::nan("");
  const auto voltage = [&](const std::string& node) {
    const int index = circuit.node_index(node);
    return index < 0 ? 0.0 : unknowns[static_cast<std::size_t>(index)];
  };
  return voltage(sequence.pack.plus) - voltage(sequence.pack.minus);
}

// The plan under construction: the rows in order, each with its own copy of the case document.
class Plan {
 public:
  Plan(const netlist::CaseDocument& document, const netlist::Case& nominal, const solver::Circuit& circuit,
       ScenarioFit fit)
      : document_(document), nominal_(nominal), circuit_(circuit), fit_(fit), sequence_(*nominal.sequence),
        at_(sequence_.mark), caught_(caught_outcome(sequence_)) {}

  std::vector<Planned> built_in_and_case_scenarios() {
    add("nominal", "the case as written", sequence_.expected_outcome);
    shorted_link();
    open_resistor();
    scaled_capacitance();
    constant_power_from_start();
    reversed_connection();
    contactor_faults();
    live_bus();
    case_scenarios();
    return std::move(planned_);
  }

 private:
  Planned& add(const std::string& name, const std::string& description, netlist::SequenceOutcome expected) {
    Planned p;
    p.row.scenario = name;
    p.row.description = description;
    p.row.expected = expected;
    p.document = document_;
    planned_.push_back(std::move(p));
    return planned_.back();
  }
  static void not_applicable(Planned& p, const std::string& reason) {
    p.row.applicable = false;
    p.row.note = reason;
  }

  void shorted_link() {
    Planned& p = add("shorted_link", "1 mOhm short across the sensed link nodes", caught_);
    const models::PartRecipe short_circuit = models::plain_resistance("1 mOhm");
    p.document.add_part(p.document.unused_part_name("scenario_short"), short_circuit.kind, sequence_.link.plus,
                        sequence_.link.minus, short_circuit.parameters, at_);
  }

  void open_resistor() {
    Planned& p = add("open_precharge_resistor", fmt::format("{} open (1 GOhm)", sequence_.resistor), caught_);
    const models::Part& resistor = circuit_.part(circuit_.find_part(sequence_.resistor));
    const auto value = resistor.defining_value();
    if (resistor.role() == models::Role::Resistive && value && value->alone) {
      p.document.apply({sequence_.resistor + "." + value->parameter, "1 GOhm", at_});
      return;
    }
    const models::PartRecipe open = models::plain_resistance("1 GOhm");
    p.document.replace_part(sequence_.resistor, open.kind, open.parameters, at_);
    p.row.note = fmt::format("the {} part is replaced by a plain 1 GOhm resistor", resistor.kind());
  }

  void scaled_capacitance() {
    std::vector<std::string> paths;
    for (const models::Part* part : parts_where(circuit_, sequence_, models::Role::Storage, true)) {
      if (auto value = part->defining_value()) paths.push_back(part->name() + "." + value->parameter);
    }
    for (auto [name, factor, expected, description] :
         {std::tuple{"missing_capacitance", 1e-3, netlist::SequenceOutcome::TooFast, "link capacitance at 0.1 % (stray only)"},
          std::tuple{"oversize_capacitance", 2.0, netlist::SequenceOutcome::Closed, "link capacitance doubled"}}) {
      Planned& p = add(name, description, expected);
      if (paths.empty()) {
        not_applicable(p, "no capacitor is connected across the sensed link nodes");
        continue;
      }
      if (expected == netlist::SequenceOutcome::TooFast && !(sequence_.minimum_time > 0.0)) {
        not_applicable(p, "the too-fast check is off (sequence.minimum_time is 0 s), so nothing can catch it");
        continue;
      }
      for (const auto& path : paths) p.document.scale(path, factor, at_);
    }
  }

  void constant_power_from_start() {
    Planned& p = add("constant_power_from_start", "constant-power loads draw from 0 V on", netlist::SequenceOutcome::Closed);
    p.expect_from_stall = true;
    bool any = false, started_by_sequence = false;
    for (const models::Part* load : parts_where(circuit_, sequence_, models::Role::Load, false)) {
      if (!load->load_demand()->constant_power) continue;
      if (!draws_during_charge(sequence_, load->name())) {
        started_by_sequence = true;
        continue;
      }
      any = true;
      p.document.apply({load->name() + ".enable_voltage", "0 V", at_});
      p.document.apply({load->name() + ".disable_voltage", "0 V", at_});
      p.document.apply({load->name() + ".initial", "enabled", at_});
    }
    if (!any) {
      not_applicable(p, started_by_sequence ? "the sequence starts the case's constant-power loads only after "
                                              "the charge (sequence.loads), so none can draw while the link charges"
                                            : "the case has no constant-power load");
    }
  }

  void reversed_connection() {
    Planned& p = add("reversed_connection", "load side connected the other way round", caught_);
    if (parts_where(circuit_, sequence_, models::Role::Rectifier, true).empty()) {
      not_applicable(p,
                     "no diode across the sensed link nodes to clamp a reversed link (add the inverter's body "
                     "diodes as a diode part)");
      return;
    }
    for (int i = 0; i < circuit_.part_count(); ++i) {
      // The BMS's own sensing stays as wired: only the load side is turned round.
      const models::Part& part = circuit_.part(i);
      if (part.role() != models::Role::Sensor && across_link(part, sequence_.link)) {
        p.document.reverse_part(part.name(), at_);
      }
    }
  }

  // Each contactor the sequence moves, welded (closed from the start) and failed (never touches). A weld is
  // caught only by a weld check, a failed main contactor only by the closure check; without them the row is not
  // applicable, with the reason.
  void contactor_faults() {
    for (const auto& name : sequence_.moved_names()) {
      Planned& p = add("welded_" + name, fmt::format("{} welded: closed from the start, never opens", name),
                       netlist::SequenceOutcome::Welded);
      if (sequence_.weld_check.empty()) {
        not_applicable(p, "the sequence has no weld_check, so nothing can catch a weld (add a step that closes one "
                          "contactor alone and requires the link not to rise)");
        continue;
      }
      p.document.apply({name + ".stuck", "closed", at_});
    }
    for (const auto& name : sequence_.moved_names()) {
      const auto mains = sequence_.mains();
      const bool main = std::find(mains.begin(), mains.end(), name) != mains.end();
      Planned& p = add("failed_" + name, fmt::format("{} fails to close: its contacts never touch", name),
                       main ? netlist::SequenceOutcome::MainFailed : caught_);
      if (main && mains.size() > 1) {
        p.row.note = "parallel strings: the others hold the link up, so no voltage check can see one string left "
                     "out; only that string's own current can";
      }
      if (main && !sequence_.closure_check) {
        not_applicable(p, "the sequence has no closure_check, so nothing notices the main contacts never touched "
                          "(the load then drains the link once the pre-charge path opens)");
        continue;
      }
      p.document.apply({name + ".stuck", "open", at_});
    }
  }

  // A source already on the bus (a charger, a second pack) behind a diode, 2 % above the pack at rest, with the
  // link capacitors charged to it before the BMS wakes: caught as live_bus, never as too_fast.
  void live_bus() {
    Planned& p = add("live_bus", "a source 2 % above the pack feeds the link through a diode",
                     netlist::SequenceOutcome::LiveBus);
    const auto storage = parts_where(circuit_, sequence_, models::Role::Storage, true);
    const double pack = pack_at_rest(circuit_, sequence_);
    if (!(pack > 0.0)) {
      not_applicable(p, "the pack reads no voltage with every contactor open");
      return;
    }
    const double bus = 1.02 * pack;
    const std::string source = p.document.unused_part_name("scenario_bus");
    const std::string diode = p.document.unused_part_name("scenario_bus_diode");
    const std::string node = source + "_plus";
    p.document.add_part(source, "dc_source", node, sequence_.link.minus,
                        {{"voltage", netlist::quantity_text(bus, netlist::Dimension::voltage(), false)},
                         {"series_resistance", "0.5 Ohm"}},
                        at_);
    p.document.add_part(diode, "diode", node, sequence_.link.plus, {}, at_);
    for (const models::Part* part : storage) {  // storage parts hold their charge as `initial_voltage`
      p.document.apply({part->name() + ".initial_voltage",
                        netlist::quantity_text(bus - 0.7, netlist::Dimension::voltage(), false), at_});
    }
    p.row.note = fmt::format("bus at {} (2 % above the pack at rest)", netlist::format_si(bus, "V"));
  }

  void case_scenarios() {
    for (const auto& scenario : nominal_.scenarios) {
      auto existing = std::find_if(planned_.begin(), planned_.end(),
                                   [&](const Planned& p) { return p.row.scenario == scenario.name; });
      const bool is_new = existing == planned_.end();
      if (is_new && !scenario.expected) {
        throw netlist::InputError(scenario.mark,
                                  fmt::format("scenario '{}' needs 'expect', the outcome the BMS should reach",
                                              scenario.name),
                                  "add e.g. 'expect: no_rise' (closed, timeout, no_rise, too_fast)");
      }
      Planned& p = is_new ? add(scenario.name, "defined by the case", *scenario.expected) : *existing;
      p.from_case = true;
      if (scenario.expected) {
        p.row.expected = *scenario.expected;
        p.expect_from_stall = false;
      }
      if (!scenario.note.empty()) p.row.note = scenario.note;
      if (scenario.overrides.empty()) continue;
      try {
        p.document.apply(scenario.overrides);
      } catch (const netlist::InputError& error) {
        mark_unfit(p, error, fit_);
        continue;
      }
      if (is_new || p.row.description == "defined by the case") {
        std::string list;
        for (const auto& change : scenario.overrides) list += (list.empty() ? "" : ", ") + change.path + " = " + change.value;
        p.row.description = list;
      }
    }
  }

  const netlist::CaseDocument& document_;
  const netlist::Case& nominal_;
  const solver::Circuit& circuit_;
  const ScenarioFit fit_;
  const netlist::SequenceSpec& sequence_;
  const netlist::SourceMark at_;  // built-in edits point at the sequence block
  const netlist::SequenceOutcome caught_;  // the outcome a fault that stops the rise ends in
  std::vector<Planned> planned_;
};

// The outcome the quadratic predicts for constant-power loads that draw from 0 V on (analysis/stall.h). The link
// must first climb past the unstable lower root [Vs − √(Vs² − 4PR)]/2: where the loads are still constant-power
// there (the root lies above their resistive floor) it cannot, and stays near 0 V. Past it, the link settles at the
// upper root, which must reach the closing level.
netlist::SequenceOutcome predicted_outcome(const analysis::StallDiagnostic& prediction,
                                           const netlist::SequenceSpec& sequence) {
  using netlist::SequenceOutcome;
  const SequenceOutcome caught = caught_outcome(sequence);
  if (std::isnan(prediction.equilibrium)) return caught;
  if (prediction.lower_root >= prediction.resistive_below) return caught;
  if (!prediction.stalls) return SequenceOutcome::Closed;
  if (sequence.rise_fraction && prediction.equilibrium < *sequence.rise_fraction * prediction.source_voltage) {
    return SequenceOutcome::NoRise;
  }
  return SequenceOutcome::Timeout;
}

// The constant-power-from-start expectation comes from the case's data, not from the scenario's own run: the
// charging path measured in the nominal run (where the loads do not hold the link) and the rated powers of the
// case's constant-power loads. The note gives the prediction and, when the run made one, its own stall finding,
// so a row that disagrees shows both sides.
void expect_from_case(Planned& p, const analysis::ChargePath& path, const std::vector<analysis::ConstantPowerLoad>& loads,
                      const netlist::SequenceSpec& sequence) {
  double power = 0.0;
  double resistive_below = 0.0;
  for (const auto& load : loads) {
    power += load.power;
    resistive_below = std::max(resistive_below, load.resistive_below);
  }
  const analysis::StallDiagnostic prediction = analysis::predict_stall(path, power, resistive_below);
  std::string note = fmt::format("expected from the nominal run's charging path and the case's loads: {}",
                                 prediction.explanation);
  if (prediction.applicable) {
    p.row.expected = predicted_outcome(prediction, sequence);
    if (!std::isnan(prediction.equilibrium) && prediction.lower_root >= prediction.resistive_below) {
      note += fmt::format("; the lower root lies above the loads' resistive floor {}, so the link cannot climb past it",
                          netlist::format_si(prediction.resistive_below, "V"));
    }
  }
  if (p.run_stall && p.run_stall->applicable) note += "; the run: " + p.run_stall->explanation;
  p.row.note = note + (p.row.note.empty() ? "" : "; " + p.row.note);
  p.row.pass = p.row.actual == p.row.expected && p.row.ratings_held;
}

// The row shows the run's outcome with the first attempt that ended in it, and that attempt's fault time, so
// outcome, time and attempt always belong together; earlier attempts that ended otherwise (a timeout before a
// retry closed) are named in the note.
void take_attempt(DetectionRow& row, const solver::SequenceReport& report) {
  row.attempts = report.attempts;
  row.actual = report.outcome;
  row.attempt = report.attempts;
  std::string earlier;
  for (const auto& attempt : report.history) {
    const bool last = attempt.number == report.attempts;
    if (attempt.fault ? *attempt.fault == report.outcome : last) {
      row.attempt = attempt.number;
      row.detection_time = attempt.fault ? attempt.fault_time : std::nan("");
      break;
    }
    if (attempt.fault) {
      earlier += fmt::format("{}attempt {} ended {} at {}", earlier.empty() ? "" : ", ", attempt.number,
                             netlist::outcome_word(*attempt.fault), analysis::format_metric(attempt.fault_time, "s"));
    }
  }
  if (!earlier.empty()) row.note += (row.note.empty() ? "" : "; ") + earlier;
}

// "<metric> = <value> above its max <limit> (<entry> at <place>)": the rating a fault row broke, for its note.
std::string describe_broken(const analysis::JudgedLimit& limit) {
  return fmt::format("{} = {} above its {} {} ({})", limit.metric, analysis::format_metric(limit.value, limit.unit),
                     analysis::bound_word(limit.bound), analysis::format_metric(limit.limit, limit.unit),
                     limit.origin.empty() ? limit.source : limit.origin);
}

void run_row(Planned& p) {
  DetectionRow& row = p.row;
  CaseRun run(*p.spec);
  if (run.solver_failed()) {
    row.solver_failed = true;
    row.note = run.result().message;
    row.pass = false;
    return;
  }
  const solver::SequenceReport& report = *run.report();
  const netlist::SequenceSpec& sequence = report.spec;
  const analysis::Evaluation& evaluation = run.evaluation();
  take_attempt(row, report);
  row.end_time = run.result().end_time;
  keep_link_trace(row, run.result(), sequence, report.ground);  // for the HTML report's plots
  if (p.expect_from_stall && evaluation.stall) p.run_stall = evaluation.stall;
  if (row.scenario == "nominal") p.path = analysis::measure_charge_path(run.result().steps, report);
  row.peak_temperature = evaluation.metrics.value(sequence.resistor + ".peak_temperature");
  row.energy = evaluation.metrics.value(sequence.resistor + ".energy");
  double worst = std::numeric_limits<double>::infinity();
  for (const auto& limit : evaluation.limits) {
    if (limit.rated_part.empty()) continue;
    row.rating_margins.emplace_back(constraint_name(limit), constraint_margin(limit));
    if (limit.judged && !limit.pass && !limit.protection) {  // a fuse melting in a fault is protection at work
      row.ratings_held = false;
      if (limit.relative_margin < worst) {
        worst = limit.relative_margin;
        row.broken_rating = describe_broken(limit);
      }
    }
    // The resistor's temperature and energy are shown beside their ratings in every row.
    if (limit.rated_part != sequence.resistor) continue;
    if (limit.metric == sequence.resistor + ".peak_temperature") row.temperature_rating = limit.limit;
    if (limit.metric == sequence.resistor + ".energy") row.energy_rating = limit.limit;
  }
  row.pass = row.actual == row.expected && row.ratings_held;
}

std::string against(double value, double rating, const std::string& unit) {
  if (std::isnan(value)) return "-";
  if (std::isnan(rating)) return analysis::format_metric(value, unit);
  return fmt::format("{} / {}", analysis::format_metric(value, unit), analysis::format_metric(rating, unit));
}
}  // namespace

void keep_link_trace(DetectionRow& row, const solver::Result& result, const netlist::SequenceSpec& sequence,
                     const std::string& ground) {
  const solver::Waveform& waveform = result.steps.row_count() > 0 ? result.steps : result.samples;
  const auto column_of = [&](const std::string& node) { return node == ground ? -2 : waveform.column(node); };
  const int plus = column_of(sequence.link.plus);
  const int minus = column_of(sequence.link.minus);
  row.link_time.clear();
  row.link_voltage.clear();
  if (plus == -1 || minus == -1 || waveform.row_count() == 0) return;
  std::vector<double> link(waveform.row_count());
  for (std::size_t r = 0; r < link.size(); ++r) {
    link[r] = (plus >= 0 ? waveform.value(r, plus) : 0.0) - (minus >= 0 ? waveform.value(r, minus) : 0.0);
  }
  const auto& times = waveform.times();
  for (const Point& point : decimate_min_max(times, link, times.front(), times.back(), kLinkTraceColumns)) {
    row.link_time.push_back(point.x);
    row.link_voltage.push_back(point.y);
  }
}

DetectionMatrix detection_matrix(const std::string& case_file, int jobs) {
  return detection_matrix(netlist::CaseDocument::load(case_file), jobs);
}

// Also used by `linkrise window` (app/studies/fault_window.cc), which re-runs the scenarios on a case document
// that carries the recommended minimum time and timeout as overrides.
namespace {
// Drops the rows a selection leaves out (the nominal row stays); a name no row has is bad input.
void select_rows(std::vector<Planned>& planned, const ScenarioSelection& selection) {
  if (selection.all) return;
  std::vector<std::string> known;
  for (const auto& p : planned) known.push_back(p.row.scenario);
  for (const auto& name : selection.names) {
    if (std::find(known.begin(), known.end(), name) == known.end()) {
      throw netlist::InputError(selection.mark, fmt::format("there is no fault scenario '{}'", name),
                                netlist::did_you_mean(name, known, "name a built-in scenario or one of the case's"));
    }
  }
  std::erase_if(planned, [&](const Planned& p) {
    return p.row.scenario != "nominal" &&
           std::find(selection.names.begin(), selection.names.end(), p.row.scenario) == selection.names.end();
  });
}
}  // namespace

namespace {
// The longest a sequence can take: every attempt to its timeout and the sample after it, every cool-down, the
// slowest contact movements with their bounces, the overlap and the loads' delays.
double longest_sequence(const netlist::Case& spec) {
  const netlist::SequenceSpec& sequence = *spec.sequence;
  const solver::Circuit circuit(spec);
  double movements = sequence.overlap;
  for (const auto& [name, mark] : sequence.moved_contactors()) {
    const auto actuation = circuit.part(circuit.find_part(name)).actuation();
    if (actuation) {
      movements += actuation->closing_delay + actuation->opening_delay +
                   2.0 * actuation->bounce_count * actuation->bounce_interval + actuation->parting_time;
    }
  }
  for (const auto& load : sequence.loads) movements += load.delay;
  return sequence.start + sequence.attempts * (sequence.timeout + 2.0 * sequence.sample_period + movements) +
         (sequence.attempts - 1) * (sequence.cool_down + sequence.sample_period);
}
}  // namespace

netlist::Case follow_sequence(netlist::CaseDocument& document, const netlist::Case& nominal) {
  const netlist::SequenceSpec& sequence = *nominal.sequence;
  const double settle = nominal.run.settle.value_or(kFaultSettle);
  // The cap only guards against a run the sequence cannot end; twice the longest sequence and a second more.
  const double cap = std::max(nominal.run.follows_sequence() ? nominal.run.duration : 0.0,
                              2.0 * longest_sequence(nominal) + settle + 1.0);
  const auto time_text = [](double value) { return netlist::quantity_text(value, netlist::Dimension::time(), false); };
  document.apply({{"run.duration", "sequence", sequence.mark},
                  {"run.settle", time_text(settle), sequence.mark},
                  {"run.max_duration", time_text(cap), sequence.mark}});
  return document.validate();
}

DetectionMatrix detection_matrix(netlist::CaseDocument document, int jobs, ScenarioFit fit,
                                 const ScenarioSelection& selection) {
  const std::string case_file = document.file();
  netlist::Case nominal = document.validate();
  const auto& sequence = nominal.sequence;
  if (!sequence) {
    throw netlist::InputError(netlist::SourceMark{case_file, 1, 1},
                              "`linkrise faults` needs a 'sequence:' block: the matrix judges the BMS checks",
                              "add a sequence block (see docs/sequence-and-limits.md)");
  }
  nominal = follow_sequence(document, nominal);
  const solver::Circuit circuit(nominal);
  std::vector<Planned> planned = Plan(document, nominal, circuit, fit).built_in_and_case_scenarios();
  select_rows(planned, selection);
  // Every scenario is validated before any is simulated, so bad input costs no run and writes nothing.
  for (auto& p : planned) {
    if (!p.row.applicable) continue;
    try {
      p.spec = p.document.validate();
      solver::Circuit check(*p.spec);
    } catch (const netlist::InputError& error) {
      mark_unfit(p, error, fit);
      continue;
    }
    if (!p.spec->sequence) throw std::logic_error("scenario lost its sequence block");
  }
  // The studies' pool: each row writes its own slot, so the matrix does not depend on the thread or rank count.
  const PointTransfer transfer{[&](std::size_t i, ByteWriter& out) {
                                 save_row(out, planned[i].row);
                                 save_path(out, planned[i].path);
                                 save_stall(out, planned[i].run_stall);
                               },
                               [&](std::size_t i, ByteReader& in) {
                                 planned[i].row = load_row(in);
                                 planned[i].path = load_path(in);
                                 planned[i].run_stall = load_stall(in);
                               }};
  for_each_index_on_ranks(
      planned.size(), jobs,
      [&](std::size_t i) {
        if (planned[i].row.applicable) run_row(planned[i]);
      },
      transfer);
  const Planned& nominal_row = planned.front();  // select_rows keeps it first
  for (auto& p : planned) {
    if (!p.expect_from_stall || !p.row.applicable || p.row.solver_failed) continue;
    const analysis::ChargePath unmeasured{.explanation = "the nominal run failed, so its charging path is unknown"};
    auto loads = analysis::constant_power_loads(circuit);
    std::erase_if(loads, [&](const analysis::ConstantPowerLoad& load) { return !draws_during_charge(*sequence, load.name); });
    expect_from_case(p, nominal_row.path ? *nominal_row.path : unmeasured, loads, *sequence);
  }
  DetectionMatrix matrix;
  matrix.case_file = case_file;
  matrix.title = nominal.title;
  matrix.resistor = sequence->resistor;
  for (auto& p : planned) matrix.rows.push_back(std::move(p.row));
  return matrix;
}

std::vector<std::string> failure_reasons(const DetectionRow& row) {
  std::vector<std::string> reasons;
  if (!row.applicable || row.pass) return reasons;
  if (row.actual != row.expected) reasons.push_back(fmt::format("ended '{}' instead of '{}'", row.actual_word(), row.expected_word()));
  if (!row.ratings_held) reasons.push_back("a part rating was broken: " + row.broken_rating);
  return reasons;
}

std::string matrix_text(const DetectionMatrix& matrix) {
  std::string out = fmt::format("linkrise faults — {}\n", matrix.title);
  out += fmt::format("  pre-charge resistor: {} (peak temperature and energy / rating)\n", matrix.resistor);
  out += fmt::format("  {:<26} {:<14} {:<14} {:>7} {:>11} {:>24} {:>22}  {}\n", "scenario", "expected", "actual", "attempt",
                     "detected", "peak temperature", "energy", "result");
  for (const auto& row : matrix.rows) {
    std::string result = !row.applicable ? "n/a" : row.pass ? "pass" : "FAIL";
    out += fmt::format("  {:<26} {:<14} {:<14} {:>7} {:>11} {:>24} {:>22}  {}\n", row.scenario, row.expected_word(),
                       row.actual_word(), row.applicable ? fmt::format("{}/{}", row.attempt, row.attempts) : "-",
                       analysis::format_metric(row.detection_time, "s"), against(row.peak_temperature, row.temperature_rating, "degC"),
                       against(row.energy, row.energy_rating, "J"), result);
    if (!row.applicable || !row.note.empty() || (row.applicable && !row.pass)) {
      std::string why = row.note;
      for (const auto& reason : failure_reasons(row)) why += (why.empty() ? "" : "; ") + reason;
      if (!why.empty()) out += fmt::format("      {}\n", why);
    }
  }
  out += fmt::format("  matrix    {} ({} of {} rows failed)\n", matrix.pass() ? "PASS" : "FAIL", matrix.failed(),
                     matrix.rows.size());
  return out;
}

std::string matrix_csv(const DetectionMatrix& matrix) {
  auto number = [](double value) { return csv_number(value); };
  std::string out =
      "scenario,expected,actual,applicable,attempt [1],attempts [1],detection_time [s],end_time [s],"
      "peak_temperature [degC],temperature_rating [degC],energy [J],energy_rating [J],ratings_held,broken_rating,pass,"
      "note\n";
  for (const auto& row : matrix.rows) {
    out += fmt::format("{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{}\n", row.scenario, row.expected_word(),
                       row.actual_word(), row.applicable ? "yes" : "no", row.attempt, row.attempts,
                       number(row.detection_time), number(row.end_time),
                       number(row.peak_temperature), number(row.temperature_rating), number(row.energy),
                       number(row.energy_rating), row.ratings_held ? "yes" : "no", csv_quoted(row.broken_rating),
                       row.pass ? "yes" : "no", csv_quoted(row.note));
  }
  return out;
}

nlohmann::json detection_matrix_json(const DetectionMatrix& matrix) {
  nlohmann::json rows = nlohmann::json::array();
  for (const auto& row : matrix.rows) {
    rows.push_back({{"scenario", row.scenario},
                    {"description", row.description},
                    {"expected", row.expected_word()},
                    {"actual", row.actual_word()},
                    {"applicable", row.applicable},
                    {"attempt", row.attempt},
                    {"attempts", row.attempts},
                    {"detection_time", quantity(row.detection_time, "s")},
                    {"end_time", quantity(row.end_time, "s")},
                    {"peak_temperature", quantity(row.peak_temperature, "degC")},
                    {"temperature_rating", quantity(row.temperature_rating, "degC")},
                    {"energy", quantity(row.energy, "J")},
                    {"energy_rating", quantity(row.energy_rating, "J")},
                    {"ratings_held", row.ratings_held},
                    {"broken_rating", row.broken_rating},
                    {"pass", row.pass},
                    {"note", row.note}});
  }
  return with_file_head({{"resistor", matrix.resistor},
                         {"verdict", matrix.pass() ? "pass" : "fail"},
                         {"rows", rows}},
                        matrix.title, matrix.case_file);
}

std::string matrix_json(const DetectionMatrix& matrix) { return json_text(detection_matrix_json(matrix)); }

}  // namespace linkrise::app
