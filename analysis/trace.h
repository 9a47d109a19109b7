#pragma once
// One signal over time taken from a recorded waveform, with the operations metrics need: value at a time,
// first crossing of a level, refined peak and integral.
//
// Rows are the solver's steps (plus two rows at every switching instant, before and after, and one at each
// watched crossing), so a crossing found by linear interpolation between rows is exact where a watch put a
// row, and accurate to the step otherwise. A peak between rows is refined by the parabola through the
// largest row and its two neighbours; integrals use piecewise parabolas (non-uniform Simpson). Rows with
// the same time split the signal into smooth segments, and neither refinement crosses such a split.
#include <optional>
#include <string>
#include <vector>

#include "solver/waveform.h"

namespace linkrise::analysis {

struct Extremum {
  double time = 0.0;
  double value = 0.0;
};

class Trace {
 public:
  Trace() = default;
  Trace(std::vector<double> times, std::vector<double> values);

  /// A column by name ("k_main.current"); throws std::out_of_range naming the column when absent.
  static Trace column(const solver::Waveform& waveform, const std::string& name);
  /// v(plus) − v(minus) from node columns; the `ground` node has no column and reads 0 V.
  static Trace node_pair(const solver::Waveform& waveform, const std::string& plus, const std::string& minus,
                         const std::string& ground);

  std::size_t size() const { return times_.size(); }
  bool empty() const { return times_.empty(); }
  const std::vector<double>& times() const { return times_; }
  const std::vector<double>& values() const { return values_; }

  /// Pointwise a − b (same rows).
  Trace minus(const Trace& other) const;
  /// Pointwise a − k·b − offset (same rows).
  Trace minus_scaled(const Trace& other, double factor, double offset) const;
  /// Pointwise square.
  Trace squared() const;
  /// Pointwise absolute value.
  Trace absolute() const;

  /// Linear interpolation at `time`; at a switching instant (two rows at one time) `after` picks the row
  /// after the switching. Outside the recorded span the end values are held.
  double at(double time, bool after = false) const;
  /// The first time >= `from` at which the signal rises through zero (from < 0 to >= 0); interpolated.
  std::optional<double> first_rise_through_zero(double from) const;
  /// Largest value over rows with from <= t <= to (rows at `from` taken after switching), refined between rows.
  std::optional<Extremum> maximum(double from, double to) const;
  std::optional<Extremum> minimum(double from, double to) const;
  /// ∫ value dt over [from, to], both expected at rows (switching instants, the ends); partial intervals are
  /// interpolated linearly.
  double integral(double from, double to) const;

 private:
  std::vector<double> times_;
  std::vector<double> values_;
};

}  // namespace linkrise::analysis
