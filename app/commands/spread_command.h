#pragma once
// `linkrise spread CASE.yaml --corners | --samples N`: the tolerance spread (app/studies/spread.h); writes
// spread_samples.csv and spread.json, and with --report an HTML report.
#include <string>
#include <vector>
#include <cstddef>
#include <cstdint>

namespace linkrise::app {

struct SpreadArguments {
  std::string case_file;
  bool corners = false;
  std::size_t samples = 0;
  std::uint64_t seed = 1;
  std::string shard;  // "k/n"
  std::vector<std::string> settings;
  std::string metrics;
  std::string output_directory = "out";
  int jobs = 0;
  std::string report;  // optional HTML report file (spread and window)
  bool quiet = false;
};

int spread_command(const SpreadArguments& arguments);

/// Why a --shard text is not "k/n" with 1 <= k <= n, for the command line's validator; empty when it is one.
std::string shard_problem(const std::string& text);

}  // namespace linkrise::app
