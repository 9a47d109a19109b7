// Time to solve a case in-process (parse once, build and simulate per iteration), with the solver's statistics
// as counters: steps, RHS evaluations, Jacobians and network iterations per solve. The reference case
// cases/reference_180s_speed.yaml runs under its BMS sequence, as `linkrise run` does (the supervisor is part of
// the solve). Targets (README, Performance): the reference case in at most 0.5 ms, the demo in at most 1 ms.
// Argument: 1 records a row per step (as `run` does), 0 records none.
#include <benchmark/benchmark.h>

#include "netlist/case.h"
#include "solver/circuit.h"
#include "solver/sequence_controller.h"
#include "solver/transient.h"

namespace {
const char* demo_path() { return LINKRISE_SOURCE_DIR "/cases/demo_storage_rack.yaml"; }
const char* reference_path() { return LINKRISE_SOURCE_DIR "/cases/reference_180s_speed.yaml"; }

void report(benchmark::State& state, const linkrise::solver::Statistics& last) {
  state.counters["steps"] = static_cast<double>(last.steps);
  state.counters["rhs"] = static_cast<double>(last.rhs_evaluations);
  state.counters["jacobians"] = static_cast<double>(last.jacobian_evaluations);
  state.counters["newton"] = static_cast<double>(last.network_newton_iterations);
  state.counters["settlings"] = static_cast<double>(last.settlings);
}

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
  report(state, last);
}
BENCHMARK(SolveDemoCase)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->Repetitions(5)->ReportAggregatesOnly(true);

void SolveReferenceCase(benchmark::State& state) {
  auto spec = linkrise::netlist::load_case(reference_path());
  linkrise::solver::Circuit circuit(spec);
  linkrise::solver::Statistics last;
  for (auto _ : state) {
    linkrise::solver::SequenceController controller(circuit, *spec.sequence);
    auto options = linkrise::solver::options_from(circuit);
    linkrise::solver::attach(controller, options);
    options.record_steps = state.range(0) != 0;
    auto result = linkrise::solver::simulate(circuit, options);
    benchmark::DoNotOptimize(result.final_states.data());
    last = result.statistics;
  }
  report(state, last);
}
BENCHMARK(SolveReferenceCase)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->Repetitions(5)->ReportAggregatesOnly(true);

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
