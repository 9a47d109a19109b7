#include "analysis/pulses.h"

#include <algorithm>
#include <cmath>

namespace linkrise::analysis {

std::vector<Pulse> split_pulses(const std::vector<double>& times, const std::vector<double>& power,
                                double threshold) {
  std::vector<Pulse> pulses;
  if (times.size() < 2 || power.size() != times.size()) return pulses;
  double peak = 0.0;
  for (double p : power) peak = std::max(peak, std::fabs(p));
  if (!(peak > 0.0)) return pulses;
  const double floor = threshold * peak;
  std::optional<Pulse> open;
  for (std::size_t r = 0; r < times.size(); ++r) {
    const double p = std::fabs(power[r]);
    if (r > 0 && open) open->energy += 0.5 * (std::fabs(power[r - 1]) + p) * (times[r] - times[r - 1]);
    if (p > floor && !open) open = Pulse{times[r], times[r], 0.0, 0.0};
    if (open) {
      open->peak_power = std::max(open->peak_power, p);
      open->end = times[r];
      if (p <= floor) {
        pulses.push_back(*open);
        open.reset();
      }
    }
  }
  if (open) pulses.push_back(*open);
  return pulses;
}

std::optional<PulseJudgement> judge_pulses(const std::vector<Pulse>& pulses,
                                           const std::vector<models::PulseCurve>& curves) {
  if (pulses.empty() || curves.empty()) return std::nullopt;
  const bool repeated = pulses.size() > 1;
  // The curve that applies: repetitive for repeated pulses where given; a lone repetitive curve for any run.
  const models::PulseCurve* chosen = nullptr;
  for (const auto& curve : curves) {
    if (curve.repetitive == repeated) chosen = &curve;
  }
  if (chosen == nullptr) chosen = &curves.front();
  PulseJudgement worst;
  worst.curve = chosen->key();
  worst.count = static_cast<int>(pulses.size());
  worst.use = -1.0;
  for (const auto& pulse : pulses) {
    const double permitted = chosen->permitted(pulse.length());
    const double taken = chosen->measure == models::PulseCurve::Measure::Energy ? pulse.energy : pulse.peak_power;
    const double use = taken / permitted;
    if (use > worst.use) {
      worst.use = use;
      worst.pulse = pulse;
      worst.permitted = permitted;
      worst.rows = chosen->rows_at(pulse.length());
    }
  }
  return worst;
}

}  // namespace linkrise::analysis
