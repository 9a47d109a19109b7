#pragma once
// `linkrise faults CASE.yaml`: the detection matrix. Runs the nominal case and fault scenarios applied as
// overrides (netlist/overrides.h) and checks that the BMS sequence catches each fault in time — with the
// expected outcome, and with the pre-charge resistor inside its temperature and energy ratings.
//
// Built-in scenarios (expected outcome in brackets):
//   nominal                    the case as written [sequence.expected_outcome, default closed]
//   shorted_link               1 mOhm across the sensed link nodes [no_rise; timeout without a rise check]
//   open_precharge_resistor    the pre-charge resistor at 1 GOhm [no_rise; timeout without a rise check]
//   missing_capacitance        capacitors across the link at 0.1 % of their value [too_fast]
//   oversize_capacitance       capacitors across the link doubled [closed]
//   constant_power_from_start  constant-power loads draw from 0 V on [from the case's data: the quadratic
//                              v = [Vs ± √(Vs² − 4PR)]/2 with Vs and R measured in the nominal run's charge and P
//                              the loads' rated powers: closed above the closing level, otherwise timeout, or
//                              no_rise below the rise-check level or when the lower root holds the link down]
//   reversed_connection        the parts across the link connected the other way round, so the link's diode
//                              (inverter body diodes) clamps it [no_rise; timeout without a rise check]
// A scenario the case lacks the structure for (no capacitor, no constant-power load, no diode across the link)
// is reported as not applicable with the reason. The case's `scenarios:` add rows or change a built-in's
// expectation (netlist/scenario_spec.h).
// Writes faults.json and faults.csv, and with --report an HTML report (app/report/faults_report.h). Exit 0 when every
// applicable row passes, 1 otherwise, 2 for bad input, 3 when the solver failed in a scenario.
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "netlist/sequence_spec.h"
#include "netlist/case_document.h"
#include "solver/transient.h"

namespace linkrise::app {

// Every field travels between the ranks of an MPI job: a new one joins save_row in app/studies/result_transfer.cc.
struct DetectionRow {
  /// How the row ended, in words: the sequence outcome, "not_applicable" or "solver_failure".
  std::string actual_word() const;
  std::string expected_word() const { return netlist::outcome_word(expected); }

  std::string scenario;
  std::string description;
  netlist::SequenceOutcome expected = netlist::SequenceOutcome::Closed;
  netlist::SequenceOutcome actual = netlist::SequenceOutcome::Unfinished;  // when simulated without failure
  bool applicable = true;
  bool solver_failed = false;
  std::string note;  // why not applicable, the solver's message, or the scenario's note
  int attempt = 0;   // the first attempt that ended in `actual`; the detection time is that attempt's fault
  int attempts = 0;  // attempts the run used
  double detection_time = std::numeric_limits<double>::quiet_NaN();   // s, the fault of `attempt`
  double end_time = std::numeric_limits<double>::quiet_NaN();  // s, where the run ended (its settle after the last event)
  double peak_temperature = std::numeric_limits<double>::quiet_NaN();  // degC, pre-charge resistor
  double temperature_rating = std::numeric_limits<double>::quiet_NaN();
  double energy = std::numeric_limits<double>::quiet_NaN();  // J, pre-charge resistor over the run
  double energy_rating = std::numeric_limits<double>::quiet_NaN();
  /// Every part rating judged in the scenario's run held (the resistor's, a contactor's, a fuse's: one engine,
  /// analysis/limits.h); `broken_rating` names the worst one that did not, with its data-sheet entry and value.
  bool ratings_held = true;
  std::string broken_rating;
  bool pass = true;
  /// Every part rating judged in the scenario's run (retries included): "<part>.<metric> max" and its relative
  /// margin beyond the required one (NaN when not judged). The design search reads these.
  std::vector<std::pair<std::string, double>> rating_margins;
  // For the HTML report only (app/report/faults_report.h): the sensed link voltage over the scenario's run, reduced
  // to a few samples per drawing column (at most 2400 points), so a matrix stays small in memory.
  std::vector<double> link_time;     // s
  std::vector<double> link_voltage;  // V
};

struct DetectionMatrix {
  std::string case_file;
  std::string title;
  std::string resistor;
  std::vector<DetectionRow> rows;
  bool pass() const;
  bool solver_failure() const;
  /// Rows that did not pass (not-applicable rows pass).
  std::size_t failed() const;
  /// The row of a scenario; null when there is none.
  const DetectionRow* find(const std::string& scenario) const;
};

/// Drawing columns the kept link-voltage trace is reduced to (decimate_min_max: at most four samples per
/// column, so a one-step spike survives): enough for a 720 px plot, a few tens of kB per scenario.
constexpr int kLinkTraceColumns = 600;

/// Keeps the sensed link voltage of a scenario's run in `row` (link_time, link_voltage), decimated to
/// kLinkTraceColumns columns. `ground` is the case's ground node (it has no waveform column). Leaves the trace
/// empty when a link node has no waveform column.
void keep_link_trace(DetectionRow& row, const solver::Result& result, const netlist::SequenceSpec& sequence,
                     const std::string& ground);

/// How long a scenario's run goes on after the sequence's last event when the case itself lasts a fixed duration:
/// the row is decided by then (its outcome, attempt, fault time and the resistor's heat), so a scenario that makes
/// the solver struggle after its closure or last fault costs no more.
inline constexpr double kFaultSettle = 0.1;  // s

/// Makes every run of the document end `settle` after its sequence's last event (the case's own settle, or
/// kFaultSettle), within a cap that fits every attempt and cool-down; returns the validated case.
netlist::Case follow_sequence(netlist::CaseDocument& document, const netlist::Case& nominal);

/// Runs every scenario of a case file (`jobs` threads; results do not depend on it). Throws
/// netlist::InputError for a bad case or scenario.
DetectionMatrix detection_matrix(const std::string& case_file, int jobs = 1);
/// Whether the case's own scenarios must fit the document: they must for the case as written; on a design
/// alternative (a compare variant, a sizing candidate of another kind) a scenario that overrides a parameter the
/// new part lacks becomes a not-applicable row with the reason.
enum class ScenarioFit { MustFit, MayNotFit };
/// Which scenarios a matrix runs: every one, or only those named (plus the nominal row). A name the matrix does
/// not have is bad input at `mark`.
struct ScenarioSelection {
  bool all = true;
  std::vector<std::string> names;
  netlist::SourceMark mark;
};
/// The same on a case document (e.g. with overrides applied).
DetectionMatrix detection_matrix(netlist::CaseDocument document, int jobs = 1, ScenarioFit fit = ScenarioFit::MustFit,
                                 const ScenarioSelection& selection = {});

/// Why an applicable row failed, one phrase per reason (empty for a passing row).
std::vector<std::string> failure_reasons(const DetectionRow& row);

std::string matrix_text(const DetectionMatrix& matrix);
std::string matrix_csv(const DetectionMatrix& matrix);
/// faults.json as text.
std::string matrix_json(const DetectionMatrix& matrix);

}  // namespace linkrise::app
