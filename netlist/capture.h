#pragma once
// A measured capture: the time column and the signals of a CSV file, as linkrise writes it (`time [s]`,
// `<name> [unit]`) or as an oscilloscope exports it (metadata lines before the header row, negative pre-trigger
// times, plain headers that the case or the command line maps to quantities, uneven spacing).
//
// The file:
//   - The header row is the line just above the first row of numbers (or the line whose first cell is the
//     `time` header the mapping names); every line before it is metadata and is skipped.
//   - Cells are separated by commas; a header row without commas but with semicolons or tabs uses those.
//   - The first column is the time. Every header that is used carries its unit in brackets or parentheses,
//     `CH2 [V]`, `Time (s)`, `I [mA]`; values are converted to SI by that unit (a header in mV reads volts).
//   - Times increase strictly from row to row; negative times (before the trigger) are fine.
//
// Only the time and the columns asked for are kept, each as one compact vector of doubles, and the file is read
// line by line: a capture of a million rows and two signals holds 24 MB, whatever the file's other columns.
#include <cstddef>
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/units.h"

namespace linkrise::netlist {

/// Which file column measures which quantity: `name` is a node (`link_plus`) or a part's signal
/// (`r_pre.current`), `header` the column's header as the file writes it (`CH2 [V]`).
struct ColumnMapping {
  std::string name;
  std::string header;
  SourceMark mark;  // where the mapping is written (a case file's line, `option --column`)
};

struct CaptureRequest {
  std::string file;
  std::string time_header;  // empty: the header row is found as the line above the first row of numbers
  /// The columns to keep; empty: every column after the time, named by its header without the unit.
  std::vector<ColumnMapping> columns;
  SourceMark mark;  // where the file is named (for a file that cannot be opened)
};

struct CaptureColumn {
  std::string name;    // the quantity it measures, e.g. "link_plus", "r_pre.current"
  std::string header;  // as the file writes it
  Dimension dimension;
  SourceMark header_mark;     // the header cell: file, line, column
  std::vector<double> values;  // SI, one per row
};

struct Capture {
  std::string file;
  std::vector<double> times;  // s, strictly increasing
  std::vector<CaptureColumn> columns;
  int header_line = 0;      // 1-based
  int first_data_line = 0;  // 1-based
  std::size_t metadata_lines = 0;

  std::size_t row_count() const { return times.size(); }
  /// The column measuring `name`, or nullptr.
  const CaptureColumn* find(const std::string& name) const;
};

/// Reads a capture. Throws InputError naming the file, line and column for: a file that cannot be read, no
/// header row or no row of numbers, a mapped header the file lacks (with a did-you-mean), a used header without
/// a unit or with one that is not a unit, a time column whose unit is not a time, a row without a cell for a
/// used column, a cell that is not a finite number, and a time that does not increase.
Capture read_capture(const CaptureRequest& request);

/// Splits a header `CH2 [V]` or `Time (s)` into its name and unit text; the unit is empty when there is none.
std::pair<std::string, std::string> split_header(const std::string& header);

}  // namespace linkrise::netlist
