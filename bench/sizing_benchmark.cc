// Wall time of sizing runs (app/studies/sizing.h), on 2 worker threads:
//  - SizingBoatCase: the stored case cases/boat_104s_sizing.yaml as its sizing block says — r_pre.resistance over
//    5 … 400 Ohm, every value at the nominal point, the 32 corners of its five tolerances and the six built-in
//    fault scenarios with two attempts each; then its seven catalogue parts over the same; then the chosen part's
//    fault matrix and BMS window (a corner spread and the scenarios again).
//  - SizingStudyCase: cases/study_precharge_window.yaml over 5 … 300 Ohm, corners only (no faults, no verification).
// Counters: values evaluated and simulations per second.
//   linkrise_bench --benchmark_filter=Sizing
#include <benchmark/benchmark.h>

#include "app/studies/sizing.h"

namespace {

void run_sizing(benchmark::State& state, const linkrise::app::SizingRequest& request) {
  std::size_t values = 0, runs = 0;
  for (auto _ : state) {
    linkrise::app::Sizing sizing = linkrise::app::size_part(request);
    values = sizing.points.size();
    runs = sizing.runs;
    benchmark::DoNotOptimize(sizing.lower);
  }
  state.counters["values"] = static_cast<double>(values);
  state.counters["simulations"] = static_cast<double>(runs);
  state.counters["simulations_per_second"] =
      benchmark::Counter(static_cast<double>(runs), benchmark::Counter::kIsIterationInvariantRate);
}

void SizingBoatCase(benchmark::State& state) {
  linkrise::app::SizingRequest request;
  request.case_file = LINKRISE_SOURCE_DIR "/cases/boat_104s_sizing.yaml";
  request.jobs = 2;
  run_sizing(state, request);
}

void SizingStudyCase(benchmark::State& state) {
  linkrise::app::SizingRequest request;
  request.case_file = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  request.part = "r_pre";
  request.range = {5.0, 300.0};
  request.faults = false;
  request.verify = false;
  request.jobs = 2;
  run_sizing(state, request);
}

BENCHMARK(SizingBoatCase)->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);
BENCHMARK(SizingStudyCase)->Iterations(1)->UseRealTime()->Unit(benchmark::kSecond);

}  // namespace
