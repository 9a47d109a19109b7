// What a study point's result is as bytes between ranks (app/studies/result_transfer.h): every field comes back
// as it was written, numbers bit for bit (docs/references.md [R-IEEE754] for NaN and −0).
#include "app/studies/result_transfer.h"

#include <cmath>
#include <cstring>
#include <limits>

#include <gtest/gtest.h>

namespace linkrise::app {
namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

void expect_same(const std::vector<double>& a, const std::vector<double>& b) {
  ASSERT_EQ(a.size(), b.size());
  for (std::size_t i = 0; i < a.size(); ++i) EXPECT_TRUE(same_bits(a[i], b[i])) << i;
}

TEST(ResultTransfer, APointComesBackWhole) {
  PointResult point;
  point.status = CaseEvaluation::Status::SolverFailure;
  point.message = "CVode failed at t = 0.1 s";
  point.outcome = "timeout";
  point.verdict = analysis::Verdict::Pass;
  point.values = {1.5, kNaN, -0.0, 2e-300};
  ByteWriter out;
  save_point(out, point);
  save_point(out, PointResult{});
  const std::string bytes = out.take();
  ByteReader in(bytes);
  const PointResult back = load_point(in);
  EXPECT_EQ(back.status, point.status);
  EXPECT_EQ(back.message, point.message);
  EXPECT_EQ(back.outcome, point.outcome);
  EXPECT_EQ(back.verdict, point.verdict);
  expect_same(back.values, point.values);
  const PointResult empty = load_point(in);
  EXPECT_EQ(empty.status, CaseEvaluation::Status::Evaluated);
  EXPECT_TRUE(empty.values.empty());
  EXPECT_TRUE(in.at_end());
}

TEST(ResultTransfer, AnEvaluationComesBackWhole) {
  CaseEvaluation evaluation;
  evaluation.status = CaseEvaluation::Status::Evaluated;
  evaluation.outcome = "closed";
  evaluation.verdict = analysis::Verdict::Fail;
  evaluation.metrics = {{"sequence.precharge_time", 0.2125, "s"}, {"r_pre.peak_temperature", kNaN, "degC"}};
  evaluation.margins = {{"r_pre.energy max (rating)", -0.25}, {"sequence outcome", 1.0}};
  evaluation.seconds = 0.0125;
  ByteWriter out;
  save_evaluation(out, evaluation);
  const std::string bytes = out.take();
  ByteReader in(bytes);
  const CaseEvaluation back = load_evaluation(in);
  EXPECT_EQ(back.status, evaluation.status);
  EXPECT_EQ(back.outcome, evaluation.outcome);
  EXPECT_EQ(back.verdict, evaluation.verdict);
  ASSERT_EQ(back.metrics.size(), 2u);
  EXPECT_EQ(back.metrics[0].name, "sequence.precharge_time");
  EXPECT_EQ(back.metrics[0].value, 0.2125);
  EXPECT_EQ(back.metrics[1].unit, "degC");
  EXPECT_TRUE(std::isnan(back.metrics[1].value));
  ASSERT_EQ(back.margins.size(), 2u);
  EXPECT_EQ(back.margins[0].constraint, "r_pre.energy max (rating)");
  EXPECT_EQ(back.margins[0].margin, -0.25);
  EXPECT_EQ(back.seconds, 0.0125);
  EXPECT_TRUE(in.at_end());
}

TEST(ResultTransfer, ADetectionRowAndItsFindingsComeBackWhole) {
  DetectionRow row;
  row.scenario = "shorted_link";
  row.description = "1 mOhm across the link";
  row.expected = netlist::SequenceOutcome::NoRise;
  row.actual = netlist::SequenceOutcome::Timeout;
  row.applicable = true;
  row.solver_failed = true;
  row.note = "attempt 1 ended no_rise at 50 ms";
  row.attempt = 2;
  row.attempts = 3;
  row.detection_time = 0.05;
  row.peak_temperature = 81.5;
  row.temperature_rating = 200.0;
  row.energy = 12.5;
  row.energy_rating = kNaN;
  row.end_time = 1.154;
  row.ratings_held = false;
  row.broken_rating = "r_pre.energy = 700 J above its max 600 J (ratings.pulse_energy at c.yaml:9:7)";
  row.pass = false;
  row.rating_margins = {{"r_pre.peak_temperature max (rating)", 0.5}, {"r_pre.energy max (rating)", kNaN}};
  row.link_time = {0.0, 0.001, 0.002};
  row.link_voltage = {0.0, 1.5, -0.0};
  analysis::ChargePath path;
  path.measured = true;
  path.source_voltage = 400.0;
  path.path_resistance = 47.25;
  path.at_time = 0.3;
  path.closing_level = 380.0;
  path.explanation = "measured";
  analysis::StallDiagnostic stall;
  stall.applicable = true;
  stall.source_voltage = 400.0;
  stall.path_resistance = 47.0;
  stall.load_power = 300.0;
  stall.maximum_power = 851.0;
  stall.equilibrium = 360.0;
  stall.lower_root = 40.0;
  stall.resistive_below = 10.0;
  stall.closing_level = 380.0;
  stall.link_voltage = kNaN;
  stall.stalls = true;
  stall.latched = true;
  stall.explanation = "stalls below the closing level";

  ByteWriter out;
  save_row(out, row);
  save_path(out, path);
  save_stall(out, stall);
  save_path(out, std::nullopt);
  save_stall(out, std::nullopt);
  const std::string bytes = out.take();
  ByteReader in(bytes);
  const DetectionRow back = load_row(in);
  EXPECT_EQ(back.scenario, row.scenario);
  EXPECT_EQ(back.description, row.description);
  EXPECT_EQ(back.expected, row.expected);
  EXPECT_EQ(back.actual, row.actual);
  EXPECT_EQ(back.applicable, row.applicable);
  EXPECT_EQ(back.solver_failed, row.solver_failed);
  EXPECT_EQ(back.note, row.note);
  EXPECT_EQ(back.attempt, row.attempt);
  EXPECT_EQ(back.attempts, row.attempts);
  expect_same({back.detection_time, back.peak_temperature, back.temperature_rating, back.energy, back.energy_rating,
               back.end_time},
              {row.detection_time, row.peak_temperature, row.temperature_rating, row.energy, row.energy_rating,
               row.end_time});
  EXPECT_EQ(back.ratings_held, row.ratings_held);
  EXPECT_EQ(back.broken_rating, row.broken_rating);
  EXPECT_EQ(back.pass, row.pass);
  ASSERT_EQ(back.rating_margins.size(), 2u);
  EXPECT_EQ(back.rating_margins[0], row.rating_margins[0]);
  EXPECT_TRUE(std::isnan(back.rating_margins[1].second));
  expect_same(back.link_time, row.link_time);
  expect_same(back.link_voltage, row.link_voltage);

  const auto path_back = load_path(in);
  ASSERT_TRUE(path_back);
  EXPECT_EQ(path_back->measured, true);
  expect_same({path_back->source_voltage, path_back->path_resistance, path_back->at_time, path_back->closing_level},
              {400.0, 47.25, 0.3, 380.0});
  EXPECT_EQ(path_back->explanation, "measured");
  const auto stall_back = load_stall(in);
  ASSERT_TRUE(stall_back);
  expect_same({stall_back->source_voltage, stall_back->path_resistance, stall_back->load_power,
               stall_back->maximum_power, stall_back->equilibrium, stall_back->lower_root, stall_back->resistive_below,
               stall_back->closing_level, stall_back->link_voltage},
              {400.0, 47.0, 300.0, 851.0, 360.0, 40.0, 10.0, 380.0, kNaN});
  EXPECT_TRUE(stall_back->applicable && stall_back->stalls && stall_back->latched);
  EXPECT_EQ(stall_back->explanation, stall.explanation);
  EXPECT_FALSE(load_path(in));
  EXPECT_FALSE(load_stall(in));
  EXPECT_TRUE(in.at_end());
}

}  // namespace
}  // namespace linkrise::app
