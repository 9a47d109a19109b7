#pragma once
// The worker pool over the ranks of an MPI job (app/cluster/ranks.h). Rank r of R runs the points r, r + R,
// r + 2R… on its own threads (for_each_index, app/studies/study_pool.h); then every rank sends the results of its
// points to every other, so each holds the whole study in index order and takes the same decisions after it. A
// point's result depends on its index alone, so every number is the one a single process computes, bit for bit.
// Interleaved rather than in blocks: neighbouring points cost alike (a sweep's largest resistances, the slow
// corners), so each rank gets its share of the dear ones. With one rank this is for_each_index.
#include <cstddef>
#include <functional>
#include <string>

#include "app/cluster/bytes.h"

namespace linkrise::app {

/// How the result of a point travels: `save` writes point i's result on the rank that computed it, `load` reads
/// it into point i's place on every other rank.
struct PointTransfer {
  std::function<void(std::size_t, ByteWriter&)> save;
  std::function<void(std::size_t, ByteReader&)> load;
};

/// Calls task(i) for every i in [0, count), shared out among the ranks, each on `jobs` threads; afterwards every
/// rank holds every point's result. A task that throws (the lowest failing index over all ranks counts): every
/// rank throws it after all have finished their points, so none is left waiting — the rank that met it its own
/// exception, the others the same netlist::InputError, or a std::runtime_error with its text. `label` names the
/// progress bar, which the first rank alone draws.
void for_each_index_on_ranks(std::size_t count, int jobs, const std::function<void(std::size_t)>& task,
                             const PointTransfer& transfer, const std::string& label = "");

}  // namespace linkrise::app
