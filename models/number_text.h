#pragma once
// Small helpers shared by the parameter checks of the physical laws.
#include <cmath>
#include <string>

#include <fmt/format.h>

namespace linkrise::models {
/// A value as it appears in a validation message (six significant digits).
inline std::string number_text(double value) { return fmt::format("{:.6g}", value); }
/// Finite and strictly positive.
inline bool finite_positive(double value) { return std::isfinite(value) && value > 0.0; }
}  // namespace linkrise::models
