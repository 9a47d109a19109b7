#pragma once
// The HTML report of `linkrise faults CASE.yaml --report FILE.html`: the detection matrix (one table row per
// scenario, failing rows marked by the word FAIL and the reason, not only by colour), the matrix verdict, the
// pre-charge resistor's peak temperature and energy against its ratings per scenario, the link voltage of
// every simulated scenario with its first fault marked, the not-applicable scenarios with their reasons, and
// the high-voltage caution. Composed from the HtmlReport blocks (app/report_html.h), so it is self-contained
// and byte-reproducible like the run report (docs/report.md).
#include <string>

#include "app/faults_command.h"
#include "netlist/sequence_spec.h"
#include "solver/transient.h"

namespace linkrise::app {

/// Drawing columns the kept link-voltage trace is reduced to (decimate_min_max: at most four samples per
/// column, so a one-step spike survives): enough for a 720 px plot, a few tens of kB per scenario.
constexpr int kLinkTraceColumns = 600;

/// Keeps the sensed link voltage of a scenario's run in `row` (link_time, link_voltage), decimated to
/// kLinkTraceColumns columns. `ground` is the case's ground node (it has no waveform column). Leaves the trace
/// empty when a link node has no waveform column.
void keep_link_trace(DetectionRow& row, const solver::Result& result, const netlist::SequenceSpec& sequence,
                     const std::string& ground);

/// The complete HTML report of one detection matrix.
std::string faults_report_html(const DetectionMatrix& matrix);

}  // namespace linkrise::app
