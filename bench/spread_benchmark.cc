// Throughput of the tolerance spread: Monte Carlo samples of the stored sequence case
// cases/study_precharge_window.yaml (five tolerances, the full BMS sequence with the analyser), on 1 and 2
// worker threads. Arguments: {samples, threads}. Wall time is what counts (UseRealTime). The headline run is
// 10 000 samples on 2 threads; the 500-sample runs give the 1 -> 2 thread speed-up in a shorter time.
//   linkrise_bench --benchmark_filter=Spread
#include <benchmark/benchmark.h>

#include "app/studies/spread.h"

namespace {

void SpreadMonteCarlo(benchmark::State& state) {
  const std::string file = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  linkrise::app::SpreadPlan plan;
  plan.samples = static_cast<std::size_t>(state.range(0));
  plan.seed = 1;
  const int threads = static_cast<int>(state.range(1));
  for (auto _ : state) {
    linkrise::app::Spread spread = linkrise::app::run_spread(file, {}, plan, threads);
    benchmark::DoNotOptimize(spread.statistics.data());
  }
  state.counters["samples_per_second"] =
      benchmark::Counter(static_cast<double>(plan.samples), benchmark::Counter::kIsIterationInvariantRate);
}

BENCHMARK(SpreadMonteCarlo)->Args({500, 1})->Args({500, 2})->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);
BENCHMARK(SpreadMonteCarlo)->Args({10000, 2})->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);

}  // namespace
