// The default accuracy against the yardstick: the reference case of the speed benchmarks
// (cases/reference_180s_speed.yaml) run at the default tolerances, with fast states settled after each switching,
// must give every golden metric within its golden tolerance of a tight run (rtol 1e-10, atol 1e-12, every
// transient resolved step by step). The tolerances are the golden file's own, so the test fails when the default
// accuracy drifts further from the converged answer than the stored results allow.
#include <gtest/gtest.h>

#include "analysis/verdict.h"
#include "app/evaluation/case_evaluation.h"
#include "app/regression/golden.h"

namespace {
using linkrise::app::CaseEvaluation;
using linkrise::netlist::Override;

const std::string kReferenceCase = LINKRISE_SOURCE_DIR "/cases/reference_180s_speed.yaml";

TEST(ReferenceAccuracy, DefaultToleranceRunAgreesWithTheTightRunWithinTheGoldenTolerances) {
  const CaseEvaluation tight = linkrise::app::evaluate_case_file(
      kReferenceCase, {Override{"run.rtol", "1e-10", {}}, Override{"run.atol", "1e-12", {}},
                       Override{"run.fast_states", "resolve", {}}});
  const CaseEvaluation nominal = linkrise::app::evaluate_case_file(kReferenceCase);
  ASSERT_EQ(tight.status, CaseEvaluation::Status::Evaluated) << tight.message;
  ASSERT_EQ(nominal.status, CaseEvaluation::Status::Evaluated) << nominal.message;
  const auto golden = linkrise::app::read_golden(linkrise::app::golden_path(kReferenceCase));
  ASSERT_FALSE(golden.metrics.empty());
  // The golden file's metric list and tolerances, with the tight run's values.
  const auto yardstick = linkrise::app::golden_from(tight.outcome, linkrise::analysis::verdict_word(tight.verdict),
                                                    tight.metrics, &golden);
  const auto comparisons = linkrise::app::compare_with_golden(
      yardstick, nominal.outcome, linkrise::analysis::verdict_word(nominal.verdict), nominal.metrics);
  ASSERT_EQ(comparisons.size(), golden.metrics.size() + 2);  // every metric, the outcome and the verdict
  for (const auto& comparison : comparisons) {
    EXPECT_TRUE(comparison.pass) << comparison.item << ": default " << comparison.actual << ", tight "
                                 << comparison.expected << " (allowed ±" << comparison.allowed << ")";
  }
}

}  // namespace
