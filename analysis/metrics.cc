#include "analysis/metrics.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

#include "analysis/part_metrics.h"
#include "analysis/trace.h"

namespace linkrise::analysis {

void MetricSet::add(std::string name, double value, std::string unit, std::string definition, std::string detail) {
  list_.push_back(Metric{std::move(name), value, std::move(unit), std::move(definition), std::move(detail)});
}

void MetricSet::append(const MetricSet& other) { list_.insert(list_.end(), other.list_.begin(), other.list_.end()); }

const Metric* MetricSet::find(const std::string& name) const {
  for (const auto& metric : list_) {
    if (metric.name == name) return &metric;
  }
  return nullptr;
}

double MetricSet::value(const std::string& name) const {
  const Metric* metric = find(name);
  return metric ? metric->value : std::nan("");
}

std::vector<std::string> MetricSet::names() const {
  std::vector<std::string> names;
  for (const auto& metric : list_) names.push_back(metric.name);
  return names;
}

netlist::Dimension metric_dimension(const std::string& unit) {
  using netlist::Dimension;
  if (unit == "s") return Dimension::time();
  if (unit == "V") return Dimension::voltage();
  if (unit == "A") return Dimension::current();
  if (unit == "A²s") return Dimension::current().power(2) * Dimension::time();
  if (unit == "W") return Dimension::power_();
  if (unit == "F") return Dimension::capacitance();
  if (unit == "J") return Dimension::energy();
  if (unit == "degC" || unit == "K") return Dimension::temperature();
  if (unit == "1") return Dimension::none();
  throw std::logic_error(fmt::format("metric unit '{}' has no dimension", unit));
}

std::string difference_unit(const std::string& unit) { return unit == "degC" ? "K" : unit; }

std::string format_metric(double value, const std::string& unit) {
  if (std::isnan(value)) return "-";
  if (unit == "degC" || unit == "K") return fmt::format("{:.4g} {}", value, unit);
  if (unit == "1") return fmt::format("{:g}", value);
  return netlist::format_si(value, unit);
}

namespace {
const double kNaN = std::nan("");

double or_nan(const std::optional<Extremum>& extremum) { return extremum ? extremum->value : kNaN; }
bool reached(double time) { return !std::isnan(time); }
}  // namespace

MetricSet sequence_metrics(const solver::Waveform& waveform, const solver::SequenceReport& report,
                           const StallDiagnostic& stall) {
  MetricSet m;
  const auto& spec = report.spec;
  const solver::AttemptRecord* attempt = report.last();
  const bool rows = waveform.row_count() >= 2;
  const double end = rows ? waveform.times().back() : 0.0;
  const double start = attempt ? attempt->start : kNaN;
  const double closed = attempt ? attempt->main_closed : kNaN;

  Trace pack, link, main_current, pre_current;
  if (rows) {
    pack = Trace::node_pair(waveform, spec.pack.plus, spec.pack.minus, report.ground);
    link = Trace::node_pair(waveform, spec.link.plus, spec.link.minus, report.ground);
    main_current = Trace::column(waveform, spec.main + ".current");
    pre_current = Trace::column(waveform, spec.precharge + ".current");
  }

  m.add("sequence.attempts", report.attempts, "1", "pre-charge attempts started (retries included)");

  double threshold = kNaN;
  if (rows && reached(start)) {
    double ratio = spec.rule == netlist::ClosingRule::Ratio ? spec.rule_value : 1.0;
    double offset = spec.rule == netlist::ClosingRule::Ratio ? 0.0 : -spec.rule_value;
    // What the BMS compares: a sensor's reading where the sequence reads one (between rows, linearly), else
    // the node pair (a watch puts a row at its exact crossing).
    Trace sensed_pack = spec.pack_sensor.empty() ? pack : Trace::column(waveform, spec.pack_sensor + ".reading");
    Trace sensed_link = spec.link_sensor.empty() ? link : Trace::column(waveform, spec.link_sensor + ".reading");
    if (auto crossing = sensed_link.minus_scaled(sensed_pack, ratio, offset).first_rise_through_zero(start)) {
      threshold = *crossing - start;
    }
  }
  m.add("sequence.time_to_threshold", threshold, "s",
        "from the start of the final attempt to the first moment the link meets the closing level (ratio or "
        "difference; the rate condition is not part of it), at the exact crossing; as read by the sequence's "
        "voltage sensors where it names them");
  m.add("sequence.decision_time", attempt ? attempt->decision : kNaN, "s",
        "run time of the BMS sample that decided to close the main contactor");
  m.add("sequence.main_close_time", closed, "s", "run time at which the main contacts first touched");
  m.add("sequence.precharge_time", closed - start, "s",
        "from the start of the final attempt to the first touch of the main contacts");

  bool after_close = rows && reached(closed);
  m.add("sequence.voltage_step_at_close", after_close ? pack.minus(link).at(closed, false) : kNaN, "V",
        "sensed pack minus sensed link voltage just before the main contacts touched");
  m.add("sequence.peak_main_current", after_close ? or_nan(main_current.absolute().maximum(closed, end)) : kNaN, "A",
        "largest |current| through the main contactor from its closure to the end of the run");
  m.add("sequence.main_current_squared_time", after_close ? main_current.squared().integral(closed, end) : kNaN,
        "A²s", "I²t: ∫ i² dt of the main contactor current from its closure to the end of the run");
  m.add("sequence.peak_precharge_current",
        rows ? or_nan(pre_current.absolute().maximum(waveform.times().front(), end)) : kNaN, "A",
        "largest |current| through the pre-charge contactor over the run (all attempts)");
  // Against the pack at rest, not its terminal voltage: the terminal sags under the inrush, so a link still rising
  // monotonically below the open-circuit voltage would otherwise read as an overshoot.
  double overshoot = kNaN;
  if (after_close && reached(start)) overshoot = std::max(0.0, or_nan(link.maximum(closed, end)) - pack.at(start));
  m.add("sequence.link_overshoot", overshoot, "V",
        "largest amount by which the sensed link voltage exceeds the pack's open-circuit voltage (the sensed pack "
        "voltage at rest, at the start of the final attempt before any contact touches) after the main closure "
        "(0 when it never does)");
  if (!spec.more_mains.empty()) {
    // Parallel strings: a string whose main current runs backwards is being charged by the others. The zero trace
    // minus a main current is that backward current, so its maximum is the equalising current's peak.
    double equalising = kNaN;
    if (after_close) {
      for (const auto& name : spec.mains()) {
        const Trace current = Trace::column(waveform, name + ".current");
        const auto backwards = current.minus_scaled(current, 2.0, 0.0).maximum(closed, end);  // −i
        if (backwards && (std::isnan(equalising) || backwards->value > equalising)) equalising = backwards->value;
      }
      equalising = std::max(0.0, equalising);
    }
    m.add("sequence.equalising_current", equalising, "A",
          "largest current flowing backwards through any string's main contactor after the main closure: one "
          "parallel string charging another (0 when none does)");
  }
  m.add("sequence.minimum_pack_voltage", rows ? or_nan(pack.minimum(waveform.times().front(), end)) : kNaN, "V",
        "lowest sensed pack terminal voltage over the run");
  m.add("sequence.detection_time", report.first_fault_time, "s", "run time at which the first fault was raised");
  m.add("sequence.stall", stall.applicable && stall.stalls ? 1.0 : 0.0, "1",
        "1 when a constant-power load leaves no equilibrium at or above the closing level (quadratic "
        "v = [Vs + √(Vs² − 4PR)]/2) or holds the link below the lower root [Vs − √(Vs² − 4PR)]/2, else 0");
  m.add("sequence.stall_equilibrium", stall.applicable ? stall.equilibrium : kNaN, "V",
        "link equilibrium [Vs + √(Vs² − 4PR)]/2 with the loads that drew in the final attempt; NaN when there "
        "is none or no load drew");
  return m;
}

namespace {
// Definitions are for people reading a report: plain words, no pointers into the source.
std::string part_definition(const std::string& metric) {
  if (metric == "peak_temperature") return "highest element temperature of the part over the run";
  if (metric == "peak_body_temperature") {
    return "highest body (housing) temperature of a two-node thermal network over the run";
  }
  if (metric == "switched_capacitance") {
    return "the largest capacitance charged through the part in one pulse: the pulse's charge ∫|i| dt over the "
           "largest |voltage| across the part during it (C for an RC charge from 0 to V); what a PTC's capacitance "
           "per switching is judged against";
  }
  if (metric == "peak_power") return "largest instantaneous heat power in the part (I²R; power into stored energy excluded)";
  if (metric == "peak_stored_power") {
    return "largest |instantaneous power into the part's stored energy| (e.g. a cable's ½·L·i²; not heat)";
  }
  if (metric == "energy") return "heat dissipated in the part over the run (the solver's energy account)";
  if (metric == "current_squared_time") return "I²t: ∫ i² dt of the part's current over the run";
  if (metric == "peak_voltage") return "largest |voltage| across the part";
  if (metric == "peak_current") return "largest |current| through the part";
  if (metric == "peak_pulse_energy") {
    return "the largest heat of one pulse (a stretch of heat power above 1e-4 of its peak: an attempt, a bounce, "
           "a trip); what a PTC's energy per switching is judged against";
  }
  if (metric == "pulse_curve_use") {
    return "the worst pulse's share of what the part's data-sheet pulse curve permits at its equivalent rectangular "
           "length E/P_peak (the repetitive curve when the run has several pulses; 100 % = at the curve)";
  }
  if (metric == "worst_pulse_start") return "when the pulse that used most of the pulse curve began";
  if (metric == "worst_pulse_length") return "that pulse's equivalent rectangular length E/P_peak";
  if (metric == "peak_melt") {
    return "largest melting integral of the fuse over the run: the share of its melting I²t or time-current "
           "curve used (1 = melted open)";
  }
  if (metric == "arc_energy") return "the largest arc energy ∫U·|i| dt of one opening or bounce gap of the contactor";
  if (metric == "total_arc_energy") return "the arc energy of all the contactor's openings and bounce gaps";
  if (metric == "arc_time") return "how long the arc with the largest energy burned (the interruption time)";
  if (metric == "break_current") return "the current the worst opening broke (just before the contacts parted)";
  if (metric == "break_voltage") return "the voltage across the worst opening's gap once it had recovered";
  if (metric == "break_time_constant") {
    return "L/R of the circuit the worst opening broke (capacitors held, read when its arc struck)";
  }
  if (metric == "break_use") {
    return "the worst opening's current as a share of what its breaking-capacity row permits (100 % = at the "
           "rating; not reached without an arcing opening)";
  }
  if (metric == "break_row") return "the breaking-capacity row the worst opening was judged against (0: none covers it)";
  if (metric == "making_current") return "the largest current peak right after the contacts touched (every touch), before the next switching";
  if (metric == "making_voltage_step") return "the largest voltage across the contacts just before they touched";
  if (metric == "average_power") {
    return "heat dissipated in the part over the run divided by the run's length (it depends on the length "
           "chosen; a continuous power rating is judged against duty_average_power)";
  }
  if (metric == "duty_average_power") {
    return "heat dissipated over the key-cycle duty divided by the duty's length (sequence.key_cycles): the mean a "
           "continuous power rating is judged against; not reached without a stated duty";
  }
  throw std::logic_error(fmt::format("part metric '{}' has no definition", metric));
}
}  // namespace

double duty_length(const solver::SequenceReport& report) {
  const auto& cycles = report.spec.key_cycles;
  const solver::AttemptRecord* last = report.last();
  if (last == nullptr || report.cycles != cycles.count || std::isnan(last->main_closed)) return kNaN;
  if (cycles.on_time <= 0.0) return kNaN;  // no key_cycles block: no duty stated
  const double first_start = report.history.front().start;
  return (last->main_closed - first_start) + cycles.on_time + cycles.off_time;
}

MetricSet part_metrics(const solver::Circuit& circuit, const solver::Result& result, const EnergyAudit& audit,
                       double duty) {
  MetricSet m;
  if (result.steps.row_count() == 0) return m;
  for (auto part : all_resistive_metrics(circuit, result, audit)) {
    part.duty_average_power = duty > 0.0 ? part.energy / duty : kNaN;
    for (const auto& metric : part.named()) {
      m.add(part.part + "." + metric.name, metric.value, metric.unit, part_definition(metric.name), metric.detail);
    }
  }
  return m;
}

std::vector<ConstantPowerLoad> constant_power_loads(const solver::Circuit& circuit) {
  std::vector<ConstantPowerLoad> loads;
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto demand = circuit.part(p).load_demand();
    if (!demand || !demand->constant_power) continue;
    loads.push_back({circuit.part(p).name(), demand->demand, demand->resistive_below});
  }
  return loads;
}

}  // namespace linkrise::analysis
