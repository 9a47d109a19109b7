// What parts answer about themselves (models/part.h): roles, actuation data, load demand, thermal model,
// derived and defining values — the questions later layers ask instead of comparing kind words.
#include "models/part.h"

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "models/registry.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::models::Role;
using linkrise::testing::case_from;

const std::string kCase =
    "ground: gnd\n"
    "parts:\n"
    "  - {name: pack, kind: cell_string, nodes: [plus, gnd], cells_in_series: 100, cell_voltage: 3.7 V, cell_resistance: 1 mOhm,"
    " cell_capacity: 50 Ah}\n"
    "  - {name: cable, kind: cable, nodes: [plus, bus], length: 2 m, cross_section: 35 mm², spacing: 20 mm}\n"
    "  - {name: k_main, kind: contactor, nodes: [bus, link], closing_delay: 20 ms, opening_delay: 5 ms,"
    " bounce_count: 2, bounce_interval: 0.3 ms, closed_resistance: 0.2 mOhm}\n"
    "  - {name: r_pre, kind: resistor, nodes: [bus, link], resistance: 47 Ohm,"
    " thermal: {heat_capacity: 20 J/K, thermal_resistance: 8 K/W}}\n"
    "  - {name: ntc, kind: ntc_thermistor, nodes: [bus, link], resistance_at_25degC: 60 Ohm, b_value: 3000 K,"
    " thermal: {heat_capacity: 5 J/K, thermal_resistance: 30 K/W}}\n"
    "  - {name: link, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
    "  - {name: dcdc, kind: constant_power_load, nodes: [link, gnd], power: 300 W, enable_voltage: 250 V}\n"
    "  - {name: clamp, kind: diode, nodes: [gnd, link]}\n"
    "run: {duration: 1 s}\n";

const linkrise::models::Part& part(const linkrise::solver::Circuit& circuit, const std::string& name) {
  return circuit.part(circuit.find_part(name));
}
}  // namespace

TEST(Part, EveryKindAnswersItsRole) {
  linkrise::solver::Circuit circuit(case_from(kCase));
  EXPECT_EQ(part(circuit, "pack").role(), Role::Source);
  EXPECT_EQ(part(circuit, "cable").role(), Role::Conductor);
  EXPECT_EQ(part(circuit, "k_main").role(), Role::Switch);
  EXPECT_EQ(part(circuit, "r_pre").role(), Role::Resistive);
  EXPECT_EQ(part(circuit, "ntc").role(), Role::Resistive);
  EXPECT_EQ(part(circuit, "link").role(), Role::Storage);
  EXPECT_EQ(part(circuit, "dcdc").role(), Role::Load);
  EXPECT_EQ(part(circuit, "clamp").role(), Role::Rectifier);
  EXPECT_STREQ(linkrise::models::role_word(Role::Storage), "storage");
}

TEST(Part, SwitchesGiveTheirActuationDataAndOnlyThey) {
  linkrise::solver::Circuit circuit(case_from(kCase));
  auto actuation = part(circuit, "k_main").actuation();
  ASSERT_TRUE(actuation.has_value());
  EXPECT_DOUBLE_EQ(actuation->closing_delay, 0.020);
  EXPECT_DOUBLE_EQ(actuation->opening_delay, 0.005);
  EXPECT_EQ(actuation->bounce_count, 2);
  EXPECT_DOUBLE_EQ(actuation->bounce_interval, 0.3e-3);
  EXPECT_DOUBLE_EQ(actuation->closed_resistance, 0.2e-3);
  EXPECT_DOUBLE_EQ(actuation->open_resistance, 100e6);  // the documented default (models/contactor.h)
  EXPECT_FALSE(part(circuit, "r_pre").actuation().has_value());
}

TEST(Part, LoadsGiveTheirDemandAndResistiveFloor) {
  linkrise::solver::Circuit circuit(case_from(kCase));
  auto demand = part(circuit, "dcdc").load_demand();
  ASSERT_TRUE(demand.has_value());
  EXPECT_TRUE(demand->constant_power);
  EXPECT_DOUBLE_EQ(demand->demand, 300.0);
  EXPECT_DOUBLE_EQ(demand->enable_voltage, 250.0);
  EXPECT_DOUBLE_EQ(demand->disable_voltage, 225.0);  // 90 % of enable (models/switched_load.h)
  EXPECT_DOUBLE_EQ(demand->resistive_below, 10.0);
  EXPECT_FALSE(part(circuit, "link").load_demand().has_value());
}

TEST(Part, ThermalModelAndDefiningValue) {
  linkrise::solver::Circuit circuit(case_from(kCase));
  EXPECT_TRUE(part(circuit, "r_pre").has_thermal_model());
  EXPECT_FALSE(part(circuit, "link").has_thermal_model());
  auto resistance = part(circuit, "r_pre").defining_value();
  ASSERT_TRUE(resistance.has_value());
  EXPECT_EQ(resistance->parameter, "resistance");
  EXPECT_TRUE(resistance->alone);
  EXPECT_EQ(part(circuit, "link").defining_value()->parameter, "capacitance");
  // A thermistor is named by its R25, but its curve has more parameters: setting R25 alone does not make it a
  // plain resistor of that value.
  auto ntc = part(circuit, "ntc").defining_value();
  ASSERT_TRUE(ntc.has_value());
  EXPECT_EQ(ntc->parameter, "resistance_at_25degC");
  EXPECT_FALSE(ntc->alone);
}

TEST(Part, ACableDerivesItsLoopResistanceAndInductanceFromGeometry) {
  linkrise::solver::Circuit circuit(case_from(kCase));
  auto derived = part(circuit, "cable").derived_values();
  ASSERT_EQ(derived.size(), 2u);
  // Loop of 2 × 2 m of 35 mm² copper at 20 °C: R = ρ·2L/A with ρ = 1.68e-8 Ω·m
  // (docs/references.md [R-conductor-resistivity]).
  EXPECT_EQ(derived[0].unit, "Ohm");
  EXPECT_NEAR(derived[0].value, 1.68e-8 * 4.0 / 35e-6, 1e-12);
  // Two round wires, radius √(A/π), 20 mm apart: L = length·(µ0/π)·[ln(d/r) + ¼]
  // (docs/references.md [R-wire-pair-inductance], low-frequency form).
  const double radius = std::sqrt(35e-6 / std::numbers::pi);
  const double expected = 2.0 * 4e-7 * (std::log(0.020 / radius) + 0.25);
  EXPECT_EQ(derived[1].unit, "H");
  EXPECT_NEAR(derived[1].value, expected, 1e-6 * expected);
  EXPECT_TRUE(part(circuit, "k_main").derived_values().empty());
}

TEST(Part, APlainResistanceRecipeBuildsAResistor) {
  auto recipe = linkrise::models::plain_resistance("1 mOhm");
  std::string yaml = "ground: gnd\nparts:\n  - {name: s, kind: dc_source, nodes: [a, gnd], voltage: 1 V}\n"
                     "  - {name: r, kind: " + recipe.kind + ", nodes: [a, gnd], " + recipe.parameters[0].first +
                     ": " + recipe.parameters[0].second + "}\nrun: {duration: 1 s}\n";
  auto spec = case_from(yaml);
  EXPECT_DOUBLE_EQ(spec.find_part("r")->parameters().required("resistance", linkrise::netlist::Dimension::resistance()),
                   1e-3);
  linkrise::solver::Circuit circuit(spec);
  EXPECT_EQ(part(circuit, "r").role(), Role::Resistive);
  EXPECT_FALSE(part(circuit, "r").has_thermal_model());
}
