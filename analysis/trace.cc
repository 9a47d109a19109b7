#include "analysis/trace.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

namespace linkrise::analysis {

Trace::Trace(std::vector<double> times, std::vector<double> values)
    : times_(std::move(times)), values_(std::move(values)) {
  if (times_.size() != values_.size()) throw std::logic_error("trace: times and values differ in length");
}

Trace Trace::column(const solver::Waveform& waveform, const std::string& name) {
  int index = waveform.column(name);
  if (index < 0) throw std::out_of_range(fmt::format("the waveform has no column '{}'", name));
  return Trace(waveform.times(), waveform.series(index));
}

Trace Trace::node_pair(const solver::Waveform& waveform, const std::string& plus, const std::string& minus,
                       const std::string& ground) {
  auto node = [&](const std::string& name) {
    if (name == ground) return Trace(waveform.times(), std::vector<double>(waveform.row_count(), 0.0));
    return column(waveform, name);
  };
  return node(plus).minus(node(minus));
}

Trace Trace::minus(const Trace& other) const { return minus_scaled(other, 1.0, 0.0); }

Trace Trace::minus_scaled(const Trace& other, double factor, double offset) const {
  if (other.size() != size()) throw std::logic_error("trace: rows differ");
  std::vector<double> out(size());
  for (std::size_t i = 0; i < size(); ++i) out[i] = values_[i] - factor * other.values_[i] - offset;
  return Trace(times_, std::move(out));
}

Trace Trace::squared() const {
  std::vector<double> out(values_);
  for (double& v : out) v *= v;
  return Trace(times_, std::move(out));
}

Trace Trace::absolute() const {
  std::vector<double> out(values_);
  for (double& v : out) v = std::fabs(v);
  return Trace(times_, std::move(out));
}

double Trace::at(double time, bool after) const {
  if (empty()) return std::nan("");
  if (time <= times_.front()) {
    if (!after || time < times_.front()) return values_.front();
  }
  if (time >= times_.back()) {
    if (after || time > times_.back()) return values_.back();
  }
  auto lower = std::lower_bound(times_.begin(), times_.end(), time);
  std::size_t i = static_cast<std::size_t>(lower - times_.begin());
  if (i < size() && times_[i] == time) {
    if (after) {
      while (i + 1 < size() && times_[i + 1] == time) ++i;
    }
    return values_[i];
  }
  // times_[i - 1] < time < times_[i]
  double t0 = times_[i - 1], t1 = times_[i];
  double w = (time - t0) / (t1 - t0);
  return values_[i - 1] + w * (values_[i] - values_[i - 1]);
}

std::optional<double> Trace::first_rise_through_zero(double from) const {
  std::size_t i = static_cast<std::size_t>(std::lower_bound(times_.begin(), times_.end(), from) - times_.begin());
  if (i >= size()) return std::nullopt;
  if (values_[i] >= 0.0) return times_[i];  // already at or above the level where the search starts
  for (; i + 1 < size(); ++i) {
    double a = values_[i], b = values_[i + 1];
    if (a < 0.0 && b >= 0.0) {
      double ta = times_[i], tb = times_[i + 1];
      if (tb == ta) return ta;
      return ta + (-a) / (b - a) * (tb - ta);
    }
  }
  return std::nullopt;
}

namespace {
// First row to use from `from`: at a switching instant the row after the switching.
std::size_t first_row(const std::vector<double>& times, double from) {
  std::size_t i = static_cast<std::size_t>(std::lower_bound(times.begin(), times.end(), from) - times.begin());
  while (i + 1 < times.size() && times[i + 1] == times[i] && times[i] == from) ++i;
  return i;
}

std::optional<Extremum> largest(const std::vector<double>& times, const std::vector<double>& values, double sign,
                                double from, double to) {
  std::size_t begin = first_row(times, from);
  std::size_t best = times.size();
  for (std::size_t i = begin; i < times.size() && times[i] <= to; ++i) {
    if (best == times.size() || sign * values[i] > sign * values[best]) best = i;
  }
  if (best == times.size()) return std::nullopt;
  Extremum result{times[best], values[best]};
  // Parabola through the best row and its neighbours, when all three lie in one smooth segment of the window.
  if (best > begin && best + 1 < times.size() && times[best + 1] <= to && times[best - 1] < times[best] &&
      times[best] < times[best + 1]) {
    double h0 = times[best] - times[best - 1], h1 = times[best + 1] - times[best];
    double d1 = (values[best] - values[best - 1]) / h0, d2 = (values[best + 1] - values[best]) / h1;
    double a = (d2 - d1) / (h0 + h1);
    double b = d1 + a * h0;  // slope at the best row
    if (sign * a < 0.0) {
      double s = -b / (2.0 * a);
      if (s > -h0 && s < h1) {
        result.time = times[best] + s;
        result.value = values[best] - b * b / (4.0 * a);
      }
    }
  }
  return result;
}

// Neighbouring row intervals more than this many times apart are not joined by a parabola.
constexpr double kSpacingRatio = 10.0;

// ∫ over one smooth run of rows [first, last] by parabolas through consecutive triples.
double smooth_integral(const std::vector<double>& t, const std::vector<double>& v, std::size_t first,
                       std::size_t last) {
  double sum = 0.0;
  std::size_t i = first;
  auto parabola = [&](std::size_t mid, double lower, double upper) {
    // p(t_mid + s) = v_mid + b·s + a·s², integrated over s in [lower, upper].
    double h0 = t[mid] - t[mid - 1], h1 = t[mid + 1] - t[mid];
    double d1 = (v[mid] - v[mid - 1]) / h0, d2 = (v[mid + 1] - v[mid]) / h1;
    double a = (d2 - d1) / (h0 + h1);
    double b = d1 + a * h0;
    auto primitive = [&](double s) { return v[mid] * s + b * s * s / 2.0 + a * s * s * s / 3.0; };
    return primitive(upper) - primitive(lower);
  };
  // A parabola through rows of very different spacing (a row microseconds after a switching, then a step of
  // tenths of a second) extrapolates the short interval's slope over the long one: such a pair of intervals is
  // taken by trapezoids instead (exact for the straight line the long step's solver error allows anyway).
  auto even = [&](std::size_t mid) {
    const double h0 = t[mid] - t[mid - 1], h1 = t[mid + 1] - t[mid];
    return h0 <= kSpacingRatio * h1 && h1 <= kSpacingRatio * h0;
  };
  auto trapezoid = [&](std::size_t from) { return 0.5 * (v[from] + v[from + 1]) * (t[from + 1] - t[from]); };
  while (i + 2 <= last) {
    sum += even(i + 1) ? parabola(i + 1, t[i] - t[i + 1], t[i + 2] - t[i + 1]) : trapezoid(i) + trapezoid(i + 1);
    i += 2;
  }
  if (i + 1 == last) {
    if (last - first >= 2 && even(last - 1)) {
      sum += parabola(last - 1, 0.0, t[last] - t[last - 1]);
    } else {
      sum += 0.5 * (v[i] + v[last]) * (t[last] - t[i]);
    }
  }
  return sum;
}
}  // namespace

std::optional<Extremum> Trace::maximum(double from, double to) const { return largest(times_, values_, 1.0, from, to); }

std::optional<Extremum> Trace::minimum(double from, double to) const {
  return largest(times_, values_, -1.0, from, to);
}

double Trace::integral(double from, double to) const {
  if (empty() || !(to > from)) return 0.0;
  std::size_t begin = first_row(times_, from);
  double sum = 0.0;
  if (begin < size() && times_[begin] > from) {
    double start = std::max(from, times_.front());
    sum += 0.5 * (at(start, true) + values_[begin]) * (times_[begin] - start);
  }
  std::size_t end = begin;
  while (end + 1 < size() && times_[end + 1] <= to) ++end;
  // Split into smooth segments at repeated times (switching instants).
  std::size_t segment = begin;
  for (std::size_t i = begin; i <= end && i < size(); ++i) {
    if (i == end || times_[i + 1] == times_[i]) {
      if (i > segment) sum += smooth_integral(times_, values_, segment, i);
      segment = i + 1;
    }
  }
  if (end < size() && times_[end] < to && end + 1 < size()) {
    sum += 0.5 * (values_[end] + at(to)) * (to - times_[end]);
  }
  return sum;
}

}  // namespace linkrise::analysis
