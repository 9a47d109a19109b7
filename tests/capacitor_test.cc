// Capacitor over temperature: temperature_factors scale C and the ESR at the case's ambient; the charge through a
// resistor then follows the RC closed form with the scaled values (docs/references.md [R-RC-charge]).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "tests/circuit_fixture.h"

using linkrise::testing::Simulation;

namespace {
std::string charged_through_ten_ohms(const std::string& ambient, const std::string& factors) {
  return "ground: gnd\n"
         "ambient: " + ambient + "\n"
         "parts:\n"
         "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 100 V}\n"
         "  - {name: r, kind: resistor, nodes: [plus, link], resistance: 10 Ohm}\n"
         "  - name: c\n"
         "    kind: capacitor\n"
         "    nodes: [link, gnd]\n"
         "    capacitance: 1 mF\n"
         "    esr: 1 Ohm\n" + factors +
         "run: {duration: 50 ms}\n";
}
const std::string kFactors =
    "    temperature_factors:\n"
    "      capacitance: [[-40 degC, 0.8], [25 degC, 1.0], [85 degC, 1.1]]\n"
    "      esr: [[-40 degC, 5.0], [25 degC, 1.0], [85 degC, 0.5]]\n";

// The capacitor's terminal voltage vc + ESR·i at the row nearest `time`, that row's time, and the current at t = 0.
struct Charge {
  double time = 0.0;
  double voltage = 0.0;
  double initial_current = 0.0;
};
Charge charge_near(const std::string& ambient, double time) {
  Simulation simulation(charged_through_ten_ohms(ambient, kFactors));
  simulation.tight();
  auto result = simulation.run();
  EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  std::size_t best = 0;
  for (std::size_t r = 0; r < result.steps.row_count(); ++r) {
    if (std::fabs(result.steps.time(r) - time) < std::fabs(result.steps.time(best) - time)) best = r;
  }
  return {result.steps.time(best), result.steps.value(best, result.steps.column("c.voltage")),
          result.steps.value(0, result.steps.column("c.current"))};
}
// The closed form of that terminal voltage: vc = V·(1 − e^(−t/τ)), i = (V − vc)/(R + ESR), τ = (R + ESR)·C.
double terminal(double time, double esr, double capacitance) {
  const double vc = 100.0 * (1.0 - std::exp(-time / ((10.0 + esr) * capacitance)));
  return vc + esr * (100.0 - vc) / (10.0 + esr);
}
}  // namespace

TEST(Capacitor, TemperatureFactorsScaleCapacitanceAndEsrAtTheAmbient) {
  // −40 °C: C = 0.8 mF, ESR = 5 Ohm, so τ = (10 + 5)·0.8 mF = 12 ms and the first current is 100 V / 15 Ohm.
  const Charge cold = charge_near("-40 degC", 12e-3);
  EXPECT_NEAR(cold.initial_current, 100.0 / 15.0, 1e-6);
  EXPECT_NEAR(cold.voltage, terminal(cold.time, 5.0, 0.8e-3), 1e-5);
  // 55 °C lies halfway between the 25 °C and 85 °C rows: C = 1.05 mF, ESR = 0.75 Ohm.
  const Charge warm = charge_near("55 degC", 11e-3);
  EXPECT_NEAR(warm.initial_current, 100.0 / 10.75, 1e-6);
  EXPECT_NEAR(warm.voltage, terminal(warm.time, 0.75, 1.05e-3), 1e-5);
  // Without the factors (25 °C is the 1.0 row) the same time would read differently: the test can tell them apart.
  EXPECT_GT(std::fabs(terminal(cold.time, 1.0, 1e-3) - cold.voltage), 1.0);
}

TEST(Capacitor, AFactorTableMustRiseInTemperature) {
  auto error = linkrise::testing::input_error([] {
    Simulation simulation(charged_through_ten_ohms(
        "25 degC", "    temperature_factors: {esr: [[25 degC, 1.0], [-40 degC, 5.0]]}\n"));
  });
  EXPECT_TRUE(linkrise::testing::contains(error.what(), "temperature must increase")) << error.what();
}
