// Absolute tolerances scaled from the case (solver/absolute_tolerances.h): the scales, the per-state numbers,
// and the ∫i² dt tolerance of a nano-ohm contact, which no longer makes the error test chase rounding.
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <iterator>
#include <string>

#include "solver/absolute_tolerances.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::solver::Outcome;
using linkrise::testing::Simulation;

// 400 V through 100 Ω into 1 mF with an inductor in the loop: states in V (capacitor) and A (inductor).
const char* kRlc =
    "ground: gnd\n"
    "ambient: 40 degC\n"
    "parts:\n"
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
    "  - {name: r1, kind: resistor, nodes: [plus, mid], resistance: 100 Ohm}\n"
    "  - {name: l1, kind: inductor, nodes: [mid, link], inductance: 1 uH}\n"
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
    "run: {duration: 1 s}\n";
}  // namespace

TEST(AbsoluteTolerances, ScalesComeFromTheInitialOperatingPointAndTheAmbient) {
  Simulation sim(kRlc);
  std::vector<double> unknowns(sim.circuit.unknown_count(), 0.0);
  unknowns[sim.circuit.node_index("plus")] = 400.0;  // the source's node; the link starts at 0 V
  unknowns[sim.circuit.node_index("mid")] = -3.0;
  const auto scales = linkrise::solver::case_scales(sim.circuit, unknowns.data());
  EXPECT_DOUBLE_EQ(scales.voltage, 400.0);
  EXPECT_DOUBLE_EQ(scales.current, 400.0);  // the pack over 1 Ω, the stated scale
  EXPECT_NEAR(scales.temperature, 313.15, 1e-9);  // 40 °C in kelvin [SI kelvin offset, from memory]
  std::fill(unknowns.begin(), unknowns.end(), 0.0);
  EXPECT_DOUBLE_EQ(linkrise::solver::case_scales(sim.circuit, unknowns.data()).voltage, 1.0);  // floor 1 V
}

TEST(AbsoluteTolerances, KelvinFollowTheAmbientAndAnExplicitAtolHoldsEveryState) {
  Simulation sim(kRlc);
  EXPECT_TRUE(sim.options.scale_absolute_tolerance);  // no atol in the run block
  linkrise::solver::ToleranceScales scales{400.0, 400.0, 313.15};
  const auto& info = sim.circuit.state_info();
  const auto scaled = linkrise::solver::state_tolerances(sim.circuit, 1e-7, 1e-8, true, scales);
  const auto fixed = linkrise::solver::state_tolerances(sim.circuit, 1e-7, 1e-8, false, scales);
  ASSERT_EQ(scaled.size(), info.size());
  for (std::size_t i = 0; i < info.size(); ++i) {
    EXPECT_DOUBLE_EQ(fixed[i], 1e-8 * info[i].tolerance_scale) << info[i].name;
    EXPECT_DOUBLE_EQ(scaled[i], fixed[i]) << info[i].name;  // volts and amperes keep the fixed atol
  }
  // A thermal resistor's temperatures: rtol × 313.15 K = 3.1e-5 K against atol × 1e3 = 1e-5 K.
  Simulation thermal(std::string(kRlc).replace(std::string(kRlc).find("resistance: 100 Ohm}"), 20,
                                               "resistance: 100 Ohm, thermal: {heat_capacity: 10 J/K, "
                                               "thermal_resistance: 5 K/W}}"));
  const auto& thermal_info = thermal.circuit.state_info();
  const auto thermal_scaled = linkrise::solver::state_tolerances(thermal.circuit, 1e-7, 1e-8, true, scales);
  int temperatures = 0;
  for (std::size_t i = 0; i < thermal_info.size(); ++i) {
    if (thermal_info[i].unit != "K") continue;
    ++temperatures;
    EXPECT_NEAR(thermal_scaled[i], 1e-7 * 313.15, 1e-15) << thermal_info[i].name;
  }
  Simulation given(std::string(kRlc).replace(std::string(kRlc).find("duration: 1 s"), 13, "duration: 1 s, atol: 1e-9"));
  EXPECT_GE(temperatures, 1);
  EXPECT_FALSE(given.options.scale_absolute_tolerance);
}

TEST(AbsoluteTolerances, CurrentSquaredToleranceLoosensOnlyWhereRoundingHidesTheCurrent) {
  linkrise::solver::ToleranceScales scales{100.0, 100.0, 298.15};
  // 1 nOhm at rtol 1e-10: rounding 1e-14·100 V / 1e-9 Ω = 1 mA > 1e-10 · 100 A: held as its heat, atol/R.
  EXPECT_DOUBLE_EQ(linkrise::solver::current_squared_tolerance(1e-10, 1e-12, scales, 1e-9), 1e-3);
  // 0.3 mΩ at rtol 1e-10: rounding 3.3e-9 A < 1e-8 A: the plain atol.
  EXPECT_DOUBLE_EQ(linkrise::solver::current_squared_tolerance(1e-10, 1e-12, scales, 3e-4), 1e-12);
  // A resistance above 1 Ω never loosens it; no resistance known leaves atol.
  EXPECT_DOUBLE_EQ(linkrise::solver::current_squared_tolerance(1e-12, 1e-12, scales, 10.0), 1e-12);
  EXPECT_DOUBLE_EQ(linkrise::solver::current_squared_tolerance(1e-10, 1e-12, scales, 0.0), 1e-12);
}

TEST(AbsoluteTolerances, NanoOhmContactDoesNotChaseRounding) {
  // 100 V charges 1 mF through a 1 nOhm contact and 100 Ω at rtol 1e-10 (the studies' RC fixture without the
  // BMS): 108 787 steps per run before the ∫i² tolerance followed the part's resistance, 599 after.
  Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 100 V}\n"
      "  - {name: k1, kind: contactor, nodes: [plus, mid], closed_resistance: 1 nOhm, initial: closed}\n"
      "  - {name: r1, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "run: {duration: 0.45 s}\n");
  sim.tight(1e-10, 1e-12);
  auto result = sim.run();
  ASSERT_EQ(result.outcome, Outcome::Completed) << result.message;
  EXPECT_LT(result.statistics.steps, 2000);
  // r1's I²t against the closed form of the RC charge [R-RC-charge]: i = V/R·e^(−t/τ), ∫i² = V²τ/(2R²)·(1 − e^(−2T/τ)).
  const double tau = 100.0 * 1e-3, total = 0.45;
  const double expected = 100.0 * 100.0 * tau / (2.0 * 100.0 * 100.0) * (1.0 - std::exp(-2.0 * total / tau));
  auto integral = [&](const char* part) {
    const int index = sim.circuit.current_squared_index(sim.circuit.find_part(part));
    return result.final_states.at(index) - result.initial_states.at(index);
  };
  EXPECT_NEAR(integral("r1"), expected, 1e-8 * expected);
  // The contact's I²t is held to its heat's accuracy: within atol/R = 1e-3 A²s, 2 % of it.
  EXPECT_NEAR(integral("k1"), expected, 1e-3);
}
