#pragma once
// Kind `resistor`: a fixed resistance.
//
// Parameters: resistance R (Ohm, > 0).
// States: none.  Equation: i = v / R.  Heat: v² / R (W).
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_resistor(const netlist::PartSpec& spec);
}
