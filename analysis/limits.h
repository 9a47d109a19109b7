#pragma once
// Judging metrics against limits: the case's `limits:` block and the ratings declared on parts.
//
// For a maximum, margin = bound − value; for a minimum, margin = value − bound (in the metric's unit, K for a
// temperature in degC since a margin is a difference; positive inside the bound). relative_margin =
// margin / |bound|. A limit passes when margin >= required·|bound| (required margin 0 unless the limit sets
// `margin:`). A metric that was not reached in the run (NaN, e.g.
// the main current of a sequence that never closed) is reported as not judged and does not fail; the
// sequence outcome judges that run.
//
// Limits of the case and ratings of parts are judged here alike, by every command (run, faults, compare, the
// studies and the design search read the judged list), so a rating's verdict, margin and origin are one thing.
#include <string>
#include <vector>

#include "analysis/metrics.h"
#include "netlist/limit_spec.h"
#include "solver/circuit.h"

namespace linkrise::analysis {

/// Which side of a metric a limit bounds.
enum class BoundSide { Minimum, Maximum };
/// "min" or "max", as the limits block writes it.
const char* bound_word(BoundSide side);

struct JudgedLimit {
  std::string metric;
  BoundSide bound = BoundSide::Maximum;
  std::string unit;         // of the limit and the value
  std::string margin_unit;  // of the margin: difference_unit(unit), K for a temperature
  std::string source;  // "limits block" or "rating of <part>"
  std::string rated_part;  // the part whose rating this is; empty for the limits block
  std::string origin;  // the entry the bound was written as and where, e.g. "ratings.max_temperature at x.yaml:31:7"
  bool protection = false;  // a protective device's operating point: a fault scenario may reach it
  std::string detail;  // what the run's value stands for, when the metric says (e.g. the pulse-curve rows it met)
  double limit = 0.0;
  double value = 0.0;
  double margin = 0.0;
  double relative_margin = 0.0;
  double required_margin = 0.0;  // fraction
  bool judged = true;
  bool pass = true;
};

/// Limits from the ratings parts declare (Part::ratings()), as "<part>.<metric>" maxima.
std::vector<netlist::LimitSpec> rating_limits(const solver::Circuit& circuit);

/// Judges every bound of every limit. Throws netlist::InputError (at the limit's position) for a metric
/// the run does not have or a bound whose unit does not fit the metric.
std::vector<JudgedLimit> judge_limits(const std::vector<netlist::LimitSpec>& limits, const MetricSet& metrics);

}  // namespace linkrise::analysis
