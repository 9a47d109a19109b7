// The worker pool over the ranks of an MPI job (app/studies/rank_pool.h).
// Always: with one rank (no launcher) it is the threaded pool — every index once, nothing carried, the lowest
// failing index rethrown.
// In a build with LINKRISE_MPI (the tests exist only there): the small probe program under mpirun (its results
// gathered in index order, an error of one rank thrown on all, no rank left waiting), and the built linkrise
// under `mpirun --oversubscribe -n 2` and `-n 3` writing byte for byte the files of the threaded run for spread,
// sweep and size — the promise of the MPI build: a point's numbers do not depend on where it ran. The reference is
// the threaded run of the same binary; the physics of these cases is checked by the stored-case goldens.
#include "app/studies/rank_pool.h"

#include <atomic>
#include <stdexcept>
#include <vector>

#include <gtest/gtest.h>

#include "netlist/input_error.h"

#ifdef LINKRISE_MPIEXEC
#include <filesystem>
#include <tuple>

#include "command_fixture.h"
#endif

namespace linkrise::app {
namespace {

TEST(RankPool, OneRankIsTheThreadedPool) {
  std::vector<std::atomic<int>> calls(40);
  int carried = 0;
  const PointTransfer transfer{[&](std::size_t, ByteWriter&) { ++carried; }, [&](std::size_t, ByteReader&) { ++carried; }};
  for_each_index_on_ranks(calls.size(), 3, [&](std::size_t i) { ++calls[i]; }, transfer);
  for (std::size_t i = 0; i < calls.size(); ++i) EXPECT_EQ(calls[i].load(), 1) << i;
  EXPECT_EQ(carried, 0);
  for_each_index_on_ranks(0, 3, [&](std::size_t) { FAIL(); }, transfer);
}

TEST(RankPool, OneRankRethrowsTheLowestFailingIndex) {
  const PointTransfer transfer{[](std::size_t, ByteWriter&) {}, [](std::size_t, ByteReader&) {}};
  try {
    for_each_index_on_ranks(
        8, 1,
        [](std::size_t i) {
          if (i >= 3) throw netlist::InputError({"case.yaml", 2, 5}, "point " + std::to_string(i), "fix");
        },
        transfer);
    FAIL() << "expected an InputError";
  } catch (const netlist::InputError& error) {
    EXPECT_EQ(error.problem(), "point 3");
    EXPECT_EQ(error.mark().line, 2);
  }
}

#ifdef LINKRISE_MPIEXEC
namespace fs = std::filesystem;
using command_test::Outcome;
using command_test::slurp;

// Open MPI refuses to start as root unless told: OMPI_ALLOW_RUN_AS_ROOT*, set in the CTest environment by
// CMakeLists.txt.
std::string mpirun(int ranks) {
  return std::string("\"") + LINKRISE_MPIEXEC + "\" --oversubscribe -n " + std::to_string(ranks) + " ";
}

class RanksEndToEnd : public ::testing::Test {
 protected:
  void SetUp() override { directory_ = command_test::fresh_test_folder("linkrise_rank_pool_test"); }
  void TearDown() override { fs::remove_all(directory_); }

  // linkrise `arguments` in the source tree (where the stored cases are) into folder `name`, under mpirun with
  // `ranks` ranks (0: plain, threaded), each with `jobs` threads.
  Outcome linkrise(const std::string& name, int ranks, int jobs, const std::string& arguments) const {
    const fs::path out = directory_ / name;
    const std::string command = (ranks > 0 ? mpirun(ranks) : "") + "\"" + LINKRISE_BINARY + "\" " + arguments +
                                " -j " + std::to_string(jobs) + " -o \"" + out.string() + "\" --report \"" +
                                (out / "report.html").string() + "\"";
    return command_test::run_in(LINKRISE_SOURCE_DIR, command, directory_);
  }

  // The threaded run and the runs on 2 and 3 ranks end alike and write the same bytes; returns the 3-rank run.
  Outcome expect_same_everywhere(const std::string& arguments, const std::vector<std::string>& files, int exit_code) {
    const Outcome threads = linkrise("threads", 0, 2, arguments);
    EXPECT_EQ(threads.exit_code, exit_code) << threads.err;
    Outcome last;
    for (const auto& [name, ranks, jobs] : {std::tuple{"two", 2, 1}, std::tuple{"three", 3, 2}}) {
      last = linkrise(name, ranks, jobs, arguments);
      EXPECT_EQ(last.exit_code, exit_code) << last.err;
      EXPECT_EQ(command_test::without_file_lines(last.out), command_test::without_file_lines(threads.out))
          << "the terminal text on " << ranks << " ranks differs";
      for (const auto& file : files) {
        const std::string threaded = slurp(directory_ / "threads" / file);
        EXPECT_FALSE(threaded.empty()) << file;
        EXPECT_TRUE(slurp(directory_ / name / file) == threaded) << file << " on " << ranks << " ranks differs";
      }
    }
    return last;
  }

  fs::path directory_;
};

TEST_F(RanksEndToEnd, TheProbeGathersInOrderAndFailsOnEveryRank) {
  for (int ranks : {2, 3}) {
    const Outcome probe = command_test::run_in(directory_, mpirun(ranks) + "\"" + LINKRISE_RANK_PROBE + "\"", directory_);
    ASSERT_EQ(probe.exit_code, 0) << probe.out << probe.err;
    for (int rank = 0; rank < ranks; ++rank) {
      const std::string head = "rank " + std::to_string(rank) + " of " + std::to_string(ranks) + ": ";
      EXPECT_NE(probe.out.find(head + "gathered in order"), std::string::npos) << probe.out;
      EXPECT_NE(probe.out.find(head + "input error: case.yaml:7:3: error: point 4 is bad|  fix: fix it"),
                std::string::npos)
          << probe.out;
      EXPECT_NE(probe.out.find(head + "error: point 1 broke"), std::string::npos) << probe.out;
    }
  }
}

TEST_F(RanksEndToEnd, SpreadWritesTheThreadedFiles) {
  expect_same_everywhere("spread cases/study_precharge_window.yaml --samples 24 --seed 3",
                         {"spread_samples.csv", "spread.json", "report.html"}, 0);
}

TEST_F(RanksEndToEnd, SweepWithAFailingPointWritesTheThreadedFiles) {
  // The second value's step budget is far too small: the solver gives up at points 3 and 4 (exit 3), on
  // whichever rank they fall; the others are evaluated and reported as usual.
  const Outcome three = expect_same_everywhere(
      "sweep cases/study_precharge_window.yaml --vary run.max_steps=2000000,10,1000000 "
      "--vary r_pre.resistance=33Ohm,68Ohm",
      {"sweep.csv", "report.html"}, 3);
  EXPECT_NE(three.out.find("point 3: more than 10 steps (run.max_steps)"), std::string::npos) << three.out;
  EXPECT_NE(three.out.find("point 4: more than 10 steps (run.max_steps)"), std::string::npos) << three.out;
}

TEST_F(RanksEndToEnd, SizeWritesTheThreadedFiles) {
  expect_same_everywhere("size cases/study_precharge_window.yaml --part r_pre --range 20Ohm..200Ohm --corners",
                         {"sizing.csv", "sizing.json", "report.html"}, 0);
}
#endif

}  // namespace
}  // namespace linkrise::app
