// The breaking-capacity table of a contactor's ratings: which row judges an opening, and its bad inputs.
#include <gtest/gtest.h>

#include <cmath>
#include <optional>

#include "models/breaking_capacity.h"
#include "tests/circuit_fixture.h"

using linkrise::models::BreakingCapacity;
using linkrise::models::CurrentDirection;

namespace {
linkrise::models::BreakingRow row(double voltage, double current, CurrentDirection direction = CurrentDirection::Both,
                                  std::optional<double> time_constant = std::nullopt) {
  return {voltage, current, direction, time_constant};
}
// Invented rows of a polarised contactor: full capacity forward, a tenth of it reverse at 450 V.
BreakingCapacity table() {
  return BreakingCapacity{{row(450.0, 200.0, CurrentDirection::Forward), row(450.0, 20.0, CurrentDirection::Reverse),
                           row(120.0, 600.0), row(800.0, 50.0)}};
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
  BreakingCapacity forward_only{{row(450.0, 200.0, CurrentDirection::Forward)}};
  EXPECT_EQ(forward_only.judge(100.0, -1.0).row, 0);
}

// Invented rows in the way data sheets state L/R (common practice: the longer the circuit's time constant, the
// less current the contacts break, as the arc takes the inductance's ½·L·I² on top). A row covers a break whose
// L/R is at or below its own; of the covering rows at the lowest voltage, the tightest time constant judges.
TEST(BreakingCapacity, TimeConstantPicksTheRowThatCoversTheBrokenCircuit) {
  const BreakingCapacity rated{{row(450.0, 200.0, CurrentDirection::Both, 1e-3),
                                row(450.0, 50.0, CurrentDirection::Both, 10e-3), row(800.0, 20.0)}};
  auto judged = rated.judge(400.0, 100.0, 0.5e-3);  // L/R 0.5 ms: the 1 ms row
  EXPECT_EQ(judged.row, 1);
  EXPECT_DOUBLE_EQ(judged.use, 0.5);
  judged = rated.judge(400.0, 100.0, 3e-3);  // 3 ms: only the 10 ms row at 450 V covers it
  EXPECT_EQ(judged.row, 2);
  EXPECT_DOUBLE_EQ(judged.use, 2.0);
  judged = rated.judge(400.0, 10.0, 30e-3);  // beyond both: the 800 V row states no time constant
  EXPECT_EQ(judged.row, 3);
  EXPECT_DOUBLE_EQ(judged.use, 0.5);
  const BreakingCapacity only_stated{{row(450.0, 200.0, CurrentDirection::Both, 1e-3)}};
  EXPECT_EQ(only_stated.judge(400.0, 1.0, 2e-3).row, 0);  // longer than every stated L/R: no row, fails
  EXPECT_TRUE(std::isinf(only_stated.judge(400.0, 1.0, 2e-3).use));
  EXPECT_EQ(only_stated.judge(400.0, 1.0, 1e-3).row, 1);  // at the row's L/R: covered
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

// One voltage may carry several rows when each states its own L/R.
TEST(BreakingCapacity, RowsOfOneVoltageDifferByTimeConstant) {
  linkrise::solver::Circuit circuit(linkrise::testing::case_from(contactor_with(
      "    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 200 A, time_constant: 1 ms}\n"
      "        - {voltage: 450 V, current: 50 A, time_constant: 10 ms}\n")));
  const auto capacity = circuit.part(1).breaking_capacity();
  ASSERT_TRUE(capacity.has_value());
  ASSERT_EQ(capacity->rows.size(), 2u);
  EXPECT_DOUBLE_EQ(capacity->rows[1].time_constant.value_or(0.0), 10e-3);
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
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 2 A, time_constant: 1 V}\n",
       "test.yaml:10:57", "time_constant"},
      {"    ratings:\n      breaking_capacity:\n        - {voltage: 450 V, current: 2 A, time_constant: 1 ms}\n"
       "        - {voltage: 450 V, current: 3 A, time_constant: 1 ms}\n",
       "test.yaml:11:21", "repeats the voltage and time constant"},
  };
  for (const auto& bad : cases) {
    auto error = linkrise::testing::case_error(contactor_with(bad.ratings));
    const std::string text = error.what();
    EXPECT_NE(text.find(bad.where), std::string::npos) << text;
    EXPECT_NE(text.find(bad.fragment), std::string::npos) << text;
  }
}
