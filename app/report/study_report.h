#pragma once
// The HTML reports of the studies (docs/report.md), composed from the HtmlReport blocks (app/report/report_html.h), so
// they are self-contained and byte-reproducible like the run report:
//  - compare: the comparison table (one row per metric, one column per variant, the best value marked by word),
//    the verdict of every variant and the caution;
//  - spread: one histogram per headline metric with the nominal value marked, and the distribution statistics;
//  - window: the spread's report plus the recommended minimum time and timeout marked on the time histograms
//    and the verification (extreme samples and fault scenarios re-run with the window);
//  - sweep: each headline metric against the swept parameter (a second parameter gives one curve per value).
// A study keeps no waveform (app/studies/study_run.h), so the plots show one number per point, never a trace.
#include <string>
#include <vector>

#include "app/studies/compare.h"
#include "app/studies/fault_window.h"
#include "app/studies/spread.h"
#include "app/studies/sweep.h"

namespace linkrise::app {

/// The metrics a spread report draws a histogram of: `chosen` (the terminal table's metrics) followed by the
/// headline quantities of a pre-charge when the study has them and they are not already chosen — the
/// pre-charge time, the time to the closing level, the sequence resistor's peak temperature and energy, and
/// the peak main current. Only metrics that are columns of the study.
std::vector<std::string> spread_plot_metrics(const Spread& spread, const std::vector<std::string>& chosen);

std::string compare_report_html(const VariantComparison& comparison);
/// `metrics`: those of the statistics table and the histograms (spread_plot_metrics is applied).
std::string spread_report_html(const Spread& spread, const std::vector<std::string>& metrics);
std::string window_report_html(const FaultWindow& window, const Spread& spread, const std::vector<std::string>& metrics);
/// `metrics`: one plot per metric against the first swept parameter.
std::string sweep_report_html(const Sweep& sweep, const std::vector<std::string>& metrics);

}  // namespace linkrise::app
