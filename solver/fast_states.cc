#include "solver/fast_states.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

namespace linkrise::solver {
namespace {

// The rows × columns sub-matrix (Eigen's indexed view, copied).
Eigen::MatrixXd block(const Eigen::MatrixXd& matrix, const std::vector<int>& rows, const std::vector<int>& columns) {
  return matrix(rows, columns);
}

// Largest modulus of a square matrix's eigenvalues (0 for an empty matrix).
double fastest_rate(const Eigen::MatrixXd& matrix) {
  if (matrix.rows() == 0) return 0.0;
  Eigen::EigenSolver<Eigen::MatrixXd> solver(matrix, false);
  if (solver.info() != Eigen::Success) return std::numeric_limits<double>::infinity();
  return solver.eigenvalues().cwiseAbs().maxCoeff();
}

// Slowest decay rate of the fast block, or 0 when one of its eigenvalues is not real and negative.
double slowest_fast_rate(const Eigen::MatrixXd& fast) {
  Eigen::EigenSolver<Eigen::MatrixXd> solver(fast, false);
  if (solver.info() != Eigen::Success) return 0.0;
  double slowest = std::numeric_limits<double>::infinity();
  for (const auto& lambda : solver.eigenvalues()) {
    if (lambda.real() >= 0.0 || std::fabs(lambda.imag()) > 1e-9 * std::abs(lambda)) return 0.0;
    slowest = std::min(slowest, -lambda.real());
  }
  return slowest;
}

// Bounds on the eigenvalues alone that show a split fails, so that the two eigenvalue problems
// (more than half of a settling's instructions, measured on the reference case) are not needed. The split needs
// slowest fast rate ≥ 1/(ratio·longest_time) and fastest slow rate ≤ ratio·slowest fast rate. Bounds that hold
// for any matrix: the smallest |λ| of the fast block is at most the geometric mean |det|^(1/m) of its m
// eigenvalues; the largest |λ| of the Schur complement is at least their geometric mean and their mean |trace|/k.
// A failure the bounds miss is found by the eigenvalues as before, so the split chosen is the same.
// The bounds are applied with a factor of two to spare, for their rounding. The first needs only the fast block's
// LU, so the Schur complement is formed only where it passes.
double fast_rate_bound(double fast_determinant, int fast_count) {
  return std::pow(std::fabs(fast_determinant), 1.0 / fast_count);
}

bool too_slow_to_settle(double fast_bound, double ratio, double longest_time) {
  return std::isfinite(fast_bound) && 2.0 * fast_bound * ratio * longest_time < 1.0;
}

bool slow_part_too_fast(double fast_bound, const Eigen::MatrixXd& schur, double ratio) {
  if (!std::isfinite(fast_bound)) return false;
  const double count = static_cast<double>(schur.rows());
  const double slow_bound =
      std::max(std::fabs(schur.trace()) / count, std::pow(std::fabs(schur.determinant()), 1.0 / count));
  return std::isfinite(slow_bound) && slow_bound > 2.0 * ratio * fast_bound;
}

}  // namespace

FastSplit split_fast_states(const Eigen::MatrixXd& jacobian, double ratio, double longest_time) {
  const int n = static_cast<int>(jacobian.rows());
  std::vector<int> order;
  for (int i = 0; i < n; ++i)
    if (jacobian(i, i) < 0.0) order.push_back(i);
  std::stable_sort(order.begin(), order.end(), [&](int a, int b) { return jacobian(a, a) < jacobian(b, b); });
  FastSplit best;
  // Every set but the whole: at least one slow state carries the run on.
  for (std::size_t m = 1; m <= order.size() && static_cast<int>(m) < n; ++m) {
    std::vector<int> fast(order.begin(), order.begin() + static_cast<long>(m));
    std::vector<int> slow;
    for (int i = 0; i < n; ++i)
      if (std::find(fast.begin(), fast.end(), i) == fast.end()) slow.push_back(i);
    const Eigen::MatrixXd fast_block = block(jacobian, fast, fast);
    const auto fast_lu = fast_block.partialPivLu();
    const double fast_bound = fast_rate_bound(fast_lu.determinant(), static_cast<int>(m));
    if (too_slow_to_settle(fast_bound, ratio, longest_time)) continue;
    const Eigen::MatrixXd schur =
        block(jacobian, slow, slow) - block(jacobian, slow, fast) * fast_lu.solve(block(jacobian, fast, slow));
    if (slow_part_too_fast(fast_bound, schur, ratio)) continue;
    const double fast_rate = slowest_fast_rate(fast_block);
    if (fast_rate <= 0.0) continue;
    const double slow_time = std::min(longest_time, 1.0 / fastest_rate(schur));
    const double fast_time = 1.0 / fast_rate;
    if (fast_time <= ratio * slow_time) best = FastSplit{fast, slow, fast_time, slow_time};
  }
  return best;
}

namespace {

// Newton on the fast states' rates with the slow states held, towards the slow manifold to first order: the
// fast states do not stand still there but follow their quasi-steady value as the slow states move,
// ẋ_F = −J_FF⁻¹·J_FS·ẋ_S (zero rates instead would leave a transient of size τ_F/τ_S that BDF resolves in
// tiny steps). True when it converged.
bool quasi_steady(Equations& equations, double time, double* states, const int* modes, double* unknowns,
                  const std::vector<int>& fast, const std::vector<int>& slow, Eigen::MatrixXd& jacobian,
                  Eigen::VectorXd& rates) {
  for (int iteration = 0; iteration < 12; ++iteration) {
    if (!equations.solve_network(time, states, modes, unknowns)) return false;
    equations.jacobian(time, states, modes, unknowns, jacobian.data());
    equations.state_rates(time, states, modes, unknowns, rates.data());
    const auto fast_block = block(jacobian, fast, fast).partialPivLu();
    Eigen::VectorXd fast_rates(fast.size()), slow_rates(slow.size());
    for (std::size_t k = 0; k < fast.size(); ++k) fast_rates[k] = rates[fast[k]];
    for (std::size_t k = 0; k < slow.size(); ++k) slow_rates[k] = rates[slow[k]];
    const Eigen::VectorXd following = -fast_block.solve(block(jacobian, fast, slow) * slow_rates);
    const Eigen::VectorXd step = -fast_block.solve(fast_rates - following);
    if (!step.allFinite()) return false;
    bool small = true;
    for (std::size_t k = 0; k < fast.size(); ++k) {
      double& x = states[fast[k]];
      if (std::fabs(step[k]) > 1e-12 * std::fabs(x) + 1e-300) small = false;
      x += step[k];
    }
    if (small) return equations.solve_network(time, states, modes, unknowns);
  }
  return false;
}

// Account rates at a point (network solved into `unknowns`); false when the network has no solution.
bool account_rates_at(Equations& equations, double time, const double* states, const int* modes, double* unknowns,
                      std::vector<double>& out) {
  if (!equations.solve_network(time, states, modes, unknowns)) return false;
  out.resize(equations.circuit().quadrature_count());
  equations.account_rates(time, states, modes, unknowns, out.data());
  return true;
}

// ∫0^∞ [q(x(t)) − q(x_settled)] dt along the skipped transient, by 4-point Gauss–Legendre on intervals
// [0, τ_min/4], then growing fourfold up to 64·τ_max (the transient is e^-64 of its start there).
bool integrate_skipped(Equations& equations, double time, const double* settled, const int* modes, double* unknowns,
                       const SkippedTransient& transient, std::vector<double>& skipped) {
  static const double nodes[4] = {-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526};
  static const double weights[4] = {0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538};
  std::vector<double> reference, rate, point(equations.circuit().part_state_count());
  if (!account_rates_at(equations, time, settled, modes, unknowns, reference)) return false;
  skipped.assign(reference.size(), 0.0);
  const double end_all = 64.0 * transient.longest_time();
  for (double start = 0.0, end = 0.25 * transient.shortest_time(); start < end_all; start = end, end *= 4.0) {
    for (int g = 0; g < 4; ++g) {
      transient.states_at(0.5 * (start + end) + 0.5 * (end - start) * nodes[g], point.data());
      if (!account_rates_at(equations, time, point.data(), modes, unknowns, rate)) return false;
      for (std::size_t a = 0; a < rate.size(); ++a) skipped[a] += 0.5 * (end - start) * weights[g] * (rate[a] - reference[a]);
    }
  }
  return account_rates_at(equations, time, settled, modes, unknowns, rate);
}

}  // namespace

SkippedTransient::SkippedTransient(const Eigen::MatrixXd& jacobian, const FastSplit& split, const double* before,
                                   const double* settled)
    : fast_(split.fast), slow_(split.slow), settled_(settled, settled + jacobian.rows()) {
  const Eigen::MatrixXd fast_block = block(jacobian, fast_, fast_);
  Eigen::EigenSolver<Eigen::MatrixXd> eigen(fast_block, true);
  if (eigen.info() != Eigen::Success) return;
  vectors_ = eigen.eigenvectors().real();
  rates_ = eigen.eigenvalues().real();
  Eigen::VectorXd distance(fast_.size());
  for (std::size_t k = 0; k < fast_.size(); ++k) distance[k] = before[fast_[k]] - settled[fast_[k]];
  modal_ = vectors_.partialPivLu().solve(distance);
  slow_share_ = block(jacobian, slow_, fast_) * fast_block.partialPivLu().inverse();
  shortest_ = 1.0 / rates_.cwiseAbs().maxCoeff();
  longest_ = 1.0 / rates_.cwiseAbs().minCoeff();
  valid_ = modal_.allFinite() && slow_share_.allFinite();
}

void SkippedTransient::states_at(double elapsed, double* out) const {
  std::copy(settled_.begin(), settled_.end(), out);
  const Eigen::VectorXd left = vectors_ * (modal_.array() * (rates_.array() * elapsed).exp()).matrix();
  for (std::size_t k = 0; k < fast_.size(); ++k) out[fast_[k]] += left[k];
  const Eigen::VectorXd lag = slow_share_ * left;
  for (std::size_t k = 0; k < slow_.size(); ++k) out[slow_[k]] += lag[k];
}

SettleResult settle_fast_states(Equations& equations, double time, double* states, const int* modes,
                                double* unknowns, const FastSettling& settings) {
  SettleResult result;
  const int n = equations.circuit().part_state_count();
  if (n < 2) return result;
  Eigen::MatrixXd jacobian(n, n);
  Eigen::VectorXd rates(n);
  if (!equations.solve_network(time, states, modes, unknowns)) return result;
  equations.jacobian(time, states, modes, unknowns, jacobian.data());
  result.split = split_fast_states(jacobian, settings.ratio, settings.longest_time);
  const auto& fast = result.split.fast;
  if (fast.empty()) return result;
  const std::vector<double> before(states, states + n);
  const Eigen::MatrixXd at_switch = jacobian;
  if (!quasi_steady(equations, time, states, modes, unknowns, fast, result.split.slow, jacobian, rates)) {
    std::copy(before.begin(), before.end(), states);
    return result;
  }
  // The slow states' share of the skipped transient, to first order: −J_SF·J_FF⁻¹·δ.
  const auto& slow = result.split.slow;
  Eigen::VectorXd distance(fast.size());
  for (std::size_t k = 0; k < fast.size(); ++k) distance[k] = before[fast[k]] - states[fast[k]];
  const Eigen::VectorXd correction =
      -block(at_switch, slow, fast) * block(at_switch, fast, fast).partialPivLu().solve(distance);
  for (std::size_t k = 0; k < slow.size(); ++k) states[slow[k]] += correction[k];
  if (!quasi_steady(equations, time, states, modes, unknowns, fast, result.split.slow, jacobian, rates)) {
    std::copy(before.begin(), before.end(), states);
    return result;
  }
  result.transient = SkippedTransient(at_switch, result.split, before.data(), states);
  if (!result.transient.valid() ||
      !integrate_skipped(equations, time, states, modes, unknowns, result.transient, result.skipped_accounts)) {
    std::copy(before.begin(), before.end(), states);
    return result;
  }
  result.settled = true;
  return result;
}

}  // namespace linkrise::solver
