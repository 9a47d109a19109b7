#include "solver/carried_transient.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace linkrise::solver {
namespace {

// The row grid: `even_rows` rows `first_row_` apart, then each `growth` times further from the start.
constexpr int even_rows = 10;
constexpr double growth = 1.05;
// Past this many of the slowest carried time constants the offset is its final value to double precision
// (e^-40 = 4e-18).
constexpr double decay_lengths = 40.0;

// (e^{z} − 1)/z · τ for z = λ·τ (`inverse` = 1/λ), without cancellation for small |z| (its series to z³, error
// below 1e-16 there).
std::complex<double> integral_of_exponential(std::complex<double> rate, std::complex<double> inverse,
                                             double elapsed) {
  const std::complex<double> z = rate * elapsed;
  if (std::norm(z) < 1e-8) return elapsed * (1.0 + z * (0.5 + z * (1.0 / 6.0 + z / 24.0)));
  return (std::exp(z) - 1.0) * inverse;
}

// The modes worth carrying: the fastest decaying ones, when they are a cluster apart from every other mode — the
// slowest carried decays `gap` times faster than the fastest of the rest moves (|λ|: growing, ringing and
// integrating modes too) — and fast against the run (its slowest time constant at most `share` of it). Such a
// cluster is what BDF would restart into and resolve step by step (the main-closure inrush against a link's
// charge and a pack's polarisation); a mode among the run's main dynamics (a pre-charge's R·C) is resolved at
// little cost anyway, and carrying it would keep the per-step overhead on for the whole run.
std::vector<int> fast_cluster(const Eigen::VectorXcd& eigenvalues, const Eigen::VectorXcd& modal, double longest_time) {
  constexpr double gap = 100.0, share = 0.01;
  const int n = static_cast<int>(eigenvalues.size());
  std::vector<int> order(n);
  for (int k = 0; k < n; ++k) order[k] = k;
  std::stable_sort(order.begin(), order.end(),
                   [&](int a, int b) { return eigenvalues[a].real() < eigenvalues[b].real(); });
  for (int m = 1; m <= n; ++m) {
    const double slowest_carried = -eigenvalues[order[m - 1]].real();
    if (!(slowest_carried * share * longest_time > 1.0)) break;
    double fastest_rest = 0.0;
    for (int k = m; k < n; ++k) fastest_rest = std::max(fastest_rest, std::abs(eigenvalues[order[k]]));
    if (slowest_carried < gap * fastest_rest) continue;
    std::vector<int> carried;
    for (int k = 0; k < m; ++k) {
      if (std::abs(modal[order[k]]) > 0.0) carried.push_back(order[k]);
    }
    return carried;
  }
  return {};
}

}  // namespace

CarriedTransient::CarriedTransient(const Eigen::MatrixXd& jacobian, const Eigen::VectorXd& rates, double start,
                                   double longest_time, const Eigen::VectorXd& tolerances)
    : size_(static_cast<int>(jacobian.rows())), start_(start) {
  if (size_ == 0 || !jacobian.allFinite() || !rates.allFinite()) return;
  Eigen::EigenSolver<Eigen::MatrixXd> eigen(jacobian, true);
  if (eigen.info() != Eigen::Success) return;
  const Eigen::MatrixXcd vectors = eigen.eigenvectors();
  const auto lu = vectors.partialPivLu();
  if (!(lu.rcond() > 1e-9)) return;
  const Eigen::VectorXcd modal = lu.solve(rates.cast<std::complex<double>>());
  const std::vector<int> carried = fast_cluster(eigen.eigenvalues(), modal, longest_time);
  modes_ = static_cast<int>(carried.size());
  rates_.resize(modes_);
  shares_.resize(size_, modes_);
  for (int m = 0; m < modes_; ++m) {
    rates_[m] = eigen.eigenvalues()[carried[m]];
    shares_.col(m) = vectors.col(carried[m]) * modal[carried[m]];
  }
  weights_.resize(modes_);
  inverse_rates_ = rates_.cwiseInverse();
  offset_.resize(size_);
  final_offset_ = -(shares_ * inverse_rates_).real();
  if (!shares_.allFinite()) modes_ = 0;
  if (modes_ == 0) return;
  shortest_ = 1.0 / rates_.real().cwiseAbs().maxCoeff();
  longest_ = 1.0 / rates_.real().cwiseAbs().minCoeff();
  decayed_after_ = decay_lengths * longest_;
  double fastest_seen = 0.0, slowest_seen = std::numeric_limits<double>::infinity();
  for (int m = 0; m < modes_; ++m) {
    const double excursion = (shares_.col(m) / rates_[m]).cwiseAbs().cwiseQuotient(tolerances).maxCoeff();
    if (!(excursion > 1.0)) continue;
    fastest_seen = std::max(fastest_seen, -rates_[m].real());
    slowest_seen = std::min(slowest_seen, -rates_[m].real());
    const double frequency = std::fabs(rates_[m].imag());
    if (frequency > 0.0) {
      period_ = std::min(period_, 2.0 * M_PI / frequency);
      ringing_until_ = std::max(ringing_until_, 20.0 / -rates_[m].real());
    }
  }
  if (fastest_seen > 0.0) place_rows(0.02 / fastest_seen, 20.0 / slowest_seen);
}

// Ten rows `first` apart, then each 5 % further from the start than the last, but no further apart than 1/20 of
// the shortest excited period while a ringing mode is excited; up to `last` (s after the start).
void CarriedTransient::place_rows(double first, double last) {
  constexpr std::size_t most_rows = 1000000;  // a ringing of Q about 15 000 would need more: the rest unplaced
  double elapsed = ringing_until_ > 0.0 ? std::min(first, period_ / 20.0) : first;
  for (int k = 0; elapsed <= last && rows_.size() < most_rows; ++k) {
    rows_.push_back(elapsed);
    double spacing = k + 1 < even_rows ? first : elapsed * (growth - 1.0);
    if (elapsed < ringing_until_) spacing = std::min(spacing, period_ / 20.0);
    elapsed += spacing;
  }
}

double CarriedTransient::step_limit(double time) const {
  return time - start_ < ringing_until_ ? period_ / 8.0 : std::numeric_limits<double>::infinity();
}

double CarriedTransient::row_after(double time) const {
  // The first row strictly later in absolute time, whatever the rounding of start + elapsed.
  auto row = std::upper_bound(rows_.begin(), rows_.end(), time - start_);
  while (row != rows_.end() && start_ + *row <= time) ++row;
  return row == rows_.end() ? std::numeric_limits<double>::infinity() : start_ + *row;
}

double CarriedTransient::row_spacing(double row) const {
  if (rows_.empty()) return 0.0;
  // The grid row nearest to `row` (start + elapsed rounds), then the interval before it.
  const double elapsed = row - start_;
  auto at = std::lower_bound(rows_.begin(), rows_.end(), elapsed);
  if (at == rows_.end() || (at != rows_.begin() && elapsed - *(at - 1) < *at - elapsed)) --at;
  return at == rows_.begin() ? *at : *at - *(at - 1);
}

void CarriedTransient::add_final_offset(double* values) const {
  if (modes_ == 0) return;
  for (int i = 0; i < size_; ++i) values[i] += final_offset_[i];
}

void CarriedTransient::add_offset(double time, double* values) const {
  if (modes_ == 0) return;
  const double elapsed = time - start_;
  if (elapsed > decayed_after_) {
    add_final_offset(values);
    return;
  }
  for (int m = 0; m < modes_; ++m) weights_[m] = integral_of_exponential(rates_[m], inverse_rates_[m], elapsed);
  offset_.noalias() = shares_ * weights_;
  for (int i = 0; i < size_; ++i) values[i] += offset_[i].real();
}

void CarriedTransient::subtract_rate(double time, double* values) const {
  if (modes_ == 0) return;
  const double elapsed = time - start_;
  if (elapsed > decayed_after_) return;
  for (int m = 0; m < modes_; ++m) weights_[m] = std::exp(rates_[m] * elapsed);
  offset_.noalias() = shares_ * weights_;
  for (int i = 0; i < size_; ++i) values[i] -= offset_[i].real();
}

}  // namespace linkrise::solver
