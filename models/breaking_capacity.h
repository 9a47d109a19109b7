#pragma once
// A contactor data sheet's breaking capacity: the current the contacts may break at a given circuit voltage,
// as a table of rows, each valid for one current direction or both (a polarised contactor breaks less against
// its marked direction; common practice).
//
// A row may state the circuit's time constant L/R it was tested at (a data sheet's L/R column: the longer the
// time constant, the more magnetic energy the arc must take per ampere, so the permitted current falls). A row
// covers an opening when it is for the opening's direction, its voltage is at or above the voltage broken and,
// when it states a time constant, that is at or above the broken circuit's L/R (solver/break_circuit.h). A row
// without a time constant is judged on voltage and current alone.
//
// Of the covering rows, the opening is judged by the one with the smallest voltage, then the smallest time
// constant (a conservative reading: no interpolation towards higher permitted currents); its use is
// |current broken| / permitted current. An opening that no row covers (above every row's voltage or time
// constant, or in a direction no row has) has no row: its use is infinite (it fails the rating).
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace linkrise::models {

/// Which way the current ran through the contacts when they opened: forward enters the first node.
enum class CurrentDirection { Both, Forward, Reverse };
/// "both", "forward", "reverse".
const char* direction_word(CurrentDirection direction);

struct BreakingRow {
  double voltage = 0.0;  // V, the circuit voltage of the row
  double current = 0.0;  // A, permitted break current at that voltage
  CurrentDirection direction = CurrentDirection::Both;
  std::optional<double> time_constant;  // s, the L/R the row holds up to; none: not stated
};

struct BreakJudgement {
  double use = std::numeric_limits<double>::infinity();  // |I| / permitted; infinite without a row
  int row = 0;  // 1-based row of the table judged against; 0 when no row covers the opening
};

struct BreakingCapacity {
  std::vector<BreakingRow> rows;  // in the order written

  /// Judges a break of `current` (signed: positive entering the first node) at `voltage` (magnitude) in a
  /// circuit of time constant `time_constant` (s, L/R; 0 for a resistive circuit).
  BreakJudgement judge(double voltage, double current, double time_constant = 0.0) const;
};

}  // namespace linkrise::models
