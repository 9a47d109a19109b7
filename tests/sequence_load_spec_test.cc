// The sequence's loads list and the run block's `duration: sequence`: each problem is an input error at the place
// it was written, with a fix. Positions are counted by hand from the YAML text (1-based line and column).
#include "netlist/sequence_load_spec.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::testing::case_error;
using linkrise::testing::case_from;
using linkrise::testing::contains;

const std::string kParts =
    "ground: gnd\n"                                                                               // 1
    "parts:\n"                                                                                    // 2
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                   // 3
    "  - {name: k_pre, kind: contactor, nodes: [plus, mid]}\n"                                    // 4
    "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"                // 5
    "  - {name: k_main, kind: contactor, nodes: [plus, link]}\n"                                  // 6
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"                    // 7
    "  - {name: dcdc, kind: constant_power_load, nodes: [link, gnd], power: 1 kW}\n"              // 8
    "sequence:\n"                                                                                 // 9
    "  start_closed: [k_pre]\n"                                                                   // 10
    "  precharge: k_pre\n"                                                                        // 11
    "  main: k_main\n"                                                                            // 12
    "  resistor: r_pre\n"                                                                         // 13
    "  pack: [plus, gnd]\n"                                                                       // 14
    "  link: [link, gnd]\n"                                                                       // 15
    "  close_when: {ratio: 95 %}\n"                                                               // 16
    "  sample_period: 1 ms\n"                                                                     // 17
    "  timeout: 300 ms\n";                                                                        // 18

// The parts and sequence above, `loads` from line 19, then `rest` (the run block and anything else).
std::string with(const std::string& loads, const std::string& rest = "run: {duration: 1 s}\n") {
  return kParts + loads + rest;
}

void expect_error_at(const std::string& yaml, int line, int column, const std::string& fragment) {
  auto error = case_error(yaml);
  EXPECT_EQ(error.mark().line, line) << error.what();
  EXPECT_EQ(error.mark().column, column) << error.what();
  EXPECT_TRUE(contains(error.what(), fragment)) << error.what();
  EXPECT_FALSE(error.fix().empty()) << error.what();
}
}  // namespace

TEST(SequenceLoadSpec, ALoadIsReadWithItsMomentAndDelay) {
  auto spec = case_from(with("  loads: [{part: dcdc, after: precharge_opened, delay: 25 ms}]\n"));
  ASSERT_EQ(spec.sequence->loads.size(), 1u);
  const auto& load = spec.sequence->loads.front();
  EXPECT_EQ(load.part, "dcdc");
  EXPECT_EQ(load.after, linkrise::netlist::LoadMoment::PrechargeOpened);
  EXPECT_DOUBLE_EQ(load.delay, 25e-3);
  EXPECT_EQ(load.mark.line, 19);
  auto defaults = case_from(with("  loads: [{part: dcdc}]\n")).sequence->loads.front();
  EXPECT_EQ(defaults.after, linkrise::netlist::LoadMoment::MainClosed);
  EXPECT_EQ(defaults.delay, 0.0);
}

TEST(SequenceLoadSpec, ProblemsAreNamedAtTheirPlace) {
  expect_error_at(with("  loads: [{part: dcdd}]\n"), 19, 18, "not in the parts list");
  expect_error_at(with("  loads: [{part: dcdc, after: main_close}]\n"), 19, 31, "after");
  expect_error_at(with("  loads: [{part: dcdc, delay: -1 ms}]\n"), 19, 31, "delay");
  expect_error_at(with("  loads: [{part: dcdc}, {part: dcdc}]\n"), 19, 32, "listed twice");
  expect_error_at(with("  loads: [{part: dcdc}]\n", "events: [{at: 5 ms, enable: dcdc}]\nrun: {duration: 1 s}\n"), 20,
                  10, "also by this event");
  expect_error_at(with("  loads: [{part: k_main}]\n"), 19, 18, "cannot be enabled");
  expect_error_at(with("  loads: {part: dcdc}\n"), 19, 10, "must be a list");
}

TEST(SequenceLoadSpec, ARunFollowsTheSequenceWithItsSettleAndCap) {
  auto run = case_from(with("", "run: {duration: sequence, settle: 200 ms}\n")).run;
  ASSERT_TRUE(run.follows_sequence());
  EXPECT_DOUBLE_EQ(*run.settle, 0.2);
  EXPECT_DOUBLE_EQ(run.duration, linkrise::netlist::kDefaultMaxDuration);
  auto capped = case_from(with("", "run: {duration: sequence, settle: 0 s, max_duration: 12 s}\n")).run;
  EXPECT_DOUBLE_EQ(capped.duration, 12.0);
  EXPECT_EQ(capped.marks.duration.column, 54);  // the cap's own place
  EXPECT_FALSE(case_from(with("")).run.follows_sequence());
}

TEST(SequenceLoadSpec, ARunThatFollowsTheSequenceIsCheckedAtItsPlace) {
  expect_error_at(with("", "run: {duration: sequence}\n"), 19, 17, "needs 'settle'");
  expect_error_at(with("", "run: {duration: sequence, settle: -1 ms}\n"), 19, 35, "settle");
  expect_error_at(with("", "run: {duration: 1 s, settle: 1 ms}\n"), 19, 30, "belongs to 'duration: sequence'");
  expect_error_at(with("", "run: {duration: sequence, settle: 1 ms, max_duration: 0 s}\n"), 19, 55, "max_duration");
  // Without a sequence block nothing can end the run.
  const std::string no_sequence =
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V, series_resistance: 1 Ohm}\n"
      "  - {name: c1, kind: capacitor, nodes: [plus, gnd], capacitance: 1 uF}\n"
      "run: {duration: sequence, settle: 1 ms}\n";
  expect_error_at(no_sequence, 5, 17, "no 'sequence:' block");
}
