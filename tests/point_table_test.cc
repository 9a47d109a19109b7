// The compact point table (app/studies/point_table.h): a point reads back as it was stored, numbers bit for bit
// (IEEE 754 [R-IEEE754]: -0.0, NaN and the infinities are distinct bit patterns a text output spells
// differently), whichever order the points arrive in and whichever form a column takes (constant, coded, dense).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <cstring>
#include <limits>
#include <random>
#include <type_traits>

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

// The file-backed path: tables of more than `memory_points` points keep their dense columns' complete blocks in
// a temporary file. Point i of 600 in four columns: one constant, one coded, one dense from the start (with the
// special bit patterns), one coded by 200 values until point 480, then of a new value at every point (dense
// late); every 37th point without values.
constexpr std::size_t kPoints = 600;
constexpr std::size_t kLateDense = 480;

PointResult sample_point(std::size_t i) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  if (i % 37 == 11) {
    PointResult failed;
    failed.status = CaseEvaluation::Status::SolverFailure;
    failed.message = "step " + std::to_string(i);
    return failed;
  }
  const auto x = static_cast<double>(i);
  const double dense = i == 5 ? nan : i == 6 ? -inf : i == 7 ? -0.0 : 0.1 * x;
  const double coded = i % 3 == 0 ? (i % 2 == 0 ? 0.0 : -0.0) : 2.5;
  const double late = i < kLateDense ? static_cast<double>(i % 200) : 1000.0 + x / 3.0;
  PointResult point = point_with({7.5, coded, dense, late}, i % 4 == 0 ? "timeout" : "closed");
  if (i % 5 == 0) point.verdict = analysis::Verdict::Fail;
  return point;
}

void expect_every_point(const PointTable& table) {
  ASSERT_EQ(table.size(), kPoints);
  for (std::size_t i = 0; i < kPoints; ++i) expect_same(table[i], sample_point(i));  // row by row
  for (std::size_t c = 0; c < 4; ++c) {                                                // column by column
    for (std::size_t i = 0; i < kPoints; ++i) {
      const PointResult want = sample_point(i);
      const double expected = want.values.empty() ? std::numeric_limits<double>::quiet_NaN() : want.values[c];
      ASSERT_TRUE(same_bits(table.value(i, c), expected)) << "point " << i << " column " << c;
    }
  }
  std::mt19937 random(3);  // and at random, across blocks and columns
  for (int k = 0; k < 2000; ++k) {
    const std::size_t i = random() % kPoints, c = random() % 4;
    const PointResult want = sample_point(i);
    if (want.values.empty()) continue;
    ASSERT_TRUE(same_bits(table.value(i, c), want.values[c])) << i << " " << c;
  }
}

// The order worker threads give: in order but for neighbours swapped and every 50th point 40 places late.
std::vector<std::size_t> nearly_in_order() {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < kPoints; ++i) order.push_back(i ^ 1u);
  for (std::size_t late = 0; late < kPoints; late += 50) {
    auto at = std::find(order.begin(), order.end(), late);
    const auto to = std::min<std::ptrdiff_t>(at - order.begin() + 40, static_cast<std::ptrdiff_t>(kPoints) - 1);
    order.erase(at);
    order.insert(order.begin() + to, late);
  }
  return order;
}

TEST(PointTableFile, PointsReadBackBitForBitStoredNearlyInOrder) {
  const std::vector<std::size_t> order = nearly_in_order();
  ASSERT_EQ(order.size(), kPoints);
  PointTable table(0, 16);
  table.resize(kPoints, 4);
  std::size_t k = 0;
  for (; order[k] < kLateDense - 8; ++k) table.store(order[k], sample_point(order[k]));
  // Column 3 is still coded while most blocks are in the file already; its coded values go there when it turns
  // dense.
  EXPECT_EQ(table.coded_columns(), 2u);
  EXPECT_GE(table.blocks_in_file(), 25u);
  for (; k < order.size(); ++k) table.store(order[k], sample_point(order[k]));
  EXPECT_EQ(table.constant_columns(), 1u);
  EXPECT_EQ(table.coded_columns(), 1u);
  EXPECT_EQ(table.blocks_in_file(), kPoints / 16);  // the last block, 8 points, stays in memory
  expect_every_point(table);
}

TEST(PointTableFile, PointsReadBackBitForBitStoredInRandomOrder) {
  std::vector<std::size_t> order(kPoints);
  for (std::size_t i = 0; i < kPoints; ++i) order[i] = i;
  std::shuffle(order.begin(), order.end(), std::mt19937(7));
  PointTable table(100, 32);
  table.resize(kPoints, 4);
  for (std::size_t k = 0; k < kPoints; ++k) {
    table.store(order[k], sample_point(order[k]));
    // Reads between stores, as a rank sending a point does: a stored point reads back from memory or the file.
    expect_same(table[order[k / 2]], sample_point(order[k / 2]));
  }
  EXPECT_EQ(table.blocks_in_file(), kPoints / 32);
  expect_every_point(table);
}

TEST(PointTableFile, APointStoredAgainAfterItsBlockWentToTheFileReadsAsStoredLast) {
  PointTable table(0, 16);
  table.resize(kPoints, 4);
  for (std::size_t i = 0; i < kPoints; ++i) table.store(i, point_with({double(i), double(i), double(i), double(i)}));
  ASSERT_EQ(table.coded_columns(), 0u);
  EXPECT_EQ(table.value(20, 2), 20.0);  // the column's block 1 is cached now
  table.store(20, point_with({-1.0, -2.0, -3.0, -4.0}, "again"));
  table.store(40, sample_point(11));  // without values
  expect_same(table[20], point_with({-1.0, -2.0, -3.0, -4.0}, "again"));
  expect_same(table[40], sample_point(11));
  EXPECT_EQ(table.value(21, 2), 21.0);
  EXPECT_EQ(table.blocks_in_file(), kPoints / 16);
}

TEST(PointTableFile, ATableGrownPointByPointSpillsOnceItHasMoreThanItsMemoryPoints) {
  PointTable table(100, 16);
  for (std::size_t i = 0; i < 100; ++i) table.push_back(sample_point(i));
  EXPECT_EQ(table.blocks_in_file(), 0u);
  for (std::size_t i = 100; i < kPoints; ++i) table.push_back(sample_point(i));
  EXPECT_EQ(table.blocks_in_file(), kPoints / 16);
  expect_every_point(table);
}

TEST(PointTableFile, MovesTakeTheFileAlong) {
  static_assert(std::is_nothrow_move_constructible_v<PointTable> && !std::is_copy_constructible_v<PointTable>,
                "a table owns its file: moved, not copied");
  PointTable table(0, 16);
  table.resize(kPoints, 4);
  for (std::size_t i = 0; i < kPoints; ++i) table.store(i, sample_point(i));
  PointTable moved(std::move(table));
  expect_every_point(moved);
  PointTable assigned;
  assigned = std::move(moved);
  expect_every_point(assigned);
}

}  // namespace
}  // namespace linkrise::app
