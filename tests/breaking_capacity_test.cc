// The breaking-capacity table of a contactor's ratings: which row judges an opening, and its bad inputs.
#include <gtest/gtest.h>

#include <cmath>

#include "models/breaking_capacity.h"
#include "tests/circuit_fixture.h"

using linkrise::models::BreakingCapacity;
using linkrise::models::CurrentDirection;

namespace {
// Invented rows of a polarised contactor: full capacity forward, a tenth of it reverse at 450 V.
BreakingCapacity table() {
  return BreakingCapacity{{{450.0, 200.0, CurrentDirection::Forward},
                           {450.0, 20.0, CurrentDirection::Reverse},
                           {120.0, 600.0, CurrentDirection::Both},
                           {800.0, 50.0, CurrentDirection::Both}}};
}
}  // namespace

// The row with the smallest voltage at or above the break's, for the break's direction; use = |I|/permitted.
TEST(BreakingCapacity, JudgesByTheNextRowUpForTheDirection) {
  auto judged = table().judge(400.0, 100.0);
  EXPECT_EQ(judged.row, 1);
  EXPECT_DOUBLE_EQ(judged.use, 0.5);
  judged = table().judge(-400.0, -10.0);  // reverse: the reverse row, the voltage's sign does not matter
  EXPECT_EQ(judged.row, 2);
  EXPECT_DOUBLE_EQ(judged.use, 0.5);
  judged = table().judge(100.0, -300.0);
  EXPECT_EQ(judged.row, 3);
  EXPECT_DOUBLE_EQ(judged.use, 0.5);
  judged = table().judge(500.0, 75.0);
  EXPECT_EQ(judged.row, 4);
  EXPECT_DOUBLE_EQ(judged.use, 1.5);
}

// Above every row's voltage no row covers the break: it fails (infinite use).
TEST(BreakingCapacity, BreakAboveTheTableHasNoRow) {
  auto judged = table().judge(900.0, 1.0);
  EXPECT_EQ(judged.row, 0);
  EXPECT_TRUE(std::isinf(judged.use));
  BreakingCapacity forward_only{{{450.0, 200.0, CurrentDirection::Forward}}};
  EXPECT_EQ(forward_only.judge(100.0, -1.0).row, 0);
}

namespace {
std::string contactor_with(const std::string& ratings) {
  return "title: ratings\nground: gnd\nparts:\n"
         "  - {name: supply, kind: dc_source, nodes: [top, gnd], voltage: 100 V}\n"
         "  - name: k1\n    kind: contactor\n    nodes: [top, mid]\n" + ratings +
         "  - {name: r1, kind: resistor, nodes: [mid, gnd], resistance: 10 Ohm}\n"
         "run: {duration: 1 ms}\n";
}
}  // namespace

// The ratings become limits on the contactor's metrics, each naming where it came from.
TEST(BreakingCapacity, RatingsAreDeclaredOnTheContactor) {
  linkrise::solver::Circuit circuit(linkrise::testing::case_from(contactor_with(
      "    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 200 A, direction: forward}\n"
      "        - {voltage: 450 V, current: 20 A, direction: reverse}\n"
      "      max_arc_energy: 2 J\n      max_making_current: 1.5 kA\n")));
  const auto& part = circuit.part(1);
  auto ratings = part.ratings();
  ASSERT_EQ(ratings.size(), 3u);
  EXPECT_EQ(ratings[0].metric, "break_use");
  EXPECT_DOUBLE_EQ(ratings[0].value, 1.0);
  EXPECT_NE(ratings[0].note.find("ratings.breaking_capacity"), std::string::npos);
  EXPECT_EQ(ratings[1].metric, "arc_energy");
  EXPECT_DOUBLE_EQ(ratings[1].value, 2.0);
  EXPECT_EQ(ratings[2].metric, "making_current");
  EXPECT_DOUBLE_EQ(ratings[2].value, 1500.0);
  ASSERT_TRUE(part.breaking_capacity().has_value());
  EXPECT_EQ(part.breaking_capacity()->rows.size(), 2u);
}

// Bad tables fail at the offending value with file:line:column.
TEST(BreakingCapacity, BadInputNamesThePlace) {
  struct Bad {
    std::string ratings, where, fragment;
  };
  const std::vector<Bad> cases = {
      {"    ratings:\n      breaking_capacity: []\n", "test.yaml:9:26", "at least one row"},
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V}\n", "test.yaml:10:11", "current"},
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 2 V}\n", "test.yaml:10:37",
       "current"},
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 2 A, direction: up}\n",
       "test.yaml:10:53", "direction"},
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 2 A}\n"
       "        - {voltage: 450 V, current: 3 A, direction: forward}\n",
       "test.yaml:11:21", "repeats the voltage"},
      {"    arc: off\n    ratings:\n      max_arc_energy: 1 J\n", "test.yaml:10:23", "arc: off"},
  };
  for (const auto& bad : cases) {
    auto error = linkrise::testing::case_error(contactor_with(bad.ratings));
    const std::string text = error.what();
    EXPECT_NE(text.find(bad.where), std::string::npos) << text;
    EXPECT_NE(text.find(bad.fragment), std::string::npos) << text;
  }
}
