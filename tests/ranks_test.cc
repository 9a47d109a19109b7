// The processes of a job (app/cluster/ranks.h) when no MPI launcher started the program — every test run and
// every plain `linkrise` command: rank 0 of 1, and an exchange gives back the rank's own bytes. The ranks of a
// real job are tested under mpirun in tests/rank_pool_test.cc.
#include "app/cluster/ranks.h"

#include <gtest/gtest.h>

namespace linkrise::app {
namespace {

TEST(Ranks, WithoutALauncherTheProcessIsRankZeroOfOne) {
  EXPECT_EQ(rank_index(), 0);
  EXPECT_EQ(rank_count(), 1);
  EXPECT_TRUE(first_rank());
  const std::string mine("bytes\0with a NUL", 16);
  const std::vector<std::string> all = exchange_bytes(mine);
  ASSERT_EQ(all.size(), 1u);
  EXPECT_EQ(all[0], mine);
  end_job(1);  // no job of several ranks: returns
}

}  // namespace
}  // namespace linkrise::app
