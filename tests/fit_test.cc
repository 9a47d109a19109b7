// `linkrise fit` against synthetic captures made here from closed forms, with a known time offset, Gaussian
// noise from GSL's Mersenne Twister with a fixed seed, and an oscilloscope-like header:
//  - an RC charge, v = V·(1 − e^(−t/RC)), i = (V/R)·e^(−t/RC) [R-RC-charge];
//  - a series RLC step, vC and i of the underdamped case [R-RLC-step].
// A fit's 95 % interval covers the true value (a fixed seed makes each check deterministic; the coverage test
// counts hits over twenty seeds), the width doubles with the noise, and a voltage alone reports R and C as
// correlated. The Jacobian by central differences [R-central-differences] matches the closed form's derivatives.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <functional>
#include <string>
#include <utility>

#include <fmt/format.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <spawn.h>
#include <sys/resource.h>
#include <sys/wait.h>

#include "app/studies/fit.h"
#include "netlist/input_error.h"

extern char** environ;

namespace {
using linkrise::app::FitProblem;
using linkrise::app::FitRequest;
using linkrise::app::FitResult;
using linkrise::app::run_fit;

std::string temp_path(const std::string& name) { return (std::filesystem::path(testing::TempDir()) / name).string(); }

// The true circuit of the RC captures: 400 V, 100 Ohm, 1 mF (τ = 100 ms); the pre-charge contactor closes at
// 1 ms case time, and the scope's zero sits 0.2 ms before case time 0.2 ms (case time = capture time + 0.2 ms).
constexpr double kV = 400.0, kR = 100.0, kC = 1e-3, kClose = 1e-3, kOffset = 0.2e-3;

// Signal values at capture time t, and their noise.
struct Channel {
  std::string header;
  std::function<double(double)> value;
  double sigma = 0.0;
};

// A scope-like export: metadata lines, the header, rows at uneven times from `start` to `end` (spacing
// uniformly 0.5…1.5 × `spacing`), each channel with Gaussian noise.
void write_capture(const std::string& path, const std::vector<Channel>& channels, double start, double end,
                   double spacing, unsigned long seed) {
  gsl_rng* rng = gsl_rng_alloc(gsl_rng_mt19937);
  gsl_rng_set(rng, seed);
  std::ofstream out(path, std::ios::binary);
  out << "Instrument,Invented bench scope\nTrigger,CH2 rising\n\nTime (s)";
  for (const auto& channel : channels) out << "," << channel.header;
  out << "\n";
  fmt::memory_buffer buffer;
  for (double t = start; t < end; t += spacing * (0.5 + gsl_rng_uniform(rng))) {
    fmt::format_to(std::back_inserter(buffer), "{}", t);
    for (const auto& channel : channels) {
      fmt::format_to(std::back_inserter(buffer), ",{}", channel.value(t) + gsl_ran_gaussian(rng, channel.sigma));
    }
    buffer.push_back('\n');
    if (buffer.size() > (1 << 20)) {
      out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
      buffer.clear();
    }
  }
  out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
  gsl_rng_free(rng);
}

// [R-RC-charge] at capture time t: charging starts at the closing, case time kClose.
double rc_elapsed(double t) { return std::max(0.0, t + kOffset - kClose); }
double rc_voltage(double t) { return t + kOffset > kClose ? kV * (1.0 - std::exp(-rc_elapsed(t) / (kR * kC))) : 0.0; }
double rc_current(double t) { return t + kOffset > kClose ? kV / kR * std::exp(-rc_elapsed(t) / (kR * kC)) : 0.0; }

std::vector<Channel> rc_channels(double voltage_noise, double current_noise, bool with_current = true) {
  std::vector<Channel> channels{{"CH2 [V]", rc_voltage, voltage_noise}};
  if (with_current) channels.push_back({"CH3 [mA]", [](double t) { return 1e3 * rc_current(t); }, 1e3 * current_noise});
  return channels;
}

// The case: invented values to start from, the fit block, the capture mapped by its scope headers.
constexpr const char* kRcFitBlock = R"(fit:
  parameters:
    link.capacitance: {start: 1.5 mF, min: 0.3 mF, max: 5 mF}
    r_pre.resistance: {start: 80 Ohm, min: 10 Ohm, max: 500 Ohm}
  time_offset: {start: 0 s, min: -0.6 ms, max: 0.6 ms}
)";

std::string write_rc_case(const std::string& name, const std::string& capture, bool with_current,
                          const std::string& extra = "", const std::string& fit_block = kRcFitBlock) {
  std::string text = fmt::format(R"(# Invented test scenario: an RC pre-charge measured on a bench.
title: RC bench capture
ground: gnd
parts:
  - {{name: pack, kind: dc_source, nodes: [pack_plus, gnd], voltage: 400 V}}
  - {{name: k_pre, kind: contactor, nodes: [pack_plus, mid], closed_resistance: 1 uOhm}}
  - {{name: r_pre, kind: resistor, nodes: [mid, link_plus], resistance: 80 Ohm}}
  - {{name: link, kind: capacitor, nodes: [link_plus, gnd], capacitance: 1.5 mF}}
events:
  - {{at: 1 ms, close: k_pre}}
run: {{duration: 800 ms, rtol: 1e-9, atol: 1e-10}}
measured:
  file: {}
  columns: {{link_plus: "CH2 [V]"{}}}
{}{})",
                                 capture, with_current ? ", r_pre.current: \"CH3 [mA]\"" : "", fit_block, extra);
  const std::string path = temp_path(name);
  std::ofstream(path) << text;
  return path;
}

FitResult fit_rc(const std::string& stem, double voltage_noise, double current_noise, unsigned long seed,
                 bool with_current = true) {
  const std::string capture = temp_path(stem + ".csv");
  write_capture(capture, rc_channels(voltage_noise, current_noise, with_current), -2e-3, 0.7, 3e-4, seed);
  FitRequest request;
  request.case_file = write_rc_case(stem + ".yaml", capture, with_current);
  return run_fit(request);
}

const linkrise::app::FittedParameter& parameter(const FitResult& fit, const std::string& path) {
  for (const auto& p : fit.parameters) {
    if (p.path == path) return p;
  }
  throw std::runtime_error("no parameter " + path);
}

void expect_covered(const FitResult& fit, const std::string& path, double truth) {
  const auto& p = parameter(fit, path);
  EXPECT_LE(p.low95, truth) << path << " = " << p.value << " ± " << p.standard_error;
  EXPECT_GE(p.high95, truth) << path << " = " << p.value << " ± " << p.standard_error;
}

}  // namespace

// [R-RC-charge]: voltage and current together fix R (the current's size), C (with R, the time constant) and the
// offset. Each 95 % interval covers the true value and is narrow (under 0.2 % of R and C, 0.1 ms of offset), so a
// wide interval cannot pass for a recovery.
TEST(Fit, RcChargeRecoversResistanceCapacitanceAndTimeOffset) {
  const FitResult fit = fit_rc("fit_rc", 1.0, 0.01, 7);
  ASSERT_TRUE(fit.solver_failure.empty()) << fit.solver_failure;
  EXPECT_EQ(fit.stop_reason.rfind("converged", 0), 0u) << fit.stop_reason;
  expect_covered(fit, "link.capacitance", kC);
  expect_covered(fit, "r_pre.resistance", kR);
  expect_covered(fit, "time_offset", kOffset);
  EXPECT_LT(parameter(fit, "link.capacitance").standard_error, 1e-3 * kC);
  EXPECT_LT(parameter(fit, "r_pre.resistance").standard_error, 1e-3 * kR);
  EXPECT_LT(parameter(fit, "time_offset").standard_error, 0.05e-3);
  // The residual RMS per signal is the added noise (1 V, 10 mA) to within 10 % (about 2300 samples each).
  ASSERT_EQ(fit.signals.size(), 2u);
  EXPECT_NEAR(fit.signals[0].residual_rms, 1.0, 0.1);
  EXPECT_NEAR(fit.signals[1].residual_rms, 0.01, 0.001);
  EXPECT_NE(fit.fitted_case.find("capacitance: " + linkrise::app::fitted_text(parameter(fit, "link.capacitance"),
                                                                              parameter(fit, "link.capacitance").value)),
            std::string::npos);
}

// With noise from one seed scaled by two the residuals double and the Jacobian stays, so every interval's
// width, s·√((JᵀJ)⁻¹) [R-nls-covariance], doubles; allowed: 5 % (the solution moves a little with the noise).
TEST(Fit, IntervalWidthScalesWithTheNoiseLevel) {
  const FitResult single = fit_rc("fit_rc_noise1", 1.0, 0.01, 11);
  const FitResult twice = fit_rc("fit_rc_noise2", 2.0, 0.02, 11);
  for (std::size_t k = 0; k < single.parameters.size(); ++k) {
    const double ratio = twice.parameters[k].standard_error / single.parameters[k].standard_error;
    EXPECT_NEAR(ratio, 2.0, 0.1) << single.parameters[k].path;
  }
}

// Over twenty seeds each parameter's 95 % interval covers the truth at least 16 times: with a true coverage of
// 95 %, 15 hits or fewer have a probability of 0.26 % [R-nls-covariance] (binomial, 20 draws).
TEST(Fit, IntervalsCoverTheTruthAtTheirStatedRate) {
  std::vector<int> hits(3, 0);
  const std::vector<std::pair<std::string, double>> truths{
      {"link.capacitance", kC}, {"r_pre.resistance", kR}, {"time_offset", kOffset}};
  for (unsigned long seed = 100; seed < 120; ++seed) {
    const FitResult fit = fit_rc("fit_rc_cover", 1.0, 0.01, seed);
    for (std::size_t k = 0; k < truths.size(); ++k) {
      const auto& p = parameter(fit, truths[k].first);
      hits[k] += p.low95 <= truths[k].second && truths[k].second <= p.high95;
    }
  }
  for (std::size_t k = 0; k < truths.size(); ++k) EXPECT_GE(hits[k], 16) << truths[k].first;
}

// A voltage alone fixes only τ = R·C [R-RC-charge]: the estimates of R and C are correlated beyond the stated
// threshold and the fit says so, while their product is still recovered (to 0.2 %).
// The trigger's place is held at its known value here: with the offset free as well, the valley of R and C is so
// flat that solver noise at rtol decides where Levenberg–Marquardt stops along it, and the offset can end at a
// bound.
TEST(Fit, AVoltageOnlyCaptureReportsRAndCAsNotToldApart) {
  const std::string capture = temp_path("fit_rc_voltage.csv");
  write_capture(capture, rc_channels(1.0, 0.0, false), -2e-3, 0.7, 3e-4, 5);
  FitRequest request;
  request.case_file = write_rc_case("fit_rc_voltage.yaml", capture, false, "", R"(  time_offset: 0.2 ms
fit:
  parameters:
    link.capacitance: {start: 1.5 mF, min: 0.3 mF, max: 5 mF}
    r_pre.resistance: {start: 80 Ohm, min: 10 Ohm, max: 500 Ohm}
)");
  const FitResult fit = run_fit(request);
  ASSERT_EQ(fit.parameters.size(), 2u);
  EXPECT_GT(std::fabs(fit.correlation[0][1]), linkrise::app::kConfoundedCorrelation);
  bool warned = false;
  for (const auto& warning : fit.warnings) warned = warned || warning.find("cannot be told apart") != std::string::npos;
  EXPECT_TRUE(warned);
  const double tau = parameter(fit, "link.capacitance").value * parameter(fit, "r_pre.resistance").value;
  EXPECT_NEAR(tau, kR * kC, 2e-3 * kR * kC);
}

// The Jacobian of the residuals by central differences against the closed-form derivatives of v and i
// [R-RC-charge], over σ (the noise block): v = V(1 − e^(−x)), i = (V/R)e^(−x), x = t/(RC);
// ∂v/∂R = −V·x·e^(−x)/R, ∂v/∂C = −V·x·e^(−x)/C, ∂i/∂R = (V/R²)(x − 1)e^(−x), ∂i/∂C = (V/(RC))·x·e^(−x),
// ∂/∂offset = d/dt: V·e^(−x)/(RC) and −V·e^(−x)/(R²C). Truncation h² ≈ 1e-6 and solver noise rtol/h ≈ 1e-6
// relative [R-central-differences]: compared to 1e-4 of each column's largest value.
TEST(Fit, CentralDifferencesMatchTheClosedFormDerivatives) {
  const std::string capture = temp_path("fit_rc_jacobian.csv");
  write_capture(capture, rc_channels(1.0, 0.01), -2e-3, 0.7, 3e-4, 3);
  FitRequest request;
  request.case_file = write_rc_case("fit_rc_jacobian.yaml", capture, true,
                                    "  noise: {link_plus: 1 V, r_pre.current: 10 mA}\n");
  FitProblem problem(request);
  const std::size_t n = problem.residual_count(), m = problem.parameter_count(), rows = n / 2;
  ASSERT_EQ(m, 3u);
  std::vector<double> jacobian(n * m);
  problem.jacobian({kC, kR, kOffset}, jacobian.data());
  const auto& capture_times = problem.capture_times();
  std::vector<double> largest(m, 0.0), worst(m, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    const double t = capture_times[i % rows];
    if (t + kOffset < kClose + 2e-3) continue;  // rows left out beside the closing (offset bounds ± a row)
    const double x = rc_elapsed(t) / (kR * kC), e = std::exp(-x);
    const bool voltage = i < rows;
    const double sigma = voltage ? 1.0 : 0.01;
    const double expected[3] = {
        (voltage ? -kV * x * e / kC : kV * x * e / (kR * kC)) / sigma,
        (voltage ? -kV * x * e / kR : kV / (kR * kR) * (x - 1.0) * e) / sigma,
        (voltage ? kV * e / (kR * kC) : -kV * e / (kR * kR * kC)) / sigma};
    for (std::size_t k = 0; k < m; ++k) {
      largest[k] = std::max(largest[k], std::fabs(expected[k]));
      worst[k] = std::max(worst[k], std::fabs(jacobian[i * m + k] - expected[k]));
    }
  }
  for (std::size_t k = 0; k < m; ++k) EXPECT_LT(worst[k], 1e-4 * largest[k]) << "parameter " << k;
}

// The fit builds JᵀJ and Jᵀr block by block of capture rows (one run per block), never holding J: cut into blocks
// of 500 rows, the residuals must equal those of one block over the whole capture, and the normal equations
// must equal JᵀJ and Jᵀr formed from the whole Jacobian [R-nls-covariance]. Each block's run covers the whole
// duration, so the solver takes the same steps; what may differ is the network solve at the rows (its cache),
// far below rtol: allowed 1e-9 of each signal's σ for residuals, 1e-9 relative for the sums.
TEST(Fit, NormalEquationsBuiltBlockByBlockEqualThoseOfTheWholeJacobian) {
  const std::string capture = temp_path("fit_rc_blocks.csv");
  write_capture(capture, rc_channels(1.0, 0.01), -2e-3, 0.7, 3e-4, 13);
  FitRequest request;
  request.case_file =
      write_rc_case("fit_rc_blocks.yaml", capture, true, "  noise: {link_plus: 1 V, r_pre.current: 10 mA}\n");
  FitProblem whole(request);
  request.block_rows = 500;
  FitProblem blocks(request);
  const std::size_t n = whole.residual_count(), m = whole.parameter_count();
  ASSERT_GT(n / 2, 4 * request.block_rows);  // several blocks, the last one short
  const std::vector<double> p{1.2e-3, 90.0, 0.1e-3};
  std::vector<double> r_whole(n), r_blocks(n), jacobian(n * m), jtr(m), jtj(m * m);
  whole.residuals(p, r_whole.data());
  blocks.residuals(p, r_blocks.data());
  for (std::size_t i = 0; i < n; ++i) ASSERT_NEAR(r_blocks[i], r_whole[i], 1e-9) << "residual " << i;
  whole.jacobian(p, jacobian.data());
  blocks.normal_equations(p, r_whole.data(), jtr.data(), jtj.data());
  for (std::size_t a = 0; a < m; ++a) {
    double expected_jtr = 0.0;
    for (std::size_t i = 0; i < n; ++i) expected_jtr += jacobian[i * m + a] * r_whole[i];
    EXPECT_NEAR(jtr[a], expected_jtr, 1e-9 * std::fabs(expected_jtr)) << a;
    for (std::size_t b = 0; b < m; ++b) {
      double expected = 0.0;
      for (std::size_t i = 0; i < n; ++i) expected += jacobian[i * m + a] * jacobian[i * m + b];
      EXPECT_NEAR(jtj[a * m + b], expected, 1e-9 * std::sqrt(std::fabs(jtj[a * m + a] * jtj[b * m + b])))
          << a << ", " << b;
    }
  }
  // J·d, the product GSL may ask for instead, row by row.
  const std::vector<double> direction{1e-4, -0.5, 2e-5};
  std::vector<double> product(n);
  blocks.jacobian_times(p, direction.data(), product.data());
  for (std::size_t i = 0; i < n; i += 97) {
    double expected = 0.0;
    for (std::size_t k = 0; k < m; ++k) expected += jacobian[i * m + k] * direction[k];
    EXPECT_NEAR(product[i], expected, 1e-9 * (std::fabs(expected) + 1.0)) << i;
  }
}

namespace {
// The series RLC of [R-RLC-step]: 100 V into 2 Ohm, 1 mH, 100 µF → α = 1000 /s, ω0 = 3162.3 rad/s,
// ωd = 3000 rad/s (ζ = 0.316, underdamped); closed at 1 ms case time, capture zero at case time 0.2 ms.
constexpr double kStep = 100.0, kRlcR = 2.0, kL = 1e-3, kRlcC = 100e-6;
double rlc_alpha() { return kRlcR / (2.0 * kL); }
double rlc_omega() { return std::sqrt(1.0 / (kL * kRlcC) - rlc_alpha() * rlc_alpha()); }
double rlc_voltage(double t) {
  const double s = t + kOffset - kClose, a = rlc_alpha(), w = rlc_omega();
  return s > 0.0 ? kStep * (1.0 - std::exp(-a * s) * (std::cos(w * s) + a / w * std::sin(w * s))) : 0.0;
}
double rlc_current(double t) {
  const double s = t + kOffset - kClose;
  return s > 0.0 ? kStep / (rlc_omega() * kL) * std::exp(-rlc_alpha() * s) * std::sin(rlc_omega() * s) : 0.0;
}
}  // namespace

// [R-RLC-step]: the ringing fixes L, C and R separately (its frequency, its decay and the current's size).
TEST(Fit, SeriesRlcStepRecoversInductanceCapacitanceAndResistance) {
  const std::string capture = temp_path("fit_rlc.csv");
  write_capture(capture, {{"V(link) [V]", rlc_voltage, 0.2}, {"I(L1) [A]", rlc_current, 0.05}}, -1e-3, 12e-3, 4e-6,
                25);
  const std::string case_file = temp_path("fit_rlc.yaml");
  std::ofstream(case_file) << R"(# Invented test scenario: a series RLC step measured on a bench.
title: RLC bench capture
ground: gnd
parts:
  - {name: supply, kind: dc_source, nodes: [supply_plus, gnd], voltage: 100 V}
  - {name: k1, kind: contactor, nodes: [supply_plus, a], closed_resistance: 1 uOhm}
  - {name: l1, kind: inductor, nodes: [a, link], inductance: 1.5 mH, resistance: 3 Ohm}
  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 80 uF}
events:
  - {at: 1 ms, close: k1}
run: {duration: 14 ms, rtol: 1e-9, atol: 1e-10}
measured:
  file: )" + capture + R"(
  columns: {link: "V(link) [V]", l1.current: "I(L1) [A]"}
fit:
  parameters:
    l1.inductance: {start: 1.5 mH, min: 0.2 mH, max: 5 mH}
    c1.capacitance: {start: 80 uF, min: 20 uF, max: 400 uF}
    l1.resistance: {start: 3 Ohm, min: 0.1 Ohm, max: 20 Ohm}
  time_offset: {start: 0 s, min: -0.1 ms, max: 0.3 ms}
)";
  FitRequest request;
  request.case_file = case_file;
  const FitResult fit = run_fit(request);
  ASSERT_TRUE(fit.solver_failure.empty()) << fit.solver_failure;
  expect_covered(fit, "l1.inductance", kL);
  expect_covered(fit, "c1.capacitance", kRlcC);
  expect_covered(fit, "l1.resistance", kRlcR);
  expect_covered(fit, "time_offset", kOffset);
  EXPECT_LT(parameter(fit, "l1.inductance").standard_error, 5e-3 * kL);
  EXPECT_LT(parameter(fit, "c1.capacitance").standard_error, 5e-3 * kRlcC);
  EXPECT_LT(parameter(fit, "l1.resistance").standard_error, 2e-2 * kRlcR);
}

namespace {
std::string fit_error(const std::string& name, const std::string& capture_text, const std::string& extra,
                      bool with_current = true) {
  const std::string capture = temp_path(name + ".csv");
  std::ofstream(capture) << capture_text;
  FitRequest request;
  request.case_file = write_rc_case(name + ".yaml", capture, with_current, extra);
  try {
    run_fit(request);
  } catch (const linkrise::netlist::InputError& error) {
    return error.what();
  }
  return "no error";
}
}  // namespace

TEST(Fit, TooFewValuesForTheParametersAreRefused) {
  EXPECT_NE(fit_error("fit_few", "Time (s),CH2 [V]\n0.1,200\n", "", false).find("too few to fit 3 parameters"),
            std::string::npos);
}

TEST(Fit, AColumnWhoseUnitDiffersFromItsSignalIsRefusedAtItsHeader) {
  const std::string capture = temp_path("fit_unit.csv");
  std::ofstream(capture) << "Time (s),CH2 [V]\n0.1,200\n0.2,300\n0.3,350\n";
  FitRequest request;
  request.case_file = write_rc_case("fit_unit.yaml", capture, false);
  request.capture.columns = {{"r_pre.current", "CH2 [V]", {"command line (--column #1)", 0, 0}}};
  try {
    run_fit(request);
    ADD_FAILURE() << "no error";
  } catch (const linkrise::netlist::InputError& error) {
    EXPECT_EQ(error.mark().line, 1);
    EXPECT_EQ(error.mark().column, 10);
    EXPECT_NE(std::string(error.what()).find("is voltage"), std::string::npos) << error.what();
  }
}

TEST(Fit, ARunShorterThanTheCaptureIsRefused) {
  std::string rows = "Time (s),CH2 [V],CH3 [mA]\n";
  for (int r = 0; r < 10; ++r) rows += fmt::format("{},1,1\n", 0.1 * r);
  const std::string message = fit_error("fit_short", rows, "");
  EXPECT_NE(message.find("lengthen 'run: duration'"), std::string::npos) << message;
}

TEST(Fit, ANoiseEntryForAnUnknownSignalOrInTheWrongUnitIsRefused) {
  std::string rows = "Time (s),CH2 [V],CH3 [mA]\n";
  for (int r = 0; r < 10; ++r) rows += fmt::format("{},1,1\n", 0.01 * r);
  EXPECT_NE(fit_error("fit_noise_name", rows, "  noise: {link_minus: 1 V}\n").find("names no fitted signal"),
            std::string::npos);
  EXPECT_NE(fit_error("fit_noise_unit", rows, "  noise: {link_plus: 1 A}\n").find("the noise of 'link_plus'"),
            std::string::npos);
}

// A million rows and two signals, fitted by the linkrise binary in its own process with the report, so its peak
// memory is its own (getrusage of the child). The capture's numbers take B = 24 MB (time and two signals, one
// double each); a residual vector of the 2·10⁶ values takes N = 16 MB. By design the fit holds the capture once
// and three residual-sized vectors: GSL's residuals, its trial residuals and its weight vector (allocated
// zeroed, so touched). Runs, Jacobian rows and the report's thinned curves live one block of 65536 rows at a
// time: one run's output (2 MB), the block's residuals at both sides of a difference (2 MB) and its Jacobian
// rows (1 MB per parameter). Budget: 16 MB for the program itself (a fit of the 2000-row demo peaks at 10 MB)
// + B + 3·N + 6 MB = 94 MB (measured: 85 MB). The dense design before it (J and its QR copy, ten n-vectors, a
// run's output for every row) peaked at 204 MB; a run's output for every row would add 2·N, simulated copies
// for the report N.
// AddressSanitizer keeps shadow memory and a quarantine of freed blocks, so a peak measured under it says nothing
// about the program's own budget: the checking build skips this test, the release build runs it.
#if defined(__SANITIZE_ADDRESS__)
#define LINKRISE_UNDER_ADDRESS_SANITIZER 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define LINKRISE_UNDER_ADDRESS_SANITIZER 1
#endif
#endif

TEST(FitMemory, AMillionRowCaptureFitsWithinItsStatedBudget) {
#ifdef LINKRISE_UNDER_ADDRESS_SANITIZER
  GTEST_SKIP() << "memory is measured in the release build (AddressSanitizer inflates every allocation)";
#endif
  const std::string capture = temp_path("fit_million.csv");
  write_capture(capture, rc_channels(1.0, 0.01), -2e-3, 0.7, 0.702e-6, 9);  // about a million rows
  const std::string case_file = write_rc_case("fit_million.yaml", capture, true, "", R"(  time_offset: 0.2 ms
fit:
  parameters:
    link.capacitance: {start: 1.5 mF, min: 0.3 mF, max: 5 mF}
)");
  const std::string output = temp_path("fit_million_out");
  const std::string report = temp_path("fit_million_report.html");
  std::vector<std::string> words{LINKRISE_BINARY, "fit", case_file, "-o", output, "--report", report, "-q"};
  std::vector<char*> argv;
  for (auto& word : words) argv.push_back(word.data());
  argv.push_back(nullptr);
  pid_t child = 0;
  ASSERT_EQ(posix_spawn(&child, LINKRISE_BINARY, nullptr, nullptr, argv.data(), environ), 0);
  int status = 0;
  struct rusage usage {};
  ASSERT_EQ(wait4(child, &status, 0, &usage), child);
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 0);
  std::ifstream json(std::filesystem::path(output) / "fit.json");
  std::stringstream text;
  text << json.rdbuf();
  const auto at = text.str().find("\"rows\": ");
  ASSERT_NE(at, std::string::npos);
  const double rows = std::stod(text.str().substr(at + 8));
  EXPECT_GT(rows, 0.99e6);
  const double peak_megabytes = static_cast<double>(usage.ru_maxrss) / 1024.0;  // kB on Linux
  const double mebibyte = 1024.0 * 1024.0;
  const double capture_megabytes = rows * 3 * 8 / mebibyte, residual_megabytes = rows * 2 * 8 / mebibyte;
  EXPECT_LT(peak_megabytes, 16.0 + capture_megabytes + 3.0 * residual_megabytes + 6.0);
  // The report draws thinned curves: six of a few thousand points (measured 178 kB in all); the million rows
  // of six curves drawn whole would take tens of megabytes.
  EXPECT_LT(std::filesystem::file_size(report), 1u << 20);
  std::filesystem::remove(capture);
  std::filesystem::remove(report);
}

// The stored demo: its capture was made by scripts/make-fit-demo-capture.sh from the values below plus noise
// (the generator's inputs, invented, not outside references); the fit must find each inside its interval.
TEST(Fit, TheStoredDemoRecoversTheValuesItsCaptureWasMadeFrom) {
  FitRequest request;
  request.case_file = std::string(LINKRISE_SOURCE_DIR) + "/cases/fit_bench_inverter_link.yaml";
  const FitResult fit = run_fit(request);
  expect_covered(fit, "link.capacitance", 905e-6);
  expect_covered(fit, "r_pre.resistance", 35.6);
  expect_covered(fit, "time_offset", 0.35e-3);
  EXPECT_EQ(fit.rows, 2000u);
}
