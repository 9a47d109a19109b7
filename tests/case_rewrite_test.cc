// A case file with values rewritten in place (the fitted case of `linkrise fit`): only the values change; the
// comments, the layout and the other values stay, and the text reads back as a case with the new values.
#include "netlist/case_rewrite.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "netlist/case_document.h"

namespace {
using linkrise::netlist::InputError;
using linkrise::netlist::rewrite_case_values;

const char* kCase = R"(# A header comment that must survive.
title: rewrite test
ground: gnd
parts:
  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V}   # flow style
  - name: r1
    kind: resistor
    nodes: [plus, link]
    resistance: "47 Ohm"      # quoted, with a comment
  - name: c1
    kind: capacitor
    nodes: [link, gnd]
    capacitance: 1 mF
run: {duration: 1 s}
)";

std::string write(const std::string& name) {
  const auto path = std::filesystem::path(testing::TempDir()) / name;
  std::ofstream(path) << kCase;
  return path.string();
}
}  // namespace

TEST(CaseRewrite, ChangesOnlyTheValuesAndKeepsCommentsAndLayout) {
  const std::string file = write("rewrite.yaml");
  const std::string text = rewrite_case_values(
      file, {{"r1.resistance", "52.5 Ohm", {}}, {"c1.capacitance", "0.00091 F", {}}, {"source.voltage", "12 V", {}}},
      "# fitted\n");
  EXPECT_EQ(text.rfind("# fitted\n# A header comment that must survive.\n", 0), 0u) << text;
  EXPECT_NE(text.find("resistance: 52.5 Ohm      # quoted, with a comment"), std::string::npos) << text;
  EXPECT_NE(text.find("voltage: 12 V}   # flow style"), std::string::npos) << text;
  const auto spec = linkrise::netlist::CaseDocument::parse(text, "rewritten.yaml").validate();
  ASSERT_NE(spec.find_part("c1"), nullptr);
  EXPECT_EQ(text.find("1 mF"), std::string::npos);
}

TEST(CaseRewrite, AValueTheFileDoesNotWriteIsAnInputError) {
  const std::string file = write("rewrite_missing.yaml");
  try {
    rewrite_case_values(file, {{"c1.esr", "1 mOhm", {"case.yaml", 20, 5}}}, "");
    ADD_FAILURE() << "no error";
  } catch (const InputError& error) {
    EXPECT_EQ(error.mark().line, 20);
    EXPECT_NE(std::string(error.what()).find("writes no value at 'c1.esr'"), std::string::npos) << error.what();
  }
}
