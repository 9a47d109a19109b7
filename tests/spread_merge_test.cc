// `linkrise merge` (app/studies/spread_merge.h) with the built binary: the shards of a spread, merged in any order,
// give the files one run over the whole population writes, byte for byte (the same program computing the same
// samples: the property the command promises, not a floating-point tolerance); a missing, repeated or foreign shard
// is refused with exit 2, the folder named, and nothing written. The case is the RC fixture (study_fixture.h,
// docs/references.md [R-RC-charge]).
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

#include "command_fixture.h"
#include "study_fixture.h"

namespace {
namespace fs = std::filesystem;
using linkrise::command_test::Outcome;
using linkrise::command_test::slurp;

class Merge : public ::testing::Test {
 protected:
  void SetUp() override {
    directory_ = linkrise::command_test::fresh_test_folder("linkrise_merge_test");
    case_file_ = directory_ / "rc.yaml";
    std::ofstream(case_file_) << linkrise::study_test::rc_case_text(
        "  r_pre.resistance: {plus_minus: 10 %}\n  link.capacitance: {minus: 20 %, plus: 10 %}\n");
  }
  void TearDown() override { fs::remove_all(directory_); }

  Outcome run(const std::string& arguments) const {
    return linkrise::command_test::run_in(directory_, std::string("\"") + LINKRISE_BINARY + "\" " + arguments,
                                          directory_);
  }
  // Runs shard k of n into folder `s<k>` with the study's options; expects it to succeed.
  void shard(int k, int n, const std::string& study) const {
    const Outcome outcome = run(fmt("spread rc.yaml {} --shard {}/{} -j 1 -o s{}", study, k, n, k));
    ASSERT_EQ(outcome.exit_code, 0) << outcome.err;
    ASSERT_TRUE(fs::exists(directory_ / ("s" + std::to_string(k)) / "spread_shard.json"));
  }
  void expect_same_files(const std::string& one, const std::string& merged) const {
    for (const char* name : {"spread_samples.csv", "spread.json", "report.html"}) {
      const std::string a = slurp(directory_ / one / name), b = slurp(directory_ / merged / name);
      EXPECT_FALSE(a.empty()) << name;
      EXPECT_TRUE(a == b) << name << " differs between " << one << " and " << merged;
    }
    EXPECT_FALSE(fs::exists(directory_ / merged / "spread_shard.json"));  // one run leaves no record either
  }
  void expect_refused(const Outcome& outcome, const std::string& fragment) const {
    EXPECT_EQ(outcome.exit_code, 2) << outcome.err;
    EXPECT_NE(outcome.err.find(fragment), std::string::npos) << outcome.err;
    EXPECT_FALSE(fs::exists(directory_ / "merged")) << "a refused merge wrote its output";
  }
  template <class... Args>
  static std::string fmt(const std::string& pattern, Args... args) {
    std::string text = pattern;
    ((text.replace(text.find("{}"), 2, to_text(args))), ...);
    return text;
  }
  static std::string to_text(const std::string& value) { return value; }
  static std::string to_text(const char* value) { return value; }
  static std::string to_text(int value) { return std::to_string(value); }

  fs::path directory_, case_file_;
};

TEST_F(Merge, ThreeShardsInAnyOrderEqualOneRun) {
  const std::string study = "--samples 10 --seed 5";
  const Outcome one = run("spread rc.yaml " + study + " -j 2 -o one --report one/report.html");
  ASSERT_EQ(one.exit_code, 0) << one.err;
  for (int k = 1; k <= 3; ++k) shard(k, 3, study);
  const Outcome merged = run("merge s3 s1 s2 -o merged --report merged/report.html");
  ASSERT_EQ(merged.exit_code, one.exit_code) << merged.err;
  expect_same_files("one", "merged");
  EXPECT_EQ(linkrise::command_test::without_file_lines(merged.out), linkrise::command_test::without_file_lines(one.out));
  EXPECT_NE(merged.out.find("samples 0..9 of 10, seed 5"), std::string::npos) << merged.out;
}

TEST_F(Merge, CornerShardsEqualOneRun) {
  const Outcome one = run("spread rc.yaml --corners -o one --report one/report.html");
  ASSERT_EQ(one.exit_code, 0) << one.err;
  shard(1, 2, "--corners");
  shard(2, 2, "--corners");
  const Outcome merged = run("merge s1 s2 -o merged --report merged/report.html");
  ASSERT_EQ(merged.exit_code, 0) << merged.err;
  expect_same_files("one", "merged");
}

TEST_F(Merge, RefusesAMissingShard) {
  for (int k : {1, 3}) shard(k, 3, "--samples 6 --seed 5");
  expect_refused(run("merge s1 s3 -o merged"), "shard 2/3 is missing; given: s1 (shard 1/3), s3 (shard 3/3)");
}

TEST_F(Merge, RefusesARepeatedShard) {
  for (int k = 1; k <= 3; ++k) shard(k, 3, "--samples 6 --seed 5");
  fs::copy(directory_ / "s2", directory_ / "s2_again");
  expect_refused(run("merge s1 s2 s2_again s3 -o merged"), "s2_again repeats shard 2/3, already given by s2");
  expect_refused(run("merge s1 s2 s3 s3 -o merged"), "s3 repeats shard 3/3, already given by s3");
}

TEST_F(Merge, RefusesAForeignShard) {
  for (int k : {1, 3}) shard(k, 3, "--samples 6 --seed 5");
  // Another seed, another sample count, another --set value, another case file: each names its folder.
  ASSERT_EQ(run("spread rc.yaml --samples 6 --seed 6 --shard 2/3 -o seed6").exit_code, 0);
  expect_refused(run("merge s1 seed6 s3 -o merged"), "seed6 is a shard of another study than s1: its seed 6 differs");
  ASSERT_EQ(run("spread rc.yaml --samples 9 --seed 5 --shard 2/3 -o nine").exit_code, 0);
  expect_refused(run("merge s1 nine s3 -o merged"), "nine is a shard of another study than s1: its 9 samples");
  ASSERT_EQ(run("spread rc.yaml --samples 6 --seed 5 --shard 2/3 --set r_pre.resistance=120Ohm -o set").exit_code, 0);
  expect_refused(run("merge s1 set s3 -o merged"), "set is a shard of another study than s1: its case");
  std::ofstream(directory_ / "other.yaml") << slurp(case_file_) << "# another file\n";
  ASSERT_EQ(run("spread other.yaml --samples 6 --seed 5 --shard 2/3 -o other").exit_code, 0);
  expect_refused(run("merge s1 other s3 -o merged"), "other is a shard of another study than s1: its case (other.yaml");
  fs::create_directories(directory_ / "empty");
  expect_refused(run("merge s1 empty s3 -o merged"), "empty holds no spread_shard.json");
}

TEST_F(Merge, AShardRecordsOnlyWhenAsked) {
  ASSERT_EQ(run("spread rc.yaml --samples 3 -o plain").exit_code, 0);
  EXPECT_FALSE(fs::exists(directory_ / "plain" / "spread_shard.json"));
  ASSERT_EQ(run("spread rc.yaml --samples 3 --shard 1/1 -o whole").exit_code, 0);
  EXPECT_TRUE(fs::exists(directory_ / "whole" / "spread_shard.json"));
  const Outcome merged = run("merge whole -o merged");
  EXPECT_EQ(merged.exit_code, 0) << merged.err;
  EXPECT_EQ(slurp(directory_ / "plain" / "spread_samples.csv"), slurp(directory_ / "merged" / "spread_samples.csv"));
}

// The example job script of the docs (scripts/array-job-example.sh) on two tasks counted from 0, one of them
// resubmitted, then its merge step: the files of one run.
TEST_F(Merge, TheArrayJobExampleMergesItsTasks) {
  const std::string script = std::string("LINKRISE=\"") + LINKRISE_BINARY + "\" TASKS=2 TASK_BASE=0 bash \"" +
                             LINKRISE_SOURCE_DIR + "/scripts/array-job-example.sh\" ";
  std::string resubmitted;
  for (int task : {0, 1, 1}) {  // the second 1: a resubmitted task finds its shard done
    const Outcome outcome = linkrise::command_test::run_in(
        directory_, "env TASK=" + std::to_string(task) + " " + script + "shard rc.yaml 6 5 results", directory_);
    ASSERT_EQ(outcome.exit_code, 0) << outcome.out << outcome.err;
    resubmitted = outcome.out;
  }
  EXPECT_NE(resubmitted.find("shard 2/2 is already in"), std::string::npos) << resubmitted;
  EXPECT_TRUE(fs::exists(directory_ / "results" / "shard-2" / "spread_shard.json"));
  const Outcome merged = linkrise::command_test::run_in(directory_, "env " + script + "merge results merged", directory_);
  ASSERT_EQ(merged.exit_code, 0) << merged.err;
  ASSERT_EQ(run("spread rc.yaml --samples 6 --seed 5 -o one").exit_code, 0);
  for (const char* name : {"spread_samples.csv", "spread.json"}) {
    EXPECT_TRUE(slurp(directory_ / "one" / name) == slurp(directory_ / "merged" / name)) << name;
  }
  EXPECT_TRUE(fs::exists(directory_ / "merged" / "spread.html"));
}

}  // namespace
