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
};

/// The ratings keys a curve may be given under, in the order read.
const std::vector<std::string>& pulse_curve_keys();

}  // namespace linkrise::models
