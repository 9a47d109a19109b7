// Wall time of a Monte Carlo spread shared out among the ranks of an MPI job (a build with LINKRISE_MPI): the
// built linkrise under `mpirun -n R`, each rank with T threads, on 1000 samples of the stored sequence case
// cases/study_precharge_window.yaml — the whole command, so the launcher's start-up, the exchange of the results
// and the writing of the files are in the time. Arguments: {ranks (0: linkrise started directly, no launcher),
// threads per rank, samples}. The 1 -> 2 rank speed-up is SpreadOverRanks/1/1/1000 against /2/1/1000; /0/1 and
// /0/2 are the plain process on 1 and 2 threads, for the launcher's cost and the threads' speed-up beside it.
//   linkrise_bench --benchmark_filter=SpreadOverRanks
#ifdef LINKRISE_MPIEXEC
#include <benchmark/benchmark.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <string>

namespace {

void SpreadOverRanks(benchmark::State& state) {
  const auto ranks = state.range(0), threads = state.range(1), samples = state.range(2);
  const std::filesystem::path out =
      std::filesystem::temp_directory_path() / ("linkrise_rank_benchmark_" + std::to_string(getpid()));
  // --oversubscribe: a rank per hardware thread is allowed, not only per core. Open MPI refuses root unless told.
  const std::string launcher = ranks > 0 ? std::string(LINKRISE_MPIEXEC) + " --oversubscribe -n " +
                                               std::to_string(ranks) + " "
                                         : "";
  const std::string command = "cd " LINKRISE_SOURCE_DIR
                              " && OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 " +
                              launcher + LINKRISE_BINARY + " spread cases/study_precharge_window.yaml --samples " +
                              std::to_string(samples) + " --seed 1 -q -j " + std::to_string(threads) + " -o " +
                              out.string();
  for (auto _ : state) {
    const int status = std::system(command.c_str());
    if (status != 0) state.SkipWithError(("failed: " + command).c_str());
  }
  std::filesystem::remove_all(out);
  state.counters["samples_per_second"] =
      benchmark::Counter(static_cast<double>(samples), benchmark::Counter::kIsIterationInvariantRate);
}

BENCHMARK(SpreadOverRanks)
    ->Args({1, 1, 1000})
    ->Args({2, 1, 1000})
    ->Args({0, 1, 1000})
    ->Args({0, 2, 1000})
    ->Iterations(1)
    ->UseRealTime()
    ->Unit(benchmark::kSecond);

}  // namespace
#endif
