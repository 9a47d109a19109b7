// The limits block and the judging of metrics against limits and part ratings.
#include "analysis/limits.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "netlist/limit_spec.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::analysis::MetricSet;
using linkrise::testing::case_from;
using linkrise::testing::contains;
using linkrise::testing::input_error;

const std::string kParts =
    "ground: gnd\n"                                                                                   // 1
    "parts:\n"                                                                                        // 2
    "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"                       // 3
    "  - {name: r1, kind: resistor, nodes: [plus, gnd], resistance: 100 Ohm}\n"                       // 4
    "run: {duration: 1 s}\n"                                                                          // 5
    "limits:\n";                                                                                      // 6

MetricSet metrics() {
  MetricSet m;
  m.add("sequence.precharge_time", 0.180, "s", "");
  m.add("r1.energy", 95.0, "J", "");
  m.add("r1.peak_temperature", 120.0, "degC", "");
  m.add("sequence.minimum_pack_voltage", 385.0, "V", "");
  m.add("sequence.peak_main_current", NAN, "A", "");
  return m;
}

std::vector<linkrise::analysis::JudgedLimit> judged(const std::string& lines) {
  auto limits = case_from(kParts + lines).limits;
  return linkrise::analysis::judge_limits(limits, metrics());
}
}  // namespace

TEST(Limits, MaximumAndMinimumWithMargins) {
  auto result = judged(
      "  sequence.precharge_time: {max: 200 ms, margin: 5 %}\n"
      "  sequence.minimum_pack_voltage: {min: 390 V}\n"
      "  r1.energy: {min: 10 J, max: 100 J, margin: 10 %}\n");
  ASSERT_EQ(result.size(), 4u);
  // max 200 ms, value 180 ms: margin 20 ms = 10 % of the bound, more than the required 5 %.
  EXPECT_EQ(result[0].bound, linkrise::analysis::BoundSide::Maximum);
  EXPECT_NEAR(result[0].margin, 0.020, 1e-15);
  EXPECT_NEAR(result[0].relative_margin, 0.10, 1e-12);
  EXPECT_EQ(result[0].margin_unit, "s");
  EXPECT_TRUE(result[0].pass);
  // min 390 V, value 385 V: 5 V outside.
  EXPECT_NEAR(result[1].margin, -5.0, 1e-12);
  EXPECT_FALSE(result[1].pass);
  // min 10 J passes; max 100 J leaves 5 J = 5 %, short of the required 10 %.
  EXPECT_EQ(result[2].bound, linkrise::analysis::BoundSide::Minimum);
  EXPECT_TRUE(result[2].pass);
  EXPECT_NEAR(result[3].margin, 5.0, 1e-12);
  EXPECT_FALSE(result[3].pass);
}

TEST(Limits, TemperaturesInDegreesCelsiusOrKelvin) {
  auto result = judged("  r1.peak_temperature: {max: 150 degC}\n");
  EXPECT_NEAR(result[0].limit, 150.0, 1e-12);
  EXPECT_NEAR(result[0].margin, 30.0, 1e-12);
  // A margin is a difference of temperatures, so it is in K; the limit and the value stay in degC.
  EXPECT_EQ(result[0].unit, "degC");
  EXPECT_EQ(result[0].margin_unit, "K");
  auto kelvin = judged("  r1.peak_temperature: {max: 373.15 K}\n");
  EXPECT_NEAR(kelvin[0].limit, 100.0, 1e-12);
  EXPECT_FALSE(kelvin[0].pass);
}

TEST(Limits, AMetricNotReachedIsNotJudged) {
  auto result = judged("  sequence.peak_main_current: {max: 1 kA}\n");
  EXPECT_FALSE(result[0].judged);
  EXPECT_TRUE(result[0].pass);
}

TEST(Limits, UnknownMetricGetsADidYouMeanAtItsKey) {
  auto error = input_error([] { judged("  sequence.precharge_tme: {max: 200 ms}\n"); });
  EXPECT_TRUE(contains(error.what(), "test.yaml:7:3")) << error.what();
  EXPECT_TRUE(contains(error.what(), "did you mean 'sequence.precharge_time'?")) << error.what();
}

TEST(Limits, WrongUnitIsAnErrorAtTheBound) {
  auto error = input_error([] { judged("  r1.energy: {max: 100 W}\n"); });
  EXPECT_TRUE(contains(error.what(), "test.yaml:7:20")) << error.what();
  EXPECT_TRUE(contains(error.what(), "energy (J)")) << error.what();
}

TEST(Limits, MalformedEntriesAreRejectedWhileReading) {
  auto neither = input_error([] { (void)case_from(kParts + "  r1.energy: {margin: 5 %}\n").limits; });
  EXPECT_TRUE(contains(neither.what(), "neither 'min' nor 'max'")) << neither.what();
  auto typo = input_error([] { (void)case_from(kParts + "  r1.energy: {maxi: 5 J}\n").limits; });
  EXPECT_TRUE(contains(typo.what(), "did you mean 'max'?")) << typo.what();
  auto order = input_error([] { (void)case_from(kParts + "  r1.energy: {min: 5 J, max: 1 J}\n").limits; });
  EXPECT_TRUE(contains(order.what(), "min must lie below max")) << order.what();
}

TEST(Limits, PartRatingsBecomeLimits) {
  linkrise::solver::Circuit circuit(case_from(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: r1, kind: resistor, nodes: [plus, gnd], resistance: 100 Ohm,"
      " ratings: {max_temperature: 155 degC, pulse_energy: 90 J}}\n"
      "run: {duration: 1 s}\n"));
  auto limits = linkrise::analysis::rating_limits(circuit);
  auto result = linkrise::analysis::judge_limits(limits, metrics());
  ASSERT_EQ(result.size(), 2u);
  for (const auto& limit : result) {
    EXPECT_EQ(limit.bound, linkrise::analysis::BoundSide::Maximum);
    EXPECT_TRUE(contains(limit.source, "rating of r1")) << limit.source;
    if (limit.metric == "r1.peak_temperature") {
      EXPECT_NEAR(limit.limit, 155.0, 1e-9);
      EXPECT_TRUE(limit.pass);
    } else {
      EXPECT_EQ(limit.metric, "r1.energy");
      EXPECT_NEAR(limit.limit, 90.0, 1e-12);
      EXPECT_FALSE(limit.pass);  // 95 J against 90 J
    }
  }
}
