// The carried transient (solver/carried_transient.h) against the closed forms of the series R-L-C step
// (docs/references.md [R-RLC-step]): its offset is the exact solution of the linearised equations, so a linear
// circuit's whole transient is carried and the integrator's steps no longer follow it.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "analysis/energy_audit.h"
#include "circuit_fixture.h"
#include "solver/carried_transient.h"

namespace {
using linkrise::solver::CarriedTransient;
using linkrise::testing::Simulation;

// Series R-L-C from rest, states (i_L, v_C): i' = (V − R·i − v)/L, v' = i/C.
struct SeriesCircuit {
  double V, R, L, C;
  Eigen::MatrixXd jacobian() const {
    Eigen::MatrixXd j(2, 2);
    j << -R / L, -1.0 / L, 1.0 / C, 0.0;
    return j;
  }
  Eigen::VectorXd rates_at_rest() const { return Eigen::Vector2d(V / L, 0.0); }
};

// [R-RLC-step]: the current of a step V into the circuit at rest, under- or overdamped.
double step_current(const SeriesCircuit& c, double t) {
  const double alpha = c.R / (2 * c.L), omega0 = 1 / std::sqrt(c.L * c.C);
  if (alpha < omega0) {
    const double omega_d = std::sqrt(omega0 * omega0 - alpha * alpha);
    return c.V / (omega_d * c.L) * std::exp(-alpha * t) * std::sin(omega_d * t);
  }
  const double root = std::sqrt(alpha * alpha - omega0 * omega0);
  const double s1 = -alpha + root, s2 = -alpha - root;
  return c.V / (c.L * (s1 - s2)) * (std::exp(s1 * t) - std::exp(s2 * t));
}

Eigen::VectorXd unit_tolerances() { return Eigen::Vector2d(1e-9, 1e-9); }

TEST(CarriedTransient, OffsetIsTheRLCStepResponse) {
  // Overdamped: the main-closure inrush of 30 V into 0.12 Ohm, 3 uH and 1.5 mF (τ of 25 us and 0.18 ms); and
  // underdamped: a ringing link, 400 V into 10 mOhm, 2 uH and 100 uF.
  for (const SeriesCircuit c : {SeriesCircuit{30.0, 0.12, 3e-6, 1.5e-3}, SeriesCircuit{400.0, 0.01, 2e-6, 1e-4}}) {
    const CarriedTransient carried(c.jacobian(), c.rates_at_rest(), 0.5, 2.0, unit_tolerances());
    ASSERT_EQ(carried.modes(), 2);
    const double peak = std::fabs(step_current(c, 1e-6));
    for (double elapsed : {0.0, 1e-7, 3e-6, 25e-6, 2e-4, 1e-3, 5e-2}) {
      double offset[2] = {0.0, 0.0};
      carried.add_offset(0.5 + elapsed, offset);
      // To the rounding of the modal sum: near the start two terms of the order of V/R cancel.
      EXPECT_NEAR(offset[0], step_current(c, elapsed), 1e-11 * std::max(peak, c.V / c.R)) << elapsed;
      // Its rate is the circuit's: the offset minus the integrator's part y = x − offset has y' = 0 here.
      double rate[2] = {c.V / c.L - c.R / c.L * offset[0] - offset[1] / c.L, offset[0] / c.C};
      carried.subtract_rate(0.5 + elapsed, rate);
      EXPECT_NEAR(rate[0], 0.0, 1e-9 * c.V / c.L) << elapsed;
      EXPECT_NEAR(rate[1], 0.0, 1e-9 * c.V / c.R / c.C) << elapsed;
    }
    // Where it settles: the capacitor at V, no current.
    double final[2] = {0.0, 0.0};
    carried.add_final_offset(final);
    EXPECT_NEAR(final[0], 0.0, 1e-12 * c.V / c.R);
    EXPECT_NEAR(final[1], c.V, 1e-12 * c.V);
  }
}

TEST(CarriedTransient, LeavesModesThatDoNotDecayWithinTheRunToTheIntegrator) {
  // A charge integrator (λ = 0) beside a 1 ms decay, and a growing mode (a constant-power load's negative
  // resistance): only the decay is carried.
  Eigen::MatrixXd jacobian(3, 3);
  jacobian << -1000.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.5;
  const CarriedTransient carried(jacobian, Eigen::Vector3d(1.0, 2.0, 3.0), 0.0, 2.0, Eigen::Vector3d::Constant(1e-9));
  EXPECT_EQ(carried.modes(), 1);
  EXPECT_NEAR(carried.longest_time(), 1e-3, 1e-15);
  // A 10 s decay in a 2 s run is not carried either.
  Eigen::MatrixXd slow(1, 1);
  slow << -0.1;
  EXPECT_FALSE(CarriedTransient(slow, Eigen::VectorXd::Ones(1), 0.0, 2.0, Eigen::VectorXd::Ones(1)).active());
}

TEST(CarriedTransient, CarriesOnlyAFastClusterThatStandsApart) {
  // Decays at 5e4 and 1e4 /s (an inrush's two modes, five times apart) beside a polarisation at 2 /s: the pair is
  // carried, the polarisation (5000 times slower than the slower of the pair) is not.
  Eigen::MatrixXd jacobian = Eigen::Vector3d(-5e4, -1e4, -2.0).asDiagonal();
  const CarriedTransient inrush(jacobian, Eigen::Vector3d(1.0, 1.0, 1.0), 0.0, 2.0, Eigen::Vector3d::Constant(1e-9));
  EXPECT_EQ(inrush.modes(), 2);
  EXPECT_NEAR(inrush.longest_time(), 1e-4, 1e-16);
  // A pre-charge's R·C of 70 ms is 3.5 % of a 2 s run: the run's main dynamics, left to the integrator.
  jacobian = Eigen::Vector3d(-1.0 / 0.07, -2.0, -0.01).asDiagonal();
  EXPECT_FALSE(CarriedTransient(jacobian, Eigen::Vector3d(1.0, 1.0, 1.0), 0.0, 2.0, Eigen::Vector3d::Constant(1e-9))
                   .active());
  // 1e4 /s alone is only 20 times faster than 500 /s, so the cluster is the two of them; with a third mode at
  // 20 /s no cluster stands 100 times apart, and nothing is carried.
  jacobian = Eigen::Vector3d(-1e4, -500.0, -0.01).asDiagonal();
  const CarriedTransient crowded(jacobian, Eigen::Vector3d(1.0, 1.0, 1.0), 0.0, 2.0, Eigen::Vector3d::Constant(1e-9));
  EXPECT_EQ(crowded.modes(), 2);  // 2 ms, 0.1 % of the run, 5e4 times faster than 0.01 /s
  jacobian = Eigen::Vector3d(-1e4, -500.0, -20.0).asDiagonal();
  EXPECT_FALSE(CarriedTransient(jacobian, Eigen::Vector3d(1.0, 1.0, 1.0), 0.0, 2.0, Eigen::Vector3d::Constant(1e-9))
                   .active());
}

TEST(CarriedTransient, RowsAreEvenThenGrowByAFixedRatio) {
  const SeriesCircuit c{30.0, 0.12, 3e-6, 1.5e-3};
  const CarriedTransient carried(c.jacobian(), c.rates_at_rest(), 1.0, 2.0, unit_tolerances());
  std::vector<double> rows;
  for (double row = carried.row_after(1.0); std::isfinite(row); row = carried.row_after(row)) rows.push_back(row);
  ASSERT_GT(rows.size(), 20u);
  const double first = rows[0] - 1.0;
  for (int k = 1; k < 10; ++k) EXPECT_NEAR(rows[k] - rows[k - 1], first, 1e-9 * first) << k;
  for (std::size_t k = 11; k < rows.size(); ++k) {
    EXPECT_NEAR((rows[k] - 1.0) / (rows[k - 1] - 1.0), 1.05, 1e-6) << k;
    EXPECT_NEAR(carried.row_spacing(rows[k]), rows[k] - rows[k - 1], 1e-6 * (rows[k] - rows[k - 1])) << k;
  }
  // From the fastest mode's 1/50 to 20 times the slowest (both excursions far above the tolerance).
  const double alpha = c.R / (2 * c.L), root = std::sqrt(alpha * alpha - 1 / (c.L * c.C));
  EXPECT_NEAR(first, 0.02 / (alpha + root), 1e-9 * first);
  EXPECT_LE(rows.back() - 1.0, 20.0 / (alpha - root));
  EXPECT_GT(rows.back() - 1.0, 20.0 / (alpha - root) / 1.05);
  // A transient whose excursion is within the tolerance needs no rows.
  const CarriedTransient small(c.jacobian(), 1e-12 * c.rates_at_rest(), 1.0, 2.0, unit_tolerances());
  EXPECT_TRUE(small.active());
  EXPECT_FALSE(std::isfinite(small.row_after(1.0)));
}

TEST(CarriedTransient, ARingingModeHoldsStepsAndRowsToItsPeriod) {
  // Underdamped: 400 V into 10 mOhm, 2 uH and 100 uF rings at ωd ≈ 7.07e4 rad/s, decaying at α = 2500 /s
  // [R-RLC-step]. CVODE finds roots by sign changes at its step ends, so a step may not span a swing of the
  // carried offset: an eighth of the period while the ringing lasts (20/α), and rows 1/20 of the period apart.
  const SeriesCircuit c{400.0, 0.01, 2e-6, 1e-4};
  const double alpha = c.R / (2 * c.L), omega_d = std::sqrt(1 / (c.L * c.C) - alpha * alpha);
  const double period = 2 * M_PI / omega_d;
  const CarriedTransient carried(c.jacobian(), c.rates_at_rest(), 1.0, 2.0, unit_tolerances());
  EXPECT_NEAR(carried.step_limit(1.0 + 1e-4), period / 8, 1e-9 * period);
  EXPECT_NEAR(carried.step_limit(1.0 + 0.99 * 20 / alpha), period / 8, 1e-9 * period);
  EXPECT_FALSE(std::isfinite(carried.step_limit(1.0 + 1.01 * 20 / alpha)));
  double last = 1.0;
  for (double row = carried.row_after(1.0); row < 1.0 + 20 / alpha; row = carried.row_after(row)) {
    EXPECT_LE(row - last, period / 20 * (1 + 1e-9)) << row;
    last = row;
  }
  // An overdamped transient sets no limit.
  const SeriesCircuit damped{30.0, 0.12, 3e-6, 1.5e-3};
  const CarriedTransient monotone(damped.jacobian(), damped.rates_at_rest(), 1.0, 2.0, unit_tolerances());
  EXPECT_FALSE(std::isfinite(monotone.step_limit(1.0)));
}

// A contactor closing 30 V of difference onto the R-L-C above: the run with the transient carried against the
// closed form and against the same run resolved step by step.
std::string inrush_case(const std::string& transients) {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 30 V}\n"
         "  - {name: k, kind: contactor, nodes: [plus, a], closed_resistance: 1 uOhm, arc: off, parting_time: 0 s}\n"
         "  - {name: r, kind: resistor, nodes: [a, b], resistance: 0.12 Ohm}\n"
         "  - {name: cable, kind: cable, nodes: [b, out], resistance: 0 Ohm, inductance: 3 uH}\n"
         "  - {name: link, kind: capacitor, nodes: [out, gnd], capacitance: 1.5 mF}\n"
         "events:\n"
         "  - {at: 1 ms, close: k}\n"
         "run: {duration: 20 ms, transients: " + transients + "}\n";
}

TEST(CarriedTransient, InrushFollowsTheClosedFormInAFewSteps) {
  Simulation carried(inrush_case("carry"));
  carried.options.sample = 1e-5;
  const auto result = carried.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  Simulation resolved(inrush_case("resolve"));
  const auto reference = resolved.run();
  // Against 120-odd steps resolved (CVODE's BDF from order 1 at rtol 1e-7): the circuit is linear, so the
  // integrator's part stays at rest and its steps grow at once.
  EXPECT_LT(result.statistics.steps, 40);
  EXPECT_GT(reference.statistics.steps, 3 * result.statistics.steps);
  // 1 uOhm of closed contact is 8e-6 of R: the closed form with R + 1 uOhm [R-RLC-step], within 10·rtol of the peak.
  const SeriesCircuit c{30.0, 0.12 + 1e-6, 3e-6, 1.5e-3};
  for (double t : {1.01e-3, 1.05e-3, 1.2e-3, 2e-3, 5e-3}) {
    const double current = linkrise::testing::value_at(result.samples, "cable.current", t);
    EXPECT_NEAR(current, step_current(c, t - 1e-3), 1e-6 * 30.0 / 0.12) << t;
  }
  // The heat: R·∫i² dt = ½·C·V² for the whole charge [R-RC-energy]; 20 ms is over a hundred of its time constants.
  auto audit = linkrise::analysis::audit_energy(carried.circuit, result);
  const double heat = 0.5 * 1.5e-3 * 30.0 * 30.0 * 0.12 / (0.12 + 1e-6);
  EXPECT_NEAR(audit.parts[2].dissipated, heat, 1e-6 * heat);
  EXPECT_LE(audit.relative_residual, 10 * carried.options.relative_tolerance);
}

}  // namespace
