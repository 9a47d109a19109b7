// The record a spread's shard leaves for `linkrise merge` (app/studies/spread_record.h): the case identity is FNV-1a
// (docs/references.md [R-FNV], test vectors), and every number reads back exactly (the JSON library writes the
// shortest text that reads back as the same double, [R-shortest-round-trip]; NaN and infinities spelled out,
// [R-IEEE754]).
#include "app/studies/spread_record.h"

#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>

#include <gtest/gtest.h>

#include "netlist/case_document.h"
#include "netlist/input_error.h"
#include "study_fixture.h"

namespace linkrise::app {
namespace {
namespace fs = std::filesystem;
using study_test::rc_case_text;
using study_test::write_case;

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

fs::path fresh_folder(const std::string& name) {
  fs::path folder = fs::path(testing::TempDir()) / name;
  fs::remove_all(folder);
  fs::create_directories(folder);
  return folder;
}

// Test vectors of the FNV draft [R-FNV] (from memory).
TEST(SpreadRecord, TheHashIsFnv1a64) {
  EXPECT_EQ(fnv1a_64(""), 0xCBF29CE484222325ULL);
  EXPECT_EQ(fnv1a_64("a"), 0xAF63DC4C8601EC8CULL);
  EXPECT_EQ(fnv1a_64("foobar"), 0x85944171F73967E8ULL);
}

TEST(SpreadRecord, TheCaseIdentityFollowsTheTextAndTheSettings) {
  const std::string identity = case_identity("title: a\n", {"r.resistance=1Ohm"});
  EXPECT_EQ(identity.rfind("fnv1a64:", 0), 0u);
  EXPECT_EQ(identity.size(), 8u + 16u);
  EXPECT_EQ(identity, case_identity("title: a\n", {"r.resistance=1Ohm"}));
  EXPECT_NE(identity, case_identity("title: b\n", {"r.resistance=1Ohm"}));
  EXPECT_NE(identity, case_identity("title: a\n", {"r.resistance=2Ohm"}));
  EXPECT_NE(identity, case_identity("title: a\n", {}));
  // Lengths keep the pieces apart: moving text from the case into a setting is another identity.
  EXPECT_NE(case_identity("ab", {"c"}), case_identity("a", {"bc"}));
}

TEST(SpreadRecord, EveryNumberReadsBackExactly) {
  const std::string file =
      write_case("record_rc.yaml", rc_case_text("  r_pre.resistance: {plus_minus: 10 %}\n"
                                                "  link.capacitance: {minus: 20 %, plus: 10 %}\n"));
  const std::string text = read_case_text(file);
  const std::vector<std::string> settings{"link.capacitance=1.1mF"};
  SpreadPlan plan = spread_plan(false, 9, 11, "2/3");
  Spread spread = run_spread(netlist::CaseDocument::parse(text, file).with({{"link.capacitance", "1.1mF", {}}}), plan, 2);
  ASSERT_EQ(spread.results.points.size(), 3u);
  // The values a text format must spell out (IEEE 754 [R-IEEE754]).
  PointResult first = spread.results.points[0];
  ASSERT_GE(first.values.size(), 4u);
  first.values[0] = std::numeric_limits<double>::quiet_NaN();
  first.values[1] = std::numeric_limits<double>::infinity();
  first.values[2] = -std::numeric_limits<double>::infinity();
  first.values[3] = -0.0;
  spread.results.points.store(0, first);
  PointResult second = spread.results.points[1];
  second.status = CaseEvaluation::Status::SolverFailure;
  second.message = "the solver gave up at 0.1 s";
  spread.results.points.store(1, second);

  const fs::path folder = fresh_folder("record_round_trip");
  std::ofstream(folder / kSpreadRecordFile) << spread_record_json(spread, text, settings);
  const SpreadRecord record = read_spread_record(folder);
  EXPECT_EQ(record.folder, folder);
  EXPECT_EQ(record.case_file, file);
  EXPECT_EQ(record.case_text, text);
  EXPECT_EQ(record.settings, settings);
  EXPECT_EQ(record.identity, case_identity(text, settings));
  EXPECT_FALSE(record.plan.corners);
  EXPECT_EQ(record.plan.seed, 11u);
  EXPECT_EQ(record.plan.shard, 2);
  EXPECT_EQ(record.plan.shards, 3);
  EXPECT_EQ(record.population, 9u);
  EXPECT_EQ(record.range.begin, 3u);
  EXPECT_EQ(record.range.end, 6u);
  ASSERT_EQ(record.columns.size(), spread.results.columns.size());
  for (std::size_t c = 0; c < record.columns.size(); ++c) {
    EXPECT_EQ(record.columns[c].name, spread.results.columns[c].name);
    EXPECT_EQ(record.columns[c].unit, spread.results.columns[c].unit);
  }
  ASSERT_EQ(record.points.size(), 3u);
  for (std::size_t p = 0; p < 3; ++p) {
    const PointResult& want = spread.results.points[p];
    const PointResult& got = record.points[p];
    EXPECT_EQ(got.status, want.status);
    EXPECT_EQ(got.message, want.message);
    EXPECT_EQ(got.outcome, want.outcome);
    EXPECT_EQ(got.verdict, want.verdict);
    ASSERT_EQ(got.values.size(), want.values.size());
    for (std::size_t c = 0; c < want.values.size(); ++c) {
      EXPECT_TRUE(same_bits(got.values[c], want.values[c]) || (std::isnan(got.values[c]) && std::isnan(want.values[c])))
          << "sample " << p << " column " << c << ": " << got.values[c] << " vs " << want.values[c];
    }
  }
  EXPECT_TRUE(std::signbit(record.points[0].values[3]));
  const auto& nominal = spread.nominal.points[0].values;
  ASSERT_EQ(record.nominal.values.size(), nominal.size());
  for (std::size_t c = 0; c < nominal.size(); ++c) {
    EXPECT_TRUE(same_bits(record.nominal.values[c], nominal[c]) || std::isnan(nominal[c])) << c;
  }
}

TEST(SpreadRecord, AFolderWithoutARecordIsNamed) {
  const fs::path folder = fresh_folder("record_missing");
  try {
    (void)read_spread_record(folder);
    FAIL() << "expected an InputError";
  } catch (const netlist::InputError& error) {
    EXPECT_NE(std::string(error.what()).find(folder.string() + " holds no spread_shard.json"), std::string::npos)
        << error.what();
  }
  std::ofstream(folder / kSpreadRecordFile) << "{\"record\": \"something else\"}";
  try {
    (void)read_spread_record(folder);
    FAIL() << "expected an InputError";
  } catch (const netlist::InputError& error) {
    EXPECT_NE(std::string(error.what()).find("is not a readable shard record"), std::string::npos) << error.what();
  }
}

}  // namespace
}  // namespace linkrise::app
