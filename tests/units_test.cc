// Unit parser: prefixes, dimensions, milli vs mega, micro spellings, errors. Prefixes, the Celsius offset and the
// ampere-hour follow the SI Brochure (docs/references.md [R-SI]).
#include <gtest/gtest.h>

#include <array>
#include <charconv>
#include <cmath>
#include <cstring>
#include <random>
#include <vector>

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

TEST(Units, RefusesPowersBeyondAnyEngineeringUnit) {
  // Found by the quantity fuzz target: a power of 1160792651 overflowed the integer exponents.
  std::string problem;
  EXPECT_FALSE(parse_quantity("51 Ohm^1160792651", problem));
  EXPECT_NE(problem.find("lies outside -20 … 20"), std::string::npos) << problem;
  EXPECT_FALSE(parse_quantity("1 F^6*s^2", problem));  // s^26 in all, each factor allowed
  EXPECT_NE(problem.find("beyond the power 20"), std::string::npos) << problem;
  EXPECT_TRUE(parse_quantity("1 F^5", problem)) << problem;  // s^20: the largest accepted
}

TEST(Units, FormatsWithPrefixes) {
  EXPECT_EQ(linkrise::netlist::format_si(0.0012, "F"), "1.2 mF");
  EXPECT_EQ(linkrise::netlist::format_si(47000, "Ohm"), "47 kOhm");
  EXPECT_EQ(linkrise::netlist::format_si(2.5e-6, "s"), "2.5 µs");
}

// --- Case-file texts of values -------------------------------------------------------------------------------
namespace {
using linkrise::netlist::quantity_text;

// Doubles of every kind a study writes: round decimals, values that decimal digits cannot hold, extremes, and a
// fixed pseudo-random spread over twenty decades.
std::vector<double> sample_doubles() {
  std::vector<double> values{0.00099, 3.3e-5, 0.1 + 0.2, 1.0 / 3.0, 33.0, 31.35, 0.9, 0.2, 1e-12, 6.02214076e23,
                             -2.7845786386235432, 5e-324, 1.7976931348623157e308, 0.0, -0.0};
  std::mt19937_64 generator(20240611);
  std::uniform_real_distribution<double> exponent(-12.0, 8.0);
  for (int i = 0; i < 2000; ++i) values.push_back(std::pow(10.0, exponent(generator)));
  return values;
}

double read_back(const std::string& text) {
  std::string problem;
  auto quantity = parse_quantity(text, problem);
  EXPECT_TRUE(quantity.has_value()) << text << ": " << problem;
  return quantity ? quantity->value : std::nan("");
}

// The leading number of a text as std::to_chars writes it shortest (docs/references.md [R-shortest-round-trip]).
std::string shortest_by_to_chars(double value) {
  std::array<char, 64> buffer{};
  auto result = std::to_chars(buffer.data(), buffer.data() + buffer.size(), value);
  return std::string(buffer.data(), result.ptr);
}

// Significant digits of a number text: the mantissa without sign, point, leading and trailing zeros.
std::size_t significant_digits(const std::string& number) {
  std::string digits;
  for (char c : number.substr(0, number.find_first_of("eE"))) {
    if (c >= '0' && c <= '9') digits += c;
  }
  const std::size_t first = digits.find_first_not_of('0');
  if (first == std::string::npos) return 1;
  return digits.find_last_not_of('0') - first + 1;
}
}  // namespace

TEST(QuantityText, ReadsBackAsTheIdenticalDoubleWithTheFewestDigits) {
  for (double value : sample_doubles()) {
    const std::string text = quantity_text(value, Dimension::capacitance(), false);
    const double back = read_back(text);
    EXPECT_EQ(std::memcmp(&back, &value, sizeof value), 0) << text << " read back as " << back;
    // As few significant digits as the shortest round-trip form of the standard library
    // (docs/references.md [R-shortest-round-trip]).
    const std::string number = text.substr(0, text.find(' '));
    EXPECT_EQ(significant_digits(number), significant_digits(shortest_by_to_chars(value))) << text;
  }
  // The value spread.json used to write as 0.00098999999999999999 F ([R-shortest-round-trip]).
  EXPECT_EQ(quantity_text(0.00099, Dimension::capacitance(), false), "0.00099 F");
  EXPECT_EQ(quantity_text(0.1 + 0.2, Dimension::none(), false), "0.30000000000000004");
  EXPECT_EQ(quantity_text(0.5, Dimension::none(), false), "0.5");
}

TEST(QuantityText, CelsiusTextsReadBackAsTheIdenticalKelvin) {
  // The parser adds 273.15 K to a degC number (docs/references.md [R-SI]); the text must undo that exactly, for
  // kelvin values drawn directly (a study draws in K) as well as for sums.
  std::mt19937_64 generator(7);
  std::uniform_real_distribution<double> kelvin_range(150.0, 3000.0);
  std::vector<double> kelvins{298.15, 233.15, 273.15, 291.921774076951374, 253.15, 2014.0256745081645};
  for (int i = 0; i < 4000; ++i) kelvins.push_back(kelvin_range(generator));
  int in_celsius = 0;
  for (double kelvin : kelvins) {
    const std::string text = quantity_text(kelvin, Dimension::temperature(), true);
    EXPECT_EQ(read_back(text), kelvin) << text;
    const bool celsius = text.find(" degC") != std::string::npos;
    in_celsius += celsius;
    // From −40 degC to 300 degC every value has its degC text.
    if (kelvin >= 233.15 && kelvin <= 573.15) {
      EXPECT_TRUE(celsius) << text;
    }
  }
  EXPECT_GT(in_celsius, 3000);
  EXPECT_EQ(quantity_text(298.15, Dimension::temperature(), true), "25 degC");
  // What "-40 degC" reads as is written back so (the literal 233.15 is a different double).
  EXPECT_EQ(quantity_text(-40.0 + 273.15, Dimension::temperature(), true), "-40 degC");
}

TEST(QuantityText, EveryDimensionReadsBackInItsSiSymbol) {
  // Mass is held in kg: its text must not say "g" ([R-SI]: k = 10³).
  EXPECT_EQ(Dimension::mass().symbol(), "kg");
  for (const Dimension& dimension : {Dimension::mass(), Dimension::charge(), Dimension::area(),
                                     Dimension::heat_capacity(), Dimension::thermal_resistance(),
                                     Dimension::per_kelvin(), Dimension::frequency(), Dimension::temperature()}) {
    const double value = 0.020000000000000004;
    const std::string text = quantity_text(value, dimension, false);
    std::string problem;
    auto quantity = parse_quantity(text, problem);
    ASSERT_TRUE(quantity.has_value()) << text << ": " << problem;
    EXPECT_TRUE(quantity->dimension == dimension) << text;
    EXPECT_EQ(quantity->value, value) << text;
  }
}

TEST(QuantityText, ADimensionWithoutANameReadsBackAsAProductOfBaseUnits) {
  // Found by the quantity fuzz target: "5 K/V" was written with spaces between its base units and did not read back.
  std::string problem;
  auto quantity = parse_quantity("5 K/V", problem);
  ASSERT_TRUE(quantity.has_value()) << problem;
  const std::string text = quantity_text(quantity->value, quantity->dimension, false);
  EXPECT_EQ(text, "5 kg^-1*m^-2*s^3*A*K");  // V = kg·m²·s⁻³·A⁻¹ ([R-SI])
  auto again = parse_quantity(text, problem);
  ASSERT_TRUE(again.has_value()) << text << ": " << problem;
  EXPECT_TRUE(again->dimension == quantity->dimension);
  EXPECT_EQ(again->value, quantity->value);
}

TEST(ShownUnit, FractionsInPercentTemperaturesInDegreesCelsiusDifferencesInKelvin) {
  using linkrise::netlist::shown_unit;
  EXPECT_EQ(shown_unit(Dimension::none(), false, true).display(0.5), "50 %");
  EXPECT_EQ(shown_unit(Dimension::none(), false, false).display(96.0), "96");
  EXPECT_EQ(shown_unit(Dimension::none(), false, false).symbol, "1");
  // [R-SI]: 25 °C = 298.15 K; a difference of 5 K is the same 5 in either scale.
  EXPECT_EQ(shown_unit(Dimension::temperature(), true).display(298.15), "25 degC");
  EXPECT_EQ(shown_unit(Dimension::temperature(), true).difference().display(5.0), "5 K");
  EXPECT_EQ(shown_unit(Dimension::resistance(), false, true).display(0.033), "33 mOhm");
}
