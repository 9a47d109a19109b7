#include "app/studies/fit.h"

#include <algorithm>
#include <cmath>
#include <exception>
#include <filesystem>
#include <functional>
#include <stdexcept>

#include <Eigen/Dense>
#include <fmt/format.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multilarge_nlinear.h>

#include "app/evaluation/case_run.h"
#include "app/output/decimation.h"
#include "app/output/json_fields.h"
#include "netlist/case_document.h"
#include "netlist/case_rewrite.h"
#include "solver/transient.h"

namespace linkrise::app {
namespace {
using netlist::InputError;

std::string error_display(const FittedParameter& parameter, double value);

constexpr double kDifferenceStep = 1e-3;  // of |p| (of the bound range for the time offset or p near 0)
constexpr double kStepTolerance = 1e-7;   // GSL's xtol on the internal variables
constexpr double kGradientTolerance = 1e-9;
constexpr int kPlotColumns = 2048;  // a plot is 720 px wide: thinned curves stay finer than any plot draws them

double logistic(double u) { return 1.0 / (1.0 + std::exp(-u)); }

}  // namespace

struct FitProblem::Impl {
  std::string case_file;
  std::string fitted_case_folder;
  bool capture_from_case = false;  // the measured block names the capture (not the command line)
  netlist::CaseDocument document;
  netlist::Case base;
  netlist::FitSpec spec;
  MeasuredCapture measured;
  std::vector<FittedParameter> parameters;
  std::vector<netlist::SourceMark> marks;
  bool offset_fitted = false;
  std::vector<int> columns;    // waveform columns of the matched signals
  std::vector<double> sigmas;  // per matched signal
  std::size_t rows = 0;
  long simulations = 0;
  std::size_t block_rows = 1;
  std::size_t left_out = 0;    // rows beside a switching instant in the last residuals() (their residuals are 0)
  std::vector<char> skip_low, skip_high;        // per row of one block: left out in a difference run
  std::vector<double> lower_block, upper_block;  // one block's residuals at either side of a difference

  explicit Impl(const FitRequest& request);
  double offset_at(const std::vector<double>& p) const {
    return offset_fitted ? p.back() : measured.time_offset;
  }
  std::vector<netlist::Override> overrides_at(const std::vector<double>& p) const {
    std::vector<netlist::Override> changes;
    for (std::size_t k = 0; k < parameters.size(); ++k) {
      if (parameters[k].path == "time_offset") continue;
      changes.push_back({parameters[k].path, fitted_text(parameters[k], p[k]), marks[k]});
    }
    return changes;
  }
  netlist::Case case_at(const std::vector<double>& p) const { return document.with(overrides_at(p)).validate(); }
  void residuals(const std::vector<double>& p, double* out);
  std::size_t residual_block(const netlist::Case& at, double offset, std::size_t first, std::size_t count,
                             double* out, std::size_t stride, std::vector<char>& skip);
  std::size_t mark_switching_rows(const std::vector<solver::TimelineEntry>& timeline, std::size_t first,
                                  std::size_t count, std::vector<char>& skip) const;
  std::size_t left_out_at(const std::vector<double>& p);
  struct Differences;
  Differences differences_at(const std::vector<double>& p) const;
  void jacobian_block(const Differences& sides, std::size_t first, std::size_t count, double* jac);
  void for_each_jacobian_block(const std::vector<double>& p,
                               const std::function<void(std::size_t first, std::size_t count, const double* jac)>& use);
  void check_parameters();
  void choose_weights();
};

FitProblem::Impl::Impl(const FitRequest& request)
    : case_file(request.case_file), fitted_case_folder(request.fitted_case_folder) {
  document = netlist::CaseDocument::load(request.case_file).with(request.settings);
  base = document.validate();
  if (!base.fit) {
    throw InputError(netlist::SourceMark{request.case_file, 1, 1}, "the case has no 'fit' block",
                     "add e.g. 'fit: {parameters: {link.capacitance: {start: 1 mF, min: 0.5 mF, max: 2 mF}}}' "
                     "(docs/fit.md)");
  }
  spec = *base.fit;
  capture_from_case = base.measured.has_value() && !request.capture.file;
  const CaseRun probe(base);  // the simulated columns, and a case that runs at its start values
  measured = load_measured(base, solver::waveform_headers(probe.circuit()), request.capture);
  rows = measured.capture.row_count();
  for (const auto& signal : measured.signals) columns.push_back(signal.waveform_column);
  check_parameters();
  choose_weights();
  block_rows = std::max<std::size_t>(request.block_rows, 1);
}

// Every fitted path must hold a quantity of its start's unit, and the run must cover the capture at any offset.
void FitProblem::Impl::check_parameters() {
  auto add = [&](const netlist::FitParameterSpec& given) {
    FittedParameter parameter;
    parameter.path = given.path;
    parameter.dimension = given.dimension;
    parameter.absolute_temperature = given.absolute_temperature;
    parameter.start = parameter.value = given.start;
    parameter.lower = given.lower;
    parameter.upper = given.upper;
    parameters.push_back(parameter);
    marks.push_back(given.mark);
  };
  for (const auto& given : spec.parameters) {
    auto written = document.quantity_at(given.path, given.mark);
    if (written && !written->bare && !(written->dimension == given.dimension)) {
      throw InputError(given.mark, fmt::format("'{}' is {} in the case, but its fit start is {}", given.path,
                                               written->dimension.describe(), given.dimension.describe()),
                       "give start, min and max in the parameter's unit");
    }
    add(given);
  }
  if (spec.time_offset) {
    add(*spec.time_offset);
    offset_fitted = true;
  }
  const std::size_t m = parameters.size();
  if (rows * columns.size() <= m) {
    throw InputError(netlist::SourceMark{measured.capture.file, measured.capture.first_data_line, 1},
                     fmt::format("the capture has {} values, too few to fit {} parameters", rows * columns.size(), m),
                     "a fit needs more measured values than parameters; capture more samples");
  }
  const double latest = measured.capture.times.back() +
                        (offset_fitted ? spec.time_offset->upper : measured.time_offset);
  if (base.run.follows_sequence()) {
    // The simulated rows are taken at the capture's times, so the run must reach its last sample whatever the
    // sequence does.
    throw InputError(base.run.marks.duration, "a fit needs a run of fixed duration, not 'duration: sequence'",
                     fmt::format("write 'duration: {}' or longer, to cover the capture",
                                 netlist::format_si(latest, "s")));
  }
  if (latest > base.run.duration) {
    throw InputError(base.run.marks.duration,
                     fmt::format("the run ends at {} s, before the capture's last sample ({} s in case time)",
                                 base.run.duration, latest),
                     fmt::format("lengthen 'run: duration' to at least {}", netlist::format_si(latest, "s")));
  }
  // The fitted case carries the fitted values in place: fail now, not after the fit, when one is not written.
  netlist::rewrite_case_values(case_file, overrides_at(std::vector<double>(m, 0.0)), "");
}

void FitProblem::Impl::choose_weights() {
  for (const auto& signal : measured.signals) {
    const auto& values = measured.capture.columns[signal.capture_column].values;
    double sigma = 0.0;
    for (const auto& noise : spec.noise) {
      if (noise.signal != signal.name) continue;
      sigma = noise.sigma.value;
    }
    if (sigma == 0.0) {
      auto [low, high] = std::minmax_element(values.begin(), values.end());
      sigma = *high > *low ? *high - *low : 1.0;
    }
    sigmas.push_back(sigma);
  }
  for (const auto& noise : spec.noise) {
    auto found = std::find_if(measured.signals.begin(), measured.signals.end(),
                              [&](const MatchedSignal& s) { return s.name == noise.signal; });
    if (found == measured.signals.end()) {
      throw InputError(noise.mark, fmt::format("the noise entry '{}' names no fitted signal", noise.signal),
                       "name a signal the capture measures");
    }
    std::string problem;
    auto unit = netlist::parse_quantity("1 " + found->unit, problem);
    if (unit && !(noise.sigma.dimension == unit->dimension)) {
      throw InputError(noise.mark, fmt::format("the noise of '{}' is {}, not in {}", noise.signal,
                                               noise.sigma.dimension.describe(), found->unit),
                       "give the noise in the signal's unit");
    }
  }
}

// The residuals at p, block by block: each block of rows is one run of the whole case with output at those rows'
// times only, so no run holds more than a block of simulated values.
void FitProblem::Impl::residuals(const std::vector<double>& p, double* out) {
  const netlist::Case at = case_at(p);
  const double offset = offset_at(p);
  std::vector<char> skip;
  left_out = 0;
  ++simulations;  // a run over all rows, made in blocks
  for (std::size_t first = 0; first < rows; first += block_rows) {
    left_out += residual_block(at, offset, first, std::min(block_rows, rows - first), out + first, rows, skip);
  }
}

// One run of the case `at` with output at the capture rows [first, first + count) (shifted by the offset, held at
// the run's ends): residual r of signal s into out[s·stride + r]. A run always covers the whole duration, so its
// steps, and the values at a row, do not depend on how the rows are cut into blocks. Returns the rows left out.
std::size_t FitProblem::Impl::residual_block(const netlist::Case& at, double offset, std::size_t first,
                                             std::size_t count, double* out, std::size_t stride,
                                             std::vector<char>& skip) {
  std::vector<double> times(count);
  for (std::size_t r = 0; r < count; ++r) {
    times[r] = std::clamp(measured.capture.times[first + r] + offset, 0.0, at.run.duration);
  }
  const CaseRun run(at, [&](solver::Options& options) {
    options.sample.reset();
    options.output_times = std::move(times);
    options.output_columns = columns;
  });
  if (run.solver_failed()) throw std::runtime_error(run.result().message);
  const solver::Waveform& samples = run.result().samples;
  if (samples.row_count() == 0) throw std::runtime_error("the run recorded no output at the capture's times");
  const std::size_t left = mark_switching_rows(run.result().timeline, first, count, skip);
  for (std::size_t s = 0; s < columns.size(); ++s) {
    const auto& values = measured.capture.columns[measured.signals[s].capture_column].values;
    for (std::size_t r = 0; r < count; ++r) {
      // A run the sequence ended early holds its last value.
      const double simulated = samples.value(std::min(r, samples.row_count() - 1), static_cast<int>(s));
      out[s * stride + r] = skip[r] ? 0.0 : (simulated - values[first + r]) / sigmas[s];
    }
  }
  return left;
}

// At a switching instant an ideal switch makes the simulated value jump: a row beside it changes by the whole
// jump when the instant moves past it, which no derivative can follow, and a fit would stall with a row on the
// wrong side. So the rows the instant can reach over the time offset's bounds, and one more on either side,
// count as zero (left out); the rows after it fix the offset. For scheduled events the set is the same in every
// run, so the sum of squares stays smooth in the parameters. Marks the rows [first, first + count) in `skip`.
std::size_t FitProblem::Impl::mark_switching_rows(const std::vector<solver::TimelineEntry>& timeline,
                                                  std::size_t first, std::size_t count,
                                                  std::vector<char>& skip) const {
  const double earliest = offset_fitted ? spec.time_offset->lower : measured.time_offset;
  const double latest = offset_fitted ? spec.time_offset->upper : measured.time_offset;
  skip.assign(count, 0);
  const auto& times = measured.capture.times;
  for (const auto& entry : timeline) {
    auto low = static_cast<std::size_t>(std::lower_bound(times.begin(), times.end(), entry.time - latest) -
                                        times.begin());
    const auto high = static_cast<std::size_t>(
        std::upper_bound(times.begin(), times.end(), entry.time - earliest) - times.begin());
    if (low > 0) --low;
    for (std::size_t r = std::max(low, first); r <= high && r < first + count; ++r) skip[r - first] = 1;
  }
  return static_cast<std::size_t>(std::count(skip.begin(), skip.end(), char{1}));
}

// The rows left out at p, from one run's timeline (a run without output rows).
std::size_t FitProblem::Impl::left_out_at(const std::vector<double>& p) {
  const CaseRun run(case_at(p), [&](solver::Options& options) {
    options.sample.reset();
    options.output_columns = columns;
  });
  ++simulations;
  if (run.solver_failed()) throw std::runtime_error(run.result().message);
  std::vector<char> skip;
  std::size_t left = 0;
  for (std::size_t first = 0; first < rows; first += block_rows) {
    left += mark_switching_rows(run.result().timeline, first, std::min(block_rows, rows - first), skip);
  }
  return left;
}

// The two sides of every parameter's central difference (one-sided at a bound): validated once per Jacobian,
// run once per block.
struct FitProblem::Impl::Differences {
  std::vector<netlist::Case> low, high;
  std::vector<double> low_offset, high_offset, width;
};

FitProblem::Impl::Differences FitProblem::Impl::differences_at(const std::vector<double>& p) const {
  Differences sides;
  for (std::size_t k = 0; k < p.size(); ++k) {
    const FittedParameter& parameter = parameters[k];
    const double range = parameter.upper - parameter.lower;
    const bool offset = parameter.path == "time_offset";
    const double step = kDifferenceStep * (offset ? range : std::max(std::fabs(p[k]), 1e-3 * range));
    std::vector<double> low = p, high = p;
    low[k] = std::max(parameter.lower, p[k] - step);
    high[k] = std::min(parameter.upper, p[k] + step);
    sides.low.push_back(case_at(low));
    sides.high.push_back(case_at(high));
    sides.low_offset.push_back(offset_at(low));
    sides.high_offset.push_back(offset_at(high));
    sides.width.push_back(high[k] - low[k]);
  }
  return sides;
}

// d residual / d p_k of the rows [first, first + count) into jac[(s·count + r)·m + k], two runs per parameter.
void FitProblem::Impl::jacobian_block(const Differences& sides, std::size_t first, std::size_t count, double* jac) {
  const std::size_t m = parameters.size(), signals = columns.size();
  lower_block.resize(signals * count);
  upper_block.resize(signals * count);
  for (std::size_t k = 0; k < m; ++k) {
    residual_block(sides.low[k], sides.low_offset[k], first, count, lower_block.data(), count, skip_low);
    residual_block(sides.high[k], sides.high_offset[k], first, count, upper_block.data(), count, skip_high);
    for (std::size_t i = 0; i < signals * count; ++i) {
      // A row left out at either end has no difference to take (its residual is 0 only at one of them).
      const bool left = skip_low[i % count] || skip_high[i % count];
      jac[i * m + k] = left ? 0.0 : (upper_block[i] - lower_block[i]) / sides.width[k];
    }
  }
}

// The Jacobian at p one block of rows at a time: `use` sees each block's rows and forgets them.
void FitProblem::Impl::for_each_jacobian_block(
    const std::vector<double>& p, const std::function<void(std::size_t, std::size_t, const double*)>& use) {
  const Differences sides = differences_at(p);
  simulations += 2 * static_cast<long>(p.size());
  std::vector<double> jac;
  for (std::size_t first = 0; first < rows; first += block_rows) {
    const std::size_t count = std::min(block_rows, rows - first);
    jac.assign(columns.size() * count * p.size(), 0.0);
    jacobian_block(sides, first, count, jac.data());
    use(first, count, jac.data());
  }
}

FitProblem::FitProblem(const FitRequest& request) : impl_(std::make_unique<Impl>(request)) {}
FitProblem::~FitProblem() = default;
std::size_t FitProblem::parameter_count() const { return impl_->parameters.size(); }
std::size_t FitProblem::residual_count() const { return impl_->rows * impl_->columns.size(); }
const std::vector<FittedParameter>& FitProblem::parameters() const { return impl_->parameters; }
const std::vector<double>& FitProblem::capture_times() const { return impl_->measured.capture.times; }
void FitProblem::residuals(const std::vector<double>& p, double* out) { impl_->residuals(p, out); }

void FitProblem::jacobian(const std::vector<double>& p, double* out) {
  const std::size_t m = p.size(), rows = impl_->rows;
  impl_->for_each_jacobian_block(p, [&](std::size_t first, std::size_t count, const double* jac) {
    for (std::size_t s = 0; s < impl_->columns.size(); ++s) {
      std::copy(jac + s * count * m, jac + (s + 1) * count * m, out + (s * rows + first) * m);
    }
  });
}

void FitProblem::normal_equations(const std::vector<double>& p, const double* weights, double* jtw, double* jtj) {
  const std::size_t m = p.size(), rows = impl_->rows;
  std::fill(jtw, jtw + m, 0.0);
  std::fill(jtj, jtj + m * m, 0.0);
  impl_->for_each_jacobian_block(p, [&](std::size_t first, std::size_t count, const double* jac) {
    for (std::size_t s = 0; s < impl_->columns.size(); ++s) {
      for (std::size_t r = 0; r < count; ++r) {
        const double* row = jac + (s * count + r) * m;
        const double w = weights != nullptr ? weights[s * rows + first + r] : 0.0;
        for (std::size_t a = 0; a < m; ++a) {
          jtw[a] += row[a] * w;
          for (std::size_t b = 0; b <= a; ++b) jtj[a * m + b] += row[a] * row[b];
        }
      }
    }
  });
  for (std::size_t a = 0; a < m; ++a) {
    for (std::size_t b = 0; b < a; ++b) jtj[b * m + a] = jtj[a * m + b];
  }
}

void FitProblem::jacobian_times(const std::vector<double>& p, const double* direction, double* out) {
  const std::size_t m = p.size(), rows = impl_->rows;
  impl_->for_each_jacobian_block(p, [&](std::size_t first, std::size_t count, const double* jac) {
    for (std::size_t s = 0; s < impl_->columns.size(); ++s) {
      for (std::size_t r = 0; r < count; ++r) {
        const double* row = jac + (s * count + r) * m;
        double sum = 0.0;
        for (std::size_t k = 0; k < m; ++k) sum += row[k] * direction[k];
        out[s * rows + first + r] = sum;
      }
    }
  });
}

namespace {

// What the GSL callbacks need: the problem, the bounds transform, and the first exception thrown inside (a C
// library must not be unwound through).
struct Callbacks {
  FitProblem* problem = nullptr;
  std::exception_ptr failure;

  std::vector<double> parameters_of(const gsl_vector* u) const {
    const auto& given = problem->parameters();
    std::vector<double> p(given.size());
    for (std::size_t k = 0; k < p.size(); ++k) {
      p[k] = given[k].lower + (given[k].upper - given[k].lower) * logistic(gsl_vector_get(u, k));
    }
    return p;
  }
  // dp/du of the transform.
  double slope(const gsl_vector* u, std::size_t k) const {
    const auto& given = problem->parameters()[k];
    const double s = logistic(gsl_vector_get(u, k));
    return (given.upper - given.lower) * s * (1.0 - s);
  }
};

int residual_callback(const gsl_vector* u, void* data, gsl_vector* f) {
  auto* c = static_cast<Callbacks*>(data);
  try {
    if (f->stride != 1) throw std::logic_error("the residual vector is not contiguous");
    c->problem->residuals(c->parameters_of(u), f->data);
    return GSL_SUCCESS;
  } catch (...) {
    if (!c->failure) c->failure = std::current_exception();
    return GSL_EBADFUNC;
  }
}

// GSL's large-problem interface never asks for J itself: with CblasTrans it wants Jᵀ·w (p values) and JᵀJ,
// with CblasNoTrans J·d (n values). The problem gives them in p; J in u is J in p times dp/du column by column.
int normal_callback(CBLAS_TRANSPOSE_t transpose, const gsl_vector* u, const gsl_vector* in, void* data,
                    gsl_vector* out, gsl_matrix* normal) {
  auto* c = static_cast<Callbacks*>(data);
  try {
    const std::vector<double> p = c->parameters_of(u);
    const std::size_t m = p.size();
    std::vector<double> slopes(m);
    for (std::size_t k = 0; k < m; ++k) slopes[k] = c->slope(u, k);
    if (transpose == CblasNoTrans) {
      if (in->stride != 1 || out->stride != 1) throw std::logic_error("the vectors are not contiguous");
      std::vector<double> direction(m);
      for (std::size_t k = 0; k < m; ++k) direction[k] = slopes[k] * gsl_vector_get(in, k);
      c->problem->jacobian_times(p, direction.data(), out->data);
      return GSL_SUCCESS;
    }
    if (in != nullptr && in->stride != 1) throw std::logic_error("the residual vector is not contiguous");
    std::vector<double> jtw(m), jtj(m * m);
    c->problem->normal_equations(p, in != nullptr ? in->data : nullptr, jtw.data(), jtj.data());
    for (std::size_t a = 0; a < m; ++a) {
      if (out != nullptr) gsl_vector_set(out, a, slopes[a] * jtw[a]);
      for (std::size_t b = 0; b < m && normal != nullptr; ++b) {
        gsl_matrix_set(normal, a, b, slopes[a] * slopes[b] * jtj[a * m + b]);
      }
    }
    return GSL_SUCCESS;
  } catch (...) {
    if (!c->failure) c->failure = std::current_exception();
    return GSL_EBADFUNC;
  }
}

std::string stop_reason(int status, int info) {
  if (status == GSL_SUCCESS) {
    return info == 2 ? "converged: the gradient vanished" : "converged: the step became negligible";
  }
  if (status == GSL_EMAXITER) return "stopped: the iteration limit was reached before convergence";
  if (status == GSL_ENOPROG) return "converged to within the simulation's accuracy: no step improved the fit";
  return fmt::format("stopped: {}", gsl_strerror(status));
}

// Covariance in p from JᵀJ in u (column k of J_p is column k of J_u over dp_k/du_k), scaled by s²; a
// pseudo-inverse, so parameters the data cannot separate give large, not infinite, errors.
Eigen::MatrixXd covariance(const gsl_matrix* normal_in_u, const std::vector<double>& slopes, double variance) {
  const std::size_t m = normal_in_u->size1;
  Eigen::MatrixXd normal(static_cast<Eigen::Index>(m), static_cast<Eigen::Index>(m));
  for (std::size_t a = 0; a < m; ++a) {
    for (std::size_t b = 0; b <= a; ++b) {
      normal(a, b) = normal(b, a) = gsl_matrix_get(normal_in_u, a, b) / (slopes[a] * slopes[b]);
    }
  }
  Eigen::VectorXd scale(static_cast<Eigen::Index>(m));
  for (std::size_t a = 0; a < m; ++a) scale(a) = normal(a, a) > 0.0 ? 1.0 / std::sqrt(normal(a, a)) : 1.0;
  const Eigen::MatrixXd scaled = scale.asDiagonal() * normal * scale.asDiagonal();
  const Eigen::MatrixXd inverse = scaled.completeOrthogonalDecomposition().pseudoInverse();
  return variance * (scale.asDiagonal() * inverse * scale.asDiagonal());
}

void summarise(FitResult& fit, const Eigen::MatrixXd& cov) {
  const std::size_t m = fit.parameters.size();
  fit.correlation.assign(m, std::vector<double>(m, 0.0));
  for (std::size_t a = 0; a < m; ++a) {
    auto& p = fit.parameters[a];
    p.standard_error = std::sqrt(std::max(cov(a, a), 0.0));
    p.low95 = p.value - fit.t_quantile * p.standard_error;
    p.high95 = p.value + fit.t_quantile * p.standard_error;
    const double margin = 1e-3 * (p.upper - p.lower);
    p.at_bound = p.value - p.lower < margin || p.upper - p.value < margin;
    if (p.at_bound) {
      fit.warnings.push_back(fmt::format("{} ended at a bound ({}): widen its bounds; its interval is not meaningful",
                                         p.path, fitted_display(p, p.value)));
    }
    for (std::size_t b = 0; b < m; ++b) {
      const double d = std::sqrt(std::max(cov(a, a), 0.0) * std::max(cov(b, b), 0.0));
      fit.correlation[a][b] = d > 0.0 ? cov(a, b) / d : (a == b ? 1.0 : 0.0);
    }
  }
  for (std::size_t a = 0; a < m; ++a) {
    for (std::size_t b = a + 1; b < m; ++b) {
      if (std::fabs(fit.correlation[a][b]) <= kConfoundedCorrelation) continue;
      fit.warnings.push_back(fmt::format(
          "{} and {} cannot be told apart (correlation {:+.3f}): the capture fixes only a combination of them; "
          "measure another signal (e.g. a current) or hold one of them at a known value",
          fit.parameters[a].path, fit.parameters[b].path, fit.correlation[a][b]));
    }
  }
}

}  // namespace

// The case file with the fitted values written in place, and a heading that says where they came from.
std::string fitted_case_text(const FitResult& fit, const FitProblem::Impl& impl) {
  std::vector<double> values;
  for (const auto& parameter : fit.parameters) values.push_back(parameter.value);
  std::vector<netlist::Override> changes = impl.overrides_at(values);
  const netlist::SourceMark mark{impl.case_file, 1, 1};
  if (impl.offset_fitted && impl.document.quantity_at("measured.time_offset", mark)) {
    changes.push_back({"measured.time_offset", netlist::quantity_text(fit.time_offset, netlist::Dimension::time(),
                                                                       false), mark});
  }
  if (impl.capture_from_case && !impl.fitted_case_folder.empty()) {
    const auto capture = std::filesystem::absolute(impl.measured.capture.file);
    const auto folder = std::filesystem::absolute(impl.fitted_case_folder);
    changes.push_back({"measured.file", fmt::format("\"{}\"", capture.lexically_relative(folder).generic_string()),
                       mark});
  }
  std::string heading = fmt::format("# Fitted by linkrise fit from {} and the capture {} ({} rows).\n", fit.case_file,
                                    impl.measured.capture.file, fit.rows);
  for (const auto& parameter : fit.parameters) {
    heading += fmt::format("# {}: {} ± {} (95 %: {} … {}), started at {}\n", parameter.path,
                           fitted_display(parameter, parameter.value),
                           error_display(parameter, parameter.standard_error),
                           fitted_display(parameter, parameter.low95), fitted_display(parameter, parameter.high95),
                           fitted_display(parameter, parameter.start));
  }
  if (!impl.offset_fitted) {
    heading += fmt::format("# time offset held at {}\n", netlist::format_si(fit.time_offset, "s"));
  }
  return netlist::rewrite_case_values(impl.case_file, changes, heading);
}

namespace {

// GSL's trust-region solver for large problems (Levenberg–Marquardt on the normal equations, Cholesky) over the
// problem in the internal variables: it keeps the residual vector and a trial one, and JᵀJ (m × m), never J; the
// workspace is freed on every path.
class TrustRegion {
 public:
  TrustRegion(Callbacks& callbacks, std::size_t n, std::size_t m) : u_(gsl_vector_alloc(m)) {
    fdf_.f = residual_callback;
    fdf_.df = normal_callback;
    fdf_.fvv = nullptr;
    fdf_.n = n;
    fdf_.p = m;
    fdf_.params = &callbacks;
    gsl_multilarge_nlinear_parameters settings = gsl_multilarge_nlinear_default_parameters();
    settings.trs = gsl_multilarge_nlinear_trs_lm;
    settings.solver = gsl_multilarge_nlinear_solver_cholesky;
    work_ = gsl_multilarge_nlinear_alloc(gsl_multilarge_nlinear_trust, &settings, n, m);
    for (std::size_t k = 0; k < m; ++k) {
      const auto& p = callbacks.problem->parameters()[k];
      const double s = (p.start - p.lower) / (p.upper - p.lower);
      gsl_vector_set(u_, k, std::log(s / (1.0 - s)));
    }
  }
  ~TrustRegion() {
    gsl_vector_free(u_);
    gsl_multilarge_nlinear_free(work_);
  }
  TrustRegion(const TrustRegion&) = delete;
  TrustRegion& operator=(const TrustRegion&) = delete;

  /// GSL's status; `info` says which test stopped a converged run (1 step, 2 gradient).
  int solve(std::size_t iterations, int& info) {
    gsl_error_handler_t* previous = gsl_set_error_handler_off();
    int status = gsl_multilarge_nlinear_init(u_, &fdf_, work_);
    if (status == GSL_SUCCESS) {
      status = gsl_multilarge_nlinear_driver(iterations, kStepTolerance, kGradientTolerance, 0.0, nullptr, nullptr,
                                             &info, work_);
    }
    gsl_set_error_handler(previous);
    return status;
  }
  const gsl_multilarge_nlinear_workspace* work() const { return work_; }

 private:
  gsl_multilarge_nlinear_fdf fdf_{};
  gsl_vector* u_;
  gsl_multilarge_nlinear_workspace* work_ = nullptr;
};

// Fitted values, rows left out, residual variance, t quantile, covariance and correlation at the solution.
void take_solution(FitResult& fit, FitProblem::Impl& impl, const Callbacks& callbacks, const TrustRegion& region) {
  const gsl_vector* position = gsl_multilarge_nlinear_position(region.work());
  const gsl_vector* residual = gsl_multilarge_nlinear_residual(region.work());
  const std::size_t n = residual->size, m = fit.parameters.size();
  const std::vector<double> p = callbacks.parameters_of(position);
  std::vector<double> slopes(m);
  for (std::size_t k = 0; k < m; ++k) {
    fit.parameters[k].value = p[k];
    slopes[k] = callbacks.slope(position, k);
  }
  fit.left_out_rows = impl.left_out_at(p);  // which rows are left out at the solution itself
  fit.time_offset = impl.offset_at(p);
  double sum = 0.0;
  for (std::size_t i = 0; i < n; ++i) sum += gsl_vector_get(residual, i) * gsl_vector_get(residual, i);
  const std::size_t used = n - fit.left_out_rows * impl.columns.size();
  if (used <= m) {
    throw InputError(netlist::SourceMark{impl.measured.capture.file, impl.measured.capture.first_data_line, 1},
                     "too few values remain beside the switching instants to fit the parameters",
                     "capture more samples");
  }
  fit.degrees_of_freedom = used - m;
  fit.residual_variance = sum / static_cast<double>(used - m);
  fit.t_quantile = gsl_cdf_tdist_Pinv(0.975, static_cast<double>(used - m));
  summarise(fit, covariance(region.work()->JTJ, slopes, fit.residual_variance));
}

// A series at the capture's rows, value(r) at row r, thinned for a plot (peak-preserving: each of kPlotColumns
// columns of the whole capture keeps its first, lowest, highest and last sample), in case time. Thinned block by
// block, so no series of the capture's length is made (a column that straddles two blocks keeps up to eight).
FitCurve thinned(const std::vector<double>& times, const std::function<double(std::size_t)>& value, double offset,
                 std::size_t block_rows) {
  FitCurve curve;
  std::vector<double> x, y;
  for (std::size_t first = 0; first < times.size(); first += block_rows) {
    const std::size_t count = std::min(block_rows, times.size() - first);
    x.assign(times.begin() + static_cast<std::ptrdiff_t>(first),
             times.begin() + static_cast<std::ptrdiff_t>(first + count));
    y.resize(count);
    for (std::size_t r = 0; r < count; ++r) y[r] = value(first + r);
    for (const Point& point : decimate_min_max(x, y, times.front(), times.back(), kPlotColumns)) {
      curve.times.push_back(point.x + offset);
      curve.values.push_back(point.y);
    }
  }
  return curve;
}

// Per signal: the residual RMS over the rows used, and for the report the measured curve, the simulated one at
// the solution (measured + σ·residual) and their difference, thinned.
void take_signals(FitResult& fit, const FitProblem::Impl& impl, const gsl_vector* residual) {
  const double used_rows = static_cast<double>(impl.rows - fit.left_out_rows);
  const auto& times = impl.measured.capture.times;
  for (std::size_t s = 0; s < impl.columns.size(); ++s) {
    FittedSignal signal;
    signal.name = impl.measured.signals[s].name;
    signal.unit = impl.measured.signals[s].unit;
    signal.sigma = impl.sigmas[s];
    signal.capture_column = impl.measured.signals[s].capture_column;
    const auto& values = impl.measured.capture.columns[signal.capture_column].values;
    double squares = 0.0;
    for (std::size_t r = 0; r < impl.rows; ++r) {
      const double scaled = gsl_vector_get(residual, s * impl.rows + r);
      squares += scaled * scaled;
    }
    signal.residual_rms = signal.sigma * std::sqrt(squares / used_rows);
    const auto simulated = [&](std::size_t r) {
      return values[r] + gsl_vector_get(residual, s * impl.rows + r) * signal.sigma;
    };
    signal.measured = thinned(times, [&](std::size_t r) { return values[r]; }, fit.time_offset, impl.block_rows);
    signal.simulated = thinned(times, simulated, fit.time_offset, impl.block_rows);
    signal.residual = thinned(times, [&](std::size_t r) { return simulated(r) - values[r]; }, fit.time_offset,
                              impl.block_rows);
    fit.signals.push_back(std::move(signal));
  }
}

}  // namespace

FitResult run_fit(const FitRequest& request) {
  FitProblem problem(request);
  FitProblem::Impl& impl = problem.impl();
  FitResult fit;
  fit.case_file = request.case_file;
  fit.title = impl.base.title;
  fit.parameters = problem.parameters();
  fit.rows = impl.rows;
  fit.residual_count = problem.residual_count();
  fit.capture_file = impl.measured.capture.file;

  Callbacks callbacks{&problem, nullptr};
  TrustRegion region(callbacks, problem.residual_count(), problem.parameter_count());
  int info = 0;
  const int status = region.solve(static_cast<std::size_t>(impl.spec.iterations), info);
  fit.simulations = impl.simulations;
  if (callbacks.failure) {
    try {
      std::rethrow_exception(callbacks.failure);
    } catch (const InputError&) {
      throw;
    } catch (const std::exception& error) {
      fit.solver_failure = error.what();
      return fit;
    }
  }
  fit.iterations = static_cast<int>(gsl_multilarge_nlinear_niter(region.work()));
  fit.stop_reason = stop_reason(status, info);
  if (status == GSL_EMAXITER) fit.warnings.push_back("the fit " + fit.stop_reason + "; raise fit: iterations");
  take_solution(fit, impl, callbacks, region);
  take_signals(fit, impl, gsl_multilarge_nlinear_residual(region.work()));
  fit.simulations = impl.simulations;
  fit.fitted_case = fitted_case_text(fit, impl);
  fit.measured = std::move(impl.measured);
  return fit;
}

namespace {

std::string error_display(const FittedParameter& parameter, double value) {
  return netlist::shown_unit(parameter.dimension, parameter.absolute_temperature).difference().display(value);
}

std::string correlation_table(const FitResult& fit) {
  std::string out = "  correlation of the estimates:\n";
  for (std::size_t a = 0; a < fit.parameters.size(); ++a) {
    out += fmt::format("    [{}] {:<28}", a + 1, fit.parameters[a].path);
    for (std::size_t b = 0; b <= a; ++b) out += fmt::format(" {:+7.3f}", fit.correlation[a][b]);
    out += "\n";
  }
  return out;
}

}  // namespace

std::string fit_text(const FitResult& fit) {
  std::string out = fmt::format("fit of {} ({})\n  capture {}: {} rows, {} signals, {} values\n", fit.title,
                                fit.case_file, fit.capture_file, fit.rows, fit.signals.size(), fit.residual_count);
  if (!fit.solver_failure.empty()) return out + "  the solver gave up: " + fit.solver_failure + "\n";
  out += fmt::format("  {} after {} iterations ({} runs); {} rows beside switching instants left out\n\n",
                     fit.stop_reason, fit.iterations, fit.simulations, fit.left_out_rows);
  out += fmt::format("  {:<28} {:>12} {:>12} {:>12}   {}\n", "parameter", "start", "fitted", "std error",
                     "95 % interval");
  for (const auto& p : fit.parameters) {
    out += fmt::format("  {:<28} {:>12} {:>12} {:>12}   {} … {}{}\n", p.path, fitted_display(p, p.start),
                       fitted_display(p, p.value), error_display(p, p.standard_error), fitted_display(p, p.low95),
                       fitted_display(p, p.high95), p.at_bound ? "  (at a bound)" : "");
  }
  out += "\n" + correlation_table(fit);
  out += "  residual RMS per signal:\n";
  for (const auto& signal : fit.signals) {
    out += fmt::format("    {:<28} {:>12}   (weight: 1/σ² with σ = {})\n", signal.name,
                       netlist::format_si(signal.residual_rms, signal.unit), netlist::format_si(signal.sigma, signal.unit));
  }
  if (fit.parameters.empty() || fit.parameters.back().path != "time_offset") {
    out += fmt::format("  time offset held at {}\n", netlist::format_si(fit.time_offset, "s"));
  }
  for (const auto& warning : fit.warnings) out += "  warning: " + warning + "\n";
  return out;
}

std::string fit_json(const FitResult& fit) {
  nlohmann::json parameters = nlohmann::json::array();
  for (const auto& p : fit.parameters) {
    const std::string unit = netlist::shown_unit(p.dimension, p.absolute_temperature).symbol;
    const auto shown = netlist::shown_unit(p.dimension, p.absolute_temperature);
    const auto spread = shown.difference();
    parameters.push_back({{"path", p.path},
                          {"start", quantity(shown.shown(p.start), unit)},
                          {"min", quantity(shown.shown(p.lower), unit)},
                          {"max", quantity(shown.shown(p.upper), unit)},
                          {"value", quantity(shown.shown(p.value), unit)},
                          {"standard_error", quantity(spread.shown(p.standard_error), spread.symbol)},
                          {"interval_95", {{"low", quantity(shown.shown(p.low95), unit)},
                                           {"high", quantity(shown.shown(p.high95), unit)}}},
                          {"at_bound", p.at_bound}});
  }
  nlohmann::json signals = nlohmann::json::array();
  for (const auto& signal : fit.signals) {
    signals.push_back({{"name", signal.name},
                       {"residual_rms", quantity(signal.residual_rms, signal.unit)},
                       {"sigma", quantity(signal.sigma, signal.unit)}});
  }
  nlohmann::json fields = {{"capture", {{"file", fit.capture_file}, {"rows", fit.rows}}},
                           {"values", fit.residual_count},
                           {"rows_left_out", fit.left_out_rows},
                           {"parameters", parameters},
                           {"correlation", fit.correlation},
                           {"confounded_threshold", kConfoundedCorrelation},
                           {"signals", signals},
                           {"time_offset", quantity(fit.time_offset, "s")},
                           {"residual_variance", quantity(fit.residual_variance, "1")},
                           {"t_quantile_975", fit.t_quantile},
                           {"iterations", fit.iterations},
                           {"runs", fit.simulations},
                           {"stop_reason", fit.stop_reason},
                           {"warnings", fit.warnings}};
  if (!fit.solver_failure.empty()) fields["solver_failure"] = fit.solver_failure;
  return json_text(with_file_head(fields, fit.title, fit.case_file));
}

std::string fitted_text(const FittedParameter& parameter, double value) {
  return netlist::quantity_text(value, parameter.dimension, parameter.absolute_temperature);
}

std::string fitted_display(const FittedParameter& parameter, double value) {
  return netlist::shown_unit(parameter.dimension, parameter.absolute_temperature).display(value);
}

}  // namespace linkrise::app
