#pragma once
// Drawing a tolerance of the case (netlist/tolerance_spec.h, where the `tolerances:` block is read): the value a
// uniform draw u in (0, 1) gives, uniform over [lower, upper] or a normal truncated to it. Each entry's position
// in the block is its "slot" in the random stream (app/studies/random_stream.h): adding an entry at the end
// leaves the draws of the earlier ones unchanged.
#include "netlist/tolerance_spec.h"

namespace linkrise::app {

using Tolerance = netlist::ToleranceSpec;

/// The value of a tolerance for a uniform draw u in (0, 1).
double draw(const Tolerance& tolerance, double u);

}  // namespace linkrise::app
