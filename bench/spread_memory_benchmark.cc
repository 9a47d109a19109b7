// Peak memory of a Monte Carlo spread: the process's peak resident set (getrusage) after run_spread of
// cases/study_precharge_window.yaml, as the counter peak_rss_MB. The peak is the process's own, so run one size
// per process:
//   linkrise_bench --benchmark_filter='SpreadMemory/100000/'
// Target (README, Performance): at most 64 MB at 100 000 samples. The samples' CSV and shard record that the
// command line writes are streamed into their files (app/commands/spread_command.cc), not held as text besides;
// the dense columns of a study of more than 1024 points are kept in a temporary file (app/studies/point_table.h).
#include <sys/resource.h>

#include <benchmark/benchmark.h>

#include "app/studies/spread.h"

namespace {

double peak_rss_megabytes() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return static_cast<double>(usage.ru_maxrss) / 1024.0;  // ru_maxrss is in KiB on Linux
}

void SpreadMemory(benchmark::State& state) {
  const std::string file = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  linkrise::app::SpreadPlan plan;
  plan.samples = static_cast<std::size_t>(state.range(0));
  plan.seed = 1;
  std::size_t metrics = 0, constant = 0, coded = 0, blocks_in_file = 0;
  for (auto _ : state) {
    linkrise::app::Spread spread = linkrise::app::run_spread(file, {}, plan, 2);
    metrics = spread.results.columns.size();
    constant = spread.results.points.constant_columns();
    coded = spread.results.points.coded_columns();
    blocks_in_file = spread.results.points.blocks_in_file();
    benchmark::DoNotOptimize(spread.statistics.data());
  }
  state.counters["peak_rss_MB"] = peak_rss_megabytes();
  state.counters["metrics"] = static_cast<double>(metrics);
  // Columns with one value over every sample keep that one number, those of a few values a byte per sample
  // (app/studies/point_table.h).
  state.counters["constant_columns"] = static_cast<double>(constant);
  state.counters["coded_columns"] = static_cast<double>(coded);
  // The dense columns' blocks of points written to the table's temporary file, not held in memory.
  state.counters["blocks_in_file"] = static_cast<double>(blocks_in_file);
}

BENCHMARK(SpreadMemory)->Arg(500)->Arg(3000)->Arg(100000)->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);

}  // namespace
