#pragma once
// Kinds `inductor` and `cable`: an inductance L in series with a resistance R.
//
// inductor — parameters: inductance L (H, > 0), resistance R (Ohm, >= 0, default 0, the winding),
//            initial_current i0 (A, default 0).
// cable    — parameters given directly: resistance R (Ohm, >= 0) and inductance L (H, >= 0) of the whole
//            go-and-return loop, initial_current (A, default 0). With L = 0 the cable is a plain resistance
//            (R > 0 then) and has no state.
// States: current i (A, from the positive to the negative node).
// Equation: L·di/dt = v+ - v- - R·i.  Heat: R·i².  Stored energy: ½·L·i².
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_inductor(const netlist::PartSpec& spec);
std::unique_ptr<Part> make_cable(const netlist::PartSpec& spec);
}
