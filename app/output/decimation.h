#pragma once
// Peak-preserving decimation of a series: what the SVG plots draw and what a detection matrix keeps of each
// scenario's link voltage.
#include <vector>

namespace linkrise::app {

struct Point {
  double x = 0.0;
  double y = 0.0;
};

/// Points to draw for x ascending (time order). Samples in [x_low, x_high]
/// plus one neighbour on each side are kept; non-finite samples are dropped.
/// If more than 2 x columns samples remain, each pixel column keeps only its
/// first, minimum, maximum and last sample in time order (at most 4 per
/// column), so a one-sample spike survives. Uses min(x.size(), y.size()).
std::vector<Point> decimate_min_max(const std::vector<double>& x,
                                    const std::vector<double>& y, double x_low,
                                    double x_high, int columns);

}  // namespace linkrise::app
