// The compact point table (app/studies/point_table.h): a point reads back as it was stored, numbers bit for bit
// (IEEE 754 [R-IEEE754]: -0.0, NaN and the infinities are distinct bit patterns a text output spells
// differently), whichever order the points arrive in and whichever form a column takes (constant, coded, dense).
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>
#include <limits>

#include "app/studies/point_table.h"

namespace linkrise::app {
namespace {

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

PointResult point_with(std::vector<double> values, const std::string& outcome = "closed") {
  PointResult point;
  point.outcome = outcome;
  point.verdict = analysis::Verdict::Pass;
  point.values = std::move(values);
  return point;
}

void expect_same(const PointResult& got, const PointResult& want) {
  EXPECT_EQ(got.status, want.status);
  EXPECT_EQ(got.verdict, want.verdict);
  EXPECT_EQ(got.outcome, want.outcome);
  EXPECT_EQ(got.message, want.message);
  ASSERT_EQ(got.values.size(), want.values.size());
  for (std::size_t c = 0; c < want.values.size(); ++c) EXPECT_TRUE(same_bits(got.values[c], want.values[c])) << c;
}

TEST(PointTable, PointsReadBackBitForBitInAnyStoringOrder) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  // Column 0 stays constant, column 1 differs only by the sign of zero, column 2 at the last point stored; all but
  // column 0 become coded (a few distinct values).
  std::vector<PointResult> points = {point_with({3.0, 0.0, 1.0, nan}), point_with({3.0, -0.0, 1.0, inf}, "timeout"),
                                     point_with({3.0, 0.0, 1.0, -inf}), point_with({3.0, 0.0, 2.5, 1e-300})};
  points[2].status = CaseEvaluation::Status::SolverFailure;
  points[2].message = "the solver gave up";
  points[2].verdict = analysis::Verdict::Fail;
  PointTable table;
  table.resize(points.size(), 4);
  for (std::size_t i : {3u, 0u, 2u, 1u}) table.store(i, points[i]);
  ASSERT_EQ(table.size(), points.size());
  for (std::size_t i = 0; i < points.size(); ++i) expect_same(table[i], points[i]);
  EXPECT_EQ(table.constant_columns(), 1u);
  EXPECT_EQ(table.coded_columns(), 3u);
  EXPECT_EQ(table.status(2), CaseEvaluation::Status::SolverFailure);
  EXPECT_TRUE(same_bits(table.value(1, 1), -0.0));
}

TEST(PointTable, APointWithoutValuesStaysWithoutThem) {
  PointTable table;
  table.push_back(point_with({1.0, 2.0}));
  PointResult failed;
  failed.status = CaseEvaluation::Status::InputError;
  failed.message = "bad override";
  table.push_back(failed);
  table.push_back(point_with({1.0, 4.0}));
  EXPECT_EQ(table.width(), 2u);
  expect_same(table[1], failed);
  EXPECT_TRUE(std::isnan(table.value(1, 0)));
  EXPECT_EQ(table.value(2, 0), 1.0);  // column 0 is still one number
  EXPECT_EQ(table.constant_columns(), 1u);
  EXPECT_THROW(table.push_back(point_with({1.0})), std::invalid_argument);
  EXPECT_THROW(table.at(3), std::out_of_range);
}

TEST(PointTable, AColumnOfManyValuesBecomesDenseAndKeepsEveryValue) {
  PointTable table;
  const std::size_t count = 600;
  table.resize(count, 2);
  // The first half in order (the column turns dense at a point past every code), the rest from both ends
  // inwards (points on either side still missing).
  for (std::size_t k = 0; k < count; ++k) {
    const std::size_t rest = k - count / 2;
    const std::size_t i = k < count / 2 ? k : rest % 2 == 0 ? count / 2 + rest / 2 : count - 1 - rest / 2;
    table.store(i, point_with({0.1 * static_cast<double>(i), static_cast<double>(i % 5)}));
  }
  EXPECT_EQ(table.coded_columns(), 1u);  // column 1: five values
  EXPECT_EQ(table.constant_columns(), 0u);
  for (std::size_t i = 0; i < count; ++i) {
    EXPECT_TRUE(same_bits(table.value(i, 0), 0.1 * static_cast<double>(i))) << i;
    EXPECT_EQ(table.value(i, 1), static_cast<double>(i % 5)) << i;
  }
}

TEST(PointTable, IteratesInPointOrder) {
  PointTable table;
  for (double v : {5.0, 6.0, 7.0}) table.push_back(point_with({v}));
  double expected = 5.0;
  for (const PointResult& point : table) EXPECT_EQ(point.values.at(0), expected++);
}

}  // namespace
}  // namespace linkrise::app
