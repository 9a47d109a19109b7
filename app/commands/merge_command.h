#pragma once
// `linkrise merge DIR...`: the output folders of a spread's shards (`linkrise spread --shard k/n`) combined into
// the files one run over the whole population writes (app/studies/spread_merge.h): spread_samples.csv,
// spread.json, and with --report the HTML report; the exit code of that run (0, 1 when a sample failed, 3 when the
// solver gave up on one). A folder of another study, a repeated or a missing shard: exit 2, nothing written.
#include <string>
#include <vector>

namespace linkrise::app {

struct MergeArguments {
  std::vector<std::string> folders;
  std::string metrics;
  std::string output_directory = "out";
  std::string report;
  bool quiet = false;
};

int merge_command(const MergeArguments& arguments);

}  // namespace linkrise::app
