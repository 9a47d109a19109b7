#pragma once
// Kind `cell_string`: a battery of identical cells, `cells_in_series` × `cells_in_parallel`, each a Thevenin
// model: open-circuit voltage OCV(SOC), series resistance R0 and zero to two RC polarisation pairs.
//
// Parameters (per cell): cell_voltage (V, constant OCV) or cell_voltage_table (rows [SOC, V], SOC strictly
//   increasing; interpolated by Steffen's monotone cubic (GSL) from three rows on, linearly for two; held
//   constant outside the table). The cubic passes through every row, never overshoots between them and has a
//   continuous slope, so the right-hand side stays smooth inside the table; cell_resistance R0 (Ohm, >= 0), or
//   cell_resistance_table (rows [SOC, temperature, R0 (Ohm, > 0)] covering every combination of at least two SOC
//   values and two temperatures once; bilinear (GSL interp2d), held at the grid's edges, read at the initial SOC and
//   the case's ambient); resistance_temperature {reference (K, default 25 degC), activation B (K, > 0)}: R0 and the
//   pairs' resistances follow the Arrhenius law R(T) = R(T_ref)·exp(B·(1/T − 1/T_ref)), B = Ea/k, at the ambient
//   (not with a table);
//   polarisation: list of up to two {resistance (Ohm, > 0), capacitance (F, > 0)}; cell_capacity Q (Ah, > 0);
//   initial_soc (fraction or %, default 100 %); cells_in_series s (>= 1); cells_in_parallel p (>= 1, default 1).
// String values: E = s·OCV, R0s = s·R0/p, Rk = s·Rk/p, Ck = p·Ck/s.
// States: soc (held as a fraction 0 … 1, unit 1, as the solver works in SI; outputs show it as the signal
//   soc [%]), then one voltage per pair vk (V).
// Unknowns: branch current j (A, entering the positive terminal; discharge current is id = -j).
// Equations: v+ - v- = E(soc) - R0s·id - Σ vk;  Ck·dvk/dt = id - vk/Rk;  dsoc/dt = -id / (p·3600·Q).
// Source power: E·id.  Heat: R0s·id² + Σ vk²/Rk.  Stored: Σ ½·Ck·vk².
// Output: current and power positive while discharging; extra signals soc [%], open_circuit_voltage [V].
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_cell_string(const netlist::PartSpec& spec);
}
