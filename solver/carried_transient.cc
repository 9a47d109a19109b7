#include "solver/carried_transient.h"

#include <cmath>
#include <limits>

namespace linkrise::solver {
namespace {

// The row grid: `even_rows` rows `first_row_` apart, then each `growth` times further from the start.
constexpr double even_rows = 10.0;
constexpr double growth = 1.05;

// (e^{z} − 1)/z · τ for z = λ·τ, without cancellation for small |z| (its series to z³, error below 1e-16 there).
std::complex<double> integral_of_exponential(std::complex<double> rate, double elapsed) {
  const std::complex<double> z = rate * elapsed;
  if (std::abs(z) < 1e-4) return elapsed * (1.0 + z * (0.5 + z * (1.0 / 6.0 + z / 24.0)));
  return (std::exp(z) - 1.0) / rate;
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
  std::vector<int> carried;
  for (int k = 0; k < size_; ++k) {
    if (eigen.eigenvalues()[k].real() * longest_time < -1.0 && std::abs(modal[k]) > 0.0) carried.push_back(k);
  }
  modes_ = static_cast<int>(carried.size());
  rates_.resize(modes_);
  shares_.resize(size_, modes_);
  for (int m = 0; m < modes_; ++m) {
    rates_[m] = eigen.eigenvalues()[carried[m]];
    shares_.col(m) = vectors.col(carried[m]) * modal[carried[m]];
  }
  weights_.resize(modes_);
  if (!shares_.allFinite()) modes_ = 0;
  if (modes_ == 0) return;
  shortest_ = 1.0 / rates_.real().cwiseAbs().maxCoeff();
  longest_ = 1.0 / rates_.real().cwiseAbs().minCoeff();
  double fastest_seen = 0.0, slowest_seen = std::numeric_limits<double>::infinity();
  for (int m = 0; m < modes_; ++m) {
    const double excursion = (shares_.col(m) / rates_[m]).cwiseAbs().cwiseQuotient(tolerances).maxCoeff();
    if (!(excursion > 1.0)) continue;
    fastest_seen = std::max(fastest_seen, -rates_[m].real());
    slowest_seen = std::min(slowest_seen, -rates_[m].real());
  }
  if (fastest_seen > 0.0) {
    first_row_ = 0.02 / fastest_seen;
    last_row_ = 20.0 / slowest_seen;
  }
}

double CarriedTransient::row_after(double time) const {
  const double elapsed = time - start_;
  if (!(last_row_ >= first_row_) || elapsed >= last_row_) return std::numeric_limits<double>::infinity();
  // Rows k·first for k = 1 … 10, then 10·first·1.05^j: a fixed grid, so rows stay evenly spaced whatever the steps.
  double next = 0.0;
  if (elapsed < even_rows * first_row_) {
    next = first_row_ * (std::floor(std::max(elapsed, 0.0) / first_row_) + 1.0);
  } else {
    next = even_rows * first_row_ *
           std::pow(growth, std::floor(std::log(elapsed / (even_rows * first_row_)) / std::log(growth)) + 1.0);
  }
  // Strictly later in absolute time, whatever the rounding.
  while (start_ + next <= time) next = next < even_rows * first_row_ ? next + first_row_ : next * growth;
  return next > last_row_ ? std::numeric_limits<double>::infinity() : start_ + next;
}

double CarriedTransient::row_spacing(double row) const {
  const double elapsed = row - start_;
  return elapsed <= even_rows * first_row_ * (1.0 + 1e-12) ? first_row_ : elapsed * (1.0 - 1.0 / growth);
}

void CarriedTransient::add_final_offset(double* values) const {
  if (modes_ == 0) return;
  for (int m = 0; m < modes_; ++m) weights_[m] = -1.0 / rates_[m];
  const Eigen::VectorXd offset = (shares_ * weights_).real();
  for (int i = 0; i < size_; ++i) values[i] += offset[i];
}

void CarriedTransient::add_offset(double time, double* values) const {
  if (modes_ == 0) return;
  const double elapsed = time - start_;
  for (int m = 0; m < modes_; ++m) weights_[m] = integral_of_exponential(rates_[m], elapsed);
  const Eigen::VectorXd offset = (shares_ * weights_).real();
  for (int i = 0; i < size_; ++i) values[i] += offset[i];
}

void CarriedTransient::subtract_rate(double time, double* values) const {
  if (modes_ == 0) return;
  const double elapsed = time - start_;
  for (int m = 0; m < modes_; ++m) weights_[m] = std::exp(rates_[m] * elapsed);
  const Eigen::VectorXd rate = (shares_ * weights_).real();
  for (int i = 0; i < size_; ++i) values[i] -= rate[i];
}

}  // namespace linkrise::solver
