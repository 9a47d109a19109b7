#pragma once
// A contactor data sheet's breaking capacity: the current the contacts may break at a given circuit voltage,
// as a table of rows, each valid for one current direction or both (a polarised contactor breaks less against
// its marked direction; common practice).
//
// An opening is judged by the row with the smallest voltage at or above the voltage it broke (a conservative
// reading: no interpolation towards higher permitted currents), among the rows for the opening's direction; its
// use is |current broken| / permitted current. An opening above every row's voltage, or in a direction no row
// covers, has no row: its use is infinite (it fails the rating).
//
// The table's time constant (L/R) is not part of a row: the run does not separate the broken circuit's
// inductance from its resistance (see DEVELOPERS.md, Contacts), so a data sheet's L/R column cannot be judged.
#include <limits>
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
};

struct BreakJudgement {
  double use = std::numeric_limits<double>::infinity();  // |I| / permitted; infinite without a row
  int row = 0;  // 1-based row of the table judged against; 0 when no row covers the opening
};

struct BreakingCapacity {
  std::vector<BreakingRow> rows;  // in the order written

  /// Judges a break of `current` (signed: positive entering the first node) at `voltage` (magnitude).
  BreakJudgement judge(double voltage, double current) const;
};

}  // namespace linkrise::models
