// The study accuracy (app/studies/study_accuracy.h): the points' looser rtol and the agreement check of the
// nominal case at both accuracies, on the RC pre-charge of tests/study_fixture.h.
#include <gtest/gtest.h>

#include <string>

#include "app/studies/spread.h"
#include "app/studies/study_accuracy.h"
#include "netlist/case_document.h"
#include "tests/study_fixture.h"

namespace {
using linkrise::app::accuracy_text;
using linkrise::app::at_study_accuracy;
using linkrise::app::case_tolerance;
using linkrise::app::check_study_accuracy;
using linkrise::app::study_tolerance;
using linkrise::netlist::CaseDocument;
using linkrise::study_test::rc_case_text;
}  // namespace

TEST(StudyAccuracy, PointsRunAHundredTimesLooserAtMostOneInTenThousand) {
  EXPECT_DOUBLE_EQ(study_tolerance(1e-7), 1e-5);   // the default
  EXPECT_DOUBLE_EQ(study_tolerance(1e-10), 1e-8);
  EXPECT_DOUBLE_EQ(study_tolerance(1e-5), 1e-4);   // the cap
  EXPECT_DOUBLE_EQ(study_tolerance(1e-3), 1e-3);   // never looser than the case asks
  const CaseDocument rc = CaseDocument::parse(rc_case_text(""), "rc.yaml");
  EXPECT_DOUBLE_EQ(case_tolerance(rc), 1e-10);
  EXPECT_DOUBLE_EQ(at_study_accuracy(rc).validate().run.relative_tolerance, 1e-8);
  // A case without rtol has the default 1e-7.
  std::string text = rc_case_text("");
  text.replace(text.find(", rtol: 1e-10, atol: 1e-12"), 26, "");
  EXPECT_DOUBLE_EQ(case_tolerance(CaseDocument::parse(text, "rc.yaml")), 1e-7);
}

TEST(StudyAccuracy, NominalCaseAgreesWithinTheStatedBound) {
  const CaseDocument rc = CaseDocument::parse(rc_case_text(""), "rc.yaml");
  const auto accuracy = check_study_accuracy(rc);
  ASSERT_TRUE(accuracy.checked);
  EXPECT_TRUE(accuracy.agrees()) << accuracy_text(accuracy);
  EXPECT_GT(accuracy.compared, 20u);
  EXPECT_LE(accuracy.worst_deviation, accuracy.bound);
  EXPECT_DOUBLE_EQ(accuracy.bound, 1e-2);
  const std::string text = accuracy_text(accuracy);
  EXPECT_NE(text.find("rtol 1e-08"), std::string::npos) << text;
  EXPECT_NE(text.find("within 1 %"), std::string::npos) << text;
}

TEST(StudyAccuracy, SpreadAtStudyAccuracyStillMeetsTheClosedForm) {
  // Every corner at rtol 1e-8: the time to 95 % is R·C·ln 20 within the BMS sample period's reading and the
  // study accuracy [R-RC-charge]; the check is printed in the terminal summary.
  const std::string file = linkrise::study_test::write_case(
      "accuracy_rc.yaml", rc_case_text("  r_pre.resistance: {plus_minus: 10 %}\n"));
  linkrise::app::SpreadPlan plan;
  plan.corners = true;
  const auto spread = linkrise::app::run_spread(file, {}, plan, 1);
  ASSERT_EQ(spread.results.points.size(), 2u);
  EXPECT_TRUE(spread.results.accuracy.agrees());
  const int column = spread.results.column("sequence.time_to_threshold");
  ASSERT_GE(column, 0);
  const double resistances[] = {90.0, 110.0};
  for (std::size_t p = 0; p < 2; ++p) {
    const double expected = resistances[p] * 1e-3 * linkrise::study_test::to_95_percent();
    EXPECT_NEAR(spread.results.points[p].values[static_cast<std::size_t>(column)], expected, 1e-6 * expected) << p;
  }
  EXPECT_NE(linkrise::app::spread_text(spread, {}).find("accuracy: study points at rtol 1e-08"), std::string::npos);
}
