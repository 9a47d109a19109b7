#pragma once
// The `measured:` block of a case: the capture of a real pre-charge to compare the simulation with
// (`linkrise fit`, `linkrise run --measured`).
//
//   measured:
//     file: bench_capture.csv        # relative to the case file's folder
//     time: "Time (s)"               # optional: the time column's header (finds the header row below metadata)
//     columns:                       # optional: which column measures what; default: headers named like
//       link_plus: "CH2 [V]"         #   linkrise's own columns ('link_plus [V]', 'r_pre.current [A]')
//       r_pre.current: "CH3 [A]"
//     time_offset: 0.4 ms            # optional (0 s): the case's time at the capture's zero (the trigger)
//
// A node voltage is named by the node, a part's signal by `<part>.<signal>`, as in waveforms.csv.
#include <optional>
#include <string>
#include <vector>

#include "netlist/capture.h"
#include "netlist/input_error.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

struct MeasuredSpec {
  std::string file;  // resolved against the case file's folder
  std::string time_header;
  std::vector<ColumnMapping> columns;
  double time_offset = 0.0;  // s: case time = capture time + offset
  SourceMark mark;           // where the block starts
  SourceMark file_mark;

  CaptureRequest request() const { return CaptureRequest{file, time_header, columns, file_mark}; }
};

/// Reads the `measured:` block; std::nullopt when the case has none. `case_file` anchors a relative path.
std::optional<MeasuredSpec> read_measured(const Tree& root, const std::string& case_file);

/// Column mappings written on the command line as NAME=HEADER (`--column "link_plus=CH2 [V]"`), each marked
/// `command line (--column #n)`.
std::vector<ColumnMapping> read_column_options(const std::vector<std::string>& texts);

}  // namespace linkrise::netlist
