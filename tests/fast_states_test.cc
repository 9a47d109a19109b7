// Fast states settled after a switching (solver/fast_states.h) on a series R-L-C closed at 1 ms (the contact
// adds 1 uOhm, 2.5e-8 of R): 400 V through
// 40 Ohm and 2 uH into 1 mF. The cable current's time constant L/R = 50 ns is 1.25e-6 of the charge's R·C = 40 ms,
// below 100·rtol at the default rtol 1e-7, so it starts at its quasi-steady value. Everything is checked against
// the closed forms of the overdamped series R-L-C step (docs/references.md [R-RLC-step], [R-RL-step],
// [R-RC-energy]) at tolerances tied to the default rtol.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "analysis/energy_audit.h"
#include "circuit_fixture.h"
#include "solver/fast_states.h"

namespace {
using linkrise::testing::Simulation;

constexpr double kV = 400.0, kR = 40.0, kL = 2e-6, kC = 1e-3, kClose = 1e-3;

std::string series_case(const std::string& fast_states) {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: k, kind: contactor, nodes: [plus, a], closed_resistance: 1 uOhm, arc: off, parting_time: 0 s}\n"
         "  - {name: r, kind: resistor, nodes: [a, b], resistance: 40 Ohm}\n"
         "  - {name: cable, kind: cable, nodes: [b, out], resistance: 0 Ohm, inductance: 2 uH}\n"
         "  - {name: link, kind: capacitor, nodes: [out, gnd], capacitance: 1 mF}\n"
         "events:\n"
         "  - {at: 1 ms, close: k}\n"
         "run: {duration: 100 ms, fast_states: " + fast_states + "}\n";
}

// Overdamped series R-L-C from rest [R-RLC-step]: roots s1,2 and the capacitor voltage.
double capacitor_voltage(double t) {
  const double alpha = kR / (2 * kL), omega0 = 1 / std::sqrt(kL * kC);
  const double root = std::sqrt(alpha * alpha - omega0 * omega0);
  const double s1 = -alpha + root, s2 = -alpha - root;
  return kV * (1 - (s1 * std::exp(s2 * t) - s2 * std::exp(s1 * t)) / (s1 - s2));
}

long rows_between(const linkrise::solver::Waveform& rows, double from, double to) {
  const auto& times = rows.times();
  return std::count_if(times.begin(), times.end(), [&](double t) { return t > from && t <= to; });
}

TEST(FastStates, ClosureStartsTheCableCurrentAtItsQuasiSteadyValue) {
  Simulation settled(series_case("settle"));
  settled.options.sample = 1e-3;  // a grid from the solver's dense output: rows far apart interpolate badly
  auto result = settled.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  // Twice: at the start (the cable current through the open contact, L/100 MOhm) and at the closure.
  EXPECT_EQ(result.statistics.settlings, 2);
  // The step collapse is gone: a handful of steps in the first millisecond after the closure.
  EXPECT_LE(rows_between(result.steps, kClose, kClose + 1e-3), 30);
  Simulation resolved(series_case("resolve"));
  auto reference = resolved.run();
  EXPECT_GT(rows_between(reference.steps, kClose, kClose + 1e-3), rows_between(result.steps, kClose, kClose + 1e-3));
  // The charge follows the R-L-C closed form (the skipped 50 ns rise shifts it by L/R, which the slow states'
  // correction restores) within 10·rtol of V [R-RLC-step].
  for (double t : {2e-3, 11e-3, 41e-3, 100e-3}) {
    EXPECT_NEAR(linkrise::testing::value_at(result.samples, "out", t), capacitor_voltage(t - kClose), 1e-6 * kV) << t;
  }
}

TEST(FastStates, TheSkippedTransientKeepsItsPeakAndItsEnergy) {
  Simulation settled(series_case("settle"));
  auto result = settled.run();
  // The inductor takes (V − R·i)·i while its current rises, largest at i = V/(2R): V²/(4R) [R-RL-step, derived];
  // the capacitor is still at a few µV then, so the peak row holds it to the grid's parabola error (< 1e-4).
  const int power = result.steps.column("cable.power");
  ASSERT_GE(power, 0);
  double peak = 0.0;
  for (std::size_t r = 0; r < result.steps.row_count(); ++r) peak = std::max(peak, result.steps.value(r, power));
  EXPECT_NEAR(peak, kV * kV / (4 * kR), 1e-4 * kV * kV / (4 * kR));
  // Heat of the charge so far: R·∫i² dt with i = (V/R)·e^(−t/RC), ½·C·V²·(1 − e^(−2t/RC)) [R-RC-energy]; the
  // inductor's ½·L·i² (4e-5 J) is within the tolerance, so the skipped transient's share must be booked.
  auto audit = linkrise::analysis::audit_energy(settled.circuit, result);
  const double span = 100e-3 - kClose;
  const double heat = 0.5 * kC * kV * kV * (1 - std::exp(-2 * span / (kR * kC)));
  EXPECT_NEAR(audit.parts[2].dissipated, heat, 1e-6 * heat);
  EXPECT_LE(audit.relative_residual, 10 * settled.options.relative_tolerance);
}

TEST(FastStates, SplitTakesOnlyModesFarFasterThanTheRest) {
  // A 2×2 Jacobian with decay rates 1e7 /s and 25 /s and weak coupling: the fast state alone qualifies at
  // ratio 1e-5 (τ_F/τ_S = 2.5e-6), and nothing at ratio 1e-6.
  Eigen::MatrixXd jacobian(2, 2);
  jacobian << -2e7, -500.0, 1000.0, -25.0;
  auto split = linkrise::solver::split_fast_states(jacobian, 1e-5, 1.0);
  ASSERT_EQ(split.fast.size(), 1u);
  EXPECT_EQ(split.fast[0], 0);
  EXPECT_TRUE(linkrise::solver::split_fast_states(jacobian, 1e-6, 1.0).fast.empty());
  // Two ringing fast states (complex eigenvalues) are not settled: their transient is not monotone.
  Eigen::MatrixXd ringing(3, 3);
  ringing << -1e6, -1e8, 0.0, 1e8, -1e6, 0.0, 0.0, 1.0, -10.0;
  EXPECT_TRUE(linkrise::solver::split_fast_states(ringing, 1e-3, 1.0).fast.empty());
}

TEST(FastStates, ASplitRightAtTheRatioIsStillFound) {
  // Decay rates 1e6 /s, b and 1 /s and a state of zero rate (a SOC fed by the fast one). At ratio 1e-5 the fastest
  // state splits off while b ≤ 10 /s (τ_F = 1 µs ≤ 1e-5 · 1/b): b = 9.9 splits, b = 10.1 does not. The eigenvalue
  // bounds that spare the eigenvalue problems (solver/fast_states.cc) must leave this to the eigenvalues.
  for (double b : {9.9, 10.1}) {
    Eigen::MatrixXd jacobian = Eigen::MatrixXd::Zero(4, 4);
    jacobian(0, 0) = -1e6;
    jacobian(1, 1) = -b;
    jacobian(2, 2) = -1.0;
    jacobian(3, 0) = -1e-3;
    const auto split = linkrise::solver::split_fast_states(jacobian, 1e-5, 10.0);
    if (b < 10.0) {
      ASSERT_EQ(split.fast.size(), 1u) << b;
      EXPECT_EQ(split.fast[0], 0);
      EXPECT_NEAR(split.slow_time, 1.0 / b, 1e-12);
    } else {
      EXPECT_TRUE(split.fast.empty()) << b;
    }
  }
}

}  // namespace
