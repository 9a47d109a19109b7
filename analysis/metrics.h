#pragma once
// Metrics of one run, each with a unit and a definition (docs/sequence-and-limits.md lists them all).
// Computed from the recorded waveform, the energy audit and the sequence report only.
//
// Sequence metrics (present when the case has a `sequence:` block); times are absolute run times unless
// the definition says "from the start of the final attempt":
//   sequence.attempts [1], sequence.time_to_threshold [s], sequence.decision_time [s],
//   sequence.main_close_time [s], sequence.precharge_time [s], sequence.voltage_step_at_close [V],
//   sequence.peak_main_current [A], sequence.main_current_squared_time [A²s] (I²t),
//   sequence.peak_precharge_current [A], sequence.link_overshoot [V], sequence.minimum_pack_voltage [V],
//   sequence.detection_time [s], sequence.stall [1], sequence.stall_equilibrium [V].
// Part metrics for every resistive part (analysis/part_metrics.h): <part>.peak_power [W] (heat, I²R),
//   <part>.peak_stored_power [W] (into stored energy, parts that store it), <part>.energy [J],
//   <part>.current_squared_time [A²s] (I²t), <part>.peak_voltage [V], <part>.average_power [W], and
//   <part>.peak_temperature [degC] where the part has a temperature.
// Names are whole words: I²t is "current_squared_time" for the sequence and for every part alike.
// A metric that does not apply to the run (no closure, no fault) has the value NaN ("not reached").
#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "analysis/energy_audit.h"
#include "analysis/stall.h"
#include "netlist/units.h"
#include "solver/circuit.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::analysis {

struct Metric {
  std::string name;
  double value = 0.0;  // NaN: not reached in this run
  std::string unit;
  std::string definition;
  std::string detail;  // this run's particulars behind the value (e.g. which pulse-curve rows the worst pulse met)
};

class MetricSet {
 public:
  void add(std::string name, double value, std::string unit, std::string definition, std::string detail = "");
  void append(const MetricSet& other);
  const Metric* find(const std::string& name) const;
  /// The value, or NaN when absent.
  double value(const std::string& name) const;
  const std::vector<Metric>& list() const { return list_; }
  std::vector<std::string> names() const;

 private:
  std::vector<Metric> list_;
};

/// The dimension of a metric unit ("s", "V", "A", "A²s", "W", "J", "degC", "1"), for judging limits.
netlist::Dimension metric_dimension(const std::string& unit);

/// The unit of a difference of two values in `unit`: K for degC (a temperature rise or margin), else `unit`.
std::string difference_unit(const std::string& unit);

/// A metric value for people: SI prefixes, degC, K and plain numbers without a prefix, "-" for not reached.
std::string format_metric(double value, const std::string& unit);

/// Metrics of the BMS sequence, from the waveform and the controller's report.
MetricSet sequence_metrics(const solver::Waveform& waveform, const solver::SequenceReport& report,
                           const StallDiagnostic& stall);

/// Per-part metrics of the resistive parts (from analysis/part_metrics.h), with definitions.
/// `duty` (s): the length of the stated key-cycle duty, which duty_average_power divides by; NaN: none stated.
MetricSet part_metrics(const solver::Circuit& circuit, const solver::Result& result, const EnergyAudit& audit,
                       double duty = std::nan(""));
/// The length of the key-cycle duty a sequence ran (sequence.key_cycles): from the first cycle's start to the
/// last one's, plus the last cycle's charge, its on_time and the off_time; NaN without key cycles or a closure.
double duty_length(const solver::SequenceReport& report);

/// The constant-power loads of the circuit (rated power, resistive floor), for the stall diagnostic.
std::vector<ConstantPowerLoad> constant_power_loads(const solver::Circuit& circuit);

}  // namespace linkrise::analysis
