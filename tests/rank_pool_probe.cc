// A small program tests/rank_pool_test.cc starts under mpirun: the rank pool (app/studies/rank_pool.h) on real
// ranks. Each line it prints starts with its rank; the test reads them.
//   1. 23 points computed where they fall (each result records its rank) are on every rank afterwards, in index
//      order, and each rank computed exactly its interleaved share.
//   2. Point 4 throws an InputError (on rank 4 mod N): every rank throws the same error, nobody waits forever.
//   3. Point 1 throws a std::runtime_error: the same, as the text of the error.
#include <atomic>
#include <cstdio>
#include <stdexcept>
#include <string>
#include <vector>

#include "app/cluster/ranks.h"
#include "app/studies/rank_pool.h"
#include "netlist/input_error.h"

namespace {
using namespace linkrise::app;

PointTransfer numbers_of(std::vector<double>& values) {
  return {[&values](std::size_t i, ByteWriter& out) { out.put(values[i]); },
          [&values](std::size_t i, ByteReader& in) { values[i] = in.number(); }};
}

bool gathered_in_order(int rank, int ranks) {
  const std::size_t count = 23;
  std::vector<double> values(count, -1.0);
  std::atomic<int> computed_here{0};
  for_each_index_on_ranks(
      count, 2,
      [&](std::size_t i) {
        values[i] = 1000.0 * rank + static_cast<double>(i);
        ++computed_here;
      },
      numbers_of(values));
  const int share = static_cast<int>((count - static_cast<std::size_t>(rank) + ranks - 1) / ranks);
  bool good = computed_here == share;
  for (std::size_t i = 0; i < count; ++i) good = good && values[i] == 1000.0 * static_cast<double>(i % ranks) + i;
  return good;
}

std::string failure_seen(std::size_t failing, bool input_error) {
  std::vector<double> values(11, 0.0);
  try {
    for_each_index_on_ranks(
        values.size(), 2,
        [&](std::size_t i) {
          if (i == failing && input_error) {
            throw linkrise::netlist::InputError({"case.yaml", 7, 3}, "point " + std::to_string(i) + " is bad", "fix it");
          }
          if (i >= failing && !input_error) throw std::runtime_error("point " + std::to_string(i) + " broke");
          values[i] = 1.0;
        },
        numbers_of(values));
  } catch (const linkrise::netlist::InputError& error) {
    return std::string("input error: ") + error.what();
  } catch (const std::exception& error) {
    return std::string("error: ") + error.what();
  }
  return "no error";
}

}  // namespace

int main(int argc, char** argv) {
  RankSession session(argc, argv);
  const int rank = rank_index(), ranks = rank_count();
  std::printf("rank %d of %d: gathered %s\n", rank, ranks, gathered_in_order(rank, ranks) ? "in order" : "WRONG");
  // Two lines per error report: printed as one string, so lines of several ranks do not interleave inside one.
  std::string first = failure_seen(4, true), second = failure_seen(1, false);
  for (auto* text : {&first, &second}) {
    for (auto& c : *text) c = c == '\n' ? '|' : c;
  }
  std::printf("rank %d of %d: %s\nrank %d of %d: %s\n", rank, ranks, first.c_str(), rank, ranks, second.c_str());
  return 0;
}
