// The JSON vocabulary of every JSON file: quantities as {"value", "unit"}, numbers written with the shortest
// digits that read back as the identical double (docs/references.md [R-shortest-round-trip]).
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>
#include <random>
#include <vector>

#include <nlohmann/json.hpp>

#include "app/output/json_fields.h"

using linkrise::app::json_text;
using linkrise::app::quantity;

TEST(JsonFields, NumbersReadBackAsTheIdenticalDouble) {
  std::vector<double> values{0.00099, 0.0007199999999999999, 0.1 + 0.2, 1.0 / 3.0, 29.80300890514576, 1e-12,
                             -2.784578638623543, 5e-324, 1.7976931348623157e308};
  std::mt19937_64 generator(42);
  std::uniform_real_distribution<double> exponent(-12.0, 8.0);
  for (int i = 0; i < 2000; ++i) values.push_back(-std::pow(10.0, exponent(generator)));
  for (double value : values) {
    const std::string text = json_text(quantity(value, "F"));
    const nlohmann::json back = nlohmann::json::parse(text);
    const double read = back.at("value").get<double>();
    EXPECT_EQ(std::memcmp(&read, &value, sizeof value), 0) << text;
    EXPECT_EQ(back.at("unit"), "F");
  }
  // Shortest digits ([R-shortest-round-trip]): 0.00099 is not written with 17 significant digits.
  EXPECT_NE(json_text(quantity(0.00099, "F")).find("0.00099\n"), std::string::npos) << json_text(quantity(0.00099, "F"));
}

TEST(JsonFields, NotFiniteValuesAreNull) {
  EXPECT_TRUE(quantity(std::nan(""), "s").at("value").is_null());
  EXPECT_TRUE(quantity(HUGE_VAL, "s").at("value").is_null());
}
