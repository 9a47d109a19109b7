// Time to solve the demo case in-process (parse once, build and simulate per iteration), with the solver's
// statistics as counters. Target: one solve of a case of this size in at most 1 ms (README, Performance).
#include <benchmark/benchmark.h>

#include "netlist/case.h"
#include "solver/circuit.h"
#include "solver/transient.h"

namespace {
const char* demo_path() { return LINKRISE_SOURCE_DIR "/cases/demo_storage_rack.yaml"; }

void SolveDemoCase(benchmark::State& state) {
  auto spec = linkrise::netlist::load_case(demo_path());
  linkrise::solver::Circuit circuit(spec);
  auto options = linkrise::solver::options_from(circuit);
  options.record_steps = state.range(0) != 0;
  linkrise::solver::Statistics last;
  for (auto _ : state) {
    auto result = linkrise::solver::simulate(circuit, options);
    benchmark::DoNotOptimize(result.final_states.data());
    last = result.statistics;
  }
  state.counters["steps"] = static_cast<double>(last.steps);
  state.counters["rhs"] = static_cast<double>(last.rhs_evaluations);
  state.counters["jacobians"] = static_cast<double>(last.jacobian_evaluations);
  state.counters["newton"] = static_cast<double>(last.network_newton_iterations);
}
BENCHMARK(SolveDemoCase)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->Repetitions(5)->ReportAggregatesOnly(true);

void BuildDemoCircuit(benchmark::State& state) {
  auto spec = linkrise::netlist::load_case(demo_path());
  for (auto _ : state) {
    linkrise::solver::Circuit circuit(spec);
    benchmark::DoNotOptimize(&circuit);
  }
}
BENCHMARK(BuildDemoCircuit)->Unit(benchmark::kMicrosecond);
}  // namespace

BENCHMARK_MAIN();
