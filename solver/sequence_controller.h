#pragma once
// The BMS pre-charge sequence as a Supervisor of the transient driver.
//
// The controller acts only at its samples (start + k·sample_period), as a BMS task does. At each sample it
// reads the sensed pack and link voltages and:
//  - starts an attempt (first sample at or after `start`, or after the cool-down): energises the coils of the
//    start_closed contactors; each contact touches after its closing_delay (then bounces, if configured);
//  - while charging, in this order: closing rule met -> "too_fast" fault if earlier than minimum_time, else
//    the decision; rise check due (first sample at or after rise_check.by) and link below the level ->
//    "no_rise"; timeout reached -> "timeout";
//  - on the decision: main coil energised, main contacts touch after its closing_delay; the pre-charge coil
//    is released `overlap` after that touch and its contacts part after its opening_delay;
//  - on a fault: every start_closed coil is released (contacts part after their opening delays); with
//    attempts left the next attempt starts at the first sample cool_down after the fault. States (link
//    charge, temperatures) carry across: it is one continuous simulation.
// The closing rule holds from both sides: a link above its upper side (pack/ratio, pack + difference), or one
// already meeting the rule when an attempt begins, is fed from elsewhere -> "live_bus".
// Weld check (optional, before each attempt's pre-charge): each step energises its coils alone for its hold time;
// a link rising by its share of the pack means a contactor that should be open is welded -> "welded" (a rise, so
// charge left by an earlier attempt, which only drains, is not mistaken for a weld). The coils are released
// and the next step (or the pre-charge) begins at the first sample after the contacts parted.
// Closure check (optional): `after` the pre-charge contacts parted the link must still read its level, or the
// main contactor did not close -> "main_failed" (its coil is released too).
// Key cycles (optional): a closure is held on_time from the main contacts touching, then every coil is released
// (key off) and the next cycle's first attempt begins off_time later; retries count per cycle.
// After the last fault the controller reports finished() once its contacts have parted, so the run stops.
// With `run: {duration: sequence}` the run instead ends `settle` after the sequence's last event (end_time()).
// The loads of `sequence.loads` follow the attempts (solver/sequence_loads.h).
#include <limits>
#include <vector>

#include "netlist/sequence_spec.h"
#include "solver/circuit.h"
#include "solver/sequence_loads.h"
#include "solver/sequence_report.h"
#include "solver/transient.h"

namespace linkrise::solver {

class SequenceController final : public Supervisor {
 public:
  /// Throws netlist::InputError when a named part is not a contactor of the circuit.
  SequenceController(const Circuit& circuit, netlist::SequenceSpec spec);

  double next_sample(double time) const override;
  void sample(const Probe& probe, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline) override;
  bool finished() const override { return done_; }
  double end_time() const override;

  /// The initial modes' commands (Options::initial_commands): the sequence's loads held off until their moment.
  std::vector<Command> initial_commands() const { return loads_.hold_off(circuit_); }
  /// Level watches for the closing level, so the crossing time is a waveform row (exact metrics).
  std::vector<Watch> watches() const;
  /// The report; events scheduled after `end_time` (never reached in the run) are cleared.
  SequenceReport report(double end_time) const;

 private:
  enum class Phase { Waiting, Checking, Charging, Verifying, Holding, Closed, Faulted };
  double tick(long index) const { return spec_.start + static_cast<double>(index) * spec_.sample_period; }
  bool due(double elapsed, double limit) const { return elapsed >= limit - 1e-9 * spec_.sample_period; }
  void schedule_close(int part, double coil_time, const std::string& why, std::vector<Command>& commands,
                      double& touch) const;
  void begin_attempt(double time, double pack, double link, std::vector<Command>& commands,
                     std::vector<TimelineEntry>& timeline);
  void start_precharge(double time, bool after_checks, std::vector<Command>& commands,
                       std::vector<TimelineEntry>& timeline);
  void start_weld_step(double time, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline);
  void weld_sample(double time, double pack, double link, std::vector<Command>& commands,
                   std::vector<TimelineEntry>& timeline);
  void charging_sample(double time, double pack, double link, std::vector<Command>& commands,
                       std::vector<TimelineEntry>& timeline);
  void decide(double time, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline);
  void verify_sample(double time, double pack, double link, std::vector<Command>& commands,
                     std::vector<TimelineEntry>& timeline);
  /// After a closure: hold it until key-off when key cycles remain, else stay closed.
  void closed();
  void holding_sample(double time, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline);
  /// Releases every energised coil; returns the time the last contacts part.
  double release_coils(double time, const std::string& why, std::vector<Command>& commands);
  void raise_fault(double time, netlist::SequenceOutcome fault, const std::string& reason, std::vector<Command>& commands,
                   std::vector<TimelineEntry>& timeline);
  // The BMS task at one of its samples (sample() also serves the loads' own times).
  void run_task(const Probe& probe, std::vector<Command>& commands, std::vector<TimelineEntry>& timeline);
  bool on_task_sample(double time) const;
  double next_tick(double time) const;

  const Circuit& circuit_;
  netlist::SequenceSpec spec_;
  int main_ = -1;                                 // the primary main contactor
  std::vector<int> mains_, precharges_;           // all of them (parallel strings), primary first
  std::vector<int> start_closed_;
  std::vector<std::vector<int>> weld_steps_;  // the coils of each weld-check step
  int pack_plus_ = -1, pack_minus_ = -1, link_plus_ = -1, link_minus_ = -1;
  int pack_sensor_ = -1, link_sensor_ = -1;  // voltage_sensor parts read instead of the node pairs, or -1
  int pack_reading_ = -1, link_reading_ = -1;  // index of each sensor's `reading` among its signals
  /// What the BMS reads on a channel: the sensor's reading, or the ideal node-pair voltage.
  double sensed(const Probe& probe, int sensor, int reading, int plus, int minus) const {
    return sensor >= 0 ? probe.signal(sensor, reading) : probe.voltage(plus, minus);
  }

  Phase phase_ = Phase::Waiting;
  double next_attempt_ = 0.0;
  double previous_link_ = 0.0;
  bool have_previous_ = false;
  bool rise_checked_ = false;
  std::vector<int> energised_;   // coils held now, in the order they were energised (released on a fault)
  std::size_t weld_step_ = 0;    // the weld-check step running
  double weld_step_start_ = 0.0;
  double weld_link_start_ = 0.0;  // the link read when the step began
  double last_link_ = 0.0;        // the link read at the current sample
  bool weld_releasing_ = false;  // the step's hold is over; waiting for its contacts to part
  double weld_next_ = 0.0;       // when they have parted
  double verify_at_ = 0.0;       // the closure check's sample time
  int cycle_ = 1;                // the key cycle running
  std::size_t cycle_first_ = 0;  // index in history_ of its first attempt (retries count per cycle)
  double key_off_at_ = 0.0;      // when the closure held in this cycle is let go
  double last_command_ = 0.0;
  bool done_ = false;
  std::vector<AttemptRecord> history_;
  SequenceLoads loads_;
  double last_event_ = -std::numeric_limits<double>::infinity();  // latest command given
};

/// Installs a controller on driver options: supervisor and closing-level watches.
void attach(SequenceController& controller, Options& options);

}  // namespace linkrise::solver
