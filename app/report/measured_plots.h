#pragma once
// Plots of measured signals beside their simulation: one plot per signal with both curves, and below it the
// residual (simulated − measured) when the curve carries one. Used by the fit report and by the run report
// of `linkrise run --measured`.
#include <vector>

#include "app/evaluation/measured_capture.h"
#include "app/report/report_html.h"

namespace linkrise::app {

/// One curve per matched signal with its measured side filled in, in case time (capture time + `offset`).
std::vector<MeasuredCurve> measured_curves(const MeasuredCapture& measured, double offset);

void add_measured_plots(HtmlReport& report, const std::vector<MeasuredCurve>& curves);

}  // namespace linkrise::app
