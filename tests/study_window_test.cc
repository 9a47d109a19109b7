// The fault window (app/studies/fault_window.h): recommended from the spread by the stated rule, and verified by
// re-running the fault scenarios with it.
#include "app/studies/fault_window.h"

#include <cmath>

#include <gtest/gtest.h>

#include "study_fixture.h"

namespace linkrise::app {
namespace {
using study_test::rc_case_text;
using study_test::to_95_percent;
using study_test::write_case;

const DetectionRow* row(const DetectionMatrix& matrix, const std::string& name) {
  for (const auto& r : matrix.rows) {
    if (r.scenario == name) return &r;
  }
  return nullptr;
}

// RC case, corners of R ±10 % and C −20/+10 %: the fastest crossing is −R_min·C_min·ln(0.05) (RC closed form,
// docs/references.md [R-RC-charge]) and the slowest decision is the first 1 ms BMS sample at or after
// −R_max·C_max·ln(0.05).
// With a 20 % margin: minimum_time = ⌊0.8·fastest⌋ and timeout = ⌈1.2·slowest⌉ in whole milliseconds.
TEST(StudyWindow, RecommendationFollowsTheRcExtremesAndCatchesTheFaults) {
  std::string file = write_case("study_rc_window.yaml",
                                rc_case_text("  r_pre.resistance: {plus_minus: 10 %}\n"
                                             "  link.capacitance: {minus: 20 %, plus: 10 %}\n"
                                             // A doubled link lies outside the band the window is set for, so
                                             // with one attempt the window must now catch it as a timeout.
                                             "scenarios:\n  - {name: oversize_capacitance, expect: timeout}\n"));
  FaultWindow window = fault_window(file, {}, spread_plan(true, 0, 1, ""), 0.2, 2);
  double fastest = 90.0 * 0.8e-3 * to_95_percent();   // 215.7 ms
  double slowest = std::ceil(110.0 * 1.1e-3 * to_95_percent() / 1e-3) * 1e-3;  // 363 ms
  EXPECT_NEAR(window.fastest, fastest, 1e-6 * fastest);
  EXPECT_NEAR(window.slowest, slowest, 1e-9);
  EXPECT_NEAR(window.minimum_time, std::floor(0.8 * fastest / 1e-3) * 1e-3, 1e-12);
  EXPECT_NEAR(window.timeout, std::ceil(1.2 * slowest / 1e-3) * 1e-3, 1e-12);
  EXPECT_TRUE(window.problems.empty());
  ASSERT_EQ(window.extreme_outcomes, (std::vector<std::string>{"closed", "closed"}));
  // No rise check in this case, so the short and the open resistor end in the timeout — at the timeout.
  const DetectionRow* shorted = row(window.matrix, "shorted_link");
  ASSERT_NE(shorted, nullptr);
  EXPECT_EQ(shorted->actual_word(), "timeout");
  EXPECT_NEAR(shorted->detection_time, window.timeout, 1e-9);
  const DetectionRow* missing = row(window.matrix, "missing_capacitance");
  ASSERT_NE(missing, nullptr);
  EXPECT_EQ(missing->actual_word(), "too_fast");
  EXPECT_EQ(row(window.matrix, "oversize_capacitance")->actual_word(), "timeout");
  EXPECT_TRUE(window.verified()) << matrix_text(window.matrix);
}

// The same RC case read through a BMS channel with a ±2 % gain error: a high channel decides when the link reaches
// 0.95/1.02 of the pack, a low one at 0.95/0.98, so the spread of decisions — and the recommended window — is wider
// than with an ideal channel (RC closed form [R-RC-charge] with the reading g·v).
TEST(StudyWindow, SensorGainErrorWidensTheWindow) {
  std::string text = rc_case_text("  r_pre.resistance: {plus_minus: 10 %}\n"
                                  "  link.capacitance: {minus: 20 %, plus: 10 %}\n"
                                  "  link_sense.gain: {plus_minus: 2 %}\n");
  text.replace(text.find("link: [link_plus, gnd]"), 22, "link: link_sense");
  text.replace(text.find("sequence:"), 9,
               "  - {name: link_sense, kind: voltage_sensor, nodes: [link_plus, gnd], gain: 100 %}\nsequence:");
  FaultWindow window = fault_window(write_case("study_rc_sensed_window.yaml", text), {}, spread_plan(true, 0, 1, ""),
                                    0.2, 2);
  double fastest = 90.0 * 0.8e-3 * -std::log(1.0 - 0.95 / 1.02);
  double slowest = std::ceil(110.0 * 1.1e-3 * -std::log(1.0 - 0.95 / 0.98) / 1e-3) * 1e-3;
  // The reading's crossing lies between output rows (no watch on a reading): linear interpolation, well inside
  // the 1 ms sample.
  EXPECT_NEAR(window.fastest, fastest, 1e-4);
  EXPECT_NEAR(window.slowest, slowest, 1e-9);
  // Wider on both sides than the ideal channel's 215.7 ms … 363 ms (the test above).
  EXPECT_LT(window.minimum_time, std::floor(0.8 * 90.0 * 0.8e-3 * to_95_percent() / 1e-3) * 1e-3);
  EXPECT_GT(window.timeout, std::ceil(1.2 * 363e-3 / 1e-3) * 1e-3);
  EXPECT_TRUE(window.problems.empty());
}

// The stored study case: the recommended window catches every stored fault scenario of the case.
TEST(StudyWindow, StoredCaseWindowIsVerified) {
  std::string file = LINKRISE_SOURCE_DIR "/cases/study_precharge_window.yaml";
  Spread spread;
  FaultWindow window = fault_window(file, {}, spread_plan(true, 0, 1, ""), 0.2, 2, &spread);
  EXPECT_TRUE(window.problems.empty());
  EXPECT_LT(window.minimum_time, window.fastest * 0.8 + 1e-12);
  EXPECT_GT(window.timeout, window.slowest * 1.2 - 1e-12);
  ASSERT_FALSE(window.matrix.rows.empty());
  for (const auto& r : window.matrix.rows) {
    if (r.applicable) {
      EXPECT_TRUE(r.pass) << r.scenario << ": " << r.actual_word() << " instead of " << r.expected_word();
    }
  }
  EXPECT_TRUE(window.verified()) << window_text(window, spread);
  // Too wide a margin for the sample period is reported, not silently clamped.
  FaultWindow wide = recommend_window(spread, 0.999, 5e-3);
  EXPECT_FALSE(wide.problems.empty());
}

}  // namespace
}  // namespace linkrise::app
