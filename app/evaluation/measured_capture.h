#pragma once
// A measured capture matched to the simulation: which column of the capture is which simulated signal, with
// the units checked. Shared by `linkrise fit` (the signals it fits) and `linkrise run --measured` (the curves
// it overlays).
#include <optional>
#include <string>
#include <vector>

#include "netlist/capture.h"
#include "netlist/case.h"

namespace linkrise::app {

struct MatchedSignal {
  std::size_t capture_column = 0;  // index into Capture::columns
  int waveform_column = 0;         // index into solver::waveform_headers()
  std::string name;                // e.g. "link_plus", "r_pre.current"
  std::string unit;                // SI symbol of the simulated column, e.g. "V"
};

struct MeasuredCapture {
  netlist::Capture capture;
  std::vector<MatchedSignal> signals;
  double time_offset = 0.0;  // s: case time = capture time + offset (the measured block's)
};

/// Where the capture comes from when the command line names it, replacing the case's measured block.
struct CaptureChoice {
  std::optional<std::string> file;              // --measured / --capture
  std::vector<netlist::ColumnMapping> columns;  // --column NAME=HEADER (replaces the block's columns)
};

/// Reads the capture and matches its columns to `headers` (the simulated columns, "<name> [unit]"). With a
/// mapping every mapped name must be a simulated signal of the same dimension; without one, the columns named
/// like a simulated signal are taken and the others left aside. Throws InputError when the case names no
/// capture, a name is unknown, a unit's dimension differs, or no column matches.
MeasuredCapture load_measured(const netlist::Case& spec, const std::vector<std::string>& headers,
                              const CaptureChoice& choice);

}  // namespace linkrise::app
