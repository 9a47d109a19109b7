// Cell string OCV(SOC) table: Steffen's monotone cubic (M. Steffen, "A simple method for monotonic
// interpolation in one dimension", Astron. Astrophys. 239, 1990 — as implemented by GSL's gsl_interp_steffen;
// docs/references.md [R-Steffen]).
#include <gtest/gtest.h>

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
