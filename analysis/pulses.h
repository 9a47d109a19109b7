#pragma once
// The pulses a part takes in a run, each reduced to its equivalent rectangular pulse, and their judgement against
// the part's data-sheet pulse curves (models/pulse_curve.h).
//
// A pulse is a stretch of the heat-power trace above `threshold` × the run's peak (an attempt's charge, a bounce,
// a fault); its energy E is the trapezoid integral over the rows, its peak P the row maximum, and its equivalent
// rectangular length E/P — τ/2 for the RC exponential P0·e^(−2t/τ) of a pre-charge. With more than one pulse in
// the run (retries, bounces, key cycles) they are judged against the repetitive curve where the part has one.
#include <optional>
#include <vector>

#include "models/pulse_curve.h"

namespace linkrise::analysis {

struct Pulse {
  double start = 0.0, end = 0.0;  // s
  double energy = 0.0;            // J
  double peak_power = 0.0;        // W
  double length() const { return peak_power > 0.0 ? energy / peak_power : 0.0; }
};

/// The pulses of a heat-power trace (rows at `times`, W).
std::vector<Pulse> split_pulses(const std::vector<double>& times, const std::vector<double>& power,
                                double threshold = 1e-4);

struct PulseJudgement {
  double use = 0.0;         // the worst pulse's share of what its curve permits (1 = at the curve)
  Pulse pulse;              // that pulse
  double permitted = 0.0;   // what the curve permits at its length (J or W)
  std::string curve;        // the curve's key
  std::string rows;         // the curve's rows that decide `permitted` (PulseCurve::rows_at)
  int count = 0;            // pulses judged
};

/// The worst pulse against the curves (the repetitive one when the run has several pulses and the part has one,
/// else the single-pulse one); std::nullopt without curves or pulses.
std::optional<PulseJudgement> judge_pulses(const std::vector<Pulse>& pulses,
                                           const std::vector<models::PulseCurve>& curves);

}  // namespace linkrise::analysis
