#pragma once
// The worker pool of the studies: a fixed number of std::threads take sample indices from one atomic counter
// and write each result into its own slot, so the results do not depend on the thread count or on which thread
// ran which index. A progress bar is drawn on stderr only when stderr is a terminal.
#include <cstddef>
#include <functional>
#include <string>

namespace linkrise::app {

/// The thread count for `jobs` (0: one per hardware thread), never more than `tasks` and at least 1.
unsigned worker_count(int jobs, std::size_t tasks);

/// Calls task(i) for every i in [0, count) on `jobs` threads. The first exception thrown by a task (lowest
/// index) is rethrown after every thread has stopped; tasks not yet started are skipped once one has thrown.
/// `label` names the work on the progress bar ("" for no bar).
void for_each_index(std::size_t count, int jobs, const std::function<void(std::size_t)>& task,
                    const std::string& label = "");

/// One contiguous block of a population split into `shards` (1-based `shard`): [begin, end).
struct IndexRange {
  std::size_t begin = 0, end = 0;
  std::size_t size() const { return end - begin; }
};
IndexRange shard_range(std::size_t count, int shard, int shards);

}  // namespace linkrise::app
