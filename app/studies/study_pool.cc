#include "app/studies/study_pool.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cstdio>
#include <exception>
#include <mutex>
#include <thread>
#include <vector>

#include <fmt/format.h>
#include <unistd.h>

namespace linkrise::app {

unsigned worker_count(int jobs, std::size_t tasks) {
  unsigned threads = jobs > 0 ? static_cast<unsigned>(jobs) : std::max(1u, std::thread::hardware_concurrency());
  return static_cast<unsigned>(std::max<std::size_t>(1, std::min<std::size_t>(threads, tasks)));
}

namespace {

// Redrawn at most every 100 ms by whichever worker finishes a task then; cleared at the end.
class ProgressBar {
 public:
  ProgressBar(std::string label, std::size_t total)
      : label_(std::move(label)), total_(total), active_(!label_.empty() && total > 0 && isatty(fileno(stderr)) != 0) {}
  ~ProgressBar() {
    if (active_) std::fprintf(stderr, "\r%*s\r", 72, "");
  }
  void advance(std::size_t done) {
    if (!active_) return;
    std::unique_lock lock(mutex_, std::try_to_lock);
    if (!lock.owns_lock()) return;
    auto now = std::chrono::steady_clock::now();
    if (done < total_ && now - last_ < std::chrono::milliseconds(100)) return;
    last_ = now;
    constexpr int width = 30;
    int filled = static_cast<int>(width * done / total_);
    std::string bar(static_cast<std::size_t>(filled), '#');
    bar.resize(width, '.');
    std::string line = fmt::format("\r{} [{}] {}/{}", label_, bar, done, total_);
    std::fputs(line.c_str(), stderr);
    std::fflush(stderr);
  }

 private:
  std::string label_;
  std::size_t total_;
  bool active_;
  std::mutex mutex_;
  std::chrono::steady_clock::time_point last_{};
};

}  // namespace

void for_each_index(std::size_t count, int jobs, const std::function<void(std::size_t)>& task,
                    const std::string& label) {
  if (count == 0) return;
  std::atomic<std::size_t> next{0};
  std::atomic<std::size_t> done{0};
  std::atomic<bool> failed{false};
  std::vector<std::exception_ptr> errors(count);
  ProgressBar progress(label, count);
  auto worker = [&] {
    for (std::size_t i = next++; i < count && !failed; i = next++) {
      try {
        task(i);
      } catch (...) {
        errors[i] = std::current_exception();
        failed = true;
      }
      progress.advance(++done);
    }
  };
  unsigned threads = worker_count(jobs, count);
  std::vector<std::thread> pool;
  for (unsigned t = 1; t < threads; ++t) pool.emplace_back(worker);
  worker();
  for (auto& thread : pool) thread.join();
  for (auto& error : errors) {
    if (error) std::rethrow_exception(error);
  }
}

IndexRange shard_range(std::size_t count, int shard, int shards) {
  auto at = [&](int k) { return static_cast<std::size_t>(static_cast<unsigned long long>(count) * k / shards); };
  return IndexRange{at(shard - 1), at(shard)};
}

}  // namespace linkrise::app
