#pragma once
// Kind `contactor`: a switch with a closed and an open resistance, moved only by events
// (scheduled `events:` or the BMS sequence controller).
//
// Parameters: closed_resistance (Ohm, > 0, default 0.3 mOhm), open_resistance (Ohm, > closed, default 100 MOhm),
//             initial: open | closed (default open);
//             stuck: no | closed | open (default no): a welded contactor (closed from the start, never opens)
//             or one that fails to close (never touches); commands then move nothing. For fault scenarios.
//   Actuation, used by the sequence controller only (scheduled events move the contact at their own time):
//   closing_delay (s, >= 0, default 0): coil energised -> contacts touch;
//   opening_delay (s, >= 0, default 0): coil released -> contacts part;
//   bounce_count (whole number, default 0): after the first touch the contacts part and touch again this
//     many times; bounce_interval (s, > 0, default 0.2 ms): each open gap and each touch before the next gap.
//   parting_time (s, >= 0, default 0 = contacts part instantly): while the contacts separate, the resistance
//     rises exponentially from closed_resistance to open_resistance over this time, R = Rc·(Ro/Rc)^p with the
//     parting progress p going 0 -> 1 linearly. It stands in for the opening arc: current through a cable
//     inductance commutates at tens of volts (about L·ln(Ro/Rc)/parting_time ohms) instead of the megavolt spike an
//     instant 100 MOhm step would give, and the solver need not resolve a femtosecond L/R transient.
//     A real contactor's arc voltage and interruption limit are not modelled; use it for bounce and for
//     releasing contacts that carry inductive current.
// Modes: 0 = open, 1 = closed, 2 = parting.  States: parting progress p (1), only with a parting_time.
// Equation: i = v / R(mode, p).  Heat: v² / R (W).  Root: p = 1 ends the parting (mode open).
// Commands: close, open.  Extra signal: closed [1] (0 or 1).
#include <memory>
#include <optional>

#include "models/part.h"

namespace linkrise::models {

/// Answers role() Switch and actuation() with the data above.
std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec);
/// The actuation timing of a contactor; std::nullopt when `part` is not a contactor.

}  // namespace linkrise::models
