// Wall time of a sizing run (app/studies/sizing.h) on the stored sequence case cases/study_precharge_window.yaml:
// r_pre.resistance over 5 … 300 Ohm, every value at the nominal point and the 32 corners of its five tolerances,
// on 2 worker threads. Counters: values evaluated and case runs per second.
//   linkrise_bench --benchmark_filter=Sizing
#include <benchmark/benchmark.h>

#include "app/studies/sizing.h"

namespace {

void SizingStudyCase(benchmark::State& state) {
  linkrise::app::SizingRequest request;
  request.case_file = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  request.part = "r_pre";
  request.lower = 5.0;
  request.upper = 300.0;
  request.jobs = 2;
  std::size_t values = 0, runs = 0;
  for (auto _ : state) {
    linkrise::app::Sizing sizing = linkrise::app::size_part(request);
    values = sizing.points.size();
    runs = values * (sizing.corners + 1);
    benchmark::DoNotOptimize(sizing.lower);
  }
  state.counters["values"] = static_cast<double>(values);
  state.counters["runs_per_second"] =
      benchmark::Counter(static_cast<double>(runs), benchmark::Counter::kIsIterationInvariantRate);
}

BENCHMARK(SizingStudyCase)->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);

}  // namespace
