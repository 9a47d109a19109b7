#pragma once
// `linkrise window CASE.yaml --corners | --samples N [--margin 20%]`: the BMS fault window — a minimum time
// and a timeout that the tolerance spread never crosses, verified against the fault scenarios.
//
// Method:
//  1. The tolerance spread (app/studies/spread.h) runs with the case's own fault window opened wide
//     (sequence.minimum_time = 0 s, sequence.timeout = 1e6 s), so the population is not censored by the
//     settings under review. The rise check and the rest of the sequence stay as written.
//  2. fastest = the smallest sequence.time_to_threshold (attempt start -> link meets the closing level, exact
//     crossing) over the samples; slowest = the largest time from the attempt start to the BMS sample that
//     decided to close (sequence.decision_time − attempt start, rate condition and sampling included).
//  3. minimum_time = (1 − margin)·fastest rounded down to a whole sample period; timeout = (1 + margin)·slowest
//     rounded up to a whole sample period. The controller compares elapsed sample times with both, so whole
//     periods lose nothing.
//  4. Verification with the recommended settings: the fastest and the slowest sample are re-run and must
//     close; the fault scenarios of `linkrise faults` (app/studies/faults.h) are re-run and each must still end
//     as expected (caught, and when). The window is verified when all of that holds.
// Writes window.json. Exit 0 verified, 1 not verified, 2 bad input, 3 solver failure.
#include <limits>
#include <string>
#include <vector>

#include "app/studies/faults.h"
#include "app/studies/spread.h"

namespace linkrise::app {

struct FaultWindow {
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  double margin = 0.2;          // fraction
  double sample_period = kNaN;  // s
  double case_minimum_time = kNaN, case_timeout = kNaN;  // as the case has them
  std::size_t closed = 0;       // spread samples that closed with the window opened wide
  double fastest = kNaN;        // s, see the method
  long fastest_point = -1;      // point index into the spread
  double slowest = kNaN;        // s
  long slowest_point = -1;
  double minimum_time = kNaN, timeout = kNaN;  // recommended, s
  std::vector<std::string> problems;           // why no window could be recommended or verified

  // Verification.
  std::vector<std::string> extreme_outcomes;  // fastest, slowest sample with the window
  DetectionMatrix matrix;
  bool verified() const;
};

/// Steps 2–3 of the method on a spread run with the window opened wide.
FaultWindow recommend_window(const Spread& spread, double margin, double sample_period);

/// The overrides that install a window on the case.
std::vector<netlist::Override> window_overrides(double minimum_time, double timeout);

/// The whole method on a case. Throws InputError.
FaultWindow fault_window(const std::string& case_file, const std::vector<netlist::Override>& settings,
                         const SpreadPlan& plan, double margin, int jobs, Spread* spread_out = nullptr,
                         const std::string& progress_label = "");
/// The same on a case document (a design alternative, overrides applied).
FaultWindow fault_window(const netlist::CaseDocument& base, const SpreadPlan& plan, double margin, int jobs,
                         Spread* spread_out = nullptr, const std::string& progress_label = "");

std::string window_text(const FaultWindow& window, const Spread& spread);
/// window.json as text.
std::string window_json(const FaultWindow& window, const Spread& spread);

}  // namespace linkrise::app
