#pragma once
// The circuit a contact breaks, as a data sheet's breaking-capacity table states it: its time constant L/R.
//
// While the contact arcs, the arc's voltage e acts in series with its current (models/part.h, breaking_state).
// Over the microseconds to milliseconds of a break the capacitors' voltages (a DC link, polarisation pairs),
// temperatures and the state of charge barely move, so they are held; what moves are the currents of the
// inductances (the part states in amperes). Linearised at the moment the arc strikes, those currents x follow
//   dx/dt = A·x + b·e,   and the contact's current is   i = c·x + d·e
// (A, b from the reduced Jacobian; c, d by central differences of the solved network). A step in e then moves
// the current from d·e at once towards its final change G·e, G = d − c·A⁻¹·b, and the time constant of that
// rise, its first moment
//   τ = ∫₀^∞ (1 − Δi(t)/Δi(∞)) dt = c·A⁻²·b / G,
// is L/R for a series R-L loop (A = −R/L, b = −1/L, c = 1, d = 0: τ = L/R) and the same moment for any network.
// The loop's resistance is 1/|G| (the held capacitors act as sources, so a loop closed through the link has a
// finite resistance), its inductance L = τ·R. Without a current state in the loop τ = 0; with no resistive path
// (G = 0) or an inductance with no resistance to decay through (A singular), τ is infinite.
#include <vector>

#include "solver/equations.h"

namespace linkrise::solver {

/// One break: a contact that started breaking (an opening arc struck) at `time`.
struct BreakCircuit {
  double time = 0.0;           // s
  int part = -1;               // the breaking part
  double time_constant = 0.0;  // s, L/R of the broken circuit (infinite without a resistive path)
  double resistance = 0.0;     // Ohm, the loop's resistance seen by the gap (capacitors held)
  double inductance = 0.0;     // H, τ·R
};

/// The broken circuit of `part` at a solved point whose modes have it breaking (breaking_state ≥ 0).
/// `equations` is used for network solves and the Jacobian: pass one the driver does not rely on, as the
/// perturbed solves move its caches. A perturbed network that does not solve leaves the figures NaN (unknown).
BreakCircuit break_circuit(Equations& equations, double time, const double* states, const int* modes,
                           const double* unknowns, int part);

}  // namespace linkrise::solver
