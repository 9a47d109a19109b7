#include "app/output/run_summary.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "analysis/part_metrics.h"
#include "app/output/json_fields.h"
#include "netlist/units.h"

namespace linkrise::app {

namespace {

std::string outcome_word(solver::Outcome outcome) {
  switch (outcome) {
    case solver::Outcome::Completed: return "completed";
    case solver::Outcome::SupervisorFinished: return "sequence_finished";
    case solver::Outcome::SolverFailure: return "solver_failure";
  }
  return "unknown";
}

// One part's entry: kind, peaks, energy accounts, resistive metrics and ratings.
nlohmann::json part_summary(const solver::Circuit& circuit, const solver::Result& result,
                            const analysis::EnergyAudit& audit, int p) {
  const auto& part = circuit.part(p);
  nlohmann::json entry;
  entry["kind"] = part.kind();
  entry["role"] = models::role_word(part.role());
  for (const auto& value : part.derived_values()) {
    entry["derived"][value.name] = quantity(value.value, value.unit);
    entry["derived"][value.name]["origin"] = value.origin;
  }
  const int first = static_cast<int>(circuit.node_names().size()) + circuit.signal_first(p);
  if (result.steps.row_count() > 0) {
    entry["peak_current"] = quantity(analysis::peak_absolute(result.steps, first), "A");
    entry["peak_terminal_power"] = quantity(analysis::peak_absolute(result.steps, first + 2), "W");
    for (const char* signal : {"heat_power", "stored_power"}) {
      const int column = result.steps.column(part.name() + "." + signal);
      if (column >= 0) entry[std::string("peak_") + signal] = quantity(analysis::peak_absolute(result.steps, column), "W");
    }
  }
  const auto& energy = audit.parts[p];
  auto channels = part.power_channels();
  if (channels.source) entry["energy_delivered"] = quantity(energy.delivered, "J");
  if (channels.heat) entry["energy_dissipated"] = quantity(energy.dissipated, "J");
  if (channels.load) entry["energy_to_load"] = quantity(energy.to_load, "J");
  if (energy.stored_start != 0.0 || energy.stored_end != 0.0) {
    entry["stored_energy_start"] = quantity(energy.stored_start, "J");
    entry["stored_energy_end"] = quantity(energy.stored_end, "J");
  }
  if (analysis::is_resistive(circuit, p)) {
    for (const auto& metric : analysis::resistive_metrics(circuit, result, audit, p).named()) {
      entry[metric.name] = quantity(metric.value, metric.unit);
    }
  }
  if (auto ratings = part.ratings(); !ratings.empty()) {
    nlohmann::json list = nlohmann::json::object();
    for (const auto& rating : ratings) {
      list[rating.metric] = quantity(rating.value, rating.unit);
      if (!rating.note.empty()) list[rating.metric]["note"] = rating.note;
    }
    entry["ratings"] = list;
  }
  return entry;
}

nlohmann::json solver_summary(const solver::Statistics& s) {
  return {
      {"method", "CVODE BDF, dense direct linear solver, analytic Jacobian"},
      {"steps", quantity(static_cast<double>(s.steps), "1")},
      {"rhs_evaluations", quantity(static_cast<double>(s.rhs_evaluations), "1")},
      {"jacobian_evaluations", quantity(static_cast<double>(s.jacobian_evaluations), "1")},
      {"nonlinear_iterations", quantity(static_cast<double>(s.nonlinear_iterations), "1")},
      {"error_test_failures", quantity(static_cast<double>(s.error_test_failures), "1")},
      {"network_newton_iterations", quantity(static_cast<double>(s.network_newton_iterations), "1")},
      {"events", quantity(static_cast<double>(s.events), "1")},
      {"reinitialisations", quantity(static_cast<double>(s.reinitialisations), "1")},
      {"step_backs", quantity(static_cast<double>(s.step_backs), "1")},
      {"fast_state_settlings", quantity(static_cast<double>(s.settlings), "1")},
      {"wall_time", quantity(s.wall_seconds, "s")},
  };
}
}  // namespace

nlohmann::json run_summary(const solver::Circuit& circuit, const solver::Result& result,
                           const analysis::EnergyAudit& audit) {
  nlohmann::json summary = with_file_head(nlohmann::json::object(), circuit.spec().title, circuit.spec().file);
  summary["outcome"] = outcome_word(result.outcome);
  if (!result.message.empty()) summary["message"] = result.message;
  summary["end_time"] = quantity(result.end_time, "s");
  nlohmann::json warnings = nlohmann::json::array();
  for (const auto& warning : circuit.spec().warnings) {
    warnings.push_back({{"where", warning.mark.to_string()}, {"message", warning.message}, {"why", warning.reason}});
  }
  summary["warnings"] = warnings;
  nlohmann::json parts = nlohmann::json::object();
  for (int p = 0; p < circuit.part_count(); ++p) {
    parts[circuit.part(p).name()] = part_summary(circuit, result, audit, p);
  }
  summary["parts"] = parts;
  summary["energy_audit"] = {
      {"delivered_by_sources", quantity(audit.delivered, "J")},
      {"dissipated", quantity(audit.dissipated, "J")},
      {"taken_by_loads", quantity(audit.to_loads, "J")},
      {"stored_change", quantity(audit.stored_change, "J")},
      {"settled_at_switching", quantity(audit.settled, "J")},
      {"residual", quantity(audit.residual, "J")},
      {"relative_residual", quantity(audit.relative_residual, "1")},
  };
  summary["solver"] = solver_summary(result.statistics);
  nlohmann::json timeline = nlohmann::json::array();
  for (const auto& entry : solver::collapse_repeats(result.timeline)) {
    nlohmann::json line = {{"time", quantity(entry.time, "s")}, {"event", entry.event}, {"reason", entry.reason}};
    if (entry.count > 1) {
      line["count"] = quantity(static_cast<double>(entry.count), "1");
      line["last_time"] = quantity(entry.last_time, "s");
    }
    timeline.push_back(std::move(line));
  }
  summary["timeline"] = timeline;
  return summary;
}

std::string terminal_summary(const solver::Circuit& circuit, const solver::Result& result,
                             const analysis::EnergyAudit& audit) {
  using netlist::format_si;
  std::string out = fmt::format("linkrise — {}\n", circuit.spec().title);
  out += fmt::format("  outcome   {} at t = {}\n", outcome_word(result.outcome), format_si(result.end_time, "s"));
  if (!result.message.empty()) out += fmt::format("  message   {}\n", result.message);
  if (!result.timeline.empty()) {
    out += "  timeline\n";
    for (const auto& entry : solver::collapse_repeats(result.timeline)) {
      const std::string event = entry.count > 1 ? fmt::format("{} (×{})", entry.event, entry.count) : entry.event;
      out += fmt::format("    {:>12}  {:<28} {}\n", format_si(entry.time, "s"), event, entry.reason);
    }
  }
  out += fmt::format("  {:<22} {:>14} {:>16} {:>16} {:>14}\n", "part", "peak |I|", "peak heat power",
                     "peak |P| stored", "heat");
  const int node_columns = static_cast<int>(circuit.node_names().size());
  // Heat (I²R) and the power into stored energy apart: a cable's terminal power is mostly its inductance's.
  auto peak_of = [&](const std::string& column_name) -> std::string {
    const int column = result.steps.column(column_name);
    if (column < 0) return "-";
    return format_si(result.steps.row_count() ? analysis::peak_absolute(result.steps, column) : 0.0, "W");
  };
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    int first = node_columns + circuit.signal_first(p);
    double peak_current = result.steps.row_count() ? analysis::peak_absolute(result.steps, first) : 0.0;
    std::string heat = part.power_channels().heat ? format_si(audit.parts[p].dissipated, "J") : "-";
    out += fmt::format("  {:<22} {:>14} {:>16} {:>16} {:>14}\n", part.name(), format_si(peak_current, "A"),
                       peak_of(part.name() + ".heat_power"), peak_of(part.name() + ".stored_power"), heat);
  }
  out += fmt::format("  energy    sources {} = heat {} + loads {} + stored {} (residual {:.2e} relative)\n",
                     format_si(audit.delivered, "J"), format_si(audit.dissipated, "J"), format_si(audit.to_loads, "J"),
                     format_si(audit.stored_change, "J"), audit.relative_residual);
  const auto& s = result.statistics;
  out += fmt::format("  solver    {} steps, {} RHS, {} Jacobians, {} events, {:.3g} ms\n", s.steps, s.rhs_evaluations,
                     s.jacobian_evaluations, s.events, 1e3 * s.wall_seconds);
  return out;
}

}  // namespace linkrise::app
