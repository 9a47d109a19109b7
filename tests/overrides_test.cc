// Overrides edit a case tree before validation: part parameters, top-level settings, blocks; errors point at
// the override.
#include "netlist/overrides.h"

#include <gtest/gtest.h>

#include <string>

#include "netlist/case.h"
#include "netlist/sequence_spec.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::netlist::Override;
using linkrise::netlist::SourceMark;
using linkrise::netlist::Tree;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kCase =
    "ground: gnd\n"
    "ambient: 25 degC\n"
    "parts:\n"
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
    "  - {name: k_pre, kind: contactor, nodes: [plus, mid]}\n"
    "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
    "  - {name: k_main, kind: contactor, nodes: [plus, link]}\n"
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
    "sequence:\n"
    "  start_closed: [k_pre]\n  precharge: k_pre\n  main: k_main\n  resistor: r_pre\n"
    "  pack: [plus, gnd]\n  link: [link, gnd]\n  close_when: {ratio: 95 %}\n"
    "  sample_period: 1 ms\n  timeout: 300 ms\n"
    "run: {duration: 1 s}\n";

const SourceMark kWhere{"scenario.yaml", 7, 5};

Tree tree() { return linkrise::netlist::parse_yaml(kCase, "test.yaml"); }
linkrise::netlist::Case validated(const Tree& root) { return linkrise::netlist::read_case(root, "test.yaml"); }
}  // namespace

TEST(Overrides, SetsAPartParameterAmbientAndASequenceSetting) {
  Tree root = tree();
  linkrise::netlist::apply_overrides(root, {{"r_pre.resistance", "47 Ohm", kWhere},
                                            {"ambient", "60 degC", kWhere},
                                            {"sequence.timeout", "500 ms", kWhere},
                                            {"sequence.close_when.ratio", "90 %", kWhere},
                                            {"run.duration", "2 s", kWhere}});
  auto spec = validated(root);
  EXPECT_EQ(spec.find_part("r_pre")->parameters().text("resistance").value_or(""), "47 Ohm");
  EXPECT_DOUBLE_EQ(spec.ambient, 333.15);
  EXPECT_DOUBLE_EQ(spec.run.duration, 2.0);
  auto sequence = spec.sequence;
  EXPECT_DOUBLE_EQ(sequence->timeout, 0.5);
  EXPECT_DOUBLE_EQ(sequence->rule_value, 0.9);
  // The override carries its own position.
  EXPECT_EQ(spec.find_part("r_pre")->parameters().mark("resistance").to_string(), "scenario.yaml:7:5");
}

TEST(Overrides, AddsAParameterLeftAtItsDefaultAndABlockValue) {
  Tree root = tree();
  linkrise::netlist::apply_override(root, {"k_main.closing_delay", "20 ms", kWhere});
  linkrise::netlist::apply_override(root, {"sequence.rise_check", "{above: 20 %, by: 30 ms}", kWhere});
  auto sequence = validated(root).sequence;
  ASSERT_TRUE(sequence->rise_fraction.has_value());
  EXPECT_DOUBLE_EQ(*sequence->rise_fraction, 0.2);
  EXPECT_EQ(validated(root).find_part("k_main")->parameters().text("closing_delay").value_or(""), "20 ms");
}

TEST(Overrides, UnknownPartGetsADidYouMeanAtTheOverride) {
  Tree root = tree();
  auto error = input_error([&] { linkrise::netlist::apply_override(root, {"r_pr.resistance", "1 Ohm", kWhere}); });
  EXPECT_TRUE(contains(error.what(), "scenario.yaml:7:5")) << error.what();
  EXPECT_TRUE(contains(error.what(), "did you mean 'r_pre'?")) << error.what();
}

TEST(Overrides, AMisspeltParameterIsRejectedByThePartAtTheOverride) {
  Tree root = tree();
  linkrise::netlist::apply_override(root, {"r_pre.resistence", "1 Ohm", kWhere});
  auto error = linkrise::testing::input_error([&] { linkrise::solver::Circuit circuit(validated(root)); });
  EXPECT_TRUE(contains(error.what(), "scenario.yaml:7:5")) << error.what();
  EXPECT_TRUE(contains(error.what(), "did you mean 'resistance'?")) << error.what();
}

TEST(Overrides, PathThroughAValueOrIntoAMissingBlockIsAnError) {
  Tree root = tree();
  auto through = input_error([&] { linkrise::netlist::apply_override(root, {"sequence.timeout.x", "1", kWhere}); });
  EXPECT_TRUE(contains(through.what(), "'timeout' is a single value")) << through.what();
  auto missing = input_error([&] { linkrise::netlist::apply_override(root, {"limits.x.max", "1 J", kWhere}); });
  EXPECT_TRUE(contains(missing.what(), "the case has no 'limits' block")) << missing.what();
  auto structural = input_error([&] { linkrise::netlist::apply_override(root, {"r_pre.nodes", "[a, b]", kWhere}); });
  EXPECT_TRUE(contains(structural.what(), "cannot be overridden")) << structural.what();
}

TEST(Overrides, ScalesAQuantityKeepingItsUnit) {
  Tree root = tree();
  linkrise::netlist::scale_value(root, "c1.capacitance", 2.0, kWhere);
  const Tree* value = linkrise::netlist::find_value(root, "c1.capacitance", kWhere);
  ASSERT_NE(value, nullptr);
  EXPECT_EQ(value->text, "0.002 F");
  auto error = input_error([&] { linkrise::netlist::scale_value(root, "ambient", 2.0, kWhere); });
  EXPECT_TRUE(contains(error.what(), "not a quantity that scales")) << error.what();
}

TEST(Overrides, StructuralEditsAddReplaceAndReverseParts) {
  Tree root = tree();
  std::string name = linkrise::netlist::unused_part_name(root, "r_pre");
  EXPECT_EQ(name, "r_pre_2");
  linkrise::netlist::add_part(root, "short", "resistor", "link", "gnd", {{"resistance", "1 mOhm"}}, kWhere);
  linkrise::netlist::replace_part(root, "r_pre", "resistor", {{"resistance", "1 GOhm"}}, kWhere);
  linkrise::netlist::reverse_part(root, "c1", kWhere);
  auto spec = validated(root);
  ASSERT_NE(spec.find_part("short"), nullptr);
  EXPECT_EQ(spec.find_part("r_pre")->parameters().text("resistance").value_or(""), "1 GOhm");
  EXPECT_EQ(spec.find_part("c1")->nodes[0], "gnd");
  EXPECT_EQ(spec.find_part("c1")->nodes[1], "link");
  auto taken = input_error([&] { linkrise::netlist::add_part(root, "c1", "resistor", "a", "b", {}, kWhere); });
  EXPECT_TRUE(contains(taken.what(), "the name is taken")) << taken.what();
}
