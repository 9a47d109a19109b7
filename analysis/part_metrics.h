#pragma once
// Per-part figures of the parts that turn current into heat (pre-charge resistors, thermistors, contactors,
// cables, diodes): the values a resistor's ratings are judged against.
//
// Which parts: those whose only power flow is heat and that have no branch unknown (capacitors with ESR and
// cell strings are excluded). Metric names are those of models::Rating, so a rating on metric m of part p is
// judged against the metric "<p>.<m>":
//   peak_temperature      degC  largest element temperature over the recorded rows (parts with a temperature)
//   peak_melt             1     largest melting integral of a fuse over the recorded rows (1 = melted; fuses only)
//   peak_power            W     largest heat power (I²R, the part's heat_power signal) over the recorded rows;
//                               power into stored energy is not heat and is not counted
//   peak_stored_power     W     largest |power into the part's stored energy| (a cable's ½·L·i²), for parts that
//                               store energy only
//   energy                J     heat absorbed over the run, from the part's integrated energy account
//   current_squared_time  A²·s  ∫ i² dt (I²t)
//   peak_voltage          V     largest |v| over the recorded rows
//   peak_current          A     largest |i| over the recorded rows
//   peak_pulse_energy     J     the largest energy of one pulse (analysis/pulses.h): what a PTC's energy per
//                               switching is judged against
//   pulse_curve_use       1     the worst pulse's share of what the part's data-sheet pulse curve permits at its
//                               equivalent rectangular length (analysis/pulses.h); parts with a curve only, with
//   worst_pulse_start     s     when that pulse began, and
//   worst_pulse_length    s     its equivalent rectangular length E/P_peak
//   average_power         W     heat absorbed over the run divided by the run's length (depends on the chosen
//                               run length: for reading, not for judging)
//   (contactors, analysis/contact_events.h) arc_energy J (largest of one arc event), total_arc_energy J,
//   arc_time s (that event's length), break_current A and break_voltage V (the worst opening's), break_use 1 and
//   break_row 1 (with a breaking capacity), making_current A and making_voltage_step V (largest over the touches)
//   duty_average_power    W     heat absorbed over the key-cycle duty (sequence.key_cycles) divided by the duty's
//                               length: the mean a continuous power rating is judged against (a pulse is judged
//                               by energy and peak temperature, not by its peak power); NaN without a stated duty
// Peaks are row maxima: a peak between two solver steps is missed by at most the change over one step.
// I²t comes from the part's own integrated ∫i² dt state where it has one (electro-thermal parts, see
// models/thermal_resistor.h), as accurate as the solver; otherwise from the trapezoid rule over the rows,
// whose error for a current decaying as e^(−t/τ) is about (h/τ)²/12 of the integral per step of length h
// (a few 0.1 % on solver rows, where h/τ stays near 0.1–0.3), exact at switching instants because each has a
// row before and after.
#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "analysis/contact_events.h"
#include "analysis/energy_audit.h"
#include "solver/circuit.h"
#include "solver/transient.h"
#include "solver/waveform.h"

namespace linkrise::analysis {

struct PartMetric {
  std::string name;  // e.g. "peak_temperature"
  std::string unit;  // e.g. "degC"
  double value = 0.0;
  std::string detail;  // this run's particulars behind the value, for the verdict (may be empty)

  PartMetric(std::string name_, std::string unit_, double value_, std::string detail_ = "")
      : name(std::move(name_)), unit(std::move(unit_)), value(value_), detail(std::move(detail_)) {}
};

struct ResistiveMetrics {
  std::string part;
  std::optional<double> peak_temperature;  // degC; absent when the part has no temperature signal
  std::optional<double> peak_body_temperature;  // degC; parts with a two-node (element + body) network
  std::optional<double> peak_melt;         // 1; absent when the part has no melt signal
  double peak_power = 0.0;                 // W, heat
  std::optional<double> peak_stored_power; // W; absent when the part stores no energy
  double energy = 0.0;                     // J
  double current_squared_time = 0.0;       // A²·s
  bool current_squared_integrated = false; // true: from the part's ∫i² dt state or the solver's quadrature; false: trapezoid over rows
  double peak_voltage = 0.0;               // V
  double peak_current = 0.0;               // A
  double peak_pulse_energy = 0.0;          // J
  double switched_capacitance = 0.0;       // F, largest charge of one pulse over its largest voltage
  std::optional<double> pulse_curve_use, worst_pulse_start, worst_pulse_length;  // parts with a pulse curve
  std::string pulse_curve_detail;          // the curve and rows the worst pulse was judged between
  double average_power = 0.0;              // W
  double duty_average_power = std::nan("");  // W; NaN without a stated duty
  std::optional<ContactMetrics> contact;     // contactors (parts with an arc_energy signal)
  bool judges_breaks = false;                // the contactor has a breaking capacity
  std::string break_detail;                  // the worst opening and the row that judged it

  /// The values as named metrics, in the order listed in the header comment.
  std::vector<PartMetric> named() const;
};

/// True for the parts these metrics describe (only heat, no branch unknown).
bool is_resistive(const solver::Circuit& circuit, int part);

/// The metrics of part `part` from a run: waveform rows from result.steps, energy from `audit`.
ResistiveMetrics resistive_metrics(const solver::Circuit& circuit, const solver::Result& result,
                                   const EnergyAudit& audit, int part);
/// The same for every resistive part, in part order.
std::vector<ResistiveMetrics> all_resistive_metrics(const solver::Circuit& circuit, const solver::Result& result,
                                                    const EnergyAudit& audit);

/// Largest |value| of a column over all rows (0 for an empty waveform).
double peak_absolute(const solver::Waveform& waveform, int column);
/// Largest value of a column over all rows; nullopt for an empty waveform.
std::optional<double> peak_value(const solver::Waveform& waveform, int column);
/// ∫ value² dt over the rows by the trapezoid rule (see the accuracy note above).
double square_integral_trapezoid(const solver::Waveform& waveform, int column);

}  // namespace linkrise::analysis
