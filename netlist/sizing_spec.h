#pragma once
// The `sizing:` block: what `linkrise size` searches and what counts as passing (docs/studies.md).
//
//   sizing:
//     part: r_pre                       # the part to size
//     parameter: resistance             # optional: the part's defining value (a fixed resistor's resistance,
//                                       #   a thermistor's resistance_at_25degC or minimum_resistance)
//     range: [10 Ohm, 200 Ohm]          # the values searched (0 < low < high)
//     spread: corners                   # corners (default) | nominal | {samples: 200, seed: 1, quantile: 99 %}
//     faults: all                       # all (default with a sequence) | none | [shorted_link, ...]
//     faults_at: nominal                # nominal (default) | spread: the scenarios at every point of the spread
//     attempts: 3                       # optional: the attempts each fault scenario runs with (its retries)
//     tolerance: 0.5 %                  # relative tolerance of the boundaries (default 0.5 %)
//     catalogue: resistors.yaml         # optional: candidate parts (netlist/catalogue_spec.h), relative to
//                                       #   the case file
//
// The command line may give or replace each of these (`linkrise size --part ... --range ...`).
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

/// Which points of the tolerance spread a design must pass.
enum class SizingSpread { Nominal, Corners, Samples };

struct SizingSpec {
  std::string part;
  std::string parameter;  // empty: the part's defining value
  double lower = 0.0, upper = 0.0;  // SI; both 0 when the block gives no range
  SizingSpread spread = SizingSpread::Corners;
  std::size_t samples = 0;     // Monte Carlo population (spread: samples)
  std::uint64_t seed = 1;
  double quantile = 0.99;      // the share of samples that must pass (fraction)
  bool all_faults = true;      // every built-in and case scenario; otherwise those in `faults`
  std::vector<std::string> faults;  // named scenarios (empty with all_faults false: none)
  bool faults_over_spread = false;  // the scenarios at every point of the spread, not only the nominal one
  std::optional<int> attempts;      // attempts of each fault scenario; absent: the sequence's own
  double tolerance = 0.005;         // relative, on the boundaries
  std::string catalogue;            // path as resolved against the case file; empty: none
  SourceMark mark;                  // where the block starts
  SourceMark catalogue_mark;
};

/// Reads the `sizing:` block of a case tree (std::nullopt when absent). `file` is the case file, against whose
/// folder a relative catalogue path is resolved. Throws InputError at the offending value.
std::optional<SizingSpec> read_sizing(const Tree& root, const std::string& file);

/// A path written in a case file, resolved against the folder of the case file.
std::string beside_case(const std::string& path, const std::string& case_file);

}  // namespace linkrise::netlist
