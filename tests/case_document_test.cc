// The input side of a case: a document edited by overrides and variants, then validated into typed sections.
#include "netlist/case_document.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::netlist::CaseDocument;
using linkrise::netlist::Dimension;
using linkrise::netlist::Override;
using linkrise::netlist::SourceMark;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kCase =
    "ground: gnd\n"                                                                                         // 1
    "parts:\n"                                                                                              // 2
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                             // 3
    "  - {name: k_pre, kind: contactor, nodes: [plus, mid]}\n"                                              // 4
    "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"                          // 5
    "  - {name: k_main, kind: contactor, nodes: [plus, link], closing_delay: 20 ms}\n"                       // 6
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"                              // 7
    "sequence:\n"                                                                                           // 8
    "  start_closed: [k_pre]\n  precharge: k_pre\n  main: k_main\n  resistor: r_pre\n"                     // 9-12
    "  pack: [plus, gnd]\n  link: [link, gnd]\n  close_when: {ratio: 95 %}\n"                               // 13-15
    "  sample_period: 1 ms\n  timeout: 800 ms\n"                                                            // 16-17
    "limits:\n  sequence.precharge_time: {max: 500 ms}\n"                                                   // 18-19
    "scenarios:\n  - {name: weak_resistor, set: {r_pre.resistance: 50 Ohm}, expect: closed}\n"             // 20-21
    "variants:\n"                                                                                           // 22
    "  - name: ntc\n"                                                                                       // 23
    "    replace: {r_pre: {kind: ntc_thermistor, resistance_at_25degC: 100 Ohm, b_value: 3000 K}}\n"        // 24
    "    set: {c1.capacitance: 2 mF}\n"                                                                     // 25
    "tolerances:\n  r_pre.resistance: {plus_minus: 5 %}\n"                                                  // 26-27
    "run: {duration: 1 s}\n";                                                                               // 28

const SourceMark kWhere{"command line (--set #1)", 0, 0};

CaseDocument document() { return CaseDocument::parse(kCase, "test.yaml"); }

double resistance_of(const linkrise::netlist::Case& spec, const std::string& part) {
  return spec.find_part(part)->parameters().required("resistance", Dimension::resistance());
}
}  // namespace

TEST(CaseDocument, ValidatesEverySectionIntoTypedData) {
  auto spec = document().validate();
  ASSERT_TRUE(spec.sequence.has_value());
  EXPECT_EQ(spec.sequence->main, "k_main");
  EXPECT_EQ(spec.sequence->main_mark.to_string(), "test.yaml:11:9");
  ASSERT_EQ(spec.limits.size(), 1u);
  EXPECT_EQ(spec.limits[0].metric, "sequence.precharge_time");
  EXPECT_DOUBLE_EQ(spec.limits[0].maximum->value, 0.5);
  ASSERT_EQ(spec.scenarios.size(), 1u);
  EXPECT_EQ(spec.scenarios[0].expected, linkrise::netlist::SequenceOutcome::Closed);
  ASSERT_EQ(spec.variants.size(), 1u);
  EXPECT_EQ(spec.variants[0].replaced_parts, std::vector<std::string>{"r_pre"});
  ASSERT_EQ(spec.tolerances.size(), 1u);
  // 100 Ohm ± 5 %: plain arithmetic on the nominal value written in the case.
  EXPECT_DOUBLE_EQ(spec.tolerances[0].lower, 95.0);
  EXPECT_DOUBLE_EQ(spec.tolerances[0].upper, 105.0);
}

TEST(CaseDocument, OverridesMakeANewDocumentAndLeaveTheBaseAlone) {
  const CaseDocument base = document();
  const CaseDocument changed = base.with({Override{"r_pre.resistance", "47 Ohm", kWhere}});
  EXPECT_DOUBLE_EQ(resistance_of(changed.validate(), "r_pre"), 47.0);
  EXPECT_DOUBLE_EQ(resistance_of(base.validate(), "r_pre"), 100.0);
  // A tolerance follows the overridden nominal value.
  EXPECT_DOUBLE_EQ(changed.validate().tolerances[0].upper, 47.0 * 1.05);
}

TEST(CaseDocument, VariantSwapsTheKindKeepsNameAndNodesThenApplies) {
  const CaseDocument base = document();
  const auto spec = base.validate();
  const auto changed = base.with_variant(spec.variants[0]).validate();
  const auto* part = changed.find_part("r_pre");
  ASSERT_NE(part, nullptr);
  EXPECT_EQ(part->kind, "ntc_thermistor");
  EXPECT_EQ(part->nodes[0], "mid");
  EXPECT_EQ(part->nodes[1], "link");
  EXPECT_DOUBLE_EQ(changed.find_part("c1")->parameters().required("capacitance", Dimension::capacitance()), 2e-3);
}

TEST(CaseDocument, QuantityAtReadsWrittenValuesOnly) {
  const CaseDocument base = document();
  auto delay = base.quantity_at("k_main.closing_delay", kWhere);
  ASSERT_TRUE(delay.has_value());
  EXPECT_DOUBLE_EQ(delay->value, 0.02);
  EXPECT_FALSE(base.quantity_at("k_pre.closing_delay", kWhere).has_value());  // left at its default
  auto error = input_error([&] { base.quantity_at("r_pr.resistance", kWhere); });
  EXPECT_TRUE(contains(error.what(), "did you mean 'r_pre'?")) << error.what();
}

TEST(CaseDocument, StructuralEditsOfTheFaultScenarios) {
  CaseDocument edited = document();
  const std::string name = edited.unused_part_name("c1");
  EXPECT_EQ(name, "c1_2");
  edited.add_part(name, "resistor", "link", "gnd", {{"resistance", "1 mOhm"}}, kWhere);
  edited.scale("c1.capacitance", 2.0, kWhere);
  edited.reverse_part("c1", kWhere);
  const auto spec = edited.validate();
  EXPECT_DOUBLE_EQ(resistance_of(spec, "c1_2"), 1e-3);
  EXPECT_DOUBLE_EQ(spec.find_part("c1")->parameters().required("capacitance", Dimension::capacitance()), 2e-3);
  EXPECT_EQ(spec.find_part("c1")->nodes[0], "gnd");
}

TEST(CaseDocument, ABadOverrideIsAnInputErrorAtItsOwnPlace) {
  const CaseDocument changed = document().with({Override{"r_pre.resistance", "47 F", kWhere}});
  // Part parameters are read by the part models, so the error comes when the circuit is built.
  auto error = input_error([&] { linkrise::solver::Circuit circuit(changed.validate()); });
  EXPECT_EQ(error.mark().file, "command line (--set #1)");
  EXPECT_TRUE(contains(error.what(), "resistance")) << error.what();
}
