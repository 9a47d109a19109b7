#pragma once
// Kinds `constant_power_load` and `constant_current_load`: a converter or auxiliary load seen from the DC link.
//
// Common parameters: enable_voltage Von (V, >= 0, default 0 = always on), disable_voltage Voff
//   (V, 0 <= Voff < Von, default 0.9·Von) — an under-voltage lockout with hysteresis; initial: enabled |
//   disabled (the command state, default enabled); resistive_below Vr (V, > 0) — below Vr the load behaves
//   as a resistor so it never demands unbounded current near 0 V (default 10 V power, 1 V current).
// constant_power_load: power P (W, >= 0).  i = P/v for v >= Vr, i = P·v/Vr² below.
// constant_current_load: current I (A, >= 0). i = I for v >= Vr, i = I·v/Vr below.
// Modes: 0 = lockout released (voltage above Von since last below Voff), 1 = commanded on
//   (events `enable` / `disable`). The load draws only when both are set.
// Roots: v - Von (rising, while locked out) or v - Voff (falling, while released).
// Load power: v·i (W), energy leaving the circuit as work.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_constant_power_load(const netlist::PartSpec& spec);
std::unique_ptr<Part> make_constant_current_load(const netlist::PartSpec& spec);
}
