#include "app/studies/rank_pool.h"

#include <exception>
#include <limits>
#include <stdexcept>
#include <vector>

#include "app/cluster/ranks.h"
#include "app/studies/study_pool.h"
#include "netlist/input_error.h"

namespace linkrise::app {
namespace {

enum class ErrorKind : std::uint64_t { Input, Other };

void save_error(ByteWriter& out, const std::exception_ptr& error) {
  try {
    std::rethrow_exception(error);
  } catch (const netlist::InputError& input) {
    out.put(static_cast<std::uint64_t>(ErrorKind::Input));
    out.put(input.mark().file);
    out.put(static_cast<std::uint64_t>(input.mark().line));
    out.put(static_cast<std::uint64_t>(input.mark().column));
    out.put(input.problem());
    out.put(input.fix());
  } catch (const std::exception& other) {
    out.put(static_cast<std::uint64_t>(ErrorKind::Other));
    out.put(std::string(other.what()));
  } catch (...) {
    out.put(static_cast<std::uint64_t>(ErrorKind::Other));
    out.put(std::string("a study point failed with an exception that is not a std::exception"));
  }
}

[[noreturn]] void throw_error(ByteReader& in) {
  if (static_cast<ErrorKind>(in.count()) == ErrorKind::Input) {
    netlist::SourceMark mark;
    mark.file = in.text();
    mark.line = static_cast<int>(in.count());
    mark.column = static_cast<int>(in.count());
    std::string problem = in.text();
    std::string fix = in.text();
    throw netlist::InputError(mark, problem, fix);
  }
  throw std::runtime_error(in.text());
}

constexpr std::uint64_t kNoFailure = std::numeric_limits<std::uint64_t>::max();

}  // namespace

void for_each_index_on_ranks(std::size_t count, int jobs, const std::function<void(std::size_t)>& task,
                             const PointTransfer& transfer, const std::string& label) {
  const auto ranks = static_cast<std::size_t>(rank_count());
  if (ranks == 1) {
    for_each_index(count, jobs, task, label);
    return;
  }
  const auto me = static_cast<std::size_t>(rank_index());
  const std::size_t mine = count > me ? (count - me + ranks - 1) / ranks : 0;
  auto index_of = [&](std::size_t k) { return me + k * ranks; };
  // The lowest failing point of this rank, and its exception.
  std::uint64_t failed = kNoFailure;
  std::exception_ptr error;
  std::vector<std::exception_ptr> errors(mine);
  try {
    for_each_index(
        mine, jobs,
        [&](std::size_t k) {
          try {
            task(index_of(k));
          } catch (...) {
            errors[k] = std::current_exception();
            throw;
          }
        },
        me == 0 ? label : "");
  } catch (...) {
    error = std::current_exception();  // the pool itself failed, unless a point's error is recorded below
    failed = index_of(0);
  }
  for (std::size_t k = 0; k < mine; ++k) {
    if (!errors[k]) continue;
    error = errors[k];
    failed = index_of(k);
    break;
  }

  ByteWriter out;
  out.put(failed);
  if (error) {
    save_error(out, error);
  } else {
    for (std::size_t k = 0; k < mine; ++k) transfer.save(index_of(k), out);
  }
  const std::vector<std::string> payloads = exchange_bytes(out.bytes());

  // Every rank looks for the same lowest failure, so all throw or none does.
  std::uint64_t lowest = kNoFailure;
  std::size_t lowest_rank = 0;
  for (std::size_t r = 0; r < ranks; ++r) {
    ByteReader in(payloads[r]);
    const std::uint64_t at = in.count();
    if (at < lowest) {
      lowest = at;
      lowest_rank = r;
    }
  }
  if (lowest != kNoFailure) {
    if (lowest_rank == me) std::rethrow_exception(error);
    ByteReader in(payloads[lowest_rank]);
    in.count();
    throw_error(in);
  }
  for (std::size_t r = 0; r < ranks; ++r) {
    if (r == me) continue;
    ByteReader in(payloads[r]);
    in.count();
    for (std::size_t i = r; i < count; i += ranks) transfer.load(i, in);
  }
}

}  // namespace linkrise::app
