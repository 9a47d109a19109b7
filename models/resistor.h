#pragma once
// Kind `resistor`: a fixed resistance, optionally with a temperature coefficient and a thermal model
// (a wire-wound, thick-film or metal-clad pre-charge resistor).
//
// Parameters: resistance R25 (Ohm, > 0; the value at 25 °C when tcr is given),
//   tcr (1/K, written e.g. '200 ppm/K', default 0, linear about 25 °C: R = R25·(1 + tcr·(T − 25 °C)),
//   held above 0.1 % of R25 by a smooth floor, see models/resistance_law.h),
//   thermal (block, optional), ratings (block, optional): see models/thermal_resistor.h.
// Without tcr, thermal and ratings it is a plain resistance: no state, no extra signals, i = v / R, heat v²/R.
// With any of them it is the electro-thermal part of models/thermal_resistor.h (without a thermal block it runs
// at the case's ambient temperature, so R = R25·(1 + tcr·(Ta − 25 °C))).
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_resistor(const netlist::PartSpec& spec);
}
