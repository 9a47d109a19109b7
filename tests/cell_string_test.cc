// Cell string OCV(SOC) table: Steffen's monotone cubic (M. Steffen, "A simple method for monotonic
// interpolation in one dimension", Astron. Astrophys. 239, 1990 — as implemented by GSL's gsl_interp_steffen;
// docs/references.md [R-Steffen]).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "tests/circuit_fixture.h"

using linkrise::testing::Simulation;

namespace {
// Invented cell data: 10 cells in series feeding a 1 kOhm resistor, rested (no current at t = 0).
double initial_open_circuit_voltage(const std::string& soc) {
  Simulation simulation(
      "ground: gnd\n"
      "parts:\n"
      "  - name: pack\n"
      "    kind: cell_string\n"
      "    nodes: [plus, gnd]\n"
      "    cells_in_series: 10\n"
      "    cell_voltage_table: [[0 %, 3.0 V], [10 %, 3.4 V], [50 %, 3.6 V], [90 %, 3.9 V], [100 %, 4.2 V]]\n"
      "    cell_resistance: 1 mOhm\n"
      "    cell_capacity: 50 Ah\n"
      "    initial_soc: " + soc + "\n"
      "  - {name: load, kind: resistor, nodes: [plus, gnd], resistance: 1 kOhm}\n"
      "run: {duration: 1 ms}\n");
  auto result = simulation.run();
  EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  int column = result.steps.column("pack.open_circuit_voltage");
  EXPECT_GE(column, 0);
  return result.steps.value(0, column);
}
}  // namespace

TEST(CellString, OcvTablePassesThroughEveryRow) {
  EXPECT_NEAR(initial_open_circuit_voltage("10 %"), 34.0, 1e-12);
  EXPECT_NEAR(initial_open_circuit_voltage("50 %"), 36.0, 1e-12);
  EXPECT_NEAR(initial_open_circuit_voltage("90 %"), 39.0, 1e-12);
  // Outside the table the end value holds.
  EXPECT_NEAR(initial_open_circuit_voltage("100 %"), 42.0, 1e-12);
}

TEST(CellString, OcvBetweenRowsIsMonotoneWithoutOvershoot) {
  double previous = initial_open_circuit_voltage("10 %");
  for (int percent = 12; percent <= 90; percent += 2) {
    double value = initial_open_circuit_voltage(std::to_string(percent) + " %");
    EXPECT_GE(value, previous) << percent << " %";
    EXPECT_GE(value, 34.0 - 1e-12);
    EXPECT_LE(value, 39.0 + 1e-12);
    previous = value;
  }
}

namespace {
// 10 cells of 4 V (constant OCV) into a 1 Ohm resistor at `ambient`: the string resistance from the current,
// first at t = 0 (R0 only, the pairs uncharged), then after `duration` (R0 and the pairs, charged), by Ohm's law.
struct Measured {
  double first = 0.0;  // Ohm
  double last = 0.0;   // Ohm
};
std::string four_volt_string(const std::string& ambient, const std::string& resistance_lines,
                             const std::string& duration) {
  return "ground: gnd\n"
         "ambient: " + ambient + "\n"
         "parts:\n"
         "  - name: pack\n"
         "    kind: cell_string\n"
         "    nodes: [plus, gnd]\n"
         "    cells_in_series: 10\n"
         "    cell_voltage: 4 V\n"
         "    cell_capacity: 50 Ah\n"
         "    initial_soc: 50 %\n" +
         resistance_lines +
         "  - {name: load, kind: resistor, nodes: [plus, gnd], resistance: 1 Ohm}\n"
         "run: {duration: " + duration + ", rtol: 1e-10}\n";
}
Measured string_resistance(const std::string& ambient, const std::string& resistance_lines, const std::string& duration) {
  Simulation simulation(four_volt_string(ambient, resistance_lines, duration));
  auto result = simulation.run();
  EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  int column = result.steps.column("pack.current");
  EXPECT_GE(column, 0);
  auto resistance = [&](std::size_t row) { return 40.0 / result.steps.value(row, column) - 1.0; };
  return {resistance(0), resistance(result.steps.row_count() - 1)};
}
}  // namespace

// Arrhenius: R(T) = R(T_ref)·exp(B·(1/T − 1/T_ref)) (docs/references.md [R-Arrhenius]) on R0 and the pair: at
// −20 °C with B = 4000 K the factor is exp(4000·(1/253.15 − 1/298.15)) ≈ 10.86.
TEST(CellString, ArrheniusLawScalesEveryResistanceAtTheAmbient) {
  const std::string lines =
      "    cell_resistance: 10 mOhm\n"
      "    polarisation: [{resistance: 5 mOhm, capacitance: 1 F}]\n"
      "    resistance_temperature: {reference: 25 degC, activation: 4000 K}\n";
  const double factor = std::exp(4000.0 * (1.0 / 253.15 - 1.0 / 298.15));
  // Pair time constant at −20 °C: 10·5 mOhm·factor × 1 F/10 ≈ 54 ms, so 1 s leaves e^(−18) of its transient.
  const Measured cold = string_resistance("-20 degC", lines, "1 s");
  EXPECT_NEAR(cold.first, 10 * 10e-3 * factor, 1e-8);
  EXPECT_NEAR(cold.last, 10 * (10e-3 + 5e-3) * factor, 1e-6);
  // At the reference temperature the law is the identity.
  const Measured reference = string_resistance("25 degC", lines, "1 s");
  EXPECT_NEAR(reference.first, 0.1, 1e-8);
  EXPECT_NEAR(reference.last, 0.15, 1e-6);
}

// A grid over SOC and temperature, read bilinearly at the initial SOC (50 %) and the ambient (10 °C): between SOC
// 20/80 % and 0/40 °C the weights are 1/2 and 1/4 (bilinear interpolation, e.g. Press et al., Numerical Recipes,
// 3rd ed., §3.6, from memory).
TEST(CellString, ResistanceGridIsReadBilinearlyAtTheInitialSocAndAmbient) {
  const std::string lines =
      "    cell_resistance_table: [[20 %, 0 degC, 8 mOhm], [80 %, 0 degC, 6 mOhm],\n"
      "                            [20 %, 40 degC, 4 mOhm], [80 %, 40 degC, 2 mOhm]]\n";
  const double at_zero = 0.5 * (8e-3 + 6e-3), at_forty = 0.5 * (4e-3 + 2e-3);
  const double cell = at_zero + 0.25 * (at_forty - at_zero);  // 10 °C is a quarter of the way to 40 °C
  EXPECT_NEAR(string_resistance("10 degC", lines, "1 ms").first, 10 * cell, 1e-9);
  // Beyond the grid the edge value holds.
  EXPECT_NEAR(string_resistance("60 degC", lines, "1 ms").first, 10 * at_forty, 1e-9);
}

TEST(CellString, AnIncompleteResistanceGridIsAnInputError) {
  const std::string lines =
      "    cell_resistance_table: [[20 %, 0 degC, 8 mOhm], [80 %, 0 degC, 6 mOhm], [20 %, 40 degC, 4 mOhm]]\n";
  auto error = linkrise::testing::input_error([&] { Simulation simulation(four_volt_string("25 degC", lines, "1 ms")); });
  EXPECT_TRUE(linkrise::testing::contains(error.what(), "do not form a full grid")) << error.what();
  EXPECT_TRUE(linkrise::testing::contains(error.what(), ":11:")) << error.what();
}
