// Trace operations on signals with known answers (closed forms named at each check; docs/references.md).
#include "analysis/trace.h"

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

using linkrise::analysis::Trace;

TEST(Trace, AtInterpolatesAndPicksTheSideOfASwitchingInstant) {
  Trace trace({0.0, 1.0, 1.0, 2.0}, {0.0, 10.0, 20.0, 40.0});
  EXPECT_DOUBLE_EQ(trace.at(0.5), 5.0);
  EXPECT_DOUBLE_EQ(trace.at(1.0), 10.0);        // before the switching
  EXPECT_DOUBLE_EQ(trace.at(1.0, true), 20.0);  // after it
  EXPECT_DOUBLE_EQ(trace.at(1.5), 30.0);
  EXPECT_DOUBLE_EQ(trace.at(3.0), 40.0);
}

TEST(Trace, FirstRiseThroughZeroIsExactForAStraightLine) {
  // g(t) = 3t − 1 sampled unevenly: zero at t = 1/3.
  std::vector<double> t = {0.0, 0.1, 0.25, 0.4, 0.9}, v;
  for (double x : t) v.push_back(3.0 * x - 1.0);
  Trace trace(t, v);
  auto crossing = trace.first_rise_through_zero(0.0);
  ASSERT_TRUE(crossing.has_value());
  EXPECT_NEAR(*crossing, 1.0 / 3.0, 1e-15);
  EXPECT_FALSE(Trace(t, std::vector<double>(t.size(), -1.0)).first_rise_through_zero(0.0).has_value());
}

TEST(Trace, PeakOfAParabolaIsFoundBetweenRows) {
  // v = 5 − (t − 0.37)²: the three rows around the largest define the parabola exactly.
  std::vector<double> t = {0.0, 0.2, 0.3, 0.45, 0.6, 1.0}, v;
  for (double x : t) v.push_back(5.0 - (x - 0.37) * (x - 0.37));
  auto peak = Trace(t, v).maximum(0.0, 1.0);
  ASSERT_TRUE(peak.has_value());
  EXPECT_NEAR(peak->time, 0.37, 1e-14);
  EXPECT_NEAR(peak->value, 5.0, 1e-14);
  auto low = Trace(t, v).minimum(0.0, 1.0);
  EXPECT_NEAR(low->value, 5.0 - 0.63 * 0.63, 1e-14);  // at the last row
}

TEST(Trace, IntegralIsExactForCubicsOnUnevenRowsAndSplitsAtSwitching) {
  // Piecewise parabolas (non-uniform Simpson, [R-Simpson-error]) integrate cubics exactly only on even pairs of
  // equal steps; on uneven rows they are exact for quadratics: ∫0^1 (2 + 3t − t²) dt = 2 + 1.5 − 1/3.
  std::vector<double> t = {0.0, 0.1, 0.35, 0.5, 0.8, 1.0}, v;
  for (double x : t) v.push_back(2.0 + 3.0 * x - x * x);
  EXPECT_NEAR(Trace(t, v).integral(0.0, 1.0), 2.0 + 1.5 - 1.0 / 3.0, 1e-14);
  // A step at t = 0.5 (two rows): 1 before, 3 after → ∫0^1 = 0.5 + 1.5.
  Trace step({0.0, 0.25, 0.5, 0.5, 0.75, 1.0}, {1.0, 1.0, 1.0, 3.0, 3.0, 3.0});
  EXPECT_NEAR(step.integral(0.0, 1.0), 2.0, 1e-15);
  EXPECT_NEAR(step.integral(0.5, 1.0), 1.5, 1e-15);
}

// Rows of a microsecond rise, then steps of a tenth of a second (a switching's transient, then the solver's long
// steps): a parabola through 8 µs, 9 µs and 0.1 s would carry the rise's slope over the long step (0.35 off an
// integral of 0.2). Intervals more than tenfold apart are joined by trapezoids instead, whose error on a
// monotone function is at most the rise left, (1 − v(9 µs)), times half the long step (the trapezoid's bound for
// a monotone integrand, [R-trapezoid-error]). ∫0^0.2 (1 − e^(−t/τ)) dt = 0.2 − τ·(1 − e^(−0.2/τ)).
TEST(Trace, IntegralOverAShortRiseThenLongStepsStaysWithinTheTrapezoidBound) {
  const double tau = 1e-6;
  std::vector<double> t, v;
  for (int k = 0; k < 10; ++k) t.push_back(k * 1e-6);
  t.push_back(0.1);
  t.push_back(0.2);
  for (double x : t) v.push_back(1.0 - std::exp(-x / tau));
  const double exact = 0.2 - tau * (1.0 - std::exp(-0.2 / tau));
  const double bound = (1.0 - v[9]) * 0.1 / 2.0;
  EXPECT_NEAR(Trace(t, v).integral(0.0, 0.2), exact, bound);
}

TEST(Trace, IntegralOfADecayingExponentialConvergesAtFourthOrder) {
  // ∫0^1 e^(−5t) dt = (1 − e^(−5))/5; with 100 equal steps Simpson's error is ~ h⁴·f⁗/180 ≈ 7e-9
  // [R-Simpson-error].
  std::vector<double> t, v;
  for (int k = 0; k <= 100; ++k) {
    t.push_back(k / 100.0);
    v.push_back(std::exp(-5.0 * k / 100.0));
  }
  double exact = (1.0 - std::exp(-5.0)) / 5.0;
  EXPECT_NEAR(Trace(t, v).integral(0.0, 1.0), exact, 1e-8);
}
