// Values outside the trade's usual ranges (netlist/plausibility.h) are warned about, placed at the value; the
// ranges are facts of the trade (common practice), listed once in docs/plausibility.md.
#include "netlist/plausibility.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "app/regression/check.h"
#include "netlist/case_document.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::testing::case_from;
using linkrise::testing::contains;

std::string case_with(const std::string& contactor, const std::string& link, const std::string& settings = "") {
  return "ground: gnd\n" + settings +                                                                  // 1
         "parts:\n"                                                                                   // 2
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                  // 3
         "  - {name: k_main, kind: contactor, nodes: [plus, link], " + contactor + "}\n"              // 4
         "  - {name: link, kind: capacitor, nodes: [link, gnd], " + link + "}\n"                      // 5
         "run: {duration: 1 s}\n";
}
}  // namespace

TEST(Plausibility, UsualValuesGiveNoWarning) {
  EXPECT_TRUE(case_from(case_with("closing_delay: 20 ms", "capacitance: 1.1 mF")).warnings.empty());
}

TEST(Plausibility, ASlipGetsAWarningAtItsValue) {
  // `closing_delay: 15` is 15 s (a bare number is in SI units); 1.1 MF is M written for m.
  auto spec = case_from(case_with("closing_delay: 15", "capacitance: 1.1 MF", "ambient: 200 degC\n"));
  ASSERT_EQ(spec.warnings.size(), 3u);
  EXPECT_EQ(spec.warnings[0].mark.to_string(), "test.yaml:5:73");  // the "15", counted
  EXPECT_TRUE(contains(spec.warnings[0].message, "part 'k_main' closing_delay = 15 s lies outside the usual range 0 … 1 s"))
      << spec.warnings[0].message;
  EXPECT_TRUE(contains(spec.warnings[0].reason, "bare number")) << spec.warnings[0].reason;
  EXPECT_TRUE(contains(spec.warnings[1].message, "part 'link' capacitance = 1.1 MF")) << spec.warnings[1].message;
  EXPECT_TRUE(contains(spec.warnings[2].message, "ambient = 200 degC")) << spec.warnings[2].message;
  EXPECT_EQ(spec.warnings[2].mark.to_string(), "test.yaml:2:10");
}

TEST(Plausibility, TheStoredCasesUseUsualValues) {
  // The stored-case check's own rule for what a case file is (golden results and catalogues sit beside them).
  for (const auto& name : linkrise::app::find_case_files({std::string(LINKRISE_SOURCE_DIR) + "/cases"})) {
    const auto spec = linkrise::netlist::CaseDocument::load(name).validate();
    EXPECT_TRUE(spec.warnings.empty()) << name << ": " << (spec.warnings.empty() ? "" : spec.warnings[0].message);
  }
}

TEST(Plausibility, TheDocsListEveryRule) {
  std::ifstream in(std::filesystem::path(LINKRISE_SOURCE_DIR) / "docs" / "plausibility.md");
  std::stringstream page;
  page << in.rdbuf();
  for (const auto& rule : linkrise::netlist::plausibility_rules()) {
    EXPECT_TRUE(contains(page.str(), "| `" + rule.key + "` |")) << rule.key;
    EXPECT_TRUE(contains(page.str(), rule.range)) << rule.key;
    EXPECT_TRUE(contains(page.str(), rule.reason)) << rule.key;
  }
}
