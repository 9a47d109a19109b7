#include "analysis/part_metrics.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "analysis/pulses.h"
#include "models/contactor.h"
#include "models/thermal_resistor.h"

namespace linkrise::analysis {

std::vector<PartMetric> ResistiveMetrics::named() const {
  std::vector<PartMetric> list;
  if (peak_temperature) list.push_back({"peak_temperature", "degC", *peak_temperature});
  if (peak_body_temperature) list.push_back({"peak_body_temperature", "degC", *peak_body_temperature});
  list.push_back({"peak_power", "W", peak_power});
  if (peak_stored_power) list.push_back({"peak_stored_power", "W", *peak_stored_power});
  list.push_back({"energy", "J", energy});
  list.push_back({"current_squared_time", "A²s", current_squared_time});
  list.push_back({"peak_voltage", "V", peak_voltage});
  list.push_back({"average_power", "W", average_power});
  list.push_back({"duty_average_power", "W", duty_average_power});
  list.push_back({"peak_current", "A", peak_current});
  list.push_back({"peak_pulse_energy", "J", peak_pulse_energy});
  list.push_back({"switched_capacitance", "F", switched_capacitance});
  if (peak_melt) list.push_back({"peak_melt", "1", *peak_melt});
  if (pulse_curve_use) {
    list.push_back({"pulse_curve_use", "1", *pulse_curve_use, pulse_curve_detail});
    list.push_back({"worst_pulse_start", "s", *worst_pulse_start});
    list.push_back({"worst_pulse_length", "s", *worst_pulse_length});
  }
  if (contact) {
    const double none = std::nan("");
    list.push_back({"arc_energy", "J", contact->arc_energy});
    list.push_back({"total_arc_energy", "J", contact->total_arc_energy});
    list.push_back({"arc_time", "s", contact->arc_time});
    list.push_back({"break_current", "A", contact->break_current.value_or(none)});
    list.push_back({"break_voltage", "V", contact->break_voltage.value_or(none)});
    list.push_back({"break_time_constant", "s", contact->break_time_constant.value_or(none)});
    if (judges_breaks) {
      list.push_back({"break_use", "1", contact->break_use.value_or(none), break_detail});
      list.push_back({"break_row", "1", contact->break_row ? static_cast<double>(*contact->break_row) : none});
    }
    list.push_back({"making_current", "A", contact->making_current.value_or(none)});
    list.push_back({"making_voltage_step", "V", contact->making_voltage_step.value_or(none)});
  }
  return list;
}

bool is_resistive(const solver::Circuit& circuit, int part) {
  const auto& p = circuit.part(part);
  auto channels = p.power_channels();
  return channels.heat && !channels.source && !channels.load && p.branch_count() == 0;
}

double peak_absolute(const solver::Waveform& waveform, int column) {
  double peak = 0.0;
  for (std::size_t r = 0; r < waveform.row_count(); ++r) peak = std::max(peak, std::fabs(waveform.value(r, column)));
  return peak;
}

std::optional<double> peak_value(const solver::Waveform& waveform, int column) {
  if (waveform.row_count() == 0) return std::nullopt;
  double peak = waveform.value(0, column);
  for (std::size_t r = 1; r < waveform.row_count(); ++r) peak = std::max(peak, waveform.value(r, column));
  return peak;
}

double square_integral_trapezoid(const solver::Waveform& waveform, int column) {
  double sum = 0.0;
  for (std::size_t r = 1; r < waveform.row_count(); ++r) {
    double a = waveform.value(r - 1, column), b = waveform.value(r, column);
    sum += 0.5 * (a * a + b * b) * (waveform.time(r) - waveform.time(r - 1));
  }
  return sum;
}

namespace {
// The charge of one pulse (trapezoid of |i| over its rows) over the largest |v| across the part during it.
// Only the pulse's own rows are read (times are in order), so many pulses cost the run's rows once, not each.
double switched_capacitance(const solver::Waveform& rows, int current, int voltage, const Pulse& pulse) {
  double charge = 0.0, peak = 0.0;
  const auto& times = rows.times();
  const auto first = std::lower_bound(times.begin(), times.end(), pulse.start) - times.begin();
  for (std::size_t r = static_cast<std::size_t>(first); r < rows.row_count(); ++r) {
    const double t = rows.time(r);
    if (t > pulse.end) break;
    peak = std::max(peak, std::fabs(rows.value(r, voltage)));
    if (r > 0 && rows.time(r - 1) >= pulse.start) {
      charge += 0.5 * (std::fabs(rows.value(r - 1, current)) + std::fabs(rows.value(r, current))) * (t - rows.time(r - 1));
    }
  }
  return peak > 0.0 ? charge / peak : 0.0;
}

// The worst opening and the data-sheet row that judged it, for the limit's detail.
std::string describe_break(const ContactMetrics& m, const models::BreakingCapacity& capacity) {
  const auto si = [](double value, const char* unit) { return netlist::format_si(value, unit); };
  std::string text = fmt::format("worst opening at {}: {} at {}, L/R {}", si(m.break_time, "s"),
                                 si(m.break_current.value_or(0.0), "A"), si(m.break_voltage.value_or(0.0), "V"),
                                 si(m.break_time_constant.value_or(0.0), "s"));
  const int row = m.break_row.value_or(0);
  if (row <= 0) return text + "; no row of ratings.breaking_capacity covers it";
  const auto& r = capacity.rows[static_cast<std::size_t>(row - 1)];
  text += fmt::format("; ratings.breaking_capacity row {} ({} at {}, {}", row, si(r.current, "A"), si(r.voltage, "V"),
                      models::direction_word(r.direction));
  return text + (r.time_constant ? ", L/R up to " + si(*r.time_constant, "s") + ")" : ")");
}

// The worst pulse and the data-sheet rows it was judged between, for the verdict.
std::string describe(const PulseJudgement& judged) {
  const char* unit = judged.pulse.peak_power > 0.0 && judged.curve.find("power") != std::string::npos ? "W" : "J";
  const double taken = unit[0] == 'W' ? judged.pulse.peak_power : judged.pulse.energy;
  return fmt::format("worst of {} pulse(s): {} at {}, equivalent length {}; ratings.{} {} permits {}", judged.count,
                     netlist::format_si(taken, unit), netlist::format_si(judged.pulse.start, "s"),
                     netlist::format_si(judged.pulse.length(), "s"), judged.curve, judged.rows,
                     netlist::format_si(judged.permitted, unit));
}

// Index of the part's ∫i² dt state in the ODE vector, or -1.
int current_squared_state(const solver::Circuit& circuit, int part) {
  int first = circuit.layout(part).state;
  if (first < 0) return -1;
  auto states = circuit.part(part).states(circuit.spec().ambient);
  for (std::size_t k = 0; k < states.size(); ++k) {
    if (states[k].name == models::current_squared_state) return first + static_cast<int>(k);
  }
  return -1;
}
}  // namespace

ResistiveMetrics resistive_metrics(const solver::Circuit& circuit, const solver::Result& result,
                                   const EnergyAudit& audit, int part) {
  ResistiveMetrics metrics;
  const auto& p = circuit.part(part);
  metrics.part = p.name();
  const solver::Waveform& rows = result.steps;
  const int first = static_cast<int>(circuit.node_names().size()) + circuit.signal_first(part);
  const int current = first, voltage = first + 1;
  if (rows.row_count() > 0) {
    metrics.peak_power = peak_absolute(rows, rows.column(p.name() + ".heat_power"));
    if (p.stores_energy()) metrics.peak_stored_power = peak_absolute(rows, rows.column(p.name() + ".stored_power"));
    metrics.peak_voltage = peak_absolute(rows, voltage);
    metrics.peak_current = peak_absolute(rows, current);
    int temperature = rows.column(p.name() + ".temperature");
    if (temperature >= 0) metrics.peak_temperature = peak_value(rows, temperature);
    int body = rows.column(p.name() + ".body_temperature");
    if (body >= 0) metrics.peak_body_temperature = peak_value(rows, body);
    int melt = rows.column(p.name() + ".melt");
    if (melt >= 0) metrics.peak_melt = peak_value(rows, melt);
    const auto curves = p.pulse_curves();
    const int heat = rows.column(p.name() + ".heat_power");
    const auto pulses = heat >= 0 ? split_pulses(rows.times(), rows.series(heat)) : std::vector<Pulse>{};
    for (const auto& pulse : pulses) metrics.peak_pulse_energy = std::max(metrics.peak_pulse_energy, pulse.energy);
    for (const auto& pulse : pulses) {
      metrics.switched_capacitance =
          std::max(metrics.switched_capacitance, switched_capacitance(rows, current, voltage, pulse));
    }
    if (!curves.empty()) {
      if (auto judged = judge_pulses(pulses, curves)) {
        metrics.pulse_curve_use = judged->use;
        metrics.worst_pulse_start = judged->pulse.start;
        metrics.worst_pulse_length = judged->pulse.length();
        metrics.pulse_curve_detail = describe(*judged);
      }
    }
    const ContactColumns contact{current, voltage, rows.column(p.name() + ".closed"), rows.column(p.name() + ".arcing"),
                                 rows.column(p.name() + "." + models::arc_energy_state)};
    if (contact.closed >= 0 && contact.arcing >= 0 && contact.arc_energy >= 0) {
      const auto actuation = p.actuation();
      const auto capacity = p.breaking_capacity();
      metrics.judges_breaks = capacity.has_value();
      std::vector<solver::BreakCircuit> breaks;
      for (const auto& b : result.breaks) {
        if (b.part == part) breaks.push_back(b);
      }
      metrics.contact =
          contact_metrics(contact_events(rows, contact, actuation ? actuation->parting_time : 0.0, breaks), capacity);
      if (capacity && metrics.contact->break_use) metrics.break_detail = describe_break(*metrics.contact, *capacity);
    }
  }
  if (part < static_cast<int>(audit.parts.size())) metrics.energy = audit.parts[part].dissipated;
  if (result.end_time > 0.0) metrics.average_power = metrics.energy / result.end_time;
  int state = current_squared_state(circuit, part);
  if (state < 0) state = circuit.current_squared_index(part);
  if (state >= 0 && result.final_states.size() > static_cast<std::size_t>(state) &&
      result.initial_states.size() > static_cast<std::size_t>(state)) {
    metrics.current_squared_time = result.final_states[state] - result.initial_states[state];
    metrics.current_squared_integrated = true;
  } else if (rows.row_count() > 0) {
    metrics.current_squared_time = square_integral_trapezoid(rows, current);
  }
  return metrics;
}

std::vector<ResistiveMetrics> all_resistive_metrics(const solver::Circuit& circuit, const solver::Result& result,
                                                    const EnergyAudit& audit) {
  std::vector<ResistiveMetrics> list;
  for (int p = 0; p < circuit.part_count(); ++p) {
    if (is_resistive(circuit, p)) list.push_back(resistive_metrics(circuit, result, audit, p));
  }
  return list;
}

}  // namespace linkrise::analysis
