// The counter-based random stream of the tolerance studies (app/studies/random_stream.h).
#include "app/studies/random_stream.h"

#include <cmath>
#include <vector>

#include <gsl/gsl_cdf.h>
#include <gtest/gtest.h>

namespace linkrise::app {
namespace {

// Reference: GSL's gsl_cdf_ugaussian_P (a general-purpose reference library). Φ through std::erfc is exact to a
// few ulp; 1e-13 relative allows for the far tail, where both round differently.
TEST(StudyRandomStream, NormalCdfMatchesGsl) {
  for (double x : {-8.0, -3.0, -1.0, -0.1, 0.0, 0.5, 2.0, 6.0}) {
    const double reference = gsl_cdf_ugaussian_P(x);
    EXPECT_NEAR(normal_cdf(x), reference, 1e-13 * reference) << "x = " << x;
  }
}

TEST(StudyRandomStream, DrawsArePureFunctionsOfTheirKeys) {
  const double first = uniform_draw(7, 123, 2);
  for (std::uint64_t index = 0; index < 1000; ++index) (void)uniform_draw(7, index, 5);
  EXPECT_EQ(uniform_draw(7, 123, 2), first);  // no hidden state: other draws in between change nothing
  EXPECT_NE(uniform_draw(7, 123, 2), uniform_draw(7, 124, 2));
  EXPECT_NE(uniform_draw(7, 123, 2), uniform_draw(7, 123, 3));
  EXPECT_NE(uniform_draw(7, 123, 2), uniform_draw(8, 123, 2));
  // splitmix64 reference: the first output of the generator seeded with 0 is 0xE220A8397B1DCDAF (Vigna's
  // published splitmix64.c, from memory; docs/references.md [R-splitmix64]), i.e. splitmix64(0) in this
  // formulation.
  EXPECT_EQ(splitmix64(0), 0xE220A8397B1DCDAFULL);
}

// Moments of U(0,1) (docs/references.md [R-uniform-moments]): mean 1/2, variance 1/12. Over n = 200 000 draws the
// sample mean has standard error sqrt(1/(12 n)) = 6.5e-4; 5 standard errors (3.2e-3) fail with probability below 1e-6
// for a sound stream.
// The lag-1 correlation of successive sample indices (one slot) has standard error 1/sqrt(n) = 2.2e-3.
TEST(StudyRandomStream, UniformMomentsAndIndependence) {
  const int n = 200000;
  double sum = 0.0, sum_squares = 0.0, lag = 0.0;
  double previous = uniform_draw(42, 0, 0);
  for (int i = 0; i < n; ++i) {
    double u = uniform_draw(42, static_cast<std::uint64_t>(i), 0);
    ASSERT_GT(u, 0.0);
    ASSERT_LT(u, 1.0);
    sum += u;
    sum_squares += u * u;
    if (i > 0) lag += (u - 0.5) * (previous - 0.5);
    previous = u;
  }
  double mean = sum / n;
  double variance = sum_squares / n - mean * mean;
  EXPECT_NEAR(mean, 0.5, 5.0 * std::sqrt(1.0 / (12.0 * n)));
  // The sample variance has standard error sqrt((µ4 − σ⁴)/n) with µ4 = 1/80 for U(0,1): 1.7e-4.
  EXPECT_NEAR(variance, 1.0 / 12.0, 5.0 * std::sqrt((1.0 / 80.0 - 1.0 / 144.0) / n));
  EXPECT_NEAR(lag / (n - 1) * 12.0, 0.0, 5.0 / std::sqrt(n));
}

TEST(StudyRandomStream, TruncatedNormalStaysInsideAndIsSymmetric) {
  // Symmetric truncation at ±2σ: the median is the mean and the draw at u is mirrored at 1 − u.
  EXPECT_NEAR(truncated_normal(0.5, 10.0, 1.0, 8.0, 12.0), 10.0, 1e-12);
  EXPECT_NEAR(truncated_normal(0.2, 10.0, 1.0, 8.0, 12.0) - 10.0, 10.0 - truncated_normal(0.8, 10.0, 1.0, 8.0, 12.0),
              1e-12);
  // Untruncated in effect (bounds at ±40σ): the draw is the normal quantile, Φ⁻¹(0.975) = 1.959963984540054 and
  // Φ⁻¹(0.999) = 3.090232306167813 (standard normal table, from memory), times σ = 2.
  EXPECT_NEAR(truncated_normal(0.975, 0.0, 2.0, -80.0, 80.0), 2.0 * 1.959963984540054, 1e-12);
  EXPECT_NEAR(truncated_normal(0.999, 0.0, 2.0, -80.0, 80.0), 2.0 * 3.090232306167813, 1e-12);
  EXPECT_NEAR(truncated_normal(0.001, 0.0, 2.0, -80.0, 80.0), -2.0 * 3.090232306167813, 1e-12);
  for (double u : {1e-16, 0.001, 0.999, 1.0 - 1e-16}) {
    double x = truncated_normal(u, 0.0, 1.0, -0.5, 3.0);
    EXPECT_GE(x, -0.5);
    EXPECT_LE(x, 3.0);
  }
}

}  // namespace
}  // namespace linkrise::app
