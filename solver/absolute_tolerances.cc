#include "solver/absolute_tolerances.h"

#include <algorithm>
#include <cmath>

namespace linkrise::solver {

namespace {
// The stated current scale: the pack over one ohm, the order of the main-closure inrush peak (hundreds of
// amperes on a 400 … 800 V pack), far above any pre-charge current.
constexpr double kInrushResistance = 1.0;  // Ω
}  // namespace

ToleranceScales case_scales(const Circuit& circuit, const double* unknowns) {
  ToleranceScales scales;
  const std::size_t nodes = circuit.node_names().size();
  for (std::size_t n = 0; n < nodes; ++n) scales.voltage = std::max(scales.voltage, std::fabs(unknowns[n]));
  scales.current = scales.voltage / kInrushResistance;
  scales.temperature = circuit.spec().ambient;  // K
  return scales;
}

std::vector<double> state_tolerances(const Circuit& circuit, double rtol, double atol, bool scaled,
                                     const ToleranceScales& scales) {
  const auto& info = circuit.state_info();
  std::vector<double> tolerances(info.size());
  for (std::size_t i = 0; i < info.size(); ++i) {
    tolerances[i] = atol * info[i].tolerance_scale;
    if (!scaled) continue;
    if (info[i].unit == "K") tolerances[i] = std::max(tolerances[i], rtol * scales.temperature);
  }
  return tolerances;
}

double current_squared_tolerance(double rtol, double atol, const ToleranceScales& scales, double resistance) {
  if (!(resistance > 0.0) || !std::isfinite(resistance)) return atol;
  const double rounding = kNetworkRounding * scales.voltage / resistance;
  if (!(rounding > rtol * scales.current)) return atol;
  return std::max(atol, atol / resistance);
}

}  // namespace linkrise::solver
