#pragma once
// Counter-based random numbers for the tolerance studies. A draw is a pure function of
// (seed, sample index, parameter slot): no generator state is carried from one sample to the next, so a
// Monte Carlo sample is the same whichever thread computes it, in whatever order, and in whichever shard
// (`--shard k/n`) of the population.
//
// Hash: three rounds of the splitmix64 finaliser (Steele, Lea & Flood, "Fast splittable pseudorandom number
// generators", OOPSLA 2014), one per key word, each round mixing the previous result with the next word.
// Uniform: the top 53 bits mapped to the open interval (0, 1) as (k + 0.5)·2⁻⁵³, so neither 0 nor 1 occurs and
// the inverse CDF of the normal distribution is always finite.
// Normal: the inverse of the standard normal CDF from GSL (gsl_cdf_ugaussian_Pinv), a maintained library
// rather than a hand-written rational approximation.
#include <cstdint>

namespace linkrise::app {

/// The splitmix64 output function applied to x + golden gamma.
std::uint64_t splitmix64(std::uint64_t x);

/// A uniform draw in (0, 1), a pure function of its three keys.
double uniform_draw(std::uint64_t seed, std::uint64_t index, std::uint64_t slot);

/// Φ(x), the standard normal CDF, through std::erfc.
double normal_cdf(double x);

/// A draw from the normal distribution N(mean, sigma²) truncated to [lower, upper], by inverting the truncated
/// CDF at `u`: x = mean + sigma·Φ⁻¹(Φ(a) + u·(Φ(b) − Φ(a))), a and b the standardised bounds.
double truncated_normal(double u, double mean, double sigma, double lower, double upper);

}  // namespace linkrise::app
