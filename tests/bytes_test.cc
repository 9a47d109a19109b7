// The byte layout results travel in between ranks (app/cluster/bytes.h): every double comes back bit for bit —
// the special values of IEEE 754 (NaN, ±infinity, −0, the smallest subnormal; docs/references.md [R-IEEE754])
// included — strings keep embedded NUL bytes, and a payload cut short is refused.
#include "app/cluster/bytes.h"

#include <cmath>
#include <cstring>
#include <limits>
#include <stdexcept>

#include <gtest/gtest.h>

namespace linkrise::app {
namespace {

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

TEST(Bytes, NumbersComeBackBitForBit) {
  const std::vector<double> numbers{0.1, -0.0, std::numeric_limits<double>::quiet_NaN(),
                                    -std::numeric_limits<double>::infinity(),
                                    std::numeric_limits<double>::denorm_min(), std::numeric_limits<double>::max(),
                                    1.0 / 3.0};
  ByteWriter out;
  for (double number : numbers) out.put(number);
  out.put(numbers);
  out.put(std::uint64_t{18446744073709551615ULL});
  const std::string bytes = out.take();
  ByteReader in(bytes);
  for (double number : numbers) EXPECT_TRUE(same_bits(in.number(), number)) << number;
  const std::vector<double> back = in.numbers();
  ASSERT_EQ(back.size(), numbers.size());
  for (std::size_t i = 0; i < numbers.size(); ++i) EXPECT_TRUE(same_bits(back[i], numbers[i])) << i;
  EXPECT_EQ(in.count(), 18446744073709551615ULL);
  EXPECT_TRUE(in.at_end());
  // −0 keeps its sign and NaN stays NaN (IEEE 754 [R-IEEE754]), which a text format would have to spell out.
  EXPECT_TRUE(std::signbit(back[1]));
  EXPECT_TRUE(std::isnan(back[2]));
}

TEST(Bytes, TextsAndEmptyListsKeepTheirLength) {
  ByteWriter out;
  out.put(std::string("a\0b", 3));
  out.put(std::string("µ²…"));
  out.put(std::string());
  out.put(std::vector<double>{});
  const std::string bytes = out.take();
  ByteReader in(bytes);
  EXPECT_EQ(in.text(), std::string("a\0b", 3));
  EXPECT_EQ(in.text(), "µ²…");
  EXPECT_EQ(in.text(), "");
  EXPECT_TRUE(in.numbers().empty());
  EXPECT_TRUE(in.at_end());
}

TEST(Bytes, APayloadCutShortIsRefused) {
  ByteWriter out;
  out.put(std::string("twelve bytes"));
  out.put(std::vector<double>{1.0, 2.0});
  const std::string whole = out.take();
  for (std::size_t cut : {std::size_t{3}, std::size_t{10}, whole.size() - 1}) {
    const std::string part = whole.substr(0, cut);
    ByteReader in(part);
    EXPECT_THROW(
        {
          in.text();
          in.numbers();
        },
        std::out_of_range)
        << cut;
  }
}

}  // namespace
}  // namespace linkrise::app
