#pragma once
// What the BMS sequence controller did in one run, as plain data for the analyser and the reports.
// Times are absolute run times in s; NaN means "did not happen within the run".
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "netlist/sequence_spec.h"

namespace linkrise::solver {

constexpr double kNotReached = std::numeric_limits<double>::quiet_NaN();

struct AttemptRecord {
  int number = 1;
  int cycle = 1;                     // the key cycle it belongs to (1 without key_cycles)
  double start = kNotReached;        // coils of the start_closed contactors energised (a BMS sample)
  double contacts_closed = kNotReached;  // the last start_closed contact touched
  double decision = kNotReached;     // sample at which the closing rule was met
  double main_closed = kNotReached;  // main contacts first touched
  double released = kNotReached;     // pre-charge contacts parted after the overlap
  double fault_time = kNotReached;   // sample at which a fault was raised
  std::optional<netlist::SequenceOutcome> fault;  // timeout, no_rise or too_fast; none when no fault
  std::string reason;                // why it ended (decision or fault), in words
};

struct SequenceReport {
  netlist::SequenceSpec spec;  // the configuration the controller ran
  std::string ground;          // the case's ground node (it has no waveform column)
  netlist::SequenceOutcome outcome = netlist::SequenceOutcome::Unfinished;
  int attempts = 0;
  int cycles = 0;  // key cycles begun
  std::vector<AttemptRecord> history;
  double first_fault_time = kNotReached;
  std::optional<netlist::SequenceOutcome> first_fault;

  const AttemptRecord* last() const { return history.empty() ? nullptr : &history.back(); }
};

}  // namespace linkrise::solver
