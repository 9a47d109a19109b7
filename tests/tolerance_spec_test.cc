// The `tolerances:` block read into bounds in SI units, from percentages of the nominal value, absolute offsets
// or explicit ranges (plain arithmetic on the values written in the case).
#include "netlist/tolerance_spec.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::netlist::ToleranceSpec;
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kParts =
    "ground: gnd\n"                                                                                 // 1
    "ambient: 25 degC\n"                                                                            // 2
    "parts:\n"                                                                                      // 3
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                     // 4
    "  - {name: r_pre, kind: resistor, nodes: [plus, link], resistance: 33 Ohm}\n"                  // 5
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1.1 mF}\n"                    // 6
    "run: {duration: 1 s}\n"                                                                        // 7
    "tolerances:\n";                                                                                // 8

std::vector<ToleranceSpec> read(const std::string& entries) { return case_from(kParts + entries).tolerances; }
}  // namespace

TEST(ToleranceSpec, PercentagesOffsetsAndRanges) {
  auto tolerances = read(
      "  c1.capacitance: {minus: 10 %, plus: 20 %}\n"
      "  ambient: {range: [-20 degC, 45 degC]}\n"
      "  r_pre.resistance: {plus_minus: 2 Ohm, distribution: normal, sigma: 1 Ohm}\n");
  ASSERT_EQ(tolerances.size(), 3u);
  EXPECT_NEAR(tolerances[0].lower, 0.99e-3, 1e-18);
  EXPECT_NEAR(tolerances[0].upper, 1.32e-3, 1e-18);
  EXPECT_DOUBLE_EQ(tolerances[0].centre, 1.1e-3);
  EXPECT_EQ(tolerances[0].shape, ToleranceSpec::Shape::Uniform);
  // degC to kelvin: the SI definition of the Celsius scale (docs/references.md [R-SI]).
  EXPECT_DOUBLE_EQ(tolerances[1].lower, 253.15);
  EXPECT_DOUBLE_EQ(tolerances[1].upper, 318.15);
  EXPECT_TRUE(tolerances[1].absolute_temperature);
  EXPECT_EQ(tolerances[1].display(tolerances[1].lower), "-20 degC");
  EXPECT_DOUBLE_EQ(tolerances[2].lower, 31.0);
  EXPECT_DOUBLE_EQ(tolerances[2].upper, 35.0);
  EXPECT_EQ(tolerances[2].shape, ToleranceSpec::Shape::Normal);
  EXPECT_DOUBLE_EQ(tolerances[2].sigma, 1.0);
  EXPECT_EQ(tolerances[2].mark.to_string(), "test.yaml:11:3");
}

TEST(ToleranceSpec, ACaseFileValueReadsBackExactly) {
  auto tolerance = read("  c1.capacitance: {plus_minus: 10 %}\n").front();
  const double value = 0.98999999999999999e-3;
  std::string problem;
  auto back = linkrise::netlist::parse_quantity(tolerance.text(value), problem);
  ASSERT_TRUE(back.has_value()) << problem;
  EXPECT_EQ(back->value, value);
  // The fewest digits that read back as the same double (docs/references.md [R-shortest-round-trip]).
  EXPECT_EQ(tolerance.text(value), "0.00099 F");
}

TEST(ToleranceSpec, StateOfChargeIsShownInPercent) {
  auto tolerances = case_from(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: pack, kind: cell_string, nodes: [plus, gnd], cells_in_series: 100, cell_voltage: 3.7 V,\n"
      "     cell_resistance: 1 mOhm, cell_capacity: 50 Ah, initial_soc: 0.5}\n"
      "  - {name: r1, kind: resistor, nodes: [plus, gnd], resistance: 100 Ohm}\n"
      "run: {duration: 1 s}\n"
      "tolerances:\n"
      "  pack.initial_soc: {range: [20 %, 90 %]}\n"
      "  pack.cells_in_series: {range: [98, 102]}\n").tolerances;
  ASSERT_EQ(tolerances.size(), 2u);
  // Held as fractions, shown in % (a percent is a hundredth, docs/references.md [R-SI]).
  EXPECT_DOUBLE_EQ(tolerances[0].lower, 0.2);
  EXPECT_EQ(tolerances[0].shown().symbol, "%");
  EXPECT_DOUBLE_EQ(tolerances[0].shown().shown(tolerances[0].upper), 90.0);
  EXPECT_EQ(tolerances[0].description, "20 % … 90 %, uniform");
  // A count is a plain number.
  EXPECT_EQ(tolerances[1].shown().symbol, "1");
  EXPECT_EQ(tolerances[1].description, "98 … 102, uniform");
  // The case-file text stays a fraction, which reads back exactly ([R-shortest-round-trip]).
  EXPECT_EQ(tolerances[0].text(0.9), "0.9");
}

TEST(ToleranceSpec, ErrorsNameTheEntryAndTheFix) {
  auto twice = input_error([] { read("  r_pre.resistance: {plus_minus: 5 %, range: [30 Ohm, 36 Ohm]}\n"); });
  EXPECT_TRUE(contains(twice.what(), "exactly one of plus_minus, minus/plus or range")) << twice.what();
  auto sigma = input_error([] { read("  r_pre.resistance: {plus_minus: 5 %, distribution: normal}\n"); });
  EXPECT_TRUE(contains(sigma.what(), "needs 'sigma'")) << sigma.what();
  auto unit = input_error([] { read("  r_pre.resistance: {plus_minus: 2 F}\n"); });
  EXPECT_TRUE(contains(unit.what(), "test.yaml:9:")) << unit.what();
  auto absent = input_error([] { read("  k_main.closing_delay: {plus_minus: 5 %}\n"); });
  EXPECT_TRUE(contains(absent.what(), "'k_main' is neither a part of the case nor a case setting")) << absent.what();
  // A nominal value the case does not write is reported when the tolerance is used, not while reading: a
  // variant may replace the part that carries it.
  auto unresolved = read("  c1.esr: {plus_minus: 5 %}\n");
  ASSERT_TRUE(unresolved.front().unresolved.has_value());
  EXPECT_TRUE(contains(unresolved.front().unresolved->what(), "test.yaml:9:3")) << unresolved.front().unresolved->what();
  EXPECT_TRUE(contains(unresolved.front().unresolved->what(), "gives no value")) << unresolved.front().unresolved->what();
}
