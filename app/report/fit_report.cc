#include "app/report/fit_report.h"

#include <fmt/format.h>

#include "app/report/measured_plots.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {

ReportTable parameter_table(const FitResult& fit) {
  ReportTable table;
  table.id = "fit-parameters";
  table.caption = fmt::format("Estimates with standard errors and 95 % intervals (± t(0.975, {}) = {:.4f} standard "
                              "errors, from the covariance at the solution scaled by the residual variance)",
                              fit.degrees_of_freedom, fit.t_quantile);
  table.columns = {"parameter", "start", "bounds", "fitted", "standard error", "95 % interval"};
  table.numeric_columns = {1, 3, 4};
  for (const auto& p : fit.parameters) {
    const auto spread = netlist::shown_unit(p.dimension, p.absolute_temperature).difference();
    table.rows.push_back({p.path, fitted_display(p, p.start),
                          fmt::format("{} … {}", fitted_display(p, p.lower), fitted_display(p, p.upper)),
                          fitted_display(p, p.value) + (p.at_bound ? " (at a bound)" : ""),
                          spread.display(p.standard_error),
                          fmt::format("{} … {}", fitted_display(p, p.low95), fitted_display(p, p.high95))});
    table.row_tones.push_back(p.at_bound ? Tone::Fail : Tone::Plain);
  }
  return table;
}

ReportTable correlation_table(const FitResult& fit) {
  ReportTable table;
  table.id = "fit-correlation";
  table.caption = fmt::format("Correlation of the estimates; |r| > {} marks a pair the capture cannot tell apart",
                              kConfoundedCorrelation);
  table.columns = {"parameter"};
  for (const auto& p : fit.parameters) table.columns.push_back(p.path);
  for (std::size_t a = 0; a < fit.parameters.size(); ++a) {
    std::vector<std::string> row{fit.parameters[a].path};
    bool confounded = false;
    for (std::size_t b = 0; b < fit.parameters.size(); ++b) {
      row.push_back(fmt::format("{:+.3f}", fit.correlation[a][b]));
      table.numeric_columns.push_back(static_cast<int>(b) + 1);
      confounded = confounded || (a != b && std::fabs(fit.correlation[a][b]) > kConfoundedCorrelation);
    }
    table.rows.push_back(row);
    table.row_tones.push_back(confounded ? Tone::Fail : Tone::Plain);
  }
  return table;
}

}  // namespace

std::vector<MeasuredCurve> fit_curves(const FitResult& fit) {
  std::vector<MeasuredCurve> curves;
  for (const auto& signal : fit.signals) {
    MeasuredCurve curve;
    curve.name = signal.name;
    curve.unit = signal.unit;
    curve.measured_times = signal.measured.times;
    curve.measured = signal.measured.values;
    curve.simulated_times = signal.simulated.times;
    curve.simulated = signal.simulated.values;
    curve.residual_times = signal.residual.times;
    curve.residuals = signal.residual.values;
    curves.push_back(std::move(curve));
  }
  return curves;
}

std::string fit_report_html(const FitResult& fit) {
  HtmlReport report("Fit: " + fit.title, "Model fitted to a measured capture for " + fit.case_file);
  report.section("Result", "fit-result");
  report.facts({{"capture", fmt::format("{} ({} rows, {} signals, {} values; {} rows beside switching instants "
                                        "left out)", fit.capture_file, fit.rows, fit.signals.size(),
                                        fit.residual_count, fit.left_out_rows)},
                {"method", "weighted nonlinear least squares (Levenberg–Marquardt on the normal equations, GSL), "
                           "bounds by a logistic map, Jacobian by central differences"},
                {"stopped", fmt::format("{} after {} iterations ({} runs)", fit.stop_reason, fit.iterations,
                                        fit.simulations)},
                {"time offset", netlist::format_si(fit.time_offset, "s") + " (case time at the capture's zero)"}});
  report.table(parameter_table(fit));
  report.table(correlation_table(fit));
  std::vector<std::string> residuals;
  for (const auto& signal : fit.signals) {
    residuals.push_back(fmt::format("{}: residual RMS {} (weighted by σ = {})", signal.name,
                                    netlist::format_si(signal.residual_rms, signal.unit),
                                    netlist::format_si(signal.sigma, signal.unit)));
  }
  report.list(residuals);
  if (!fit.warnings.empty()) {
    report.section("Warnings", "fit-warnings");
    report.list(fit.warnings);
  }
  report.section("Measured and simulated", "fit-signals");
  report.note("The intervals assume the model is right and the noise independent from sample to sample; a "
              "residual with structure (a slope, a bump at an event) means the model misses something, and the "
              "intervals are then too narrow.");
  add_measured_plots(report, fit_curves(fit));
  report.safety_section();
  return report.html();
}

}  // namespace linkrise::app
