#pragma once
// Kind `ptc_thermistor`: a directly heated PTC thermistor (terms of IEC 60738-1), the electro-thermal part of
// models/thermal_resistor.h with one of two R(T) forms.
//
// Parametric form (models/resistance_law.h, PtcParametric):
//   minimum_resistance R_min (Ohm, > 0) — or resistance_at_25degC R25 (Ohm, > 0) alone, used as R_min (the usual
//     approximation when a data sheet gives only R25; the law is then flat below the switch region and
//     understates the current once the part has warmed) — or both with minimum_resistance_temperature T_Rmin:
//     the cold region falls from R25 at 25 degC to R_min at T_Rmin (R_min < R25 < 2·R_min),
//   reference_temperature T_ref (switch temperature, at which R = 2·R_min; e.g. '120 degC'),
//   slope α = d ln R / dT above T_ref (1/K; '15 %/K' is 0.15 /K),
//   maximum_resistance R_max (Ohm, > 2·R_min), where the rise levels off,
//   corner_width (K, default 2 K): temperature width of the two smooth corners (knee and saturation).
//   Below the knee R = R_min, on the rise R = 2·R_min·exp[α·(T − T_ref)], above saturation R = R_max.
// Table form: table: [[T, R], ...] (temperature, resistance; at least two rows, T increasing), interpolated
//   linearly in ln R, held at the end values outside the table.
// Either form: voltage_softening V_s (V, optional): the tripped resistance falls with the voltage across the part
//   (the grain-boundary barriers of a ceramic PTC give way under field, common practice, from memory):
//   R(T, V) = R_floor·(R(T)/R_floor)^(1/(1 + (V/V_s)²)), R_floor the law's lowest resistance; at V = V_s the
//   rise of ln R above R_floor is halved. Smooth in V and T; the solver's Jacobian includes ∂R/∂V.
// Common keys: thermal, ratings (models/thermal_resistor.h; a PTC's switching limits: max_switching_voltage,
//   max_switching_energy, max_switching_capacitance). Without a thermal block the PTC stays at ambient.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_ptc_thermistor(const netlist::PartSpec& spec);
}
