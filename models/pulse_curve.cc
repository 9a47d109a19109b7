#include "models/pulse_curve.h"

#include <algorithm>
#include <cmath>

namespace linkrise::models {

double PulseCurve::permitted(double length) const {
  if (lengths.empty()) return std::nan("");
  if (lengths.size() == 1 || length <= lengths.front()) return values.front();
  // The segment holding `length`, or the last one beyond the table.
  std::size_t k = static_cast<std::size_t>(std::upper_bound(lengths.begin(), lengths.end(), length) - lengths.begin());
  k = std::min(std::max<std::size_t>(k, 1), lengths.size() - 1);
  const double x0 = std::log(lengths[k - 1]), x1 = std::log(lengths[k]);
  const double y0 = std::log(values[k - 1]), y1 = std::log(values[k]);
  return std::exp(y0 + (y1 - y0) * (std::log(length) - x0) / (x1 - x0));
}

std::string PulseCurve::key() const {
  return std::string(repetitive ? "repetitive_" : "") + (measure == Measure::Energy ? "pulse_energy_curve"
                                                                                       : "pulse_power_curve");
}

const std::vector<std::string>& pulse_curve_keys() {
  static const std::vector<std::string> keys = {"pulse_energy_curve", "pulse_power_curve",
                                                "repetitive_pulse_energy_curve", "repetitive_pulse_power_curve"};
  return keys;
}

}  // namespace linkrise::models
