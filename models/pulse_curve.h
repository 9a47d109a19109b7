#pragma once
// A data sheet's pulse capability of a resistor: how much one pulse of a given length may carry. Wire-wound data
// sheets give the permitted energy against the pulse length, film data sheets the permitted peak power; both for
// a single pulse and for repetitive pulses (common practice, from memory: repetitive curves sit a factor of a few
// below the single-pulse one).
//
// Rows [pulse length (s), permitted energy (J) or peak power (W)], lengths increasing, read log-log between rows.
// Below the first row the first value holds (for energy: the adiabatic limit the element's heat capacity sets;
// for power: conservative, since shorter pulses permit more); above the last row the last segment's log-log slope
// continues.
//
// A pulse is judged as its equivalent rectangular pulse (analysis/pulses.h): length E/P_peak, energy E, peak P.
#include <cstddef>
#include <string>
#include <vector>

namespace linkrise::models {

struct PulseCurve {
  enum class Measure { Energy, PeakPower };
  Measure measure = Measure::Energy;
  bool repetitive = false;
  std::vector<double> lengths;  // s, increasing
  std::vector<double> values;   // J or W

  /// The permitted energy (J) or peak power (W) for a rectangular pulse of `length` seconds.
  double permitted(double length) const;
  /// The data sheet's key for this curve, e.g. "pulse_energy_curve" or "repetitive_pulse_power_curve".
  std::string key() const;
  /// Which rows decide permitted(length), for a verdict: e.g. "rows 2–3 (100 ms 120 J … 1 s 400 J)",
  /// "row 1 (1 ms 20 J), held below it" or "rows 2–3 (…), extended beyond the last row".
  std::string rows_at(double length) const;
};

/// The element's thermal impedance a curve row states: a rectangular pulse of the row's length at the permitted
/// value brings the element from the curve's ambient to its maximum temperature, so
/// Z_th(t_k) = allowed_rise / P_max(t_k), with P_max = E_k/t_k for an energy curve (K/W).
double curve_thermal_impedance(const PulseCurve& curve, std::size_t row, double allowed_rise);

/// The element heat capacity a curve fixes (J/K): no network heats faster than adiabatically, Z_th(t) <= t/C_e,
/// so C_e <= t_k/Z_th(t_k) = P_max(t_k)·t_k/allowed_rise at every row; the smallest of these (normally the
/// shortest pulse, where the element alone takes the heat) is the estimate. `row` receives the deciding row.
double element_heat_capacity_from_curve(const PulseCurve& curve, double allowed_rise, std::size_t* row = nullptr);

/// The reference ambient of data-sheet pulse curves (common practice, from memory: curves are drawn from 25 °C).
inline constexpr double pulse_curve_ambient_kelvin = 298.15;

/// The ratings keys a curve may be given under, in the order read.
const std::vector<std::string>& pulse_curve_keys();

}  // namespace linkrise::models
