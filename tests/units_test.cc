// Unit parser: prefixes, dimensions, milli vs mega, micro spellings, errors. Prefixes, the Celsius offset and the
// ampere-hour follow the SI Brochure (docs/references.md [R-SI]).
#include <gtest/gtest.h>

#include "netlist/units.h"

using linkrise::netlist::Dimension;
using linkrise::netlist::parse_quantity;

namespace {
double parse(const std::string& text, const Dimension& expected) {
  std::string problem;
  auto q = parse_quantity(text, problem);
  EXPECT_TRUE(q.has_value()) << text << ": " << problem;
  if (!q) return 0.0;
  EXPECT_TRUE(q->dimension == expected) << text << " is " << q->dimension.describe();
  return q->value;
}
}  // namespace

TEST(Units, PrefixesScaleByPowersOfTen) {
  EXPECT_DOUBLE_EQ(parse("47 Ohm", Dimension::resistance()), 47.0);
  EXPECT_DOUBLE_EQ(parse("4.7 kOhm", Dimension::resistance()), 4700.0);
  EXPECT_DOUBLE_EQ(parse("1.2 mF", Dimension::capacitance()), 1.2e-3);
  EXPECT_DOUBLE_EQ(parse("2 uH", Dimension::inductance()), 2e-6);
  EXPECT_DOUBLE_EQ(parse("2 µH", Dimension::inductance()), 2e-6);
  EXPECT_DOUBLE_EQ(parse("2 μH", Dimension::inductance()), 2e-6);
  EXPECT_DOUBLE_EQ(parse("800 V", Dimension::voltage()), 800.0);
  EXPECT_DOUBLE_EQ(parse("15 pF", Dimension::capacitance()), 15e-12);
  EXPECT_DOUBLE_EQ(parse("3 nH", Dimension::inductance()), 3e-9);
  EXPECT_DOUBLE_EQ(parse("1.5 GOhm", Dimension::resistance()), 1.5e9);
  EXPECT_DOUBLE_EQ(parse("47Ω", Dimension::resistance()), 47.0);
}

TEST(Units, MilliIsNotMega) {
  EXPECT_DOUBLE_EQ(parse("1 mOhm", Dimension::resistance()), 1e-3);
  EXPECT_DOUBLE_EQ(parse("1 MOhm", Dimension::resistance()), 1e6);
  EXPECT_DOUBLE_EQ(parse("3 mW", Dimension::power_()), 3e-3);
  EXPECT_DOUBLE_EQ(parse("3 MW", Dimension::power_()), 3e6);
  // A lone "m" is the metre; "mm" is the millimetre; "ms" the millisecond.
  EXPECT_DOUBLE_EQ(parse("2 m", Dimension::length()), 2.0);
  EXPECT_DOUBLE_EQ(parse("20 mm", Dimension::length()), 0.02);
  EXPECT_DOUBLE_EQ(parse("10 ms", Dimension::time()), 0.01);
}

TEST(Units, TemperaturesAndCompounds) {
  EXPECT_DOUBLE_EQ(parse("25 degC", Dimension::temperature()), 298.15);
  EXPECT_DOUBLE_EQ(parse("-40 °C", Dimension::temperature()), 233.15);
  EXPECT_DOUBLE_EQ(parse("300 K", Dimension::temperature()), 300.0);
  EXPECT_DOUBLE_EQ(parse("12 J/K", Dimension::heat_capacity()), 12.0);
  EXPECT_DOUBLE_EQ(parse("4 K/W", Dimension::thermal_resistance()), 4.0);
  EXPECT_DOUBLE_EQ(parse("200 ppm/K", Dimension::per_kelvin()), 200e-6);
  EXPECT_DOUBLE_EQ(parse("15 %/K", Dimension::per_kelvin()), 0.15);
  EXPECT_DOUBLE_EQ(parse("50 Ah", Dimension::charge()), 180000.0);
  EXPECT_DOUBLE_EQ(parse("95 %", Dimension::none()), 0.95);
  EXPECT_NEAR(parse("35 mm²", Dimension::area()), 35e-6, 1e-18);
  EXPECT_NEAR(parse("35 mm^2", Dimension::area()), 35e-6, 1e-18);
  EXPECT_DOUBLE_EQ(parse("0.5 uH/m", Dimension::inductance() / Dimension::length()), 0.5e-6);
  EXPECT_DOUBLE_EQ(parse("1 A*s", Dimension::charge()), 1.0);
  // I²t in the data-sheet spelling, and as a product.
  const Dimension i2t = Dimension::current().power(2) * Dimension::time();
  EXPECT_DOUBLE_EQ(parse("50 A²s", i2t), 50.0);
  EXPECT_DOUBLE_EQ(parse("50 A^2s", i2t), 50.0);
  EXPECT_DOUBLE_EQ(parse("2 kA^2*s", i2t), 2e6);
}

TEST(Units, BareNumbersAreSiBaseUnits) {
  std::string problem;
  auto q = parse_quantity("0.047", problem);
  ASSERT_TRUE(q);
  EXPECT_TRUE(q->bare);
  EXPECT_DOUBLE_EQ(q->value, 0.047);
  q = parse_quantity("1e-3", problem);
  ASSERT_TRUE(q);
  EXPECT_DOUBLE_EQ(q->value, 1e-3);
}

TEST(Units, RejectsBadText) {
  std::string problem;
  EXPECT_FALSE(parse_quantity("abc", problem));
  EXPECT_NE(problem.find("number"), std::string::npos);
  EXPECT_FALSE(parse_quantity("12 furlongs", problem));
  EXPECT_NE(problem.find("unknown unit"), std::string::npos);
  EXPECT_FALSE(parse_quantity("12 degC/W", problem));
  EXPECT_FALSE(parse_quantity("inf V", problem));
  EXPECT_FALSE(parse_quantity("nan", problem));
  EXPECT_FALSE(parse_quantity("", problem));
  EXPECT_FALSE(parse_quantity("1e999 V", problem));
  EXPECT_FALSE(parse_quantity("3 J//K", problem));
}

TEST(Units, FormatsWithPrefixes) {
  EXPECT_EQ(linkrise::netlist::format_si(0.0012, "F"), "1.2 mF");
  EXPECT_EQ(linkrise::netlist::format_si(47000, "Ohm"), "47 kOhm");
  EXPECT_EQ(linkrise::netlist::format_si(2.5e-6, "s"), "2.5 µs");
}
