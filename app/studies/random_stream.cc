#include "app/studies/random_stream.h"

#include <algorithm>
#include <cmath>

#include <gsl/gsl_cdf.h>

namespace linkrise::app {

std::uint64_t splitmix64(std::uint64_t x) {
  std::uint64_t z = x + 0x9E3779B97F4A7C15ULL;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
  return z ^ (z >> 31);
}

double uniform_draw(std::uint64_t seed, std::uint64_t index, std::uint64_t slot) {
  std::uint64_t h = splitmix64(seed);
  h = splitmix64(h ^ index);
  h = splitmix64(h ^ (slot * 0xD1B54A32D192ED03ULL));  // odd multiplier: slots far apart in the hash input
  return (static_cast<double>(h >> 11) + 0.5) * 0x1.0p-53;
}

double normal_cdf(double x) { return 0.5 * std::erfc(-x / std::sqrt(2.0)); }

double truncated_normal(double u, double mean, double sigma, double lower, double upper) {
  const double low = normal_cdf((lower - mean) / sigma);
  const double high = normal_cdf((upper - mean) / sigma);
  double p = low + u * (high - low);
  // Keep p strictly inside (0, 1) where the bounds lie far out in a tail.
  p = std::clamp(p, 1e-300, 1.0 - 1e-16);
  return std::clamp(mean + sigma * gsl_cdf_ugaussian_Pinv(p), lower, upper);
}

}  // namespace linkrise::app
