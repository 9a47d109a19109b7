#pragma once
// Kind `dc_source`: an ideal voltage source with optional series resistance (a lab supply).
//
// Parameters: voltage E (V), series_resistance Rs (Ohm, >= 0, default 0).
// Unknowns: branch current j (A, entering the positive terminal; negative while delivering).
// Equation: v+ - v- = E + Rs·j.  Source power: -E·j.  Heat: Rs·j².
// Output: current and power are positive while the source delivers.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_dc_source(const netlist::PartSpec& spec);
}
