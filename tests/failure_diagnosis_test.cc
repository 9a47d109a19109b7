// The solver's give-up diagnosis on plain numbers: the fastest time constant and ringing frequency from the
// Jacobian's eigenvalues against closed forms, the worst state from CVODE's weighted local errors, and the
// suggestion each picture leads to. The driver's part (a real run that gives up) is in cli_test and
// transient_test.
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "solver/failure_diagnosis.h"

namespace {
using linkrise::solver::diagnose_failure;
using linkrise::solver::failure_text;
using linkrise::solver::FailureEvidence;
using linkrise::solver::GiveUp;

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// A series RLC driven by a source: states (capacitor voltage, inductor current);
// dv/dt = i/C, di/dt = (V − v − R·i)/L, so J = [[0, 1/C], [−1/L, −R/L]].
FailureEvidence rlc_evidence(double r, double l, double c) {
  FailureEvidence evidence;
  evidence.reason = GiveUp::StepBudget;
  evidence.cause = "more than 2000 steps";
  evidence.time = 0.25;
  evidence.duration = 1.0;
  evidence.state_parts = {"c_link", "cable"};
  evidence.state_quantities = {"voltage", "current"};
  evidence.state_units = {"V", "A"};
  evidence.jacobian.resize(2, 2);
  evidence.jacobian << 0.0, 1.0 / c, -1.0 / l, -r / l;
  return evidence;
}
}  // namespace

TEST(FailureDiagnosis, RingingCircuitGivesItsNaturalTimeConstantAndDampedFrequency) {
  // Wikibooks' worked circuit, docs/references.md [R-RLC-step]: 1 kΩ, 0.5 H, 100 nF → ω0 = 4472.14 rad/s,
  // ωd = 4358.90 rad/s. The eigenvalues are −α ± j·ωd, of magnitude ω0, so τ = 1/ω0 and f = ωd/2π.
  const double r = 1e3, l = 0.5, c = 100e-9;
  FailureEvidence evidence = rlc_evidence(r, l, c);
  evidence.step = 20e-6;
  auto diagnosis = diagnose_failure(evidence);
  const double omega0 = 1.0 / std::sqrt(l * c);
  const double alpha = r / (2.0 * l);
  const double omega_d = std::sqrt(omega0 * omega0 - alpha * alpha);
  ASSERT_TRUE(diagnosis.fastest_time_constant.has_value());
  // Eigen's QR iteration is accurate to rounding on a 2×2 matrix: 1e-12 relative.
  EXPECT_NEAR(*diagnosis.fastest_time_constant, 1.0 / omega0, 1e-12 / omega0);
  EXPECT_NEAR(*diagnosis.fastest_time_constant, 1.0 / 4472.14, 1e-6 / 4472.14);  // the page's 6 digits
  ASSERT_TRUE(diagnosis.ringing_frequency.has_value());
  EXPECT_NEAR(*diagnosis.ringing_frequency, omega_d / (2.0 * std::numbers::pi), 1e-9 * omega_d);
  EXPECT_NEAR(*diagnosis.ringing_frequency, 4358.90 / (2.0 * std::numbers::pi), 1e-6 * 4358.90);
  EXPECT_TRUE(contains(diagnosis.suggestion, "rings at 694 Hz")) << diagnosis.suggestion;
  EXPECT_TRUE(contains(diagnosis.suggestion, "raise run.max_steps")) << diagnosis.suggestion;
}

TEST(FailureDiagnosis, FastRcNamesItsTimeConstantAndThePartItLivesIn) {
  // docs/references.md [R-RC-charge]: dv/dt = (V − v)/(R·C), one eigenvalue −1/(R·C), τ = R·C; here a 1 nF stray
  // capacitance behind 1 Ω (τ = 1 ns) beside a 1 mF link behind 47 Ω (τ = 47 ms), not coupled.
  FailureEvidence evidence;
  evidence.reason = GiveUp::WallBudget;
  evidence.time = 0.1;
  evidence.duration = 2.0;
  evidence.step = 2e-9;
  evidence.state_parts = {"c_link", "c_stray"};
  evidence.state_quantities = {"voltage", "voltage"};
  evidence.state_units = {"V", "V"};
  evidence.jacobian.resize(2, 2);
  evidence.jacobian << -1.0 / (47.0 * 1e-3), 0.0, 0.0, -1.0 / (1.0 * 1e-9);
  evidence.error_weights = {1.0 / (1e-7 * 400.0 + 1e-8), 1.0 / (1e-7 * 400.0 + 1e-8)};
  evidence.local_errors = {1e-7, 3e-5};
  auto diagnosis = diagnose_failure(evidence);
  ASSERT_TRUE(diagnosis.fastest_time_constant.has_value());
  EXPECT_NEAR(*diagnosis.fastest_time_constant, 1e-9, 1e-21);
  EXPECT_FALSE(diagnosis.ringing_frequency.has_value());
  ASSERT_TRUE(diagnosis.fastest_state.has_value());
  EXPECT_EQ(*diagnosis.fastest_state, 1);
  ASSERT_TRUE(diagnosis.worst_state.has_value());
  EXPECT_EQ(*diagnosis.worst_state, 1);
  // |error| × weight: 3e-5 / (1e-7·400 + 1e-8) = 0.74981 (CVODE's weighted error, 1 = at the tolerance).
  EXPECT_NEAR(diagnosis.worst_weighted_error, 3e-5 / (4e-5 + 1e-8), 1e-12);
  std::string text = failure_text(evidence, diagnosis);
  EXPECT_TRUE(contains(text, "simulated time reached: 100 ms of 2 s; step size reached: 2 ns")) << text;
  EXPECT_TRUE(contains(text, "state furthest off its tolerance: part 'c_stray' voltage (local error 0.75 times its tolerance)")) << text;
  EXPECT_TRUE(contains(text, "fastest time constant of the circuit: 1 ns, mostly part 'c_stray' voltage")) << text;
  EXPECT_TRUE(contains(diagnosis.suggestion, "2e+09 time constants")) << diagnosis.suggestion;
  EXPECT_TRUE(contains(diagnosis.suggestion, "raise run.max_wall_time")) << diagnosis.suggestion;
}

TEST(FailureDiagnosis, AStepFarBelowTheFastestModePointsAtSomethingNonSmooth) {
  // The 1 kΩ / 0.5 H / 100 nF circuit (τ = 224 µs) held at a 1 ns step: the circuit's speed does not explain it.
  FailureEvidence evidence = rlc_evidence(1e3, 0.5, 100e-9);
  evidence.reason = GiveUp::SolverTrouble;
  evidence.step = 1e-9;
  evidence.error_weights = {1.0, 1.0};
  evidence.local_errors = {0.1, 2.0};
  auto diagnosis = diagnose_failure(evidence);
  EXPECT_TRUE(contains(diagnosis.suggestion, "non-smooth")) << diagnosis.suggestion;
  EXPECT_TRUE(contains(diagnosis.suggestion, "look at part 'cable' current")) << diagnosis.suggestion;
  EXPECT_FALSE(contains(diagnosis.suggestion, "run.max_steps")) << "CVODE's own trouble is no budget";
}

TEST(FailureDiagnosis, AStepHeldAtTheRunsBoundSaysSo) {
  FailureEvidence evidence = rlc_evidence(1e3, 0.5, 100e-9);
  evidence.step = 1e-9;
  evidence.max_step = 1e-9;
  auto diagnosis = diagnose_failure(evidence);
  EXPECT_TRUE(contains(diagnosis.suggestion, "held at run.max_step = 1 ns")) << diagnosis.suggestion;
  EXPECT_TRUE(contains(diagnosis.suggestion, "1e+09 of")) << diagnosis.suggestion;  // 1 s of run in 1 ns steps
}

TEST(FailureDiagnosis, WithoutAJacobianItStillSaysWhatToCheck) {
  FailureEvidence evidence;
  evidence.cause = "the circuit equations have no solution";
  evidence.duration = 1.0;
  auto diagnosis = diagnose_failure(evidence);
  EXPECT_FALSE(diagnosis.fastest_time_constant.has_value());
  EXPECT_FALSE(diagnosis.worst_state.has_value());
  EXPECT_TRUE(contains(diagnosis.suggestion, "constant-power load")) << diagnosis.suggestion;
  EXPECT_FALSE(contains(failure_text(evidence, diagnosis), "step size")) << "no step was taken";
}
