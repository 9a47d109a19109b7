#include "app/output/decimation.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <utility>

namespace linkrise::app {
namespace {

// The finite samples of [x_low, x_high] and their neighbours just outside.
struct Window {
  std::size_t inside = 0;
  std::size_t before;  // last finite sample left of the range (n: none)
  std::size_t after;   // first finite sample right of the range (n: none)
};

// One pass finds the neighbours just outside the range and the count inside.
Window scan_window(const std::vector<double>& x, const std::vector<double>& y,
                   std::size_t n, double x_low, double x_high) {
  Window window{0, n, n};
  for (std::size_t i = 0; i < n; ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
    if (x[i] < x_low) {
      window.before = i;
    } else if (x[i] > x_high) {
      if (window.after == n) window.after = i;
    } else {
      ++window.inside;
    }
  }
  return window;
}

}  // namespace

std::vector<Point> decimate_min_max(const std::vector<double>& x,
                                    const std::vector<double>& y, double x_low,
                                    double x_high, int columns) {
  const std::size_t n = std::min(x.size(), y.size());
  if (x_low > x_high) std::swap(x_low, x_high);
  columns = std::max(columns, 1);
  const auto finite = [&](std::size_t i) {
    return std::isfinite(x[i]) && std::isfinite(y[i]);
  };
  const Window window = scan_window(x, y, n, x_low, x_high);
  const auto kept = [&](std::size_t i) {
    return finite(i) && ((x[i] >= x_low && x[i] <= x_high) ||
                         i == window.before || i == window.after);
  };
  std::vector<Point> points;
  if (window.inside < 2 * static_cast<std::size_t>(columns)) {
    for (std::size_t i = 0; i < n; ++i) {
      if (kept(i)) points.push_back({x[i], y[i]});
    }
    return points;
  }
  points.reserve(4 * static_cast<std::size_t>(columns));
  const double span = x_high - x_low;
  const auto column_of = [&](double value) {
    if (!(span > 0.0)) return 0;
    const double c = std::floor((value - x_low) / span * columns);
    return static_cast<int>(std::clamp(c, 0.0, columns - 1.0));
  };
  int current = -1;
  std::size_t first = 0, lowest = 0, highest = 0, latest = 0;
  const auto flush = [&]() {
    if (current < 0) return;
    std::array<std::size_t, 4> picks = {first, lowest, highest, latest};
    std::sort(picks.begin(), picks.end());  // keep time order
    for (std::size_t k = 0; k < picks.size(); ++k) {
      if (k > 0 && picks[k] == picks[k - 1]) continue;
      points.push_back({x[picks[k]], y[picks[k]]});
    }
  };
  for (std::size_t i = 0; i < n; ++i) {
    if (!kept(i)) continue;
    const int column = column_of(x[i]);
    if (column != current) {
      flush();
      current = column;
      first = lowest = highest = latest = i;
      continue;
    }
    if (y[i] < y[lowest]) lowest = i;
    if (y[i] > y[highest]) highest = i;
    latest = i;
  }
  flush();
  return points;
}

}  // namespace linkrise::app
