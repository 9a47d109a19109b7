#pragma once
// `linkrise merge DIR...`: the whole tolerance spread from the output folders of its shards (`linkrise spread
// --shard k/n`, run by a batch scheduler's array job or on any machines), written as one run over the whole
// population writes it. The shards' records (app/studies/spread_record.h) must belong to one study — the same
// case text and --set values, mode, seed, population, shard count, metric columns and linkrise version — and
// cover every shard exactly once. Statistics, worst samples and the headline are computed from the gathered
// samples by the same code a single run uses (summarise_spread), so the files agree byte for byte.
#include <vector>

#include "app/studies/spread.h"
#include "app/studies/spread_record.h"

namespace linkrise::app {

/// The spread of all shards, in any order. Throws InputError naming the folder for a record of another study, a
/// damaged record or a repeated shard, and naming the missing shard and the folders given when one is missing.
Spread merge_spread(std::vector<SpreadRecord> records);

}  // namespace linkrise::app
