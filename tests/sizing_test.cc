// The sizing study against closed forms on an ideal RC charge (tests/study_fixture.h): the link meets 95 % of
// the source at t = −ln(1 − 0.95)·R·C (RC charging, docs/references.md [R-RC-charge]), and the first power in the
// resistor is V²/R (Joule, [R-Ohm-Joule]). Boundaries are found to the root finder's relative tolerance.
#include "app/studies/sizing.h"

#include <gtest/gtest.h>

#include "netlist/input_error.h"
#include "study_fixture.h"

namespace linkrise::app {
namespace {
using study_test::to_95_percent;
using study_test::write_case;

SizingRequest rc_request(const std::string& name, const std::string& limits) {
  SizingRequest request;
  request.case_file = write_case(name, study_test::rc_case_text("  link.capacitance: {plus_minus: 10 %}\n") +
                                           "limits:\n" + limits);
  request.settings = {{"sequence.minimum_time", "0 s", {}}, {"run.duration", "1.5 s", {}}};
  request.part = "r_pre";
  request.lower = 10.0;
  request.upper = 300.0;
  request.tolerance = 0.002;
  request.jobs = 2;
  return request;
}

TEST(Sizing, WindowEndsMatchTheClosedForms) {
  // Time to 95 % at most 300 ms over C = 1 mF ± 10 %: R ≤ T / (−ln 0.05 · C_max) = 91.03 Ohm, bound at the upper
  // capacitance corner. First power at most 200 W from 100 V: R ≥ V² / P = 50 Ohm at any corner.
  Sizing sizing = size_part(rc_request("sizing_window.yaml",
                                       "  sequence.time_to_threshold: {max: 300 ms}\n"
                                       "  r_pre.peak_power: {max: 200 W}\n"));
  ASSERT_TRUE(sizing.feasible()) << sizing_text(sizing);
  const double upper = 0.3 / (to_95_percent() * 1.1e-3);
  EXPECT_NEAR(sizing.upper, upper, 0.002 * upper) << sizing_text(sizing);
  EXPECT_NEAR(sizing.lower, 50.0, 0.002 * 50.0) << sizing_text(sizing);
  ASSERT_TRUE(sizing.upper_binding && sizing.lower_binding);
  EXPECT_EQ(sizing.constraints[sizing.boundaries[*sizing.upper_binding].constraint], "sequence.time_to_threshold max");
  EXPECT_EQ(sizing.constraints[sizing.boundaries[*sizing.lower_binding].constraint], "r_pre.peak_power max");
  // Corner 1 puts the only tolerance (the capacitance) at its upper bound.
  EXPECT_EQ(sizing.boundaries[*sizing.upper_binding].where, "corner 1");
  EXPECT_TRUE(sizing.notes.empty());
}

TEST(Sizing, ConflictingBoundsReportNoFeasibleValue) {
  // 100 W needs R ≥ 100 Ohm, the time limit R ≤ 91.03 Ohm: no value serves both.
  Sizing sizing = size_part(rc_request("sizing_conflict.yaml",
                                       "  sequence.time_to_threshold: {max: 300 ms}\n"
                                       "  r_pre.peak_power: {max: 100 W}\n"));
  EXPECT_FALSE(sizing.feasible());
  const std::string text = sizing_text(sizing);
  EXPECT_NE(text.find("no feasible value: r_pre.peak_power max needs at least"), std::string::npos) << text;
  EXPECT_NE(text.find("sequence.time_to_threshold max at most"), std::string::npos) << text;
}

TEST(Sizing, BadRequestsAreInputErrors) {
  SizingRequest request = rc_request("sizing_bad.yaml", "  r_pre.peak_power: {max: 200 W}\n");
  request.part = "r_pree";
  EXPECT_THROW(size_part(request), netlist::InputError);
  request.part = "link";
  request.parameter = "capacitance";
  EXPECT_THROW(size_part(request), netlist::InputError);  // not a resistance
  request.part = "r_pre";
  request.parameter = "";
  request.lower = 300.0;
  request.upper = 10.0;
  EXPECT_THROW(size_part(request), netlist::InputError);  // empty range
}

}  // namespace
}  // namespace linkrise::app
