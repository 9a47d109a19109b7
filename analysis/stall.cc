#include "analysis/stall.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "analysis/trace.h"
#include "netlist/units.h"

namespace linkrise::analysis {

double constant_power_equilibrium(double source_voltage, double resistance, double power) {
  double discriminant = source_voltage * source_voltage - 4.0 * power * resistance;
  if (discriminant < 0.0) return std::nan("");
  return 0.5 * (source_voltage + std::sqrt(discriminant));
}

double constant_power_lower_root(double source_voltage, double resistance, double power) {
  double discriminant = source_voltage * source_voltage - 4.0 * power * resistance;
  if (discriminant < 0.0) return std::nan("");
  return 0.5 * (source_voltage - std::sqrt(discriminant));
}

namespace {
using netlist::format_si;

// The constant-power loads that drew at some row of [start, end]: their summed power and highest onset.
void add_loads_that_drew(const solver::Waveform& waveform, const std::vector<ConstantPowerLoad>& loads, double start,
                         double end, StallDiagnostic& d) {
  for (const auto& load : loads) {
    int column = waveform.column(load.name + ".drawing");
    if (column < 0) continue;
    bool drew = false;
    for (std::size_t r = 0; r < waveform.row_count() && !drew; ++r) {
      double t = waveform.time(r);
      drew = t >= start && t <= end && waveform.value(r, column) > 0.5;
    }
    if (drew) {
      d.load_power += load.power;
      d.resistive_below = std::max(d.resistive_below, load.resistive_below);
    }
  }
}

// Vs²/(4R) and both roots of v·(Vs − v)/R = P from source_voltage, path_resistance and load_power.
void solve_quadratic(StallDiagnostic& d) {
  d.maximum_power = d.source_voltage * d.source_voltage / (4.0 * d.path_resistance);
  d.equilibrium = constant_power_equilibrium(d.source_voltage, d.path_resistance, d.load_power);
  d.lower_root = constant_power_lower_root(d.source_voltage, d.path_resistance, d.load_power);
}

// The finding in words; each states what it measured and what it computed from that.
void explain(StallDiagnostic& d) {
  const std::string drawn = fmt::format("{} drawn through {} from {}", format_si(d.load_power, "W"),
                                        format_si(d.path_resistance, "Ohm"), format_si(d.source_voltage, "V"));
  if (std::isnan(d.equilibrium)) {
    d.stalls = true;
    d.explanation = fmt::format(
        "stall: the loads draw {} but the path ({} from {}) can deliver at most Vs²/(4R) = {}; there is no "
        "equilibrium and the link collapses (it measured {} at the end of the attempt)",
        format_si(d.load_power, "W"), format_si(d.path_resistance, "Ohm"), format_si(d.source_voltage, "V"),
        format_si(d.maximum_power, "W"), format_si(d.link_voltage, "V"));
  } else if (d.link_voltage < d.lower_root) {
    d.stalls = true;
    d.latched = true;
    d.explanation = fmt::format(
        "stall at the bottom: with {}, the link measured {} at the end of the attempt, below the unstable lower "
        "root [Vs − √(Vs² − 4PR)]/2 = {}: the loads draw from the start and hold it there, so the upper "
        "equilibrium {} is never reached; only a fault check (no rise or timeout) can end the attempt",
        drawn, format_si(d.link_voltage, "V"), format_si(d.lower_root, "V"), format_si(d.equilibrium, "V"));
  } else if (d.equilibrium < d.closing_level) {
    d.stalls = true;
    d.explanation = fmt::format(
        "stall: with {}, the link settles at [Vs + √(Vs² − 4PR)]/2 = {} (measured {}), below the closing level "
        "{}; only a fault check (no rise or timeout) can end the attempt",
        drawn, format_si(d.equilibrium, "V"), format_si(d.link_voltage, "V"), format_si(d.closing_level, "V"));
  } else {
    d.explanation = fmt::format(
        "no stall: with {}, the link settles at [Vs + √(Vs² − 4PR)]/2 = {} (measured {} at the end of the attempt), "
        "above the closing level {}",
        drawn, format_si(d.equilibrium, "V"), format_si(d.link_voltage, "V"), format_si(d.closing_level, "V"));
  }
}
}  // namespace

StallDiagnostic diagnose_stall(const solver::Waveform& waveform, const solver::SequenceReport& report,
                               const std::vector<ConstantPowerLoad>& loads) {
  StallDiagnostic d;
  const solver::AttemptRecord* attempt = report.last();
  if (attempt == nullptr || waveform.row_count() < 2) {
    d.explanation = "no pre-charge attempt was made";
    return d;
  }
  const auto& spec = report.spec;
  double start = attempt->start;
  double end = !std::isnan(attempt->decision)     ? attempt->decision
               : !std::isnan(attempt->fault_time) ? attempt->fault_time
                                                  : waveform.times().back();
  Trace pack = Trace::node_pair(waveform, spec.pack.plus, spec.pack.minus, report.ground);
  Trace link = Trace::node_pair(waveform, spec.link.plus, spec.link.minus, report.ground);
  Trace current = Trace::column(waveform, spec.precharge + ".current");
  add_loads_that_drew(waveform, loads, start, end, d);
  d.source_voltage = pack.at(start);
  d.closing_level = spec.closing_level(d.source_voltage);
  if (d.load_power <= 0.0) {
    d.explanation = "no constant-power load drew during the final attempt, so none can stall it";
    return d;
  }
  double i = std::fabs(current.at(end));
  if (!(i > 1e-9)) {
    d.explanation = "no pre-charge current flowed at the end of the attempt, so the path resistance is unknown";
    return d;
  }
  d.applicable = true;
  d.link_voltage = link.at(end);
  // Vs − link over the current: the whole path (source resistance, contactors, resistor, cable).
  d.path_resistance = (d.source_voltage - d.link_voltage) / i;
  solve_quadratic(d);
  explain(d);
  return d;
}

ChargePath measure_charge_path(const solver::Waveform& waveform, const solver::SequenceReport& report) {
  ChargePath path;
  if (report.history.empty() || waveform.row_count() < 2) {
    path.explanation = "no pre-charge attempt was made";
    return path;
  }
  const solver::AttemptRecord& first = report.history.front();
  const auto& spec = report.spec;
  path.at_time = !std::isnan(first.decision) ? first.decision : !std::isnan(first.fault_time) ? first.fault_time
                                                                                                : waveform.times().back();
  Trace pack = Trace::node_pair(waveform, spec.pack.plus, spec.pack.minus, report.ground);
  Trace link = Trace::node_pair(waveform, spec.link.plus, spec.link.minus, report.ground);
  Trace current = Trace::column(waveform, spec.precharge + ".current");
  path.source_voltage = pack.at(first.start);
  path.closing_level = spec.closing_level(path.source_voltage);
  const double i = std::fabs(current.at(path.at_time));
  if (!(i > 1e-9)) {
    path.explanation = fmt::format("no pre-charge current flowed at {}, so the path resistance is unknown",
                                   format_si(path.at_time, "s"));
    return path;
  }
  path.path_resistance = (path.source_voltage - link.at(path.at_time)) / i;
  path.measured = path.path_resistance > 0.0;
  if (!path.measured) path.explanation = "the link stood above the source, so the path resistance is unknown";
  return path;
}

StallDiagnostic predict_stall(const ChargePath& path, double load_power, double resistive_below) {
  StallDiagnostic d;
  d.applicable = path.measured && load_power > 0.0;
  d.source_voltage = path.source_voltage;
  d.path_resistance = path.path_resistance;
  d.closing_level = path.closing_level;
  d.load_power = load_power;
  d.resistive_below = resistive_below;
  d.link_voltage = std::nan("");
  if (!d.applicable) {
    d.explanation = path.measured ? "the case has no constant-power load" : path.explanation;
    return d;
  }
  solve_quadratic(d);
  d.stalls = std::isnan(d.equilibrium) || d.equilibrium < d.closing_level;
  const std::string drawn = fmt::format("{} drawn through {} from {}", format_si(d.load_power, "W"),
                                        format_si(d.path_resistance, "Ohm"), format_si(d.source_voltage, "V"));
  if (std::isnan(d.equilibrium)) {
    d.explanation = fmt::format("predicted: {} exceeds Vs²/(4R) = {}, so there is no equilibrium", drawn,
                                format_si(d.maximum_power, "W"));
  } else {
    d.explanation = fmt::format(
        "predicted: with {}, the roots are {} (unstable) and {} (the operating point); closing level {}", drawn,
        format_si(d.lower_root, "V"), format_si(d.equilibrium, "V"), format_si(d.closing_level, "V"));
  }
  return d;
}

}  // namespace linkrise::analysis
