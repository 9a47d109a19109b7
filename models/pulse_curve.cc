#include "models/pulse_curve.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "netlist/units.h"

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

std::string PulseCurve::rows_at(double length) const {
  const char* unit = measure == Measure::Energy ? "J" : "W";
  auto row = [&](std::size_t k) {
    return fmt::format("{} {}", netlist::format_si(lengths[k], "s"), netlist::format_si(values[k], unit));
  };
  if (lengths.size() == 1 || length <= lengths.front()) {
    return fmt::format("row 1 ({}){}", row(0), lengths.size() == 1 || length < lengths.front() ? ", held below it" : "");
  }
  std::size_t k = static_cast<std::size_t>(std::upper_bound(lengths.begin(), lengths.end(), length) - lengths.begin());
  const bool beyond = k >= lengths.size();
  k = std::min(std::max<std::size_t>(k, 1), lengths.size() - 1);
  return fmt::format("rows {}–{} ({} … {}){}", k, k + 1, row(k - 1), row(k),
                     beyond ? ", extended beyond the last row" : "");
}

std::string PulseCurve::key() const {
  return std::string(repetitive ? "repetitive_" : "") + (measure == Measure::Energy ? "pulse_energy_curve"
                                                                                       : "pulse_power_curve");
}

double curve_thermal_impedance(const PulseCurve& curve, std::size_t row, double allowed_rise) {
  const double peak_power =
      curve.measure == PulseCurve::Measure::Energy ? curve.values[row] / curve.lengths[row] : curve.values[row];
  return allowed_rise / peak_power;
}

double element_heat_capacity_from_curve(const PulseCurve& curve, double allowed_rise, std::size_t* row) {
  double smallest = std::numeric_limits<double>::infinity();
  for (std::size_t k = 0; k < curve.lengths.size(); ++k) {
    const double capacity = curve.lengths[k] / curve_thermal_impedance(curve, k, allowed_rise);
    if (capacity < smallest) {
      smallest = capacity;
      if (row != nullptr) *row = k;
    }
  }
  return smallest;
}

const std::vector<std::string>& pulse_curve_keys() {
  static const std::vector<std::string> keys = {"pulse_energy_curve", "pulse_power_curve",
                                                "repetitive_pulse_energy_curve", "repetitive_pulse_power_curve"};
  return keys;
}

}  // namespace linkrise::models
