#pragma once
// Kind `voltage_sensor`: a BMS voltage channel — the divider that loads the nodes, an anti-alias filter and the
// converter's gain, offset and resolution. The sequence reads it in place of an ideal node pair
// (`pack: <sensor>` / `link: <sensor>`, netlist/sequence_spec.h), so the closing rule, the rise and too-fast
// checks see what a real BMS sees.
//
// Parameters: divider_resistance Rd (Ohm, > 0, optional: the divider's total resistance across the nodes; absent =
//   no loading); filter_time_constant τ (s, >= 0, default 0 = no filter); gain g (fraction, default 100 %: the
//   channel's gain error is g − 1); offset (V, default 0, referred to the input); resolution q (V per count, >= 0,
//   default 0 = ideal: the reading is rounded to a whole number of counts); sample_skew s (s, default 0: the
//   channel's conversion happens s after the BMS sample, e.g. a multiplexed converter reading the pack, then the
//   link; needs τ > 0, the reading is extrapolated along the filter, v_f + s·dv_f/dt, exact for a steady slope).
// State: the filtered voltage v_f (V) when τ > 0, dv_f/dt = (v − v_f)/τ, starting at 0 V (the BMS wakes with the
//   contactors open; the filter settles within a few τ before the first attempt).
// Equations: i = v/Rd (no current without a divider). Heat: v²/Rd.
// Signals: reading [V] = round((g·(v_f + s·dv_f/dt) + offset)/q)·q — what the BMS firmware compares.
// The reading's rounding is applied at the BMS sample only; the solver's right-hand side never sees it.
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_voltage_sensor(const netlist::PartSpec& spec);
/// The reading of a channel: g·v + offset rounded to whole counts of `resolution` (none when resolution is 0).
double quantised_reading(double value, double gain, double offset, double resolution);
}
