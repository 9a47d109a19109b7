#pragma once
// The arcs and makings of one contactor, read from its recorded signals (models/contactor.h: closed, arcing,
// arc_energy): what its breaking, arc-energy and making ratings are judged against.
//
// An arc event is a stretch of rows with `arcing` > 0: from the row after the contacts parted to the row before
// the arc went out (or the contacts touched again). Rows are recorded before and after every switching and state
// event, so both ends are exact. Its energy is the rise of the contactor's integrated arc energy over the stretch
// (as accurate as the solver); its time the stretch's length. An opening is an event whose arc is an opening arc
// (arcing = 2 on some row); a clean break (below the minimum arc current) has no arc and is no event.
//   current broken: the current through the contacts just before they parted (signed: + enters the first node);
//   voltage broken: |v| across the gap once it has recovered, parting_time after the arc went out (the row of the
//     ramp's end; the next row when parting_time is 0): the circuit voltage the open gap holds off.
// A making is every touch (closed 0 -> 1, a bounce's re-touch included):
//   making current: |i| at the first peak after the touch (rows while |i| does not fall), within the closure;
//   voltage step: |v| across the contacts just before they touched.
//   time constant: L/R of the circuit the opening broke, as the solver read it when the opening arc struck
//     (solver/break_circuit.h; the first of the part's Result::breaks within the event).
#include <optional>
#include <vector>

#include "models/breaking_capacity.h"
#include "solver/break_circuit.h"
#include "solver/waveform.h"

namespace linkrise::analysis {

struct ArcEvent {
  double start = 0.0, end = 0.0;  // s
  double energy = 0.0;            // J
  bool opening = false;           // an opening arc (not a bounce gap's)
  double current = 0.0;           // A, signed, just before the contacts parted
  double voltage = 0.0;           // V, |v| across the recovered gap (openings only)
  double time_constant = 0.0;     // s, L/R of the broken circuit (openings only; 0 when the run recorded none)
};

struct ContactEvents {
  std::vector<ArcEvent> arcs;
  std::vector<double> making_currents;  // A, one per touch
  std::vector<double> voltage_steps;    // V, one per touch
};

/// Column indices of the contactor's signals in `rows`.
struct ContactColumns {
  int current = -1, voltage = -1, closed = -1, arcing = -1, arc_energy = -1;
};

/// `breaks`: the solver's records of this part's breaks (Result::breaks of this part), in time order.
ContactEvents contact_events(const solver::Waveform& rows, const ContactColumns& columns, double parting_time,
                             const std::vector<solver::BreakCircuit>& breaks);

/// The contactor's figures over the run; values absent (NaN when named) where the run has no such event.
struct ContactMetrics {
  double arc_energy = 0.0;        // J, the largest of one event
  double total_arc_energy = 0.0;  // J
  double arc_time = 0.0;          // s, of the event with the largest energy
  std::optional<double> break_current, break_voltage;  // A (magnitude), V: the worst opening's
  std::optional<double> break_time_constant;            // s, its circuit's L/R
  std::optional<double> break_use;                      // 1, with a breaking capacity
  std::optional<int> break_row;                         // its row (0: none covers it)
  double break_time = 0.0;                              // s, when the worst opening's contacts parted
  std::optional<double> making_current, making_voltage_step;  // A, V: the largest over the touches
};

ContactMetrics contact_metrics(const ContactEvents& events, const std::optional<models::BreakingCapacity>& capacity);

}  // namespace linkrise::analysis
