#include "app/report/measured_plots.h"

#include <fmt/format.h>

namespace linkrise::app {

std::vector<MeasuredCurve> measured_curves(const MeasuredCapture& measured, double offset) {
  std::vector<double> times = measured.capture.times;
  for (double& t : times) t += offset;
  std::vector<MeasuredCurve> curves;
  for (const auto& signal : measured.signals) {
    MeasuredCurve curve;
    curve.name = signal.name;
    curve.unit = signal.unit;
    curve.measured_times = times;
    curve.measured = measured.capture.columns[signal.capture_column].values;
    curves.push_back(std::move(curve));
  }
  return curves;
}

void add_measured_plots(HtmlReport& report, const std::vector<MeasuredCurve>& curves) {
  for (const auto& curve : curves) {
    PlotSpec plot;
    plot.title = curve.name + ": measured and simulated";
    plot.x_label = "time (case)";
    plot.x_unit = "s";
    plot.y_label = curve.name;
    plot.y_unit = curve.unit;
    plot.series.push_back(Series{"measured", curve.measured_times, curve.measured, "none", 1.0});
    plot.series.push_back(Series{"simulated", curve.simulated_times, curve.simulated, "6 3", 2.0});
    report.line_plot(std::move(plot), fmt::format("{}: the capture (thin) and the simulation (dashed)", curve.name));
    if (curve.residuals.empty()) continue;
    PlotSpec residual;
    residual.title = curve.name + ": residual";
    residual.x_label = "time (case)";
    residual.x_unit = "s";
    residual.y_label = "simulated − measured";
    residual.y_unit = curve.unit;
    residual.height = 240;
    const auto& times = curve.residual_times.empty() ? curve.measured_times : curve.residual_times;
    residual.series.push_back(Series{"residual", times, curve.residuals, "none", 1.0});
    residual.reference_lines.push_back(ReferenceLine{0.0, "0"});
    report.line_plot(std::move(residual),
                     fmt::format("{}: residual at the capture's times; structure in it is what the model misses",
                                 curve.name));
  }
}

}  // namespace linkrise::app
