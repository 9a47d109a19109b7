#pragma once
// The run block: how long to simulate and how accurately. One check, check_run(), holds the accepted ranges;
// the case file, overrides (scenarios, studies' --set run.*) and the command line (--rtol, --atol, --sample)
// all pass through it, so a bad value is an input error at the place it was written, never a solver failure.
//
// Accepted ranges and why:
//   duration   > 0 s, finite; or the word `sequence` (a case with a sequence block): the run then ends `settle`
//              after the sequence's last event (retries and cool-downs included), at the latest at
//              `max_duration` (default 600 s), which `duration` then holds
//   settle     >= 0 s, finite (required with `duration: sequence`: the waveforms after the last switching)
//   rtol       1e-12 ... 1e-2. Tighter than 1e-12, the error test would compare against the rounding of the
//              network solve inside every right-hand side (stopped at about 1e-14 relative, double precision
//              2.2e-16), so CVODE would shrink steps chasing noise. Looser than 1 %, the error control is
//              coarser than the limits' margins, the BMS thresholds and the energy audit it feeds.
//   atol       > 0, finite (in each state's SI unit; zero leaves a state that passes through 0 without any
//              error control)
//   max_step   >= 0 s, finite (0: no limit)
//   sample     > 0 s, finite, when given
//   fast_states settle (default) or resolve: whether a mode far faster than the rest starts at its
//              quasi-steady value after a switching (solver/fast_states.h) or is resolved step by step (the
//              tight reference runs that judge the default accuracy resolve everything)
//   transients resolve (default) or carry: whether a switching's decaying modes are resolved by the
//              integrator's own steps or carried in closed form from their linearisation, the integrator solving
//              for the rest (solver/carried_transient.h; not yet the default: DEVELOPERS.md, open points)
//   max_steps  >= 10 (even a single RC charge takes dozens of steps: BDF starts at order 1 with a tiny first
//              step, so a smaller limit is a slip)
//   max_wall_time  > 0 s, finite (the wall-clock budget of one run; a pre-charge case solves in milliseconds, so
//              the default of 5 min only ends a run that is stuck, with the solver's reason)
#include <optional>
#include <string>

#include "netlist/input_error.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

/// The longest run `duration: sequence` allows unless `max_duration` says otherwise.
inline constexpr double kDefaultMaxDuration = 600.0;  // s

struct RunSpec {
  double duration = 0.0;               // s; with `duration: sequence` the hard cap (max_duration)
  std::optional<double> settle;        // s; set by `duration: sequence`: the run ends this long after the
                                       // sequence's last event
  bool follows_sequence() const { return settle.has_value(); }
  double relative_tolerance = 1e-7;    // CVODE rtol
  double absolute_tolerance = 1e-8;    // CVODE atol, in each state's SI unit (scaled per state kind)
  bool absolute_tolerance_given = false;  // false: states held to rtol of the case's scales, at least atol
  double max_step = 0.0;               // s; 0 means no limit
  std::optional<double> sample;        // s; uniform output grid from dense output
  long max_steps = 2'000'000;          // the solver gives up (exit 3) after this many steps
  bool settle_fast_states = true;      // `fast_states: settle`; false for `resolve`
  bool carry_transients = false;       // `transients: carry`; false for `resolve` (the default)
  double max_wall_time = 300.0;        // s of wall-clock time; the solver gives up (exit 3) after it

  // Where each value was written: its place in the case file (or of an override), an option such as
  // "option --rtol" (line 0), or the run block's own place for a default.
  struct Marks {
    SourceMark duration, rtol, atol, max_step, sample, max_steps, max_wall_time, settle;
  } marks;
};

/// The smallest and largest relative tolerance accepted (see the ranges above).
inline constexpr double kTightestRelativeTolerance = 1e-12;
inline constexpr double kLoosestRelativeTolerance = 1e-2;
inline constexpr long kFewestSteps = 10;

/// One run setting outside its accepted range.
struct FieldProblem {
  std::string field;  // the run block's key: "rtol", "atol", "duration"...
  double value = 0.0;
  std::string rule;   // the violated constraint, e.g. "must be at most 1e-2"
  std::string why;    // the reason for the rule
  std::string fix;
  SourceMark mark;    // where the value was written
};

/// The first setting outside its accepted range, or nothing when all are usable.
std::optional<FieldProblem> check_run(const RunSpec& run);
/// The problem as an input error at the setting's place.
InputError run_input_error(const FieldProblem& problem);
/// Throws run_input_error() when check_run() finds a problem.
void require_valid_run(const RunSpec& run);

/// Reads and checks the run block `block` of a case; throws InputError at the offending value.
RunSpec read_run(const Tree& block);

}  // namespace linkrise::netlist
