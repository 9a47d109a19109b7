#pragma once
// Kinds `inductor` and `cable`: an inductance L in series with a resistance R.
//
// inductor — parameters: inductance L (H, > 0), resistance R (Ohm, >= 0, default 0, the winding),
//            initial_current i0 (A, default 0).
// cable    — either given directly: resistance R (Ohm, >= 0) and inductance L (H, >= 0) of the whole
//            go-and-return loop (with L = 0 the cable is a plain resistance, R > 0 then, and has no state);
//            or from geometry (models/conductor.h), a go-and-return pair of equal round conductors:
//              length (m, > 0, route length; each conductor is this long, the loop twice),
//              cross_section (m², e.g. '35 mm²') or radius (m) of one conductor's metal — one of the two,
//              spacing (m, centre distance of go and return conductors, > 2·radius),
//              material: copper (default) or aluminium,
//              conductor_temperature (default: the case's ambient).
//            R = ρ20·(1 + α20·(T − 20 °C))·2·length / cross_section (resistivity and α20 from models/conductor.h).
//            L = length·(µ0/π)·[ln(spacing/radius) + ¼]: the two-parallel-round-wire loop formula with uniform
//            current in each wire (the DC form, internal inductance µ0/8π per wire included). A pre-charge is a
//            slow RC charge whose frequency content has a skin depth larger than usual HV conductor radii, so the
//            DC form applies (models/conductor.h explains the choice). Proximity effect is neglected.
//            The two ways cannot be mixed. initial_current (A, default 0) in both.
// States: current i (A, from the positive to the negative node).
// Equation: L·di/dt = v+ - v- - R·i.  Heat: R·i².  Stored energy: ½·L·i².
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_inductor(const netlist::PartSpec& spec);
std::unique_ptr<Part> make_cable(const netlist::PartSpec& spec);
}
