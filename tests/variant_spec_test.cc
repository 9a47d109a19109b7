// The `variants:` block read into typed variants; every malformed entry is placed at file:line:column.
#include "netlist/variant_spec.h"

#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kParts =
    "ground: gnd\n"                                                                                 // 1
    "parts:\n"                                                                                      // 2
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                     // 3
    "  - {name: r_pre, kind: resistor, nodes: [plus, link], resistance: 100 Ohm}\n"                 // 4
    "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"                      // 5
    "run: {duration: 1 s}\n"                                                                        // 6
    "variants:\n";                                                                                  // 7

std::string error_of(const std::string& entries) { return input_error([&] { case_from(kParts + entries); }).what(); }
}  // namespace

TEST(VariantSpec, ReadsNameNoteReplacementsAndOverrides) {
  auto spec = case_from(kParts +
                        "  - name: ptc\n"
                        "    note: thermistor instead\n"
                        "    replace: {r_pre: {kind: ptc_thermistor, minimum_resistance: 47 Ohm}}\n"
                        "    set: {c1.capacitance: 2 mF}\n");
  ASSERT_EQ(spec.variants.size(), 1u);
  const auto& variant = spec.variants[0];
  EXPECT_EQ(variant.name, "ptc");
  EXPECT_EQ(variant.note, "thermistor instead");
  EXPECT_EQ(variant.replaced_parts, std::vector<std::string>{"r_pre"});
  ASSERT_EQ(variant.overrides.size(), 1u);
  EXPECT_EQ(variant.overrides[0].path, "c1.capacitance");
  EXPECT_EQ(variant.mark.to_string(), "test.yaml:8:5");
}

TEST(VariantSpec, MalformedEntriesArePlaced) {
  std::string nominal = error_of("  - {name: nominal, set: {c1.capacitance: 2 mF}}\n");
  EXPECT_TRUE(contains(nominal, "test.yaml:8:")) << nominal;
  EXPECT_TRUE(contains(nominal, "not 'nominal'")) << nominal;
  std::string nothing = error_of("  - {name: same}\n");
  EXPECT_TRUE(contains(nothing, "changes nothing")) << nothing;
  std::string kindless = error_of("  - {name: k, replace: {r_pre: {resistance: 5 Ohm}}}\n");
  EXPECT_TRUE(contains(kindless, "must be a block with 'kind'")) << kindless;
  std::string twice = error_of("  - {name: a, set: {c1.capacitance: 2 mF}}\n  - {name: a, set: {c1.capacitance: 3 mF}}\n");
  EXPECT_TRUE(contains(twice, "test.yaml:9:")) << twice;
  EXPECT_TRUE(contains(twice, "defined twice")) << twice;
}
