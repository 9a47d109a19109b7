#pragma once
// `linkrise compare CASE.yaml`: the case's variants side by side with the nominal case.
//
//   variants:
//     - name: ptc                        # letters, digits, '_'
//       note: "PTC thermistor instead of the wire-wound resistor"   # optional
//       replace:                         # optional: parts swapped for another kind (name and nodes kept)
//         r_pre: {kind: ptc_thermistor, minimum_resistance: 47 Ohm, ...}
//       set: {r_pre.thermal.heat_capacity: 5 J/K}   # optional overrides (netlist/overrides.h), after replace
//
// Output: a table with one row per metric and one column per variant (nominal first), the outcome and verdict
// rows, and the best value per row marked '*' (smaller is better except for minimum_* metrics and the stall
// equilibrium, see larger_is_better; values that print the same tie, and a row where every value ties is not
// marked). The terminal shows the headline metrics unless asked for all; the files always hold every metric. Writes compare.csv and
// compare.json. Exit 0 when every variant was evaluated, 2 for bad input, 3 when the solver failed somewhere.
//
// With --faults every variant also runs the fault scenarios of `linkrise faults` (app/studies/faults.h): a second
// table, one row per scenario and one column per variant, shows each row's outcome and whether it passed;
// compare_faults.csv lists every row, compare.json holds each variant's detection matrix; the exit code is 1 when
// an applicable row of some variant failed.
#include <string>
#include <vector>

#include "app/studies/faults.h"
#include "app/studies/study_run.h"
#include "netlist/overrides.h"

namespace linkrise::app {

struct VariantComparison {
  std::string case_file;
  std::string title;
  std::vector<std::string> names;  // "nominal", then the variants
  std::vector<std::string> notes;  // the variants' notes, in the same order (empty for the nominal case)
  StudyResults results;            // one point per name
  std::vector<DetectionMatrix> matrices;  // with faults: one per name, in the same order; else empty
  std::vector<std::string> headline;      // the metrics the terminal table shows by default (headline_metrics)
  bool faults_failed() const;
  /// Indices of the best entries of a metric column (empty when all tie or fewer than two are reached).
  std::vector<std::size_t> best(std::size_t column) const;
};

/// Runs the comparison. Throws InputError for bad input (also a variant whose values are out of range).
/// With `faults`, every variant's detection matrix too.
VariantComparison compare_variants(const std::string& case_file, const std::vector<netlist::Override>& settings, int jobs,
                                   bool faults = false);

/// The terminal table: the headline metrics (the case's limits, the sequence resistor's temperature and energy),
/// or every metric with `all_metrics`.
std::string comparison_text(const VariantComparison& comparison, bool all_metrics = false);
std::string comparison_csv(const VariantComparison& comparison);
/// compare_faults.csv: one line per variant and scenario.
std::string comparison_faults_csv(const VariantComparison& comparison);
/// compare.json as text.
std::string comparison_json(const VariantComparison& comparison);

}  // namespace linkrise::app
