#pragma once
// Kind `ptc_thermistor`: a directly heated PTC thermistor (terms of IEC 60738-1), the electro-thermal part of
// models/thermal_resistor.h with one of two R(T) forms.
//
// Parametric form (models/resistance_law.h, PtcParametric):
//   minimum_resistance R_min (Ohm, > 0) — or resistance_at_25degC R25 (Ohm, > 0), used as R_min (the usual
//     approximation when a data sheet gives only R25; the law is flat below the switch region),
//   reference_temperature T_ref (switch temperature, at which R = 2·R_min; e.g. '120 degC'),
//   slope α = d ln R / dT above T_ref (1/K; '15 %/K' is 0.15 /K),
//   maximum_resistance R_max (Ohm, > 2·R_min), where the rise levels off,
//   corner_width (K, default 2 K): temperature width of the two smooth corners (knee and saturation).
//   Below the knee R = R_min, on the rise R = 2·R_min·exp[α·(T − T_ref)], above saturation R = R_max.
// Table form: table: [[T, R], ...] (temperature, resistance; at least two rows, T increasing), interpolated
//   linearly in ln R, held at the end values outside the table.
// Common keys: thermal, ratings (models/thermal_resistor.h). Without a thermal block the PTC stays at ambient.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_ptc_thermistor(const netlist::PartSpec& spec);
}
