#pragma once
// Kind `contactor`: a switch with a closed and an open resistance, moved only by events
// (scheduled `events:` or the BMS sequence controller).
//
// Parameters: closed_resistance (Ohm, > 0, default 0.3 mOhm), open_resistance (Ohm, > closed, default 100 MOhm),
//             initial: open | closed (default open).
// Modes: 0 = open, 1 = closed.  Equation: i = v / R(mode).  Heat: v² / R (W).
// Commands: close, open.  Extra signal: closed [1] (0 or 1).
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec);
}
