// Transient results against closed forms at tight solver tolerances (rtol 1e-10, atol 1e-12).
// Formulas and reference values: docs/references.md, cited by tag ([R-...]) beside each check.
// Tolerances: the solver controls the local error to ~rtol; the global error of these smooth runs stays within
// a few rtol to tens of rtol, so waveforms are compared to 1e-8 relative (100 rtol) and key points to 1e-6, the
// accuracy DEVELOPERS.md sets for closed-form checks at tight tolerances.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "analysis/energy_audit.h"
#include "app/evaluation/case_evaluation.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::solver::Outcome;
using linkrise::solver::Result;
using linkrise::testing::column;
using linkrise::testing::level_watch;
using linkrise::testing::Simulation;

constexpr double kWaveformTolerance = 1e-8;  // relative to the scale of the signal

// 400 V ideal source, 100 Ohm, 1 mF: tau = 0.1 s.
constexpr double kV = 400.0, kR = 100.0, kC = 1e-3, kTau = kR * kC;
std::string rc_case(const std::string& initial = "0 V", const std::string& duration = "500 ms") {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: r1, kind: resistor, nodes: [plus, link], resistance: 100 Ohm}\n"
         "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF, initial_voltage: " +
         initial + "}\n" + "run: {duration: " + duration + "}\n";
}

// RC charging [R-RC-charge] (Alexander & Sadiku ch. 7 [mem]): v(t) = V + (v0 - V)·e^(-t/RC).
double rc_voltage(double t, double v0 = 0.0) { return kV + (v0 - kV) * std::exp(-t / kTau); }
}  // namespace

TEST(Transient, RcChargeFollowsTheClosedFormEverywhere) {
  Simulation sim(rc_case());
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  auto link = column(result.steps, "link");
  auto current = column(result.steps, "r1.current");
  ASSERT_GT(result.steps.row_count(), 50u);
  double worst = 0.0;
  for (std::size_t r = 0; r < link.size(); ++r) {
    double t = result.steps.time(r);
    worst = std::max(worst, std::fabs(link[r] - rc_voltage(t)) / kV);
    // Ohm's law on the resistor: i = (V - v)/R [R-Ohm-Joule].
    EXPECT_NEAR(current[r], (kV - rc_voltage(t)) / kR, kWaveformTolerance * kV / kR) << "t = " << t;
  }
  EXPECT_LT(worst, kWaveformTolerance);
  // Initial current V/R [R-RC-charge].
  EXPECT_NEAR(current.front(), kV / kR, 1e-12 * kV / kR);
}

TEST(Transient, RcChargeFractionsAtOneTwoThreeTimeConstants) {
  Simulation sim(rc_case());
  sim.tight();
  sim.options.sample = kTau;  // grid rows exactly at 0, tau, 2 tau...
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  ASSERT_GE(result.samples.row_count(), 4u);
  auto link = column(result.samples, "link");
  // Fractions 1 - e^(-n): 63.212 %, 86.466 %, 95.021 % ([R-RC-charge], derived from the closed form).
  const double expected[] = {0.0, 0.63212, 0.86466, 0.95021};
  for (int n = 1; n <= 3; ++n) {
    EXPECT_DOUBLE_EQ(result.samples.time(n), n * kTau);
    EXPECT_NEAR(link[n] / kV, 1.0 - std::exp(-n), 1e-6 * (1.0 - std::exp(-n))) << n << " tau";
    EXPECT_NEAR(link[n] / kV, expected[n], 5e-6) << n << " tau (five-digit published value)";
  }
}

TEST(Transient, LevelWatchCrossingTimesMatchTheRcClosedForm) {
  Simulation sim(rc_case());
  sim.tight();
  // Inverting the closed form: v = f·V at t = -tau·ln(1 - f) ([R-RC-charge], Alexander & Sadiku ch. 7 [mem]).
  const double fractions[] = {0.5, 1.0 - std::exp(-1.0), 0.9, 0.95};
  for (double f : fractions) sim.options.watches.push_back(level_watch(sim.circuit, "link", f * kV));
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  ASSERT_EQ(result.crossings.size(), 4u);
  for (const auto& crossing : result.crossings) {
    double f = fractions[crossing.watch];
    double expected = -kTau * std::log(1.0 - f);
    EXPECT_EQ(crossing.direction, 1);
    EXPECT_NEAR(crossing.time, expected, 1e-6 * expected) << "fraction " << f;
    // The crossing is recorded as a waveform row at that exact time.
    EXPECT_NEAR(linkrise::testing::value_at(result.steps, "link", crossing.time), f * kV, 1e-6 * kV);
  }
  EXPECT_NEAR(result.crossings[1].time, kTau, 1e-6 * kTau);  // 63.2 % at one time constant
}

TEST(Transient, SampleGridValuesMatchTheClosedForm) {
  Simulation sim(rc_case());
  sim.tight();
  sim.options.sample = 1e-3;
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  ASSERT_EQ(result.samples.row_count(), 501u);  // 0, 1 ms ... 500 ms
  auto link = column(result.samples, "link");
  for (std::size_t r = 0; r < link.size(); ++r) {
    double t = result.samples.time(r);
    EXPECT_NEAR(t, static_cast<double>(r) * 1e-3, 1e-15);
    EXPECT_NEAR(link[r], rc_voltage(t), kWaveformTolerance * kV) << "t = " << t;
  }
}

TEST(Transient, ResistorEnergyFromNonZeroInitialVoltage) {
  // Energy dissipated in the series resistor over a full charge from v0 to V: ½·C·(V - v0)², independent of R
  // ([R-RC-energy]). 30 tau leaves e^(-60) of the charge undone.
  const double v0 = 100.0;
  Simulation sim(rc_case("100 V", "3 s"));
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  auto audit = linkrise::analysis::audit_energy(sim.circuit, result);
  const double expected = 0.5 * kC * (kV - v0) * (kV - v0);  // 45 J
  EXPECT_NEAR(audit.parts[1].dissipated, expected, 1e-6 * expected);
  // Stored energy ½CV² at both ends [R-RC-energy].
  EXPECT_NEAR(audit.parts[2].stored_start, 0.5 * kC * v0 * v0, 1e-12);
  EXPECT_NEAR(audit.parts[2].stored_end, 0.5 * kC * kV * kV, 1e-6 * 0.5 * kC * kV * kV);
  // The source delivered C·V·(V - v0): charge moved times source voltage [R-RC-energy].
  EXPECT_NEAR(audit.parts[0].delivered, kC * kV * (kV - v0), 1e-6 * kC * kV * (kV - v0));
}

namespace {
// Series RLC: 1 V step, R, 0.5 H, 100 nF (the Wikibooks "Electronics/RCL time domain" worked circuit [pub],
// [R-RLC-step]).
std::string rlc_case(const std::string& resistance) {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 1 V}\n"
         "  - {name: r1, kind: resistor, nodes: [plus, a], resistance: " +
         resistance +
         "}\n"
         "  - {name: choke, kind: inductor, nodes: [a, b], inductance: 0.5 H}\n"
         "  - {name: c1, kind: capacitor, nodes: [b, gnd], capacitance: 100 nF}\n"
         "run: {duration: 10 ms}\n";
}
constexpr double kL = 0.5, kCrlc = 100e-9;

// The inductor voltage L·di/dt crosses zero where the current peaks.
linkrise::solver::Watch inductor_voltage_zero(const linkrise::solver::Circuit& circuit) {
  linkrise::solver::Watch watch;
  watch.name = "di/dt = 0";
  watch.plus_a = circuit.node_index("a");
  watch.minus_a = circuit.node_index("b");
  return watch;
}
}  // namespace

TEST(Transient, SeriesRlcUnderdampedStepResponse) {
  const double R = 1e3;
  // [R-RLC-step]: Wikibooks "Electronics/RCL time domain" [pub] / Alexander & Sadiku ch. 8 [mem].
  const double alpha = R / (2 * kL), w0 = 1 / std::sqrt(kL * kCrlc), wd = std::sqrt(w0 * w0 - alpha * alpha);
  // The worked circuit's numbers ([R-RLC-step], derived): alpha, omega0, omega_d, zeta.
  EXPECT_NEAR(alpha, 1000.0, 1e-9);
  EXPECT_NEAR(w0, 4472.14, 0.01);
  EXPECT_NEAR(wd, 4358.90, 0.01);
  EXPECT_NEAR(alpha / w0, 0.22361, 1e-5);
  const double t_over = M_PI / wd;
  EXPECT_NEAR(t_over, 720.73e-6, 0.01e-6);
  EXPECT_NEAR(std::exp(-M_PI * alpha / wd), 0.48640, 1e-5);

  Simulation sim(rlc_case("1 kOhm"));
  sim.tight();
  sim.options.sample = t_over / 100.0;  // grid row 100 falls on the overshoot time
  sim.options.watches.push_back(inductor_voltage_zero(sim.circuit));
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;

  auto current = column(result.steps, "choke.current");
  auto vc = column(result.steps, "b");
  const double i_scale = 1.0 * std::sqrt(kCrlc / kL);  // V·sqrt(C/L), the current's natural scale
  // BDF's phase error accumulates over the ringing periods: allow ten times the non-oscillating tolerance.
  const double ringing_tolerance = 10 * kWaveformTolerance;
  for (std::size_t r = 0; r < current.size(); ++r) {
    double t = result.steps.time(r);
    double i = 1.0 / (wd * kL) * std::exp(-alpha * t) * std::sin(wd * t);
    double v = 1.0 * (1 - std::exp(-alpha * t) * (std::cos(wd * t) + alpha / wd * std::sin(wd * t)));
    ASSERT_NEAR(current[r], i, ringing_tolerance * i_scale) << "t = " << t;
    ASSERT_NEAR(vc[r], v, ringing_tolerance) << "t = " << t;
  }
  // Capacitor overshoot 48.640 % at 720.73 us (Wikibooks worked circuit [pub]).
  EXPECT_NEAR(result.samples.time(100), t_over, 1e-15);
  double overshoot = column(result.samples, "b")[100] - 1.0;
  EXPECT_NEAR(overshoot, std::exp(-M_PI * alpha / wd), 1e-6 * 0.4864);

  // Peak current i_pk = V·sqrt(C/L)·e^(-alpha·t_pk) at t_pk = atan(wd/alpha)/wd ([R-RLC-step]).
  ASSERT_FALSE(result.crossings.empty());
  const double t_peak = std::atan(wd / alpha) / wd;
  EXPECT_EQ(result.crossings.front().direction, -1);
  EXPECT_NEAR(result.crossings.front().time, t_peak, 1e-6 * t_peak);
  double peak = linkrise::testing::value_at(result.steps, "choke.current", result.crossings.front().time);
  EXPECT_NEAR(peak, std::sqrt(kCrlc / kL) * std::exp(-alpha * t_peak), 1e-6 * i_scale);
  // Every later extremum of the current follows half a damped period apart, alternating in direction
  // (di/dt ∝ e^(-αt)·cos(ωd t + φ) [derived]); 14 of them fall inside 10 ms, even as the ringing decays to 1e-5.
  // The inductor voltage crosses zero with slope V·ω0·e^(-αt) [derived], so a voltage error of
  // ringing_tolerance·V moves the crossing by ringing_tolerance·e^(αt)/ω0.
  ASSERT_EQ(result.crossings.size(), 14u);
  for (std::size_t k = 0; k < result.crossings.size(); ++k) {
    double expected = t_peak + static_cast<double>(k) * M_PI / wd;
    double tolerance = ringing_tolerance * std::exp(alpha * expected) / w0;
    EXPECT_NEAR(result.crossings[k].time, expected, tolerance) << "extremum " << k;
    EXPECT_EQ(result.crossings[k].direction, k % 2 == 0 ? -1 : 1) << "extremum " << k;
  }
}

// A peak between two step ends gets a row at its top: the in-step peak search finds it on the dense output with
// Brent's minimiser (docs/references.md [R-GSL-Brent-minimum]), so the largest recorded current is the closed-form
// peak V·sqrt(C/L)·e^(−α·t_pk) ([R-RLC-step]) to the run's own accuracy (rtol 1e-6 here; the dense output
// interpolates to a few times that), without a watch at the peak.
TEST(Transient, PeakBetweenStepEndsIsRecordedAtItsTop) {
  const double R = 1e3;
  const double alpha = R / (2 * kL), w0 = 1 / std::sqrt(kL * kCrlc), wd = std::sqrt(w0 * w0 - alpha * alpha);
  const double t_peak = std::atan(wd / alpha) / wd;
  const double expected = std::sqrt(kCrlc / kL) * std::exp(-alpha * t_peak);
  Simulation sim(rlc_case("1 kOhm"));
  sim.tight(1e-6, 1e-9);
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  const auto current = column(result.steps, "choke.current");
  std::size_t top = 0;
  for (std::size_t r = 0; r < current.size(); ++r) {
    if (current[r] > current[top]) top = r;
  }
  EXPECT_NEAR(current[top], expected, 5e-6 * expected);
  EXPECT_NEAR(result.steps.time(top), t_peak, 1e-3 * t_peak);
}

TEST(Transient, SeriesRlcOverdampedStepResponse) {
  const double R = 10e3;
  const double alpha = R / (2 * kL), w0 = 1 / std::sqrt(kL * kCrlc);
  ASSERT_GT(alpha, w0);
  // Overdamped: s1,2 = -alpha ± sqrt(alpha² - w0²), i = V/(L(s1 - s2))·(e^(s1 t) - e^(s2 t))
  // ([R-RLC-step], Wikibooks "Electronics/RCL time domain" [pub]).
  const double root = std::sqrt(alpha * alpha - w0 * w0), s1 = -alpha + root, s2 = -alpha - root;
  auto current_at = [&](double t) { return 1.0 / (kL * (s1 - s2)) * (std::exp(s1 * t) - std::exp(s2 * t)); };
  // vC = V·[1 + (s2·e^(s1 t) - s1·e^(s2 t))/(s1 - s2)], the integral of i/C [derived].
  auto voltage_at = [&](double t) { return 1.0 + (s2 * std::exp(s1 * t) - s1 * std::exp(s2 * t)) / (s1 - s2); };

  Simulation sim(rlc_case("10 kOhm"));
  sim.tight();
  sim.options.watches.push_back(inductor_voltage_zero(sim.circuit));
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  auto current = column(result.steps, "choke.current");
  auto vc = column(result.steps, "b");
  const double i_scale = 1.0 / R;
  for (std::size_t r = 0; r < current.size(); ++r) {
    double t = result.steps.time(r);
    ASSERT_NEAR(current[r], current_at(t), kWaveformTolerance * i_scale) << "t = " << t;
    ASSERT_NEAR(vc[r], voltage_at(t), kWaveformTolerance) << "t = " << t;
  }
  // di/dt = 0 where s1·e^(s1 t) = s2·e^(s2 t): t_pk = ln(s2/s1)/(s1 - s2) [derived].
  ASSERT_EQ(result.crossings.size(), 1u);  // no ringing: one peak only
  const double t_peak = std::log(s2 / s1) / (s1 - s2);
  EXPECT_NEAR(result.crossings.front().time, t_peak, 1e-6 * t_peak);
  double peak = linkrise::testing::value_at(result.steps, "choke.current", t_peak);
  EXPECT_NEAR(peak, current_at(t_peak), 1e-6 * i_scale);
}

TEST(Transient, ConstantPowerLoadSettlesAtTheQuadraticsUpperRoot) {
  // Equilibrium v·(Vs - v)/R = P → v = [Vs + sqrt(Vs² - 4PR)]/2 ([R-CPL-equilibrium]: Simpson-Porco, Dörfler &
  // Bullo, arXiv:1503.04769 [pub]). Check: 400 V, 1 Ohm, 10 kW → 373.2051 V, 26.7949 A [derived].
  const double Vs = 400.0, R = 1.0, P = 10e3;
  const double v_eq = (Vs + std::sqrt(Vs * Vs - 4 * P * R)) / 2;
  EXPECT_NEAR(v_eq, 373.2051, 1e-4);
  EXPECT_NEAR((Vs - v_eq) / R, 26.7949, 1e-4);
  // The load is enabled from the start and held off by its under-voltage lockout until the link passes 300 V
  // (otherwise the resistive floor near 0 V would hold a second, low equilibrium).
  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V, series_resistance: 1 Ohm}\n"
      "  - {name: link, kind: capacitor, nodes: [plus, gnd], capacitance: 1 mF}\n"
      "  - {name: inverter, kind: constant_power_load, nodes: [plus, gnd], power: 10 kW, enable_voltage: 300 V}\n"
      "run: {duration: 50 ms}\n");
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  const auto& steps = result.steps;
  std::size_t last = steps.row_count() - 1;
  EXPECT_NEAR(steps.value(last, steps.column("plus")), v_eq, 1e-6 * v_eq);
  EXPECT_NEAR(steps.value(last, steps.column("source.current")), (Vs - v_eq) / R, 1e-6 * (Vs - v_eq) / R);
  EXPECT_NEAR(steps.value(last, steps.column("inverter.current")), P / v_eq, 1e-6 * P / v_eq);
  EXPECT_NEAR(steps.value(last, steps.column("inverter.power")), P, 1e-6 * P);
  EXPECT_EQ(steps.value(last, steps.column("inverter.drawing")), 1.0);
  // Before the lockout released, the link charged as a plain RC (tau = 1 ms): the state event sits at
  // t = -tau·ln(1 - 300/400) [R-RC-charge].
  ASSERT_EQ(result.timeline.size(), 1u);
  EXPECT_NEAR(result.timeline.front().time, -1e-3 * std::log(0.25), 1e-6 * 1e-3);
}

TEST(Transient, TwoCapacitorsChargedFromOneSourceMatchTheClosedForm) {
  // Source 100 V with Rs = 10 Ohm feeds C1 = 1 mF through R1 = 100 Ohm and C2 = 47 uF through R2 = 1 kOhm.
  // Node p: vp = (Vs/Rs + v1/R1 + v2/R2)/(1/Rs + 1/R1 + 1/R2); Ck·dvk/dt = (vp - vk)/Rk (KCL, Ohm's law).
  // x' = A·(x - Vs) with constant A, so x(t) = Vs + Σ ck·e^(λk t)·uk over A's two eigenpairs, λ from the
  // characteristic quadratic [derived: linear ODE closed form].
  const double Vs = 100, Rs = 10, R1 = 100, R2 = 1e3, C1 = 1e-3, C2 = 47e-6;
  const double G = 1 / Rs + 1 / R1 + 1 / R2;
  const double a11 = (1 / (R1 * G) - 1) / (R1 * C1), a12 = 1 / (R2 * G) / (R1 * C1);
  const double a21 = 1 / (R1 * G) / (R2 * C2), a22 = (1 / (R2 * G) - 1) / (R2 * C2);
  const double trace = a11 + a22, det = a11 * a22 - a12 * a21, disc = std::sqrt(trace * trace - 4 * det);
  const double l1 = (trace + disc) / 2, l2 = (trace - disc) / 2;
  // Eigenvectors (a12, λ - a11); coefficients from x(0) - Vs = (-Vs, -Vs).
  const double u1[] = {a12, l1 - a11}, u2[] = {a12, l2 - a11};
  const double d = u1[0] * u2[1] - u2[0] * u1[1];
  const double c1 = (-Vs * u2[1] + Vs * u2[0]) / d, c2 = (-Vs * u1[0] + Vs * u1[1]) / d;
  auto v_at = [&](int k, double t) { return Vs + c1 * std::exp(l1 * t) * u1[k] + c2 * std::exp(l2 * t) * u2[k]; };
  ASSERT_NEAR(v_at(0, 0.0), 0.0, 1e-9);
  ASSERT_NEAR(v_at(1, 0.0), 0.0, 1e-9);

  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [p, gnd], voltage: 100 V, series_resistance: 10 Ohm}\n"
      "  - {name: r1, kind: resistor, nodes: [p, n1], resistance: 100 Ohm}\n"
      "  - {name: c1, kind: capacitor, nodes: [n1, gnd], capacitance: 1 mF}\n"
      "  - {name: r2, kind: resistor, nodes: [p, n2], resistance: 1 kOhm}\n"
      "  - {name: c2, kind: capacitor, nodes: [n2, gnd], capacitance: 47 uF}\n"
      "run: {duration: 1 s}\n");
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  auto n1 = column(result.steps, "n1"), n2 = column(result.steps, "n2"), p = column(result.steps, "p");
  for (std::size_t r = 0; r < n1.size(); ++r) {
    double t = result.steps.time(r);
    ASSERT_NEAR(n1[r], v_at(0, t), kWaveformTolerance * Vs) << "t = " << t;
    ASSERT_NEAR(n2[r], v_at(1, t), kWaveformTolerance * Vs) << "t = " << t;
    double vp = (Vs / Rs + v_at(0, t) / R1 + v_at(1, t) / R2) / G;
    ASSERT_NEAR(p[r], vp, kWaveformTolerance * Vs) << "t = " << t;
  }
}

TEST(Transient, CellStringWithOneRcPairMatchesTheClosedForm) {
  // Thevenin cell model [R-Thevenin-cell]: v = OCV - i·R0 - v1; dv1/dt = -v1/(R1·C1) + i/C1; dSOC/dt = -i/(3600 Q).
  // String of s = 10 series, p = 2 parallel: E = s·OCV, R0s = s·R0/p, R1s = s·R1/p, C1s = p·C1/s (series/parallel
  // rules [practice]). Into RL: i = (E - v1)/(R0s + RL), so v1' = a - b·v1 with a = E/((R0s + RL)·C1s),
  // b = (1/(R0s + RL) + 1/R1s)/C1s, and v1 = (a/b)(1 - e^(-bt)) [derived: linear first-order ODE].
  const int s = 10, p = 2;
  const double ocv = 3.7, R0 = 20e-3, R1 = 10e-3, C1 = 2e3, Q = 5.0, soc0 = 0.8, RL = 1.0;
  const double E = s * ocv, R0s = s * R0 / p, R1s = s * R1 / p, C1s = p * C1 / s;
  const double a = E / ((R0s + RL) * C1s), b = (1 / (R0s + RL) + 1 / R1s) / C1s;
  auto v1_at = [&](double t) { return a / b * (1 - std::exp(-b * t)); };
  auto current_at = [&](double t) { return (E - v1_at(t)) / (R0s + RL); };
  // SOC: the integral of i, with ∫v1 = (a/b)(t - (1 - e^(-bt))/b); the string's charge is p·Q [derived].
  auto soc_at = [&](double t) {
    double charge = (E * t - a / b * (t - (1 - std::exp(-b * t)) / b)) / (R0s + RL);
    return soc0 - charge / (p * 3600.0 * Q);
  };

  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - name: pack\n"
      "    kind: cell_string\n"
      "    nodes: [plus, gnd]\n"
      "    cells_in_series: 10\n"
      "    cells_in_parallel: 2\n"
      "    cell_voltage: 3.7 V\n"
      "    cell_resistance: 20 mOhm\n"
      "    polarisation: [{resistance: 10 mOhm, capacitance: 2 kF}]\n"
      "    cell_capacity: 5 Ah\n"
      "    initial_soc: 80 %\n"
      "  - {name: load, kind: resistor, nodes: [plus, gnd], resistance: 1 Ohm}\n"
      "run: {duration: 60 s}\n");
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  auto current = column(result.steps, "pack.current");
  auto terminal = column(result.steps, "plus");
  auto soc = column(result.steps, "pack.soc");
  for (std::size_t r = 0; r < current.size(); ++r) {
    double t = result.steps.time(r);
    ASSERT_NEAR(current[r], current_at(t), kWaveformTolerance * E / RL) << "t = " << t;  // discharge positive
    ASSERT_NEAR(terminal[r], RL * current_at(t), kWaveformTolerance * E) << "t = " << t;
    ASSERT_NEAR(soc[r], 100.0 * soc_at(t), kWaveformTolerance * 100.0) << "t = " << t;
  }
  // The polarisation pair has settled after 60 s (b·60 ≈ 3); the current sits between E/(R0s + RL) and
  // E/(R0s + R1s + RL) as the closed form says.
  EXPECT_LT(current.back(), E / (R0s + RL));
  EXPECT_GT(current.back(), E / (R0s + R1s + RL));
}

TEST(Transient, InductorCurrentThroughAnOpeningContactorNeitherCrashesNorHangs) {
  // 100 V through a closed contactor into 1 mH + 10 Ohm; the contactor opens at 10 ms carrying ~10 A.
  // With the open resistance of 100 MOhm the current collapses in L/R ≈ 1e-11 s: the solver must cope.
  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 100 V}\n"
      "  - {name: k1, kind: contactor, nodes: [plus, a], initial: closed, arc: off, parting_time: 0 s}\n"
      "  - {name: choke, kind: inductor, nodes: [a, b], inductance: 1 mH}\n"
      "  - {name: r1, kind: resistor, nodes: [b, gnd], resistance: 10 Ohm}\n"
      "events:\n"
      "  - {at: 10 ms, open: k1}\n"
      "run: {duration: 20 ms}\n");
  Result result = sim.run();  // default tolerances, as a user would run it
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  EXPECT_DOUBLE_EQ(result.end_time, 20e-3);
  EXPECT_LT(result.statistics.steps, 20000);
  // Current at opening: I·(1 - e^(-t R/L)) with tau = L/R = 0.1 ms, fully settled at 10 ms [R-RL-step].
  const double R_closed = 0.3e-3;  // contactor default
  const double i_open = 100.0 / (10.0 + R_closed);
  auto current = column(result.steps, "choke.current");
  EXPECT_NEAR(linkrise::testing::value_at(result.steps, "choke.current", 10e-3), i_open, 1e-6 * i_open);
  // Afterwards only the open contactor's leakage flows: 100 V / 100 MOhm [Ohm's law].
  EXPECT_NEAR(current.back(), 100.0 / (100e6 + 10.0), 1e-3 * 1e-6);
  // The inductor's energy ½·L·i² went into the opening contact (its resistance dominates the loop 1e7:1);
  // the closed-phase heat adds at most I²·R_closed·10 ms [energy conservation, Joule's law].
  auto audit = linkrise::analysis::audit_energy(sim.circuit, result);
  const double magnetic = 0.5 * 1e-3 * i_open * i_open;
  EXPECT_GT(audit.parts[1].dissipated, magnetic * (1 - 1e-4));
  EXPECT_LT(audit.parts[1].dissipated, magnetic + i_open * i_open * R_closed * 10e-3 + 1e-5);
  EXPECT_LT(audit.relative_residual, 1e-5);
}

TEST(Transient, ScheduledEventsHappenExactlyAtTheirTimes) {
  // RC through a contactor: closed at 37 ms, opened at 81.5 ms (times that no step would hit by chance).
  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: k1, kind: contactor, nodes: [plus, mid], arc: off, parting_time: 0 s}\n"
      "  - {name: r1, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "events:\n"
      "  - {at: 37 ms, close: k1}\n"
      "  - {at: 81.5 ms, open: k1}\n"
      "run: {duration: 150 ms}\n");
  sim.tight();
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  const double t_close = 37e-3, t_open = 81.5e-3;
  ASSERT_EQ(result.timeline.size(), 2u);
  EXPECT_EQ(result.timeline[0].time, t_close);
  EXPECT_EQ(result.timeline[1].time, t_open);
  const auto& steps = result.steps;
  int closed = steps.column("k1.closed"), link = steps.column("link");
  for (double t_event : {t_close, t_open}) {
    std::vector<std::size_t> rows;
    for (std::size_t r = 0; r < steps.row_count(); ++r) {
      if (steps.time(r) == t_event) rows.push_back(r);
    }
    ASSERT_EQ(rows.size(), 2u) << "a row before and a row after the switching at " << t_event;
    EXPECT_EQ(steps.value(rows[0], closed), t_event == t_close ? 0.0 : 1.0);
    EXPECT_EQ(steps.value(rows[1], closed), t_event == t_close ? 1.0 : 0.0);
    EXPECT_EQ(steps.value(rows[0], link), steps.value(rows[1], link));  // the capacitor voltage is continuous
  }
  // Three RC segments with the contactor's resistance (0.3 mOhm closed, 100 MOhm open) in series [R-RC-charge].
  auto segment = [](double v_start, double dt, double r_total) { return kV + (v_start - kV) * std::exp(-dt / (r_total * kC)); };
  const double r_open = kR + 100e6, r_closed = kR + 0.3e-3;
  const double v_close = segment(0.0, t_close, r_open);
  const double v_open = segment(v_close, t_open - t_close, r_closed);
  for (std::size_t r = 0; r < steps.row_count(); ++r) {
    double t = steps.time(r);
    double expected = t <= t_close ? segment(0.0, t, r_open)
                      : t <= t_open ? segment(v_close, t - t_close, r_closed)
                                    : segment(v_open, t - t_open, r_open);
    ASSERT_NEAR(steps.value(r, link), expected, kWaveformTolerance * kV) << "t = " << t;
  }
}

TEST(Transient, ConstantPowerLoadBeyondMaximumPowerCollapsesTheLink) {
  // P = 50 kW > Vs²/(4R) = 40 kW: no operating point above the floor ([R-CPL-equilibrium], maximum power transfer).
  // From C·dv/dt = (Vs - v)/R - P/v, with u = v - Vs/2 and a² = P·R - Vs²/4 > 0:
  //   t(v) = R·C·[F(v0) - F(v)],  F(v) = ½·ln(u² + a²) + Vs/(2a)·atan(u/a)   [derived: separable ODE].
  // Below its 1 mV floor the load is a 2e-11 Ohm resistor, so the link settles at Vs·Rf/(R + Rf) [Ohm's law].
  // (Regression: the network Newton once stalled at the floor's kink here and the run failed.)
  const double Vs = 400, R = 1, C = 1e-3, P = 50e3, v0 = 390, Vr = 1e-3;
  const double a = std::sqrt(P * R - Vs * Vs / 4);
  auto F = [&](double v) {
    double u = v - Vs / 2;
    return 0.5 * std::log(u * u + a * a) + Vs / (2 * a) * std::atan(u / a);
  };
  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V, series_resistance: 1 Ohm}\n"
      "  - {name: link, kind: capacitor, nodes: [plus, gnd], capacitance: 1 mF, initial_voltage: 390 V}\n"
      "  - {name: inverter, kind: constant_power_load, nodes: [plus, gnd], power: 50 kW, resistive_below: 1 mV}\n"
      "run: {duration: 20 ms}\n");
  // Default tolerances (rtol 1e-7), as a user runs it: the crossing time to 100 rtol.
  sim.options.watches.push_back(level_watch(sim.circuit, "plus", 100.0));
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  ASSERT_EQ(result.crossings.size(), 1u);
  const double t_100 = R * C * (F(v0) - F(100.0));
  EXPECT_NEAR(result.crossings.front().time, t_100, 1e-5 * t_100);
  const double floor_resistance = Vr * Vr / P;
  const double v_end = Vs * floor_resistance / (R + floor_resistance);
  auto link = column(result.steps, "plus");
  EXPECT_NEAR(link.back(), v_end, 1e-3 * v_end);
}

TEST(Transient, IllegalToleranceIsReportedByNameAndSundialsPrintsNothing) {
  // A caller bypassing the run block's check (netlist/run_spec.h) hands CVODE a negative rtol; CVODE rejects it
  // (CV_ILL_INPUT, its documented reply to rtol < 0, SUNDIALS CVODES guide [mem]). The driver names the call;
  // CVODE's own report, and the statistics read after the failure, print nothing.
  Simulation sim(rc_case());
  sim.options.relative_tolerance = -1.0;
  ::testing::internal::CaptureStderr();
  Result result = sim.run();
  std::string printed = ::testing::internal::GetCapturedStderr();
  EXPECT_EQ(result.outcome, Outcome::SolverFailure);
  EXPECT_NE(result.message.find("tolerances failed with CV_ILL_INPUT"), std::string::npos) << result.message;
  EXPECT_TRUE(printed.empty()) << printed;
}

// A root that changes no mode (the constant-power load's threshold crossed again while it is already on) leaves
// CVODE's own step reaching past the returned root time; a BMS sample there scheduled the pre-charge contactor's
// opening inside that step, and the driver once asked CVODE for a stop time behind its own time (CV_ILL_INPUT).
// The stored sizing case with a doubled link and a slow resistor ran into it at t ≈ 2.94 s.
TEST(Transient, ACommandDueInsideTheStepPastARootIsMet) {
  const std::string file = std::string(LINKRISE_SOURCE_DIR) + "/cases/boat_104s_sizing.yaml";
  for (const char* resistance : {"110.8 Ohm", "110.79 Ohm", "110.75 Ohm"}) {
    const auto evaluation = linkrise::app::evaluate_case_file(
        file, {{"r_pre.resistance", resistance, {}}, {"link.capacitance", "2.2 mF", {}}, {"run.duration", "4.04 s", {}}});
    EXPECT_EQ(evaluation.status, linkrise::app::CaseEvaluation::Status::Evaluated) << resistance << ": " << evaluation.message;
    EXPECT_EQ(evaluation.outcome, "timeout") << resistance;  // the doubled link times out twice at this resistance
  }
}

// Requested output times (uneven, with a repeat and both ends) come from the dense output: the RC closed form
// [R-RC-charge] holds there to the same accuracy as on the step rows, and only the requested columns are kept.
TEST(Transient, OutputTimesGiveDenseOutputAtExactlyThoseTimes) {
  Simulation sim(rc_case());
  sim.tight();
  sim.options.output_times = {0.0, 1e-4, 0.0123, 0.0123, 0.05, 0.1, 0.31416, 0.5};
  const auto headers = linkrise::solver::waveform_headers(sim.circuit);
  sim.options.output_columns = {static_cast<int>(std::find(headers.begin(), headers.end(), "link [V]") - headers.begin())};
  Result result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  ASSERT_EQ(result.samples.row_count(), sim.options.output_times.size());
  ASSERT_EQ(result.samples.column_count(), 1);
  EXPECT_EQ(result.samples.headers().front(), "link [V]");
  for (std::size_t r = 0; r < sim.options.output_times.size(); ++r) {
    const double t = sim.options.output_times[r];
    EXPECT_EQ(result.samples.time(r), t);
    EXPECT_NEAR(result.samples.value(r, 0), rc_voltage(t), kWaveformTolerance * kV) << "t = " << t;
  }
}

TEST(Transient, OutputTimesOutOfOrderOrOutsideTheRunAreRefused) {
  Simulation sim(rc_case());
  sim.options.output_times = {0.2, 0.1};
  EXPECT_THROW(sim.run(), std::invalid_argument);
  sim.options.output_times = {0.1, 0.6};  // the run lasts 500 ms
  EXPECT_THROW(sim.run(), std::invalid_argument);
  sim.options.output_times = {0.1};
  sim.options.output_columns = {99};
  EXPECT_THROW(sim.run(), std::invalid_argument);
}
