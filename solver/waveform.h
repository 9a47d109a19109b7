#pragma once
// Recorded signals: one row per time point, columns named "<name> [unit]". Plain data, read by analysis/
// and the writers; nothing here knows about the solver.
#include <string>
#include <vector>

namespace linkrise::solver {

class Waveform {
 public:
  Waveform() = default;
  explicit Waveform(std::vector<std::string> headers) : headers_(std::move(headers)) {}

  const std::vector<std::string>& headers() const { return headers_; }
  int column_count() const { return static_cast<int>(headers_.size()); }
  std::size_t row_count() const { return times_.size(); }
  /// Column index by exact header ("k_main.current [A]") or by its name without the unit ("k_main.current");
  /// -1 when absent.
  int column(const std::string& name) const;

  /// Room for `rows` rows without reallocation (a run records about one row per solver step).
  void reserve(std::size_t rows);
  /// Drops every row and takes new headers, keeping the storage (a study reuses one store per worker).
  void restart(std::vector<std::string> headers);
  void add_row(double time, const std::vector<double>& values);
  /// Drops rows after `time` (used when the solver steps back to apply a decision it sampled in a step).
  void truncate_after(double time);

  double time(std::size_t row) const { return times_[row]; }
  double value(std::size_t row, int column) const { return values_[row * headers_.size() + column]; }
  const std::vector<double>& times() const { return times_; }
  /// A copy of one column.
  std::vector<double> series(int column) const;

 private:
  std::vector<std::string> headers_;
  std::vector<double> times_;
  std::vector<double> values_;  // row-major
};

}  // namespace linkrise::solver
