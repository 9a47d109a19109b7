#pragma once
// `linkrise size CASE.yaml`: the resistor to buy. Finds the window of values of one part parameter (a resistor's
// resistance, a thermistor's R25 or minimum resistance) inside which every bound the case states holds over its
// tolerance spread and its fault scenarios; ranks catalogue parts over the same spread and scenarios; and
// verifies the chosen design with the fault matrix and the BMS fault window (docs/studies.md).
//
// What counts (the case's `sizing:` block, netlist/sizing_spec.h, or the command line):
//  - the spread: the nominal point only, the nominal point and every tolerance corner, or the nominal point and N
//    Monte Carlo samples judged at a quantile q (a constraint's margin is then the (1 − q) quantile of its margins
//    over the samples, Hyndman & Fan type 7, and never above the nominal point's);
//  - the constraints: the case's `limits:`, the ratings its parts declare, the expected sequence outcome (+1
//    reached, −1 not), and with fault scenarios each scenario's expected outcome and every part rating in that
//    scenario's run, retries included (`attempts` sets the attempts each scenario runs with). The scenarios run at
//    the nominal point, or with `faults_at: spread` at every point of the spread (the worst counts).
// A constraint's margin at a value x is its worst relative margin over the counted points and scenarios
// ((bound − value)/|bound| for a maximum, less the limit's required margin).
//
// Method. The margins are taken on a bracket of kBracketPoints values spaced evenly in log x; where a constraint's
// margin changes sign between two bracket values, Brent's method (GSL gsl_root_fsolver_brent, on log x) finds the
// boundary to the stated relative tolerance — for a margin monotonic on the bracket, or one that passes in a single
// band (fails, passes, fails: "too fast" at low values, a timeout at high ones). Any other sign pattern is neither:
// its boundaries are then those of the bracket grid, and a note says so. Each constraint holds on the stretches its
// boundaries delimit; the feasible window is the widest stretch (in log x) where all hold, and each end names the
// constraint that binds it and the point (corner, quantile or scenario) where it binds.
//
// The chosen design: the best catalogue candidate that passes (the largest smallest margin), else the preferred
// value (IEC 60063 E24 series) nearest the window's geometric middle that lies inside the window, else the middle
// itself. It is verified by the detection matrix of `linkrise faults` and the fault window of `linkrise window`.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "app/studies/fault_window.h"
#include "app/studies/faults.h"
#include "netlist/overrides.h"
#include "netlist/sizing_spec.h"

namespace linkrise::app {

inline constexpr std::size_t kBracketPoints = 9;

/// What the command line asks. Each field that is set replaces the case's `sizing:` block; what neither gives
/// takes the block's default.
struct SizingRequest {
  std::string case_file;
  std::vector<netlist::Override> settings;
  std::optional<std::string> part, parameter, catalogue;
  std::optional<std::pair<double, double>> range;  // SI, 0 < lower < upper
  std::optional<netlist::SizingSpread> spread;
  std::optional<std::size_t> samples;
  std::optional<std::uint64_t> seed;
  std::optional<double> quantile;   // fraction
  std::optional<bool> faults;       // false: no fault scenarios
  std::optional<int> attempts;
  std::optional<bool> faults_over_spread;
  std::optional<double> tolerance;  // relative, on the boundaries
  bool verify = true;               // run the fault matrix and the fault window on the chosen design
  double window_margin = 0.2;
  int jobs = 0;
  bool progress = false;            // a progress line per value on a terminal
};

struct SizingPoint {
  double value = 0.0;               // SI (a candidate: its defining value, NaN when it has none)
  std::vector<double> margins;      // per constraint: the worst over the counted points; NaN when never judged
  std::vector<std::string> worst;   // per constraint: where the worst arose ("nominal", "corner 5", "scenario x")
};

struct Boundary {
  std::size_t constraint = 0;
  double value = 0.0;
  bool lower = true;  // the constraint holds above the value (a lower bound of the window)
  std::string where;  // the point that binds there
};

struct CandidateResult {
  std::string name, note, kind;
  SizingPoint point;
  double smallest_margin = std::numeric_limits<double>::quiet_NaN();
  std::optional<std::size_t> binding;  // the constraint of the smallest margin
  std::size_t failed = 0;              // constraints with a negative margin
  bool pass() const { return failed == 0 && binding.has_value(); }
};

/// The design the study ends with, and its verification.
struct SizingChoice {
  std::string label;  // "r_pre.resistance = 47 Ohm" or "candidate wirewound_47r"
  std::string why;    // how it was chosen
  SizingPoint point;
  bool verified_run = false;           // the matrix and window were run
  DetectionMatrix matrix;              // the fault scenarios on the chosen design
  std::optional<FaultWindow> window;   // the recommended BMS window (absent without tolerances)
  std::string window_skipped;          // why no window was run
  bool verified() const;
};

struct Sizing {
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  std::string case_file, title, path, unit;
  netlist::SizingSpec spec;                 // as resolved (block and command line)
  std::string spread_text;                  // "nominal and 32 tolerance corners"
  StudyAccuracy accuracy;                   // the spreads' rtol and the nominal case's agreement check
  std::vector<std::string> scenarios;       // the fault scenarios that count
  std::vector<std::string> constraints;
  std::vector<SizingPoint> points;   // every value evaluated, ascending
  std::vector<Boundary> boundaries;  // every boundary found
  std::vector<std::string> notes;    // non-monotonic constraints, constraints that fail over the whole range
  std::vector<std::string> solver_failures;  // points the solver gave up on (their margins are not judged)
  std::size_t corners = 0;           // tolerance corners per value (0: nominal only)
  std::size_t runs = 0;              // simulations in all
  double lower = kNaN, upper = kNaN;  // the feasible window; NaN ends when there is none
  std::optional<std::size_t> lower_binding, upper_binding;  // index into boundaries
  std::vector<CandidateResult> candidates;  // ranked: passing by smallest margin (largest first), then failing
  std::optional<SizingChoice> choice;
  bool feasible() const { return !std::isnan(lower) && !std::isnan(upper) && lower <= upper; }
  /// A feasible value or a passing candidate exists.
  bool found() const;
};

/// Throws netlist::InputError for bad input (no part or range from block or command line, unknown part or
/// parameter, an empty range, a case that does not run, an unknown fault scenario, a bad catalogue).
Sizing size_part(const SizingRequest& request);

/// The E24 preferred value (IEC 60063) nearest `value` in log scale, within [lower, upper]; NaN when none lies
/// there.
double preferred_value(double value, double lower, double upper);

std::string sizing_text(const Sizing& sizing);
/// sizing.csv: every evaluated value with its margins (candidates after them, by name).
std::string sizing_csv(const Sizing& sizing);
/// sizing.json as text.
std::string sizing_json(const Sizing& sizing);
/// A constraint's margin at a point (NaN when not judged there).
double margin_of(const SizingPoint& point, std::size_t constraint);

}  // namespace linkrise::app
