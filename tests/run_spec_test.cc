// The run block's one check: every setting outside its accepted range is named with its value, the violated
// rule and the place it was written. The ranges are the project's own (netlist/run_spec.h, README "Case file
// reference"); positions are counted by hand from the YAML text (1-based line and column, as an editor shows).
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <limits>
#include <string>

#include "netlist/overrides.h"
#include "netlist/run_spec.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::netlist::check_run;
using linkrise::netlist::RunSpec;
using linkrise::netlist::SourceMark;
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

// A capacitor charged through a source's resistance; `run_lines` is the run block from line 5 on.
std::string capacitor_case(const std::string& run_lines) {
  return "ground: gnd\n"                                                                            // 1
         "parts:\n"                                                                                 // 2
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 10 V, series_resistance: 1 Ohm}\n"  // 3
         "  - {name: c1, kind: capacitor, nodes: [plus, gnd], capacitance: 1 uF}\n"                // 4
         + run_lines;
}

// A usable run whose every field carries its own mark (line = a number per field), so a problem's mark shows
// which field it names.
RunSpec marked_run() {
  RunSpec run;
  run.duration = 1.0;
  run.sample = 1e-3;
  run.marks = {SourceMark{"f", 1, 1}, SourceMark{"f", 2, 1}, SourceMark{"f", 3, 1},
               SourceMark{"f", 4, 1}, SourceMark{"f", 5, 1}, SourceMark{"f", 6, 1},
               SourceMark{"f", 7, 1}, SourceMark{"f", 8, 1}};
  return run;
}

struct BadField {
  const char* field;
  int mark_line;  // the field's line in marked_run()
  std::function<void(RunSpec&)> spoil;
  double value;
  const char* rule;
};
}  // namespace

TEST(RunSpec, DefaultsAndBoundsAreAccepted) {
  RunSpec run = marked_run();
  EXPECT_FALSE(check_run(run).has_value());
  // Both ends of the documented rtol range are inside it (netlist/run_spec.h).
  run.relative_tolerance = linkrise::netlist::kTightestRelativeTolerance;
  EXPECT_FALSE(check_run(run).has_value());
  run.relative_tolerance = linkrise::netlist::kLoosestRelativeTolerance;
  EXPECT_FALSE(check_run(run).has_value());
  run.max_step = 0.0;  // no bound
  run.sample.reset();  // one row per step
  run.max_steps = linkrise::netlist::kFewestSteps;
  EXPECT_FALSE(check_run(run).has_value());
}

TEST(RunSpec, EachBadFieldIsNamedWithItsValueAndRule) {
  const double infinity = std::numeric_limits<double>::infinity();
  const BadField cases[] = {
      {"duration", 1, [](RunSpec& r) { r.duration = 0.0; }, 0.0, "must be greater than 0 s"},
      {"duration", 1, [&](RunSpec& r) { r.duration = infinity; }, infinity, "must be a finite number"},
      {"rtol", 2, [](RunSpec& r) { r.relative_tolerance = 0.5; }, 0.5, "must be at most 0.01"},
      {"rtol", 2, [](RunSpec& r) { r.relative_tolerance = 1.01e-2; }, 1.01e-2, "must be at most 0.01"},
      {"rtol", 2, [](RunSpec& r) { r.relative_tolerance = -1.0; }, -1.0, "must be at least 1e-12"},
      {"rtol", 2, [](RunSpec& r) { r.relative_tolerance = 0.99e-12; }, 0.99e-12, "must be at least 1e-12"},
      {"atol", 3, [](RunSpec& r) { r.absolute_tolerance = 0.0; }, 0.0, "must be greater than 0"},
      {"atol", 3, [](RunSpec& r) { r.absolute_tolerance = -1e-8; }, -1e-8, "must be greater than 0"},
      {"max_step", 4, [](RunSpec& r) { r.max_step = -1e-3; }, -1e-3, "must not be negative"},
      {"sample", 5, [](RunSpec& r) { r.sample = 0.0; }, 0.0, "must be greater than 0 s"},
      {"max_steps", 6, [](RunSpec& r) { r.max_steps = 9; }, 9.0, "must be at least 10"},
      {"max_wall_time", 7, [](RunSpec& r) { r.max_wall_time = 0.0; }, 0.0, "must be greater than 0 s"},
      {"max_wall_time", 7, [&](RunSpec& r) { r.max_wall_time = infinity; }, infinity, "must be a finite number"},
  };
  for (const auto& bad : cases) {
    RunSpec run = marked_run();
    bad.spoil(run);
    auto found = check_run(run);
    ASSERT_TRUE(found.has_value()) << bad.field << " = " << bad.value;
    EXPECT_EQ(found->field, bad.field);
    EXPECT_EQ(found->value, bad.value) << bad.field;
    EXPECT_EQ(found->rule, bad.rule) << bad.field;
    EXPECT_FALSE(found->why.empty()) << bad.field;
    EXPECT_FALSE(found->fix.empty()) << bad.field;
    EXPECT_EQ(found->mark.line, bad.mark_line) << bad.field;
    auto error = linkrise::netlist::run_input_error(*found);
    EXPECT_TRUE(contains(error.what(), std::string("'") + bad.field + "'")) << error.what();
    EXPECT_TRUE(contains(error.what(), bad.rule)) << error.what();
  }
  // A not-a-number tolerance (possible from the command line) fails every comparison: still rejected.
  RunSpec run = marked_run();
  run.relative_tolerance = std::nan("");
  auto found = check_run(run);
  ASSERT_TRUE(found.has_value());
  EXPECT_EQ(found->field, "rtol");
}

TEST(RunSpec, CaseFileValuesAreReadInSiUnitsWithTheirPlaces) {
  auto spec = case_from(capacitor_case("run:\n"                // 5
                                       "  duration: 20 ms\n"  // 6
                                       "  sample: 100 us\n"   // 7
                                       "  max_step: 1 ms\n"   // 8
                                       "  rtol: 1e-9\n"))     // 9
                  .run;
  EXPECT_DOUBLE_EQ(spec.duration, 20e-3);
  ASSERT_TRUE(spec.sample.has_value());
  EXPECT_DOUBLE_EQ(*spec.sample, 100e-6);
  EXPECT_DOUBLE_EQ(spec.max_step, 1e-3);
  EXPECT_DOUBLE_EQ(spec.relative_tolerance, 1e-9);
  EXPECT_DOUBLE_EQ(spec.absolute_tolerance, 1e-8);  // the default (README)
  EXPECT_EQ(spec.marks.duration.line, 6);
  EXPECT_EQ(spec.marks.sample.line, 7);
  EXPECT_EQ(spec.marks.sample.column, 11);
  EXPECT_EQ(spec.marks.rtol.line, 9);
  EXPECT_EQ(spec.marks.atol.line, 6);  // a default is marked at the run block (its first key)
}

TEST(RunSpec, FastStatesSettleByDefaultAndTakeOneOfTwoWords) {
  EXPECT_TRUE(case_from(capacitor_case("run: {duration: 20 ms}\n")).run.settle_fast_states);
  EXPECT_FALSE(case_from(capacitor_case("run: {duration: 20 ms, fast_states: resolve}\n")).run.settle_fast_states);
  auto error = input_error([&] { case_from(capacitor_case("run: {duration: 20 ms, fast_states: skip}\n")); });
  EXPECT_NE(std::string(error.what()).find("fast_states"), std::string::npos) << error.what();
}

TEST(RunSpec, BadCaseFileValueIsAnInputErrorAtItsPlace) {
  struct Placed {
    std::string run_lines;
    int line, column;
    const char* field;
  };
  const Placed cases[] = {
      {"run: {duration: 1 s, rtol: -1}\n", 5, 28, "rtol"},
      {"run:\n  duration: 1 s\n  rtol: 0.5\n", 7, 9, "rtol"},
      {"run:\n  duration: 1 s\n  atol: 0\n", 7, 9, "atol"},
      {"run:\n  duration: 0 s\n", 6, 13, "duration"},
      {"run:\n  duration: 1 s\n  max_step: -1 ms\n", 7, 13, "max_step"},
      {"run:\n  duration: 1 s\n  sample: 0 s\n", 7, 11, "sample"},
      {"run:\n  duration: 1 s\n  max_steps: 3\n", 7, 14, "max_steps"},
  };
  for (const auto& bad : cases) {
    auto error = input_error([&] { case_from(capacitor_case(bad.run_lines)); });
    EXPECT_EQ(error.mark().file, linkrise::testing::kTestFile);
    EXPECT_EQ(error.mark().line, bad.line) << error.what();
    EXPECT_EQ(error.mark().column, bad.column) << error.what();
    EXPECT_TRUE(contains(error.problem(), std::string("run setting '") + bad.field + "'")) << error.what();
    EXPECT_FALSE(error.fix().empty()) << error.what();
  }
}

TEST(RunSpec, OverrideGoesThroughTheSameCheck) {
  // A study's '--set run.atol=0' edits the tree; the run block's reader then names the override's place.
  auto root = linkrise::netlist::parse_yaml(capacitor_case("run: {duration: 1 s}\n"), linkrise::testing::kTestFile);
  SourceMark option{"command line (--set #1)", 0, 0};
  linkrise::netlist::apply_override(root, {"run.atol", "0", option});
  auto error = input_error([&] { linkrise::netlist::read_case(root, linkrise::testing::kTestFile); });
  EXPECT_EQ(error.mark().file, option.file);
  EXPECT_TRUE(contains(error.problem(), "run setting 'atol' = 0 must be greater than 0")) << error.what();
}
