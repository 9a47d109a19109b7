#pragma once
// `linkrise fit CASE.yaml`: the parameters of the case's `fit:` block estimated from the measured capture by
// weighted nonlinear least squares.
//
// Method. For parameter values p the case runs with the values written in (the same overrides as --set) and the
// solver reports every matched signal at the capture's times shifted by the time offset (case time = capture
// time + offset), from CVODE's dense output (solver::Options::output_times). Each residual is
// (simulated − measured)/σ of its signal (the fit block's noise, else the span of the measured signal).
// GSL's gsl_multilarge_nlinear (trust region, Levenberg–Marquardt on the normal equations, Cholesky) minimises
// the sum of squares in internal variables u with p = min + (max − min)/(1 + e^(−u)), so the bounds hold and
// parameters of any size are alike. The Jacobian is taken by central differences in p (one-sided at a bound),
// two runs per parameter; JᵀJ and Jᵀr are summed block by block of capture rows (a run per block, with output at
// those rows only), so neither J nor a run's output is ever held for the whole capture.
// At the solution: the covariance s²·(JᵀJ)⁻¹ with J in p and s² = Σr²/(n − m) (n residuals, m parameters),
// standard errors, 95 % intervals p ± t(0.975, n − m)·se, the correlation matrix; two parameters with
// |r| > kConfoundedCorrelation are reported as not told apart by the capture.
#include <cstddef>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "app/evaluation/measured_capture.h"
#include "netlist/overrides.h"
#include "netlist/units.h"

namespace linkrise::app {

/// Above this |correlation| two estimates are reported as not told apart: the data fix (nearly) only a
/// combination of them, as a voltage alone fixes only R·C of an RC charge.
inline constexpr double kConfoundedCorrelation = 0.95;

/// Capture rows per run: a run reports one block of the capture's rows (65536 rows of two signals: 2 MB), so the
/// fit never holds a run's output, or a Jacobian, for the whole capture.
inline constexpr std::size_t kFitBlockRows = 65536;

struct FitRequest {
  std::string case_file;
  std::vector<netlist::Override> settings;
  CaptureChoice capture;
  /// Where the fitted case will be written: its measured block then names the capture relative to that folder,
  /// so the fitted case finds it; empty: the path is kept as written.
  std::string fitted_case_folder;
  std::size_t block_rows = kFitBlockRows;  // the tests cut short captures into several blocks with it
};

struct FittedParameter {
  std::string path;
  netlist::Dimension dimension;
  bool absolute_temperature = false;
  double start = 0.0, lower = 0.0, upper = 0.0;
  double value = 0.0, standard_error = 0.0, low95 = 0.0, high95 = 0.0;  // SI
  bool at_bound = false;  // within 0.1 % of the bound range of a bound: the interval is not meaningful there
};

/// A curve thinned for a plot, in case time (SI values).
struct FitCurve {
  std::vector<double> times, values;
};

struct FittedSignal {
  std::string name, unit;
  double sigma = 0.0;          // its weight's scale, SI
  double residual_rms = 0.0;   // SI
  std::size_t capture_column = 0;
  // At the solution, thinned for the report's plots (peak-preserving, a few thousand points each): a capture of a
  // million rows is never held as a simulated copy.
  FitCurve measured, simulated, residual;  // residual: simulated − measured
};

struct FitResult {
  std::string case_file, title, capture_file;
  std::size_t rows = 0, residual_count = 0;
  std::size_t left_out_rows = 0;            // rows beside a switching instant, left out of the fit
  std::vector<FittedParameter> parameters;  // the time offset last, when estimated
  std::vector<std::vector<double>> correlation;
  std::vector<std::string> warnings;        // confounded pairs, parameters at a bound, a fit that stopped early
  std::vector<FittedSignal> signals;
  double time_offset = 0.0;                 // s, fitted or fixed
  double residual_variance = 0.0;           // s², of the weighted residuals
  double t_quantile = 0.0;                  // t(0.975, n − m)
  std::size_t degrees_of_freedom = 0;       // n − m: values used less parameters
  int iterations = 0;
  long simulations = 0;
  std::string stop_reason;
  std::string solver_failure;               // non-empty: the solver gave up at some point (exit 3)
  MeasuredCapture measured;                 // the capture and its matched signals
  std::string fitted_case;                  // the case file with the fitted values written in
};

/// The residual function of a fit, exposed for tests: simulated − measured over σ at parameter values p (SI,
/// in the order of the fit block, the time offset last) and its Jacobian by central differences.
class FitProblem {
 public:
  explicit FitProblem(const FitRequest& request);
  ~FitProblem();
  FitProblem(const FitProblem&) = delete;
  FitProblem& operator=(const FitProblem&) = delete;

  std::size_t parameter_count() const;
  std::size_t residual_count() const;
  const std::vector<FittedParameter>& parameters() const;
  /// The capture's times (s, capture time); residual i belongs to row i mod rows of signal i / rows.
  const std::vector<double>& capture_times() const;
  /// Residuals at p into `out` (residual_count() values, signal by signal); throws std::runtime_error with the
  /// solver's message when it gave up.
  void residuals(const std::vector<double>& p, double* out);
  /// d residual_i / d p_k by central differences (one-sided at a bound) into out[i·m + k], m parameters.
  void jacobian(const std::vector<double>& p, double* out);
  /// Jᵀ·w (m values) and JᵀJ (m × m, row-major) at p for w of residual_count() values (null: Jᵀ·w = 0), block
  /// by block: J is never held for more than one block of rows.
  void normal_equations(const std::vector<double>& p, const double* weights, double* jtw, double* jtj);
  /// J·d (residual_count() values) at p for d of m values, block by block.
  void jacobian_times(const std::vector<double>& p, const double* direction, double* out);

  struct Impl;
  Impl& impl() { return *impl_; }

 private:
  std::unique_ptr<Impl> impl_;
};

/// Runs the fit. Throws netlist::InputError for bad input (exit 2); a solver failure is in solver_failure.
FitResult run_fit(const FitRequest& request);

std::string fit_text(const FitResult& fit);
/// fit.json as text.
std::string fit_json(const FitResult& fit);
/// The value as a case file writes it ("1.234 mF" in SI) and as people read it.
std::string fitted_text(const FittedParameter& parameter, double value);
std::string fitted_display(const FittedParameter& parameter, double value);

}  // namespace linkrise::app
