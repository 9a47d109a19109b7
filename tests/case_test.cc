// Case-file errors: each one names the exact file:line:column, what is wrong and how to fix it.
// Positions are counted by hand from the YAML text in each test (1-based line and column, as an editor shows).
#include <gtest/gtest.h>

#include <initializer_list>
#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::netlist::InputError;
using linkrise::testing::case_error;
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

std::string lines(std::initializer_list<const char*> text) {
  std::string out;
  for (const char* line : text) out += std::string(line) + "\n";
  return out;
}

void expect_at(const InputError& error, int line, int column) {
  EXPECT_EQ(error.mark().file, "test.yaml");
  EXPECT_EQ(error.mark().line, line) << error.what();
  EXPECT_EQ(error.mark().column, column) << error.what();
  EXPECT_TRUE(contains(error.what(), "test.yaml:" + std::to_string(line) + ":" + std::to_string(column) + ": error:"))
      << error.what();
  EXPECT_FALSE(error.fix().empty()) << "every input error proposes a fix: " << error.what();
}

// A valid source + resistor case; tests replace one line to break it.
std::string resistor_case(const char* resistance_line = "    resistance: 47 Ohm") {
  return lines({
      "title: resistor test",    // 1
      "ground: gnd",             // 2
      "parts:",                  // 3
      "  - name: source",        // 4
      "    kind: dc_source",     // 5
      "    nodes: [plus, gnd]",  // 6
      "    voltage: 400 V",      // 7
      "  - name: r1",            // 8
      "    kind: resistor",      // 9
      "    nodes: [plus, gnd]",  // 10
      resistance_line,           // 11
      "run:",                    // 12
      "  duration: 1 s",         // 13
  });
}
}  // namespace

TEST(Case, ValidCaseReadsValuesInSiUnits) {
  auto spec = case_from(resistor_case());
  ASSERT_EQ(spec.parts.size(), 2u);
  EXPECT_EQ(spec.parts[1].name, "r1");
  EXPECT_EQ(spec.parts[1].kind, "resistor");
  EXPECT_EQ(spec.parts[1].nodes[0], "plus");
  EXPECT_EQ(spec.parts[1].mark.line, 8);
  EXPECT_DOUBLE_EQ(spec.run.duration, 1.0);
  linkrise::solver::Circuit circuit(spec);  // must not throw
  EXPECT_EQ(circuit.node_names().size(), 1u);
}

TEST(Case, UnknownTopLevelKeySuggestsTheClosest) {
  std::string text = resistor_case();
  text.replace(0, 5, "titel");  // line 1 starts with the key
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 1, 1);
  EXPECT_TRUE(contains(error.problem(), "'titel'")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "did you mean 'title'")) << error.what();
}

TEST(Case, UnknownPartParameterSuggestsTheClosest) {
  auto error = case_error(resistor_case("    resistence: 47 Ohm"));
  expect_at(error, 11, 5);  // the key itself
  EXPECT_TRUE(contains(error.problem(), "r1")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "'resistence'")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "did you mean 'resistance'")) << error.what();
}

TEST(Case, MissingRequiredParameterPointsAtThePart) {
  std::string text = resistor_case();
  text.erase(text.find("    resistance: 47 Ohm\n"), 23);
  auto error = case_error(text);
  expect_at(error, 8, 5);  // the part's block starts at "name" after "  - "
  EXPECT_TRUE(contains(error.problem(), "needs the parameter 'resistance'")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "resistance:")) << error.what();
}

TEST(Case, WrongDimensionIsAnError) {
  auto error = case_error(resistor_case("    resistance: 47 mF"));
  expect_at(error, 11, 17);  // the value
  EXPECT_TRUE(contains(error.problem(), "'47 mF'")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "capacitance")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "resistance")) << error.what();
}

TEST(Case, NonFiniteValueIsAnError) {
  auto error = case_error(resistor_case("    resistance: 1e999 Ohm"));
  expect_at(error, 11, 17);
  EXPECT_TRUE(contains(error.problem(), "1e999")) << error.what();
  error = case_error(resistor_case("    resistance: nan Ohm"));
  expect_at(error, 11, 17);
}

TEST(Case, ZeroResistanceIsOutOfRange) {
  auto error = case_error(resistor_case("    resistance: 0 Ohm"));
  expect_at(error, 11, 17);
  EXPECT_TRUE(contains(error.problem(), "greater than zero")) << error.what();
}

TEST(Case, NegativeCapacitanceIsOutOfRange) {
  auto error = case_error(lines({
      "ground: gnd",              // 1
      "parts:",                   // 2
      "  - name: source",         // 3
      "    kind: dc_source",      // 4
      "    nodes: [plus, gnd]",   // 5
      "    voltage: 400 V",       // 6
      "    series_resistance: 1 Ohm",  // 7
      "  - name: link",           // 8
      "    kind: capacitor",      // 9
      "    nodes: [plus, gnd]",   // 10
      "    capacitance: -1 mF",   // 11
      "run: {duration: 1 s}",     // 12
  }));
  expect_at(error, 11, 18);
  EXPECT_TRUE(contains(error.problem(), "capacitance")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "greater than zero")) << error.what();
}

TEST(Case, ZeroInductanceIsNotAllowedForAnInductor) {
  auto error = case_error(lines({
      "ground: gnd",               // 1
      "parts:",                    // 2
      "  - name: source",          // 3
      "    kind: dc_source",       // 4
      "    nodes: [plus, gnd]",    // 5
      "    voltage: 400 V",        // 6
      "  - name: choke",           // 7
      "    kind: inductor",        // 8
      "    nodes: [plus, mid]",    // 9
      "    inductance: 0 H",       // 10
      "  - name: r1",              // 11
      "    kind: resistor",        // 12
      "    nodes: [mid, gnd]",     // 13
      "    resistance: 1 Ohm",     // 14
      "run: {duration: 1 s}",      // 15
  }));
  expect_at(error, 10, 17);
  EXPECT_TRUE(contains(error.problem(), "inductance")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "greater than zero")) << error.what();
}

TEST(Case, DuplicatePartNamesAreRejected) {
  std::string text = resistor_case();
  text.replace(text.find("name: r1"), 8, "name: source");
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 8, 11);  // the second name's value
  EXPECT_TRUE(contains(error.problem(), "'source' is used twice")) << error.what();
}

TEST(Case, PartNamesThatWouldBreakOutputColumnsAreRejected) {
  // Columns are "<part>.<quantity> [unit]" in a comma-separated file: spaces, dots, brackets and commas in a
  // name would make headers ambiguous (common practice for CSV headers, docs/references.md [R-CSV-names]).
  for (const char* bad : {"\"r pre\"", "\"r.pre\"", "\"r[1]\"", "\"r,1\"", "\"1r\""}) {
    std::string text = resistor_case();
    text.replace(text.find("name: r1") + 6, 2, bad);
    auto error = input_error([&] { case_from(text); });
    expect_at(error, 8, 11);
    EXPECT_TRUE(contains(error.problem(), "letters, digits and '_'")) << bad << ": " << error.what();
  }
}

TEST(Case, UnknownKindSuggestsTheClosest) {
  std::string text = resistor_case();
  text.replace(text.find("kind: resistor"), 14, "kind: resistr");
  auto error = case_error(text);
  expect_at(error, 9, 11);  // the kind's value
  EXPECT_TRUE(contains(error.problem(), "unknown kind 'resistr'")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "did you mean 'resistor'")) << error.what();

  text.replace(text.find("kind: resistr"), 13, "kind: flux_capacitor_unit");
  error = case_error(text);
  EXPECT_TRUE(contains(error.fix(), "known kinds:")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "constant_power_load")) << error.what();
}

TEST(Case, EventNamingAnUnknownPartSuggestsTheClosest) {
  auto error = input_error([&] {
    case_from(lines({
        "ground: gnd",                      // 1
        "parts:",                           // 2
        "  - name: source",                 // 3
        "    kind: dc_source",              // 4
        "    nodes: [plus, gnd]",           // 5
        "    voltage: 400 V",               // 6
        "  - name: k_main",                 // 7
        "    kind: contactor",              // 8
        "    nodes: [plus, gnd]",           // 9
        "events:",                          // 10
        "  - {at: 10 ms, close: k_mian}",   // 11
        "run: {duration: 1 s}",             // 12
    }));
  });
  expect_at(error, 11, 24);  // the target's name
  EXPECT_TRUE(contains(error.problem(), "'k_mian'")) << error.what();
  EXPECT_TRUE(contains(error.fix(), "did you mean 'k_main'")) << error.what();
}

TEST(Case, EventActionThePartCannotTakeIsRejected) {
  std::string text = resistor_case() + "events:\n  - {at: 10 ms, close: r1}\n";  // lines 14, 15
  auto error = case_error(text);
  expect_at(error, 15, 5);  // the event's block
  EXPECT_TRUE(contains(error.problem(), "'r1'")) << error.what();
}

TEST(Case, EventAfterTheEndOfTheRunIsRejected) {
  std::string text = resistor_case() + "events:\n  - {at: 2 s, close: r1}\n";
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 15, 5);
  EXPECT_TRUE(contains(error.problem(), "after the end of the run")) << error.what();
}

TEST(Case, DuplicateKeyInOneBlockIsRejected) {
  std::string text = resistor_case();
  text.insert(text.find("run:"), "    resistance: 10 Ohm\n");  // becomes line 12
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 12, 5);
  EXPECT_TRUE(contains(error.problem(), "'resistance' appears twice")) << error.what();
}

TEST(Case, YamlSyntaxErrorGivesItsPosition) {
  // An unclosed flow list on line 6: yaml-cpp notices it later; the message points at the open bracket itself.
  std::string text = resistor_case();
  text.replace(text.find("[plus, gnd]"), 11, "[plus, gnd");
  auto error = input_error([&] { case_from(text); });
  EXPECT_EQ(error.mark().file, "test.yaml");
  EXPECT_EQ(error.mark().line, 6) << error.what();
  EXPECT_EQ(error.mark().column, 12) << error.what();
  EXPECT_TRUE(contains(error.problem(), "YAML syntax: this bracket is never closed")) << error.what();

  // A second value on one line: the position is exactly the offending colon's line.
  text = resistor_case("    resistance: 47 Ohm: 3");
  error = input_error([&] { case_from(text); });
  EXPECT_EQ(error.mark().line, 11) << error.what();
  EXPECT_TRUE(contains(error.what(), "test.yaml:11:")) << error.what();
}

TEST(Case, MissingGroundAndRunAreNamed) {
  std::string text = resistor_case();
  text.replace(text.find("ground: gnd"), 11, "ground: earth");
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 2, 9);
  EXPECT_TRUE(contains(error.problem(), "'earth' is not connected")) << error.what();

  text = resistor_case();
  text.erase(text.find("run:"));
  error = input_error([&] { case_from(text); });
  EXPECT_TRUE(contains(error.problem(), "no 'run' block")) << error.what();
}

TEST(Case, RunToleranceMustBeUsable) {
  std::string text = resistor_case();
  text += "  rtol: 0.1\n";  // line 14
  auto error = input_error([&] { case_from(text); });
  expect_at(error, 14, 9);
  EXPECT_TRUE(contains(error.problem(), "too loose")) << error.what();

  // Below about 1e-14 relative a double cannot tell two states apart (machine epsilon 2.2e-16, common practice;
  // docs/references.md [R-IEEE754]).
  text = resistor_case();
  text += "  rtol: 1e-30\n";  // line 14
  error = input_error([&] { case_from(text); });
  expect_at(error, 14, 9);
  EXPECT_TRUE(contains(error.problem(), "double precision")) << error.what();

  text = resistor_case();
  text += "  max_steps: 3\n";  // line 14
  error = input_error([&] { case_from(text); });
  expect_at(error, 14, 14);
  EXPECT_TRUE(contains(error.problem(), "at least 10")) << error.what();
}
