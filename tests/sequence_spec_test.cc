// The sequence block is validated with the position of each problem and a fix.
#include "netlist/sequence_spec.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kParts =
    "ground: gnd\n"                                                                          // line 1
    "parts:\n"                                                                               // 2
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"              // 3
    "  - {name: k_pre, kind: contactor, nodes: [plus, mid]}\n"                               // 4
    "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"           // 5
    "  - {name: k_main, kind: contactor, nodes: [plus, link]}\n"                             // 6
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"               // 7
    "run: {duration: 1 s}\n";                                                                // 8

std::string with_sequence(const std::string& lines) {
  return kParts + "sequence:\n" + lines;  // the sequence block starts on line 10
}

const std::string kGood =
    "  start_closed: [k_pre]\n"           // 10
    "  precharge: k_pre\n"                // 11
    "  main: k_main\n"                    // 12
    "  resistor: r_pre\n"                 // 13
    "  pack: [plus, gnd]\n"               // 14
    "  link: [link, gnd]\n"               // 15
    "  close_when: {ratio: 95 %}\n"       // 16
    "  sample_period: 1 ms\n"             // 17
    "  timeout: 300 ms\n";                // 18

std::string error_of(const std::string& yaml) {
  return input_error([&] { linkrise::solver::Circuit circuit(case_from(yaml)); }).what();
}
}  // namespace

TEST(SequenceSpec, ReadsAValidBlockWithDefaults) {
  auto sequence = case_from(with_sequence(kGood)).sequence;
  ASSERT_TRUE(sequence.has_value());
  EXPECT_EQ(sequence->main, "k_main");
  EXPECT_EQ(sequence->rule, linkrise::netlist::ClosingRule::Ratio);
  EXPECT_DOUBLE_EQ(sequence->rule_value, 0.95);
  EXPECT_DOUBLE_EQ(sequence->closing_level(400.0), 380.0);
  EXPECT_EQ(sequence->attempts, 1);
  EXPECT_EQ(sequence->expected_outcome, linkrise::netlist::SequenceOutcome::Closed);
  EXPECT_FALSE(sequence->rise_fraction.has_value());
  EXPECT_FALSE(case_from(kParts).sequence.has_value());
}

TEST(SequenceSpec, DifferenceRuleAndRate) {
  std::string text = kGood;
  text.replace(text.find("{ratio: 95 %}"), 13, "{difference: 15 V, max_rate: 2 kV/s}");
  auto sequence = case_from(with_sequence(text)).sequence;
  ASSERT_TRUE(sequence.has_value());
  EXPECT_DOUBLE_EQ(sequence->closing_level(400.0), 385.0);
  ASSERT_TRUE(sequence->max_rate.has_value());
  EXPECT_DOUBLE_EQ(*sequence->max_rate, 2000.0);
  EXPECT_EQ(sequence->rule_text(), "pack - link <= 15 V and |d(link)/dt| <= 2000 V/s");
}

TEST(SequenceSpec, MisspeltKeyIsNamedWithItsPositionAndASuggestion) {
  std::string text = kGood;
  text.replace(text.find("timeout"), 7, "timout");
  std::string message = error_of(with_sequence(text + "  timeout: 1 s\n"));
  EXPECT_TRUE(contains(message, "test.yaml:18:3")) << message;
  EXPECT_TRUE(contains(message, "did you mean 'timeout'?")) << message;
}

TEST(SequenceSpec, ResistorMustBeOnePartName) {
  std::string text = kGood;
  text.replace(text.find("resistor: r_pre"), 15, "resistor: [r_pre]");
  std::string message = error_of(with_sequence(text));
  EXPECT_TRUE(contains(message, "test.yaml:13:13")) << message;
  EXPECT_TRUE(contains(message, "must be one part name")) << message;
}

// Checked when the circuit is built: only the part models know that a resistor cannot switch.
TEST(SequenceSpec, MainMustBeAContactor) {
  std::string text = kGood;
  text.replace(text.find("main: k_main"), 12, "main: r_pre");
  std::string message = error_of(with_sequence(text));
  EXPECT_TRUE(contains(message, "test.yaml:12:9")) << message;
  EXPECT_TRUE(contains(message, "'r_pre', a resistive part (resistor), which cannot switch")) << message;
  EXPECT_TRUE(contains(message, "name one of the case's switching parts: k_pre, k_main")) << message;
}

TEST(SequenceSpec, UnknownNodeGetsADidYouMean) {
  std::string text = kGood;
  text.replace(text.find("[link, gnd]"), 11, "[lnk, gnd]");
  std::string message = error_of(with_sequence(text));
  EXPECT_TRUE(contains(message, "test.yaml:15:10")) << message;
  EXPECT_TRUE(contains(message, "did you mean 'link'?")) << message;
}

TEST(SequenceSpec, RuleNeedsExactlyOneOfRatioOrDifference) {
  std::string text = kGood;
  text.replace(text.find("{ratio: 95 %}"), 13, "{ratio: 95 %, difference: 10 V}");
  std::string message = error_of(with_sequence(text));
  EXPECT_TRUE(contains(message, "test.yaml:16:15")) << message;
  EXPECT_TRUE(contains(message, "exactly one of 'ratio'")) << message;
}

TEST(SequenceSpec, RetriesNeedACoolDown) {
  std::string message = error_of(with_sequence(kGood + "  attempts: 3\n"));
  EXPECT_TRUE(contains(message, "test.yaml:19:13")) << message;
  EXPECT_TRUE(contains(message, "cool_down")) << message;
}

TEST(SequenceSpec, AContactorMovedByAnEventAndTheSequenceIsRejected) {
  std::string yaml = with_sequence(kGood);
  yaml.replace(yaml.find("run:"), 4, "events:\n  - {at: 5 ms, close: k_main}\nrun:");
  std::string message = error_of(yaml);
  EXPECT_TRUE(contains(message, "test.yaml:9:5")) << message;
  EXPECT_TRUE(contains(message, "moved by the sequence and also by this event")) << message;
}

TEST(SequenceSpec, WrongDimensionIsAnError) {
  std::string text = kGood;
  text.replace(text.find("300 ms"), 6, "300 V");
  std::string message = error_of(with_sequence(text));
  EXPECT_TRUE(contains(message, "test.yaml:18:12")) << message;
  EXPECT_TRUE(contains(message, "time (s) is needed")) << message;
}
