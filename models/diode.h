#pragma once
// Kind `diode`: a smooth forward model, enough to simulate a reversed connection or a blocking diode.
//
// Parameters: forward_voltage Vf (V, >= 0, default 0.7 V), on_resistance Ron (Ohm, > 0, default 10 mOhm),
//             off_resistance Roff (Ohm, > Ron, default 10 MOhm), knee_width w (V, > 0, default 20 mV).
// Equation (anode = first node): i = v/Roff + (w/Ron)·softplus((v - Vf)/w), softplus(x) = ln(1 + e^x).
// Far above Vf this is (v - Vf)/Ron; below it only the off-state leakage flows. The curve is smooth, so the
// right-hand side stays smooth and Newton converges. Heat: v·i.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_diode(const netlist::PartSpec& spec);
}
