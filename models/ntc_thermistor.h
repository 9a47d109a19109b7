#pragma once
// Kind `ntc_thermistor`: a directly heated NTC thermistor (terms of IEC 60539-1), the electro-thermal part of
// models/thermal_resistor.h with one of three R(T) forms.
//
// B-value form: resistance_at_25degC R25 (zero-power resistance at 25 °C, Ohm, > 0) and b_value B (K, > 0,
//   usually B25/85): R = R25·exp[B·(1/T − 1/298.15 K)], exact at 25 °C and at the second temperature of B.
//   For a data sheet referred to another temperature: reference_resistance R0 (Ohm) at reference_temperature T0
//   instead of resistance_at_25degC.
// Steinhart–Hart form: steinhart_hart: {a, b, c} (1/K; b > 0, c ≥ 0): 1/T = a + b·ln R + c·(ln R)³.
// Table form: table: [[T, R], ...] interpolated linearly in ln R, held at the end values outside the table.
// Common keys: thermal, ratings (models/thermal_resistor.h). Without a thermal block the NTC stays at ambient.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_ntc_thermistor(const netlist::PartSpec& spec);
}
