#pragma once
// `linkrise size CASE.yaml --part NAME --range A..B`: the window of values of one part parameter (a resistor's
// resistance, a thermistor's R25 or minimum resistance) inside which every bound the case states holds at every
// tolerance corner: its `limits:`, the ratings its parts declare, and the expected sequence outcome.
//
// Method. At a value x the case runs with the parameter at x (the tolerances follow it: a ±5 % tolerance of the
// sized parameter is ±5 % of x) at its nominal point and, with corners, at every corner of its `tolerances:`
// block. A constraint's margin at x is its worst relative margin over those points (limits: (bound − value)/|bound|
// for a maximum, minus the required margin; the outcome: +1 reached, −1 not). The margins are taken on a
// coarse bracket of kBracketPoints values spaced evenly in log x; where a constraint's margin changes sign
// between two bracket values, Brent's method (GSL gsl_root_fsolver_brent, on log x) finds the boundary to the
// stated relative tolerance. A constraint whose margin changes sign more than once on the bracket is not
// monotonic in x: its boundaries are then those of the bracket grid, and a note says so.
// The feasible window is the range between the largest lower boundary and the smallest upper boundary; each
// end names the constraint that binds it and the corner where it binds.
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "netlist/overrides.h"

namespace linkrise::app {

inline constexpr std::size_t kBracketPoints = 9;

struct SizingRequest {
  std::string case_file;
  std::vector<netlist::Override> settings;
  std::string part;
  std::string parameter;  // empty: the part's defining value (a fixed resistor's resistance)
  double lower = 0.0, upper = 0.0;  // SI, 0 < lower < upper
  bool corners = true;              // judge every tolerance corner, or the nominal point only
  double tolerance = 0.005;         // relative, on the boundaries
  int jobs = 0;
};

struct SizingPoint {
  double value = 0.0;               // SI
  std::vector<double> margins;      // per constraint: the worst over the points; NaN when never judged
  std::vector<std::string> worst;   // per constraint: the point that gave the worst ("nominal", "corner 5")
};

struct Boundary {
  std::size_t constraint = 0;
  double value = 0.0;
  bool lower = true;  // the constraint holds above the value (a lower bound of the window)
  std::string where;  // the point that binds there
};

struct Sizing {
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  std::string case_file, title, path, unit;
  std::vector<std::string> constraints;
  std::vector<SizingPoint> points;   // every value evaluated, ascending
  std::vector<Boundary> boundaries;  // every boundary found
  std::vector<std::string> notes;    // non-monotonic constraints, constraints that fail over the whole range
  std::vector<std::string> solver_failures;  // points the solver gave up on (their margins are not judged)
  std::size_t corners = 0;           // tolerance corners per value (0: nominal only)
  double lower = kNaN, upper = kNaN;  // the feasible window; NaN ends when there is none
  std::optional<std::size_t> lower_binding, upper_binding;  // index into boundaries
  bool feasible() const { return !std::isnan(lower) && !std::isnan(upper) && lower <= upper; }
};

/// Throws netlist::InputError for bad input (unknown part or parameter, an empty range, a case that does not run).
Sizing size_part(const SizingRequest& request);

std::string sizing_text(const Sizing& sizing);
/// sizing.csv: every evaluated value with its margins.
std::string sizing_csv(const Sizing& sizing);
/// sizing.json as text.
std::string sizing_json(const Sizing& sizing);

}  // namespace linkrise::app
