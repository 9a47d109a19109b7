// Tolerance spread (app/studies/spread.h): corners against the RC closed form, Monte Carlo statistics
// against the analytic distribution of τ = R·C, determinism across thread counts and shards.
#include "app/studies/spread.h"

#include <algorithm>
#include <cmath>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "netlist/input_error.h"
#include "study_fixture.h"

namespace linkrise::app {
namespace {
using study_test::rc_case_text;
using study_test::to_95_percent;
using study_test::write_case;

const char* kRcTolerances = "  r_pre.resistance: {plus_minus: 10 %}\n  link.capacitance: {minus: 20 %, plus: 10 %}\n";

// Corners: the charge time −R·C·ln(0.05) is monotone in R and C, so the shortest corner is R_min·C_min and the
// longest R_max·C_max (RC closed form, docs/references.md [R-RC-charge]). Tolerance 1e-6 relative: solver rtol is
// 1e-10 and the crossing is a located root, so 1e-6 is loose for the solver and tight against any model error.
TEST(StudySpread, CornersHitTheAnalyticExtremes) {
  std::string file = write_case("study_rc_corners.yaml", rc_case_text(kRcTolerances));
  SpreadPlan plan = spread_plan(true, 0, 1, "");
  Spread spread = run_spread(file, {}, plan, 2);
  ASSERT_EQ(spread.population, 4u);
  const MetricSpread& t = spread.statistics.at(static_cast<std::size_t>(spread.results.column("sequence.time_to_threshold")));
  double shortest = 90.0 * 0.8e-3 * to_95_percent();
  double longest = 110.0 * 1.1e-3 * to_95_percent();
  EXPECT_NEAR(t.minimum, shortest, 1e-6 * shortest);
  EXPECT_NEAR(t.maximum, longest, 1e-6 * longest);
  // Corner 0 is every parameter at its lower bound, corner 3 every one at its upper bound.
  EXPECT_NEAR(spread.results.value(0, "sequence.time_to_threshold"), shortest, 1e-6 * shortest);
  EXPECT_EQ(t.worst, 3);
  EXPECT_NEAR(spread.results.value(1, "sequence.time_to_threshold"), 110.0 * 0.8e-3 * to_95_percent(), 1e-6 * shortest);
}

// spread_samples.csv and spread.json: a fraction in %, an absolute temperature in degC (a percent is a
// hundredth and 0 degC is 273.15 K, docs/references.md [R-SI]).
TEST(StudySpread, SamplesCsvAndJsonShowFractionsInPercent) {
  std::string file = write_case("study_rc_percent.yaml",
                                rc_case_text("  sequence.close_when.ratio: {range: [90 %, 96 %]}\n"
                                             "  ambient: {range: [-20 degC, 45 degC]}\n"));
  Spread spread = run_spread(file, {}, spread_plan(true, 0, 1, ""), 2);
  const std::string csv = spread_csv(spread);
  const std::string header = csv.substr(0, csv.find('\n'));
  EXPECT_NE(header.find("corner,sequence.close_when.ratio [%],ambient [degC],status"), std::string::npos) << header;
  EXPECT_EQ(header.find("[]"), std::string::npos) << header;
  // Corner 0 is every parameter at its lower bound.
  const std::string first = csv.substr(header.size() + 1, csv.find('\n', header.size() + 1) - header.size() - 1);
  EXPECT_EQ(first.substr(0, first.find(",evaluated")), "0,90,-20");
  const nlohmann::json json = nlohmann::json::parse(spread_json(spread));
  EXPECT_EQ(json.at("tolerances").at(0).at("lower").at("unit"), "%");
  EXPECT_NEAR(json.at("tolerances").at(0).at("upper").at("value").get<double>(), 96.0, 1e-12);
  EXPECT_EQ(json.at("tolerances").at(0).at("description"), "90 % … 96 %, uniform");
  // The charge to 96 % takes −R·C·ln(0.04) ([R-RC-charge]); 1e-6 relative as above.
  const double longest = 100.0 * 1e-3 * -std::log(1.0 - 0.96);
  EXPECT_NEAR(spread.results.value(3, "sequence.time_to_threshold"), longest, 1e-6 * longest);
}

// CDF of Z = X·Y for independent X ~ U[a, b], Y ~ U[c, d] (0 < a, 0 < c), derived here:
//   F(z) = P(Y <= z/X) = 1/((b − a)(d − c)) · ∫_a^b (clamp(z/x, c, d) − c) dx
//        = [ (d − c)·(lo − a) + z·ln(hi/lo) − c·(hi − lo) ] / ((b − a)(d − c)),
//   lo = clamp(z/d, a, b), hi = clamp(z/c, a, b)  (for x < z/d the inner probability is 1; for x > z/c it is 0).
double product_cdf(double z, double a, double b, double c, double d) {
  double lo = std::clamp(z / d, a, b), hi = std::clamp(z / c, a, b);
  double integral = (d - c) * (lo - a) + (hi > lo ? z * std::log(hi / lo) - c * (hi - lo) : 0.0);
  return integral / ((b - a) * (d - c));
}

double product_quantile(double p, double a, double b, double c, double d) {
  double low = a * c, high = b * d;
  for (int i = 0; i < 200; ++i) {
    double middle = 0.5 * (low + high);
    (product_cdf(middle, a, b, c, d) < p ? low : high) = middle;
  }
  return 0.5 * (low + high);
}

// Monte Carlo: R ~ U[80, 120] Ohm, C ~ U[0.7, 1.3] mF; τ = time_to_threshold / (−ln 0.05). The sample quantile
// of N draws has standard error sqrt(p(1 − p)/N) / f(q), f the density at q (asymptotic normality of sample
// quantiles, docs/references.md [R-quantile-asymptotics]: David & Nagaraja, Order Statistics, from memory). With
// N = 1500 we allow 4.5 standard errors (a sound sampler fails with probability < 1e-5); the solver's error (~1e-9)
// is negligible.
TEST(StudySpread, MonteCarloQuantilesMatchTheProductOfUniforms) {
  std::string tolerances = "  r_pre.resistance: {plus_minus: 20 %}\n  link.capacitance: {plus_minus: 30 %}\n";
  std::string file = write_case("study_rc_monte_carlo.yaml", rc_case_text(tolerances) + "");
  SpreadPlan plan = spread_plan(false, 1500, 2024, "");
  Spread spread = run_spread(file, {{"run.rtol", "1e-8", {}}, {"run.atol", "1e-10", {}}}, plan, 2);
  int column = spread.results.column("sequence.time_to_threshold");
  ASSERT_GE(column, 0);
  std::vector<double> tau;
  for (const auto& point : spread.results.points) tau.push_back(point.values[static_cast<std::size_t>(column)] / to_95_percent());
  std::sort(tau.begin(), tau.end());
  ASSERT_EQ(tau.size(), 1500u);
  const double a = 80.0, b = 120.0, c = 0.7e-3, d = 1.3e-3;
  EXPECT_GE(tau.front(), a * c * (1 - 1e-6));
  EXPECT_LE(tau.back(), b * d * (1 + 1e-6));
  for (double p : {0.1, 0.5, 0.9}) {
    double q = product_quantile(p, a, b, c, d);
    double h = 1e-4 * q;
    double density = (product_cdf(q + h, a, b, c, d) - product_cdf(q - h, a, b, c, d)) / (2 * h);
    double standard_error = std::sqrt(p * (1 - p) / 1500.0) / density;
    EXPECT_NEAR(quantile(tau, p), q, 4.5 * standard_error) << "p = " << p;
  }
  // The analytic median itself: F(m) = 1/2 (a check of the derivation against a direct numerical integral).
  double m = product_quantile(0.5, a, b, c, d);
  double numeric = 0.0;
  const int steps = 20000;
  for (int i = 0; i < steps; ++i) {
    double x = a + (b - a) * (i + 0.5) / steps;
    numeric += (std::clamp(m / x, c, d) - c) / (d - c) / steps;
  }
  EXPECT_NEAR(numeric, 0.5, 1e-6);
}

// Bitwise equality, NaN included (a metric not reached is NaN in every run alike).
bool identical(const std::vector<double>& a, const std::vector<double>& b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    if (!(a[i] == b[i]) && !(std::isnan(a[i]) && std::isnan(b[i]))) return false;
  }
  return true;
}

// The same population at 1 and 2 threads, and split into three shards, gives bit-identical samples.
TEST(StudySpread, DeterministicAcrossThreadsAndShards) {
  std::string tolerances = "  r_pre.resistance: {plus_minus: 20 %}\n"
                           "  link.capacitance: {plus_minus: 30 %, distribution: normal, sigma: 10 %}\n";
  std::string file = write_case("study_rc_determinism.yaml", rc_case_text(tolerances));
  std::vector<netlist::Override> loose{{"run.rtol", "1e-7", {}}};
  SpreadPlan plan = spread_plan(false, 30, 99, "");
  Spread one = run_spread(file, loose, plan, 1);
  Spread two = run_spread(file, loose, plan, 2);
  ASSERT_EQ(one.results.points.size(), 30u);
  std::vector<std::vector<double>> sharded;
  for (int k = 1; k <= 3; ++k) {
    SpreadPlan part = spread_plan(false, 30, 99, std::to_string(k) + "/3");
    Spread shard = run_spread(file, loose, part, 2);
    EXPECT_EQ(shard.range.size(), 10u);
    for (const auto& point : shard.results.points) sharded.push_back(point.values);
  }
  for (std::size_t i = 0; i < 30; ++i) {
    EXPECT_TRUE(identical(one.results.points[i].values, two.results.points[i].values)) << "sample " << i;
    EXPECT_TRUE(identical(one.results.points[i].values, sharded[i])) << "sample " << i;
  }
  // Another seed changes the draws.
  Spread other = run_spread(file, loose, spread_plan(false, 30, 100, ""), 2);
  EXPECT_FALSE(identical(other.results.points[0].values, one.results.points[0].values));
}

TEST(StudySpread, TolerancesBlockErrorsArePlaced) {
  auto expect_error = [](const std::string& tolerances, const std::string& words) {
    std::string file = write_case("study_rc_bad.yaml", rc_case_text(tolerances));
    try {
      run_spread(file, {}, spread_plan(true, 0, 1, ""), 1);
      ADD_FAILURE() << "no error for " << tolerances;
    } catch (const netlist::InputError& error) {
      EXPECT_NE(std::string(error.what()).find(words), std::string::npos) << error.what();
      EXPECT_GT(error.mark().line, 0) << error.what();
    }
  };
  expect_error("  ambient: {plus_minus: 5 %}\n", "absolute temperature cannot be a percentage");
  expect_error("  link.esr: {plus_minus: 5 %}\n", "gives no value");
  expect_error("  r_pre.resistance: {plus_minus: 5 %, range: [1 Ohm, 2 Ohm]}\n", "exactly one of");
  expect_error("  r_pre.resistance: {plus_minus: 5 %, distribution: normal}\n", "needs 'sigma'");
  expect_error("  r_pre.resistance: {plus_minus: 5 %, distribtion: normal}\n", "distribution");
  expect_error("  r_pre.resistance: {plus_minus: 2 V}\n", "is voltage");
}

TEST(StudySpread, QuantileIsHyndmanFanType7) {
  // Type 7 on {1, 2, 3, 4}: h = 3p; p = 0.5 -> 2.5, p = 0.1 -> 1.3, p = 1 -> 4 (R's quantile() default;
  // docs/references.md [R-Hyndman-Fan]).
  std::vector<double> values{1, 2, 3, 4};
  EXPECT_DOUBLE_EQ(quantile(values, 0.5), 2.5);
  EXPECT_DOUBLE_EQ(quantile(values, 0.1), 1.3);
  EXPECT_DOUBLE_EQ(quantile(values, 1.0), 4.0);
  EXPECT_DOUBLE_EQ(quantile(values, 0.0), 1.0);
}

}  // namespace
}  // namespace linkrise::app
