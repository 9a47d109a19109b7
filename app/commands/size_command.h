#pragma once
// `linkrise size CASE.yaml [--part NAME] [--range A..B] [...]`: the resistor to buy (app/studies/sizing.h). Each
// option replaces the matching entry of the case's `sizing:` block; the block (or these options) must name the
// part and the range. Writes sizing.csv and sizing.json, and with --report an HTML report. Exit 0 when a feasible
// value or a passing candidate exists, 1 when none does, 2 for bad input, 3 when the solver gave up at some point
// (listed; its margins are not judged).
#include <cstdint>
#include <string>
#include <vector>

namespace linkrise::app {

struct SizeArguments {
  std::string case_file;
  std::string part;       // empty: the sizing block's
  std::string parameter;  // empty: the block's, else resistance
  std::string range;      // "A..B", values as in a case file; empty: the block's
  bool nominal = false;   // judge the nominal point only
  bool corners = false;   // the nominal point and every tolerance corner
  std::size_t samples = 0;  // Monte Carlo samples (0: the block's spread)
  std::uint64_t seed = 0;   // 0: the block's (default 1)
  std::string quantile;     // e.g. "99%"; empty: the block's
  bool no_faults = false;   // leave the fault scenarios out
  int attempts = 0;         // 0: the block's (or the sequence's own)
  std::string faults_at;    // "nominal" or "spread"; empty: the block's
  std::string tolerance;    // empty: the block's (default 0.5 %)
  std::string catalogue;    // empty: the block's
  bool no_verify = false;
  std::string margin = "20%";  // of the verified BMS window
  std::vector<std::string> settings;
  std::string output_directory = "out";
  std::string report;
  int jobs = 0;
  bool quiet = false;
};

int size_command(const SizeArguments& arguments);

}  // namespace linkrise::app
