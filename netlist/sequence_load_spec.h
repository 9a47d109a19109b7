#pragma once
// The sequence's `loads:` list: loads the BMS switches with the sequence, as its firmware does (an auxiliary
// converter started a stated delay after the main contacts close, a pump started with the attempt).
//
//   sequence:
//     loads:
//       - {part: aux_dcdc, after: main_closed, delay: 50 ms}   # after: attempt_start | main_closed |
//                                                                #        precharge_opened; delay >= 0 (default 0)
//
// Such a load is held off from the start of the run until its moment comes in an attempt; a fault disables it
// when it releases the contactors, and the next attempt starts it again at its moment. A load the sequence
// switches cannot also be switched by a scheduled event.
#include <string>
#include <vector>

#include "netlist/parameter_reader.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

struct Case;

/// The sequence moment a load's delay counts from.
enum class LoadMoment { AttemptStart, MainClosed, PrechargeOpened };
/// The moment as case files write it: attempt_start, main_closed, precharge_opened.
const char* moment_word(LoadMoment moment);

struct SequenceLoadSpec {
  std::string part;
  LoadMoment after = LoadMoment::MainClosed;
  double delay = 0.0;  // s
  SourceMark mark;     // where the part is named
};

/// Reads `loads:` of the sequence block (`reader` reads that block); empty when absent. Throws InputError at a
/// part the case lacks, a repeated part, a bad moment or delay, or a part a scheduled event also switches. That
/// the part is a load is checked when the circuit is built (the part kinds are known to the models only).
std::vector<SequenceLoadSpec> read_sequence_loads(ParameterReader& reader, const Case& spec);

}  // namespace linkrise::netlist
