#pragma once
// Kind `contactor`: a switch with a closed and an open resistance, moved only by events (scheduled `events:` or
// the BMS sequence controller), that arcs when it opens on a current.
//
// Parameters: closed_resistance (Ohm, > 0, default 0.3 mOhm), open_resistance (Ohm, > closed, default 100 MOhm),
//             initial: open | closed (default open);
//             stuck: no | closed | open (default no): a welded contactor (closed from the start, never opens)
//             or one that fails to close (never touches); commands then move nothing. For fault scenarios.
//   Actuation, used by the sequence controller only (scheduled events move the contact at their own time):
//   closing_delay (s, >= 0, default 0): coil energised -> contacts touch;
//   opening_delay (s, >= 0, default 0): coil released -> contacts part;
//   bounce_count (whole number, default 0): after the first touch the contacts part (a `bounce` command) and touch
//     again this many times; bounce_interval (s, > 0, default 0.2 ms): each open gap and each touch before the next.
//   The arc (common practice, from memory: a DC contact that parts on more than about half an ampere draws an
//   arc whose voltage, 12–20 V for common contact materials, holds while the gap is short and rises as the gap
//   lengthens and the arc is blown out, until it exceeds what the circuit drives and the current dies):
//   arc: on | off (default on);
//   arc_voltage (V, > 0, default 15 V): the arc's voltage when it strikes, and all through a bounce gap;
//   arc_voltage_rise (V/s, >= 0, default 200 kV/s): how fast it rises at an opening, U(t) = arc_voltage +
//     arc_voltage_rise·(t − t_part) (common practice, from memory: a sealed high-voltage contactor with magnetic
//     blow-out clears its rated break at a few hundred volts within a few milliseconds);
//   minimum_arc_current (A, > 0, default 0.5 A): below it no arc strikes (a clean break) and a burning arc goes out;
//   parting_time (s, >= 0, default 10 us): once an arc went out (or at every opening with 'arc: off') the gap's
//     resistance rises exponentially to open_resistance over this time, ln R = (1 − p)·ln R_start + p·ln R_open
//     with p going 0 -> 1 linearly; R_start = U/minimum_arc_current after an arc (the gap's voltage is
//     continuous), closed_resistance with 'arc: off'. It gives the circuit's inductance a path while the gap
//     recovers, so the last ampere of an inductive current is not forced through 100 MOhm (i·R_open, a kilovolt
//     or megavolt spike); 0 opens at once (the ideal switch of earlier versions, with its spikes). With the arc
//     model a clean break (below minimum_arc_current) opens at once and the driver settles the fast states, as
//     for any switching: a ramp there asked a femtosecond cable current through open gaps to follow 25 decades
//     of gap resistance in 10 us, which the solver could not (its spike, i·R_open of microamperes, stays).
//   ratings (optional block), judged as limits through Part::ratings():
//     breaking_capacity: rows {voltage, current, time_constant (s, optional: the L/R the row holds up to),
//       direction: both | forward | reverse (default both)} — the data sheet's permitted break current at a
//       circuit voltage and time constant (forward: current entering the first node); the metric break_use (the
//       worst opening's |current| over its row's, models/breaking_capacity.h) <= 100 %, the row chosen with the
//       broken circuit's L/R the solver reads when the opening arc strikes (solver/break_circuit.h);
//     max_arc_energy (J): the arc energy of each opening or bounce gap (metric arc_energy);
//     max_making_current (A): the peak current while the contacts make (metric making_current).
// Modes: 0 open, 1 closed, 2 parting (ramp from closed_resistance), 3 clearing (ramp after an arc), 4/5 bounce-gap
//   arc forward/reverse, 6/7 opening arc forward/reverse. The arc's sign s is fixed when it strikes.
// States: parting progress p (1, with a parting_time); with the arc model the arc voltage U (V: set to arc_voltage
//   when an arc strikes, rising only in an opening arc, held after it for the clearing ramp) and the arc energy
//   E (J, `arc_energy`: ∫U·|i| dt over every arc, a pure quadrature like a resistor's ∫i² dt).
// Equations: closed, open, ramping: i = v / R. Arcing: the stiff equivalent i = (v − s·U) / closed_resistance —
//   the arc is its voltage in series with the closed contact's resistance (so it stays a conductive element:
//   no branch unknown, and parallel arcs or an arc across a capacitor remain solvable); dE/dt = s·U·i.
// Heat: v·i (W), the arc's U·|i| included.
// Roots: p = 1 ends a ramp (mode open); s·i = minimum_arc_current (falling) puts an arc out (mode clearing).
// Commands: close; open and bounce from closed strike an opening or a bounce-gap arc when the current just
//   before the switching is at least minimum_arc_current (else a clean break: at once, a ramp with 'arc: off'); an open during a bounce-gap arc
//   turns it into an opening arc.
// Breaking state: in an opening arc, U (its voltage in series with the contact), for the broken circuit's L/R.
// Extra signals: closed [1] (0 or 1), arcing [1] (0 none, 1 bounce-gap arc, 2 opening arc), arc_voltage [V] (U while
//   an arc burns, else 0), arc_energy [J] (E, cumulative).
#include <memory>
#include <optional>

#include "models/part.h"

namespace linkrise::models {

/// Answers role() Switch and actuation() with the data above.
std::unique_ptr<Part> make_contactor(const netlist::PartSpec& spec);

/// Name of the arc-energy state and signal of a contactor (the analysis reads it by this name).
inline constexpr const char* arc_energy_state = "arc_energy";

}  // namespace linkrise::models
