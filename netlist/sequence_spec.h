#pragma once
// The `sequence:` block: how the BMS runs the pre-charge (read by solver/sequence_controller).
//
//   sequence:
//     start_closed: [k_neg, k_pre]   # contactors the BMS closes when an attempt starts
//     precharge: k_pre               # the pre-charge contactor: opened after the overlap and on a fault
//     main: k_main                   # closed when the closing rule is met (a list: one per parallel string)
//     resistor: r_pre                # the pre-charge resistor (judged in the detection matrix)
//     overlap: 20 ms                 # main contact closed -> pre-charge coil released
//     pack: [pack_plus, pack_minus]  # sensed node pair (plus, minus) for the pack voltage, read ideally,
//     link: link_sense               # or a voltage_sensor part: its nodes are the pair, its reading what the BMS
//                                    # compares (gain, offset, filter, resolution, skew, divider loading)
//     close_when: {ratio: 95 %}      # link >= ratio * pack, or {difference: 20 V}: pack - link <= 20 V;
//                                    # optional max_rate: 500 V/s (|link change| per sample / period)
//     sample_period: 1 ms            # BMS decision period; samples at start + k * period
//     start: 0 s                     # first attempt (default 0 s)
//     minimum_time: 30 ms            # rule met earlier than this after the attempt start -> fault too_fast
//     rise_check: {above: 20 %, by: 50 ms}  # link below 20 % of pack at the first sample >= 50 ms -> no_rise
//     timeout: 500 ms                # rule still not met this long after the attempt start -> timeout
//     attempts: 3                    # total attempts (default 1); after a fault the next one starts
//     cool_down: 2 s                 # at the first sample this long after the fault (required if attempts > 1)
//     expected_outcome: closed       # what `linkrise run` treats as a pass (default closed)
//     weld_check:                    # before each attempt's pre-charge, in order (optional):
//       - {close: [k_neg], hold: 50 ms, below: 10 %}  # these coils alone for 50 ms; the link rising by 10 % of
//                                                      # the pack -> welded
//     closure_check: {after: 50 ms, above: 90 %}      # after the pre-charge path opened, link < 90 % -> main_failed
//     key_cycles: {count: 5, on_time: 20 s, off_time: 60 s}  # a duty: key-off on_time after each main closure
//                                    # (every coil released), the next key-on off_time later (optional)
//     loads: [{part: aux_dcdc, after: main_closed, delay: 50 ms}]  # loads switched with the sequence
//                                    # (netlist/sequence_load_spec.h)
//
// The closing rule holds from both sides: a link above pack/ratio (or pack + difference) is a source on the bus,
// never a charging capacitor -> live_bus; so is a link already meeting the rule before the attempt closed anything.
// All times of an attempt are measured from the start of its pre-charge (the sample at which the start_closed
// coils are energised, after any weld checks).
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "netlist/sequence_load_spec.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

struct Case;

enum class ClosingRule { Ratio, Difference };

/// How a sequence ends: the main contactor closed, or the fault that stopped the last attempt, or the run ended
/// while the sequence was still going.
enum class SequenceOutcome { Closed, Timeout, NoRise, TooFast, LiveBus, Welded, MainFailed, Unfinished };
/// The outcome as case files and outputs write it: closed, timeout, no_rise, too_fast, live_bus, welded,
/// main_failed, unfinished.
const char* outcome_word(SequenceOutcome outcome);

struct NodePair {
  std::string plus, minus;
};

/// One step of the weld check: these coils alone (none: all open) for `hold`; the link must not rise by
/// `below`·pack above its reading at the step's start, or a contactor that should be open is welded.
struct WeldCheckStep {
  std::vector<std::string> close;
  double hold = 0.0;   // s
  double below = 0.1;  // fraction of pack
  SourceMark mark;
  std::vector<SourceMark> close_marks;
};

/// After the pre-charge path has opened, the link must still read at least `above`·pack `after` later, or the
/// main contactor did not close.
struct ClosureCheck {
  double after = 0.0;  // s
  double above = 0.9;  // fraction of pack
};

/// A duty of repeated key cycles: each closure is held `on_time` (from the main contacts touching), then every
/// coil is released (key off) and the next cycle's first attempt starts `off_time` later; retries count per cycle.
struct KeyCycles {
  int count = 1;
  double on_time = 0.0;   // s
  double off_time = 0.0;  // s
};

struct SequenceSpec {
  std::vector<std::string> start_closed;
  std::string precharge;
  // Parallel strings: `main: [k_main_a, k_main_b]` closes every string's main contactor on the one decision and
  // `precharge: [k_pre_a, k_pre_b]` releases every pre-charge contactor after the overlap; the first is primary.
  std::vector<std::string> more_mains, more_precharges;
  std::string main;
  std::string resistor;
  double overlap = 0.0;  // s
  NodePair pack, link;
  std::string pack_sensor, link_sensor;  // the voltage_sensor parts read instead of the ideal pairs; empty: none
  SourceMark pack_sensor_mark, link_sensor_mark;
  ClosingRule rule = ClosingRule::Ratio;
  double rule_value = 0.95;          // fraction (ratio) or V (difference)
  std::optional<double> max_rate;    // V/s
  double sample_period = 1e-3;       // s
  double start = 0.0;                // s
  double minimum_time = 0.0;         // s; 0 = no too-fast check
  std::optional<double> rise_fraction;  // fraction of pack
  double rise_by = 0.0;              // s
  double timeout = 0.0;              // s
  int attempts = 1;
  double cool_down = 0.0;            // s
  SequenceOutcome expected_outcome = SequenceOutcome::Closed;
  std::vector<WeldCheckStep> weld_check;
  std::optional<ClosureCheck> closure_check;
  KeyCycles key_cycles;
  std::vector<SequenceLoadSpec> loads;  // loads the sequence switches
  SourceMark mark;
  // Where each named part is written, for the checks made once the part kinds are known.
  std::vector<SourceMark> start_closed_marks;
  SourceMark main_mark, precharge_mark, resistor_mark;

  /// Every contactor the sequence moves (start_closed, then main) with the place it is named.
  std::vector<std::pair<std::string, SourceMark>> moved_contactors() const;
  /// Every main contactor (`main` first) and every pre-charge contactor (`precharge` first).
  std::vector<std::string> mains() const;
  std::vector<std::string> precharges() const;
  /// The same names alone.
  std::vector<std::string> moved_names() const;

  /// The closing level on the link for a given pack voltage: ratio·pack or pack − difference.
  double closing_level(double pack_voltage) const {
    return rule == ClosingRule::Ratio ? rule_value * pack_voltage : pack_voltage - rule_value;
  }
  /// The upper side of the rule: pack/ratio or pack + difference. A link above it is fed from elsewhere.
  double upper_level(double pack_voltage) const {
    return rule == ClosingRule::Ratio ? pack_voltage / rule_value : pack_voltage + rule_value;
  }
  /// Plain words for reports, e.g. "link >= 95 % of pack" or "pack - link <= 20 V".
  std::string rule_text() const;
};

/// The words of the outcomes a sequence can end with, in enumeration order.
const std::vector<std::string>& sequence_outcomes();
/// The outcome a word names (one of sequence_outcomes()).
SequenceOutcome outcome_from_word(const std::string& word);

/// Reads and validates the `sequence:` block of a case tree against the parts, nodes, events and run already
/// read into `spec`; std::nullopt when the case has none. That the named contactors are switches is checked
/// when the circuit is built (the part kinds are known to the models only). Throws InputError with the position of the first problem.
std::optional<SequenceSpec> read_sequence(const Tree& root, const Case& spec);

}  // namespace linkrise::netlist
