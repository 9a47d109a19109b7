// Kind `cable` from geometry, checked through full simulations against handbook formulas
// (docs/references.md [R-wire-pair-inductance], [R-conductor-resistivity]):
//   loop inductance per metre of two parallel round wires, uniform current: L′ = (µ0/π)·[ln(d/r) + ¼] [pub];
//   loop resistance R = ρ20·(1 + α20·(T − 20 °C))·2·length/A, copper ρ20 = 1.68e-8 Ω·m, α20 = 0.00393 /K
//   (CRC Handbook, from memory), aluminium 2.65e-8 Ω·m, 0.00429 /K (handbook tables, from memory).
// The current of a step into the cable alone is i(t) = V/R·(1 − e^(−t·R/L)) (series RL, [R-RL-step]), so the
// simulated current measures both R and L. Runs at rtol 1e-10: compared to 1e-6 relative.
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "solver/circuit.h"
#include "solver/transient.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::solver::Circuit;
using linkrise::solver::Outcome;
using linkrise::testing::case_error;
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::value_at;

constexpr double kMu0 = 4e-7 * std::numbers::pi;

std::string step_into(const std::string& cable, const std::string& ambient = "20 degC") {
  return "ground: gnd\nambient: " + ambient +
         "\nparts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 mV}\n"
         "  - {name: run, kind: cable, nodes: [plus, gnd], " +
         cable + "}\nrun: {duration: 5 ms}\n";
}

// Samples the current every 0.25 ms and compares it to the RL step response with the handbook R and L.
void expect_rl_step(const std::string& yaml, double resistance, double inductance) {
  Circuit circuit(case_from(yaml));
  auto options = linkrise::solver::options_from(circuit);
  options.relative_tolerance = 1e-10;
  options.absolute_tolerance = 1e-12;
  options.sample = 0.25e-3;
  auto result = linkrise::solver::simulate(circuit, options);
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  const double final_current = 10e-3 / resistance, tau = inductance / resistance;
  for (double t = 0.25e-3; t <= 5e-3; t += 0.25e-3) {
    double expected = final_current * (1.0 - std::exp(-t / tau));
    EXPECT_NEAR(value_at(result.samples, "run.current", t), expected, 1e-6 * final_current) << "t = " << t;
  }
}
}  // namespace

TEST(CableGeometry, CopperPairPerMetreMatchesHandbook) {
  const double r = 4e-3, d = 20e-3, area = std::numbers::pi * r * r;
  const double inductance = kMu0 / std::numbers::pi * (std::log(d / r) + 0.25);
  EXPECT_NEAR(inductance, 0.7438e-6, 0.0001e-6);  // [R-wire-pair-inductance]: r = 4 mm, d = 20 mm → 0.7438 µH/m
  const double resistance = 1.68e-8 * 2.0 / area;
  expect_rl_step(step_into("length: 1 m, radius: 4 mm, spacing: 20 mm, material: copper"), resistance, inductance);
  // Given by cross-section instead (r = √(A/π)), 10 m long: R and L scale with the length.
  const double area50 = 50e-6, r50 = std::sqrt(area50 / std::numbers::pi);
  expect_rl_step(step_into("length: 10 m, cross_section: 50 mm², spacing: 20 mm"), 10.0 * 1.68e-8 * 2.0 / area50,
                 10.0 * kMu0 / std::numbers::pi * (std::log(d / r50) + 0.25));
}

TEST(CableGeometry, AluminiumAtConductorTemperature) {
  const double area = 50e-6, r = std::sqrt(area / std::numbers::pi), d = 30e-3;
  const double inductance = 2.0 * kMu0 / std::numbers::pi * (std::log(d / r) + 0.25);
  const double resistance = 2.65e-8 * (1.0 + 0.00429 * (70.0 - 20.0)) * 2.0 * 2.0 / area;
  expect_rl_step(step_into("length: 2 m, cross_section: 50 mm², spacing: 30 mm, material: aluminium, "
                           "conductor_temperature: 70 degC"),
                 resistance, inductance);
}

TEST(CableGeometry, ConductorTemperatureDefaultsToAmbient) {
  const double r = 4e-3, d = 20e-3, area = std::numbers::pi * r * r;
  const double inductance = kMu0 / std::numbers::pi * (std::log(d / r) + 0.25);
  const double resistance = 1.68e-8 * (1.0 + 0.00393 * (60.0 - 20.0)) * 2.0 / area;
  expect_rl_step(step_into("length: 1 m, radius: 4 mm, spacing: 20 mm", "60 degC"), resistance, inductance);
}

TEST(CableGeometry, MixedOrImpossibleGeometryIsAnInputError) {
  auto error = case_error(step_into("resistance: 1 mOhm, inductance: 1 uH, length: 1 m"));
  EXPECT_TRUE(contains(error.what(), "cannot be combined")) << error.what();
  EXPECT_TRUE(contains(error.what(), "test.yaml:")) << error.what();
  error = case_error(step_into("length: 1 m, radius: 4 mm, cross_section: 35 mm², spacing: 20 mm"));
  EXPECT_TRUE(contains(error.what(), "cannot be combined")) << error.what();
  error = case_error(step_into("length: 1 m, radius: 4 mm, spacing: 6 mm"));
  EXPECT_TRUE(contains(error.what(), "spacing")) << error.what();
  error = case_error(step_into("length: 1 m, radius: 4 mm"));
  EXPECT_TRUE(contains(error.what(), "spacing")) << error.what();
  error = case_error(step_into("length: 1 m, radius: 4 mm, spacing: 20 mm, material: brass"));
  EXPECT_TRUE(contains(error.what(), "aluminium")) << error.what();
}
