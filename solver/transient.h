#pragma once
// The transient driver: CVODE BDF with a dense linear solver and the analytic Jacobian, known-time
// switching (stop exactly at the time, change the mode, re-initialise), state events by rootfinding,
// and a hook for a supervisor (the BMS sequence controller) that samples the circuit at its own period.
//
// Supervisor samples are evaluated from CVODE's dense output inside each step, so sampling at 1 ms does not
// force 1 ms steps. When a sample decides an action that falls inside the step just taken, the driver goes
// back to that time (state from dense output, recorded rows after it dropped) and re-initialises there.
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "solver/break_circuit.h"
#include "solver/circuit.h"
#include "solver/timeline.h"
#include "solver/waveform.h"

namespace linkrise::solver {

/// An action for one part at a time: close/open (contactors), enable/disable (loads).
struct Command {
  double time = 0.0;
  int part = -1;
  netlist::Action action = netlist::Action::Close;
  std::string reason;
};


/// What a supervisor can read at a sample time.
struct Probe {
  const Circuit* circuit = nullptr;
  double time = 0.0;
  const double* states = nullptr;
  const double* unknowns = nullptr;
  const int* modes = nullptr;

  double node_voltage(int node) const { return node < 0 ? 0.0 : unknowns[node]; }
  double voltage(int plus, int minus) const { return node_voltage(plus) - node_voltage(minus); }
  /// Signal `index` of part `part` in the order of Part::signals() (0 current, 1 voltage, 2 power...).
  double signal(int part, int index) const;
};

class Supervisor {
 public:
  virtual ~Supervisor() = default;
  /// The first sample time strictly after `time` (pass -infinity for the first), or +infinity for none.
  virtual double next_sample(double time) const = 0;
  /// Called at every sample time in order. May add commands at times >= probe.time, and timeline entries.
  virtual void sample(const Probe& probe, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline) = 0;
  /// True when the sequence is over and the run may stop before its duration.
  virtual bool finished() const { return false; }
  /// The time the run ends at, once the supervisor knows it (its last action plus a settling time); +infinity
  /// until then, or when the run lasts its duration. The run never goes past Options::duration.
  virtual double end_time() const { return std::numeric_limits<double>::infinity(); }
};

/// A level watch: a root function g = v(a) - ratio·v(b) - offset over node voltages. Each crossing is
/// recorded exactly (a waveform row at the crossing time and an entry in Result::crossings).
struct Watch {
  std::string name;
  int plus_a = -1, minus_a = -1;
  int plus_b = -1, minus_b = -1;
  double ratio = 0.0;
  double offset = 0.0;
};

struct Crossing {
  double time = 0.0;
  int watch = 0;
  int direction = 0;  // +1 rising, -1 falling
};

struct Options {
  double duration = 1.0;
  double relative_tolerance = 1e-7;
  double absolute_tolerance = 1e-8;
  // True: part states in volts, amperes and kelvin are held to rtol of the case's scales (at least atol);
  // false: every state to atol times its tolerance scale (solver/absolute_tolerances.h).
  bool scale_absolute_tolerance = false;
  double max_step = 0.0;
  std::optional<double> sample;  // uniform output grid
  // Output at given times instead of the uniform grid: Result::samples gets one row per entry, from CVODE's
  // dense output (not interpolated rows). Non-decreasing, inside [0, duration]; checked by simulate().
  std::vector<double> output_times;
  // Columns of Result::samples (indices into waveform_headers()); empty: all. A fit against a capture of
  // millions of rows keeps only the signals it compares.
  std::vector<int> output_columns;
  bool record_steps = true;      // one row per solver step (plus event rows)
  long max_steps = 2'000'000;
  double max_wall_time = 300.0;   // s of wall-clock time before the run gives up (exit 3, with a reason)
  std::vector<Command> commands;  // scheduled actions (the case's events)
  // Actions that set the initial modes before the run starts (a load the sequence holds off until its moment):
  // no timeline entry and no rows of their own, as if the case had started so.
  std::vector<Command> initial_commands;
  std::vector<Watch> watches;
  Supervisor* supervisor = nullptr;
  // Fast states start at their quasi-steady value after a switching when their time constant is below
  // 100·rtol of every other mode's (solver/fast_states.h); false resolves every transient.
  bool settle_fast_states = true;
  // A switching's transient carried in closed form, the integrator solving for the rest
  // (solver/carried_transient.h).
  bool carry_transients = false;
  // Row storage to reuse for Result::steps (studies keep one per worker and hand it back after each sample),
  // so a run allocates no waveform; null: fresh storage.
  Waveform* step_store = nullptr;
  // CVODE's vector and dense-matrix operations carried out by Eigen (solver/eigen_kernels.h: the same numbers
  // to rounding, several times fewer instructions than Debian's unoptimised SUNDIALS build); false keeps
  // SUNDIALS's own.
  bool eigen_kernels = true;
};

/// Options from a case's run block and events; the command line may change them afterwards.
Options options_from(const Circuit& circuit);

struct Statistics {
  long steps = 0;
  long rhs_evaluations = 0;
  long jacobian_evaluations = 0;
  long nonlinear_iterations = 0;
  long error_test_failures = 0;
  long network_newton_iterations = 0;
  long root_evaluations = 0;
  long events = 0;  // commands applied and state events handled
  long reinitialisations = 0;
  long step_backs = 0;
  long settlings = 0;  // switchings after which fast states started at their quasi-steady value
  double wall_seconds = 0.0;
};

enum class Outcome { Completed, SupervisorFinished, SolverFailure };

struct Result {
  Outcome outcome = Outcome::Completed;
  std::string message;  // solver failure reason
  double end_time = 0.0;
  Waveform steps;    // one row per step and two per event (before/after)
  Waveform samples;  // uniform grid when Options::sample is set, or the rows at Options::output_times
  std::vector<double> initial_states, final_states;  // ODE vector: part states, energy accounts (J), ∫i² dt (A²s)
  std::vector<int> final_modes;
  std::vector<double> initial_stored, final_stored;  // per part, J
  // Stored energy the fast-state settling added (negative: removed), summed over the run: the skipped
  // transients' share of the energy balance, which no account integrates.
  double settled_energy = 0.0;
  std::vector<TimelineEntry> timeline;
  std::vector<Crossing> crossings;
  std::vector<BreakCircuit> breaks;  // every opening arc's broken circuit, in time order
  Statistics statistics;
};

/// Column headers of the recorded waveforms: "time [s]" is not a column (times are kept apart);
/// node voltages "<node> [V]", then every part's signals.
std::vector<std::string> waveform_headers(const Circuit& circuit);

/// Runs the transient. Solver trouble is reported in Result::outcome/message, never thrown; output times out of
/// order or outside the run, and unknown output columns, are programming errors (std::invalid_argument).
Result simulate(const Circuit& circuit, const Options& options);

}  // namespace linkrise::solver
