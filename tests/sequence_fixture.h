#pragma once
// A run of a case with a sequence block for the tests: the controller attached, the report and the evaluation
// taken, and the timeline searched by event.
#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "solver/sequence_controller.h"
#include "tests/circuit_fixture.h"

namespace linkrise::testing {

struct SequenceRun {
  explicit SequenceRun(const std::string& yaml, double rtol = 1e-10, double atol = 1e-10) : sim(yaml) {
    sim.tight(rtol, atol);
    auto spec = sim.circuit.spec().sequence;
    EXPECT_TRUE(spec.has_value());
    controller.emplace(sim.circuit, *spec);
    solver::attach(*controller, sim.options);
    result = sim.run();
    EXPECT_NE(result.outcome, solver::Outcome::SolverFailure) << result.message;
    report = controller->report(result.end_time);
    audit = analysis::audit_energy(sim.circuit, result);
    evaluation = analysis::evaluate(sim.circuit, result, audit, &report);
  }
  /// Times of every timeline entry whose event is `event`, in order.
  std::vector<double> times(const std::string& event) const {
    std::vector<double> found;
    for (const auto& entry : result.timeline) {
      if (entry.event == event) found.push_back(entry.time);
    }
    return found;
  }
  /// Time of the first timeline entry whose event is `event`, NaN when absent.
  double when(const std::string& event) const {
    auto found = times(event);
    return found.empty() ? NAN : found.front();
  }
  /// The first timeline entry whose event is `event`; null when absent.
  const solver::TimelineEntry* entry(const std::string& event) const {
    for (const auto& e : result.timeline) {
      if (e.event == event) return &e;
    }
    return nullptr;
  }
  double metric(const std::string& name) const { return evaluation.metrics.value(name); }

  Simulation sim;
  std::optional<solver::SequenceController> controller;
  solver::Result result;
  solver::SequenceReport report;
  analysis::EnergyAudit audit;
  analysis::Evaluation evaluation;
};

}  // namespace linkrise::testing
