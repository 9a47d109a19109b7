// Loads the BMS sequence switches (sequence.loads): held off until their moment, enabled exactly their delay
// after it, disabled when a fault releases the contactors and started again by the retry; and runs that end a
// settling time after the sequence's last event (`run: {duration: sequence}`). Closed forms from
// docs/references.md, cited by tag at each check. Times the controller plans are exact by construction (sums of
// the case's delays), so they are compared to 1e-12 s.
#include "solver/sequence_loads.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "tests/circuit_fixture.h"
#include "tests/sequence_fixture.h"

namespace {
using linkrise::testing::SequenceRun;

constexpr double kTime = 1e-12;  // s

// An ideal 400 V source, pre-charge contactor and 100 Ohm resistor, main contactor, a 1 mF link, `loads` across
// it and `extra` lines in the sequence block.
std::string loads_case(const std::string& loads, const std::string& extra, const std::string& run) {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: k_pre, kind: contactor, nodes: [plus, mid], closed_resistance: 10 mOhm, closing_delay: 7 ms,"
         " opening_delay: 2 ms}\n"
         "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
         "  - {name: k_main, kind: contactor, nodes: [plus, link], closed_resistance: 1 mOhm, open_resistance: "
         "1e15 Ohm, closing_delay: 11 ms}\n"
         "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n" +
         loads +
         "sequence:\n"
         "  start_closed: [k_pre]\n"
         "  precharge: k_pre\n"
         "  main: k_main\n"
         "  resistor: r_pre\n"
         "  overlap: 5 ms\n"
         "  pack: [plus, gnd]\n"
         "  link: [link, gnd]\n"
         "  sample_period: 3 ms\n"
         "  start: 2 ms\n" +
         extra + "run: " + run + "\n";
}

const std::string kConverter =
    "  - {name: dcdc, kind: constant_power_load, nodes: [link, gnd], power: 1 kW}\n";
}  // namespace

// The converter has no lockout and starts enabled: only the sequence holds it off. Until the main contacts close,
// the link therefore charges as a plain RC ([R-RC-charge]); the converter starts exactly 40 ms after the main
// contacts touch, and the run ends its 50 ms settle after that start (the sequence's last event).
TEST(SequenceLoads, AConverterStartsItsDelayAfterTheMainClosureAndTheRunEndsItsSettleLater) {
  SequenceRun run(loads_case(kConverter,
                         "  close_when: {ratio: 90 %}\n  timeout: 2 s\n"
                         "  loads: [{part: dcdc, after: main_closed, delay: 40 ms}]\n",
                         "{duration: sequence, settle: 50 ms}"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  EXPECT_EQ(run.entry("disable dcdc"), nullptr);  // held off from the start: no switching of its own
  const double closed = run.when("close k_main");
  const auto times = run.result.steps.times();
  const auto drawing = linkrise::testing::column(run.result.steps, "dcdc.drawing");
  const double enabled = run.when("enable dcdc");
  EXPECT_NEAR(enabled, closed + 40e-3, kTime);
  for (std::size_t r = 0; r < times.size(); ++r) {
    // The switching instant has a row before and one after.
    if (times[r] == enabled) continue;
    EXPECT_EQ(drawing[r], times[r] < enabled ? 0.0 : 1.0) << times[r];
  }
  EXPECT_NEAR(run.result.end_time, closed + 40e-3 + 50e-3, kTime);
  EXPECT_EQ(run.result.outcome, linkrise::solver::Outcome::SupervisorFinished);
  // Before k_pre touches (7 ms after the 2 ms start) the link charges through the open contacts' 100 MOhm; from
  // the touch through 100.01 Ohm to 90 % of the source ([R-RC-charge], two segments chained).
  const double contacts = 9e-3, c = 1e-3, v = 400.0;
  const double v1 = v * (1.0 - std::exp(-contacts / ((100e6 + 100.0) * c)));
  const double crossing = contacts + 100.01 * c * std::log((v - v1) / (v - 0.9 * v));
  EXPECT_NEAR(run.evaluation.metrics.value("sequence.time_to_threshold") + 2e-3, crossing, 1e-6 * crossing);
  // The converter drew 1 kW for exactly the 50 ms settle: 50 J taken by the load (Joule, [R-Ohm-Joule]).
  const int dcdc = run.sim.circuit.find_part("dcdc");
  EXPECT_NEAR(run.audit.parts[static_cast<std::size_t>(dcdc)].to_load, 50.0, 1e-6 * 50.0);
}

// Into a shorted link the rise check trips each attempt 30 ms after its start. A pump started 5 ms after each
// attempt start runs until the fault releases the contactors and again on the retry; a fan due 50 ms after the
// start never runs (its start comes after the fault). The run ends its settle after the last contacts parted.
TEST(SequenceLoads, AFaultStopsTheLoadsAndTheRetryStartsThemAgain) {
  SequenceRun run(loads_case("  - {name: short, kind: resistor, nodes: [link, gnd], resistance: 20 mOhm}\n"
                         "  - {name: pump, kind: constant_current_load, nodes: [link, gnd], current: 1 A}\n"
                         "  - {name: fan, kind: constant_current_load, nodes: [link, gnd], current: 1 A}\n",
                         "  close_when: {ratio: 90 %}\n  rise_check: {above: 20 %, by: 30 ms}\n  timeout: 1 s\n"
                         "  attempts: 2\n  cool_down: 200 ms\n"
                         "  loads:\n"
                         "    - {part: pump, after: attempt_start, delay: 5 ms}\n"
                         "    - {part: fan, after: attempt_start, delay: 50 ms}\n",
                         "{duration: sequence, settle: 20 ms}"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::NoRise);
  ASSERT_EQ(run.report.attempts, 2);
  // Samples at 2 ms + k·3 ms: attempt 1 starts at 2 ms, its rise check is due at 32 ms; the retry starts at the
  // first sample 200 ms after that fault (233 ms = 2 ms + 77·3 ms), its check at 263 ms.
  const double start1 = 2e-3, fault1 = 32e-3, start2 = 233e-3, fault2 = 263e-3;
  ASSERT_NEAR(run.when("attempt 2 starts"), start2, kTime);
  const auto enables = run.times("enable pump");
  const auto disables = run.times("disable pump");
  ASSERT_EQ(enables.size(), 2u);
  ASSERT_EQ(disables.size(), 2u);  // one per fault
  EXPECT_NEAR(enables[0], start1 + 5e-3, kTime);
  EXPECT_NEAR(disables[0], fault1, kTime);
  EXPECT_NEAR(enables[1], start2 + 5e-3, kTime);
  EXPECT_NEAR(disables[1], fault2, kTime);
  EXPECT_TRUE(run.times("enable fan").empty());
  for (double drawing : linkrise::testing::column(run.result.steps, "fan.drawing")) EXPECT_EQ(drawing, 0.0);
  EXPECT_NEAR(run.result.end_time, fault2 + 2e-3 + 20e-3, kTime);  // k_pre parts 2 ms after the fault
}

// A cap below the sequence's length ends the run there: the sequence is unfinished, and the verdict says which
// setting to raise.
TEST(SequenceLoads, TheMaxDurationCapsARunThatFollowsTheSequence) {
  SequenceRun run(loads_case("  - {name: short, kind: resistor, nodes: [link, gnd], resistance: 20 mOhm}\n",
                         "  close_when: {ratio: 90 %}\n  rise_check: {above: 20 %, by: 30 ms}\n  timeout: 1 s\n"
                         "  attempts: 2\n  cool_down: 200 ms\n",
                         "{duration: sequence, settle: 20 ms, max_duration: 100 ms}"));
  EXPECT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Unfinished);
  EXPECT_NEAR(run.result.end_time, 0.1, kTime);
  ASSERT_FALSE(run.evaluation.failures.empty());
  EXPECT_TRUE(linkrise::testing::contains(run.evaluation.failures.back(), "max_duration"))
      << run.evaluation.failures.back();
}
