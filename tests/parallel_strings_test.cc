// Parallel strings under one BMS sequence (`main:` and `precharge:` as lists, netlist/sequence_spec.h): every
// string's main contactor closes on the one decision, and the strings then equalise through their resistances.
// Checked against the closed form for two sources through their resistances (Millman's theorem: the common node
// settles at Σ(V_k/R_k)/Σ(1/R_k), and the lower string takes (V_node − V_low)/R_low back) — [R-Ohm-Joule].
#include "solver/sequence_controller.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/sequence_fixture.h"

namespace {
// Two strings as Thevenin sources (404 V and 396 V, 0.1 Ohm each) with their own 1 mOhm main contactors onto a
// 1 mF link, pre-charged through string a's 100 Ohm path.
const char* kTwoStrings =
    "ground: gnd\n"
    "parts:\n"
    "  - {name: string_a, kind: dc_source, nodes: [a_plus, gnd], voltage: 404 V, series_resistance: 100 mOhm}\n"
    "  - {name: string_b, kind: dc_source, nodes: [b_plus, gnd], voltage: 396 V, series_resistance: 100 mOhm}\n"
    "  - {name: k_pre, kind: contactor, nodes: [a_plus, mid], closed_resistance: 1 mOhm}\n"
    "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
    "  - {name: k_main_a, kind: contactor, nodes: [a_plus, link], closed_resistance: 1 mOhm, closing_delay: 10 ms}\n"
    "  - {name: k_main_b, kind: contactor, nodes: [b_plus, link], closed_resistance: 1 mOhm, closing_delay: 10 ms}\n"
    "  - {name: c_link, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
    "sequence:\n"
    "  start_closed: [k_pre]\n"
    "  precharge: k_pre\n"
    "  main: [k_main_a, k_main_b]\n"
    "  resistor: r_pre\n"
    "  overlap: 20 ms\n"
    "  pack: [a_plus, gnd]\n"
    "  link: [link, gnd]\n"
    "  close_when: {ratio: 95 %}\n"
    "  sample_period: 1 ms\n"
    "  timeout: 2 s\n"
    "run: {duration: 0.6 s}\n";

TEST(ParallelStrings, BothMainsCloseOnOneDecisionAndTheStringsEqualise) {
  linkrise::testing::SequenceRun run(kTwoStrings);
  const auto& result = run.result;
  const auto& report = run.report;
  ASSERT_EQ(report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  const auto& evaluation = run.evaluation;
  // Millman: the link settles at (404/0.101 + 396/0.101)/(2/0.101) = 400 V, and string b takes
  // (400 − 396)/0.101 = 39.60 A back; the link's 50 µs settling is monotone, so that is also the peak. While the
  // pre-charge path still parallels string a (the 20 ms overlap) string a's resistance is 0.101 ∥ 100.001 Ohm,
  // raising it to 39.62 A: inside 0.1 %.
  const double r = 0.1 + 1e-3, equalising = (404.0 - 396.0) / (2.0 * r);
  EXPECT_NEAR(evaluation.metrics.value("sequence.equalising_current"), equalising, 1e-3 * equalising);
  const auto& b = linkrise::testing::column(result.steps, "k_main_b.current");
  EXPECT_NEAR(b.back(), -equalising, 1e-6 * equalising);
  // Both mains touched 10 ms after the one decision.
  const auto& attempt = report.history.front();
  EXPECT_NEAR(attempt.main_closed, attempt.decision + 10e-3, 1e-12);
  int closings = 0;
  for (const auto& entry : result.timeline) closings += entry.event == "close k_main_a" || entry.event == "close k_main_b";
  EXPECT_EQ(closings, 2);
}

TEST(ParallelStrings, AMainListedTwiceOrInStartClosedIsBadInput) {
  std::string twice = kTwoStrings;
  twice.replace(twice.find("main: [k_main_a, k_main_b]"), 26, "main: [k_main_a, k_main_a]");
  auto error = linkrise::testing::case_error(twice);
  EXPECT_TRUE(linkrise::testing::contains(error.what(), "listed twice in 'main'")) << error.what();
  std::string started = kTwoStrings;
  started.replace(started.find("start_closed: [k_pre]"), 21, "start_closed: [k_pre, k_main_b]");
  auto start_error = linkrise::testing::case_error(started);
  EXPECT_TRUE(linkrise::testing::contains(start_error.what(), "'k_main_b' is also in start_closed")) << start_error.what();
}
}  // namespace
