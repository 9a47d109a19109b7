#pragma once
// Kind `fuse`: a fuse link in series with the pre-charge path (or anywhere), which melts open.
//
// Parameters: resistance R (Ohm, > 0, the cold resistance); melting_i2t I²t_m (A²s, > 0, the pre-arcing I²t of
//   the data sheet's adiabatic region); time_current (optional rows [current (A), melting time (s)], current
//   increasing and time decreasing: the pre-arcing time-current curve); pulse_derating d (fraction, default 100 %:
//   the share of the melting integral a repeated pulse may use — data sheets give e.g. 30–50 % for 10⁴–10⁵ pulses,
//   common practice, from memory); open_resistance (Ohm, default 100 MOhm, after melting).
// State: melt m (1): the melting integral, 0 when new, the fuse opens when it reaches 1. Linear damage
//   accumulation: dm/dt = 1/t_m(|i|), where t_m is the melting time at a steady current. Without a table,
//   t_m = I²t_m/i² (adiabatic: melts when ∫i² dt = I²t_m). With one, t_m follows the table log-log between rows,
//   the first segment's slope below it (so small currents take ever longer, continuously) and the adiabatic law of
//   the last row's I²t above it.
// Mode: 0 intact, 1 melted (a state event at m = 1; the arc while it clears is not modelled — the current drops to
//   what open_resistance lets through).
// Equations: i = v/R (intact) or v/R_open (melted). Heat: v²/R.
// Ratings: peak_melt ≤ d (the largest m of the run, fraction of the melting integral), judged like every rating.
// Signals: melt [1].
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_fuse(const netlist::PartSpec& spec);
}
