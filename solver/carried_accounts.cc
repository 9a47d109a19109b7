#include "solver/carried_accounts.h"

#include <algorithm>

namespace linkrise::solver {
namespace {
constexpr int gauss_points = 8;
}  // namespace

CarriedAccounts::CarriedAccounts(const Circuit& circuit)
    : circuit_(circuit),
      equations_(circuit),
      table_(gsl_integration_glfixed_table_alloc(gauss_points), gsl_integration_glfixed_table_free) {}

bool CarriedAccounts::start(const CarriedTransient& transient, const double* origin, const int* modes,
                            const double* guess) {
  active_ = false;
  if (!transient.active() || !table_) return false;
  transient_ = &transient;
  const int n = circuit_.part_state_count();
  modes_.assign(modes, modes + circuit_.mode_count());
  origin_.assign(origin, origin + n);
  states_.resize(n);
  unknowns_.assign(guess, guess + circuit_.unknown_count());
  rate_.resize(circuit_.quadrature_count());
  final_rates_.resize(circuit_.quadrature_count());
  end_ = transient.final_time();
  tabulated_ = false;
  states_ = origin_;
  transient.add_final_offset(states_.data());
  if (!rates_at_states(end_, states_.data(), final_rates_.data())) return false;
  active_ = true;
  return true;
}

bool CarriedAccounts::rates_at_states(double time, const double* states, double* out) {
  if (!equations_.solve_network(time, states, modes_.data(), unknowns_.data())) return false;
  equations_.account_rates(time, states, modes_.data(), unknowns_.data(), out);
  return true;
}

bool CarriedAccounts::rates(double time, double* out) {
  if (time >= end_) {
    std::copy(final_rates_.begin(), final_rates_.end(), out);
    return true;
  }
  std::copy(origin_.begin(), origin_.end(), states_.begin());
  transient_->add_offset(time, states_.data());
  return rates_at_states(time, states_.data(), out);
}

// ∫ (q(x_lin) − q∞) over one panel [a, b] by the fixed Gauss–Legendre rule, added to `sum`.
bool CarriedAccounts::add_panel(double a, double b, std::vector<double>& sum) {
  for (int g = 0; g < gauss_points; ++g) {
    double node = 0.0, weight = 0.0;
    gsl_integration_glfixed_point(a, b, static_cast<std::size_t>(g), &node, &weight, table_.get());
    if (!rates(node, rate_.data())) return false;
    for (std::size_t k = 0; k < sum.size(); ++k) sum[k] += weight * (rate_[k] - final_rates_[k]);
  }
  return true;
}

// The panels' edges and the integral up to each, once per transient: each later read integrates only the part
// of one panel up to its time.
bool CarriedAccounts::tabulate() {
  const double start = transient_->start();
  edges_.assign(1, start);
  sums_.assign(1, std::vector<double>(final_rates_.size(), 0.0));
  for (double length = 0.1 * transient_->shortest_time(); edges_.back() < end_; length *= 2.0) {
    const double b = std::min(edges_.back() + length, end_);
    std::vector<double> sum = sums_.back();
    if (!add_panel(edges_.back(), b, sum)) return false;
    edges_.push_back(b);
    sums_.push_back(std::move(sum));
  }
  tabulated_ = true;
  return true;
}

bool CarriedAccounts::integral(double time, double* out) {
  if (!tabulated_ && !tabulate()) return false;
  const double start = transient_->start();
  const std::size_t count = final_rates_.size();
  const double until = std::min(time, end_);
  // The last panel edge at or before `until`, then the rest of its panel.
  std::size_t panel = static_cast<std::size_t>(std::upper_bound(edges_.begin(), edges_.end(), until) - edges_.begin());
  panel = panel == 0 ? 0 : panel - 1;
  std::vector<double> sum = sums_[panel];
  if (until > edges_[panel] && !add_panel(edges_[panel], until, sum)) return false;
  for (std::size_t k = 0; k < count; ++k) out[k] = sum[k] + final_rates_[k] * (time - start);
  return true;
}

}  // namespace linkrise::solver
