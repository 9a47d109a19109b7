#include "solver/equations.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace linkrise::solver {

Equations::Equations(const Circuit& circuit)
    : circuit_(circuit),
      unknowns_(circuit.unknown_count()),
      states_(circuit.part_state_count()),
      network_(unknowns_),
      network_by_unknown_(unknowns_, unknowns_),
      network_by_state_(unknowns_, std::max(states_, 1)),
      rate_(std::max(states_, 1)),
      rate_by_state_(std::max(states_, 1), std::max(states_, 1)),
      rate_by_unknown_(std::max(states_, 1), unknowns_),
      factor_(unknowns_),
      step_(unknowns_),
      guess_(unknowns_),
      start_(unknowns_),
      nodes_(static_cast<int>(circuit.node_names().size())),
      sensitivity_(unknowns_, std::max(states_, 1)),
      state_change_(std::max(states_, 1)),
      predicted_change_(unknowns_) {}

models::Point Equations::point(double time, const double* states, const int* modes, const double* unknowns) const {
  models::Point p;
  p.time = time;
  p.states = states;
  p.unknowns = unknowns;
  p.modes = modes;
  p.ambient = circuit_.spec().ambient;
  return p;
}

void Equations::assemble(const models::Point& point, bool derivatives) {
  network_.setZero();
  rate_.setZero();
  models::Stamp::Storage storage;
  storage.network = network_.data();
  storage.rate = rate_.data();
  storage.unknowns = unknowns_;
  storage.states = states_;
  if (derivatives) {
    network_by_unknown_.setZero();
    network_by_state_.setZero();
    rate_by_state_.setZero();
    rate_by_unknown_.setZero();
    storage.network_by_unknown = network_by_unknown_.data();
    storage.network_by_state = network_by_state_.data();
    storage.rate_by_state = rate_by_state_.data();
    storage.rate_by_unknown = rate_by_unknown_.data();
  }
  models::Stamp stamp(storage);
  for (int p = 0; p < circuit_.part_count(); ++p) circuit_.part(p).stamp(point, circuit_.layout(p), stamp);
}

bool Equations::solve_network(double time, const double* states, const int* modes, double* unknowns) {
  const int mode_total = circuit_.mode_count();
  if (cache_valid_ && time == cache_time_ && std::equal(states, states + states_, cache_states_.begin()) &&
      std::equal(modes, modes + mode_total, cache_modes_.begin())) {
    std::copy(cache_unknowns_.begin(), cache_unknowns_.end(), unknowns);
    return true;
  }
  if (cache_valid_ && sensitivity_valid_ && states_ > 0 &&
      std::equal(modes, modes + mode_total, sensitivity_modes_.begin()) &&
      std::equal(modes, modes + mode_total, cache_modes_.begin())) {
    for (int j = 0; j < states_; ++j) state_change_[j] = states[j] - cache_states_[j];
    Eigen::Map<Eigen::VectorXd> y(unknowns, unknowns_);
    predicted_change_.noalias() = sensitivity_ * state_change_;
    y = Eigen::Map<const Eigen::VectorXd>(cache_unknowns_.data(), unknowns_) + predicted_change_;
  }
  bool solved = solve_network_chord(time, states, modes, unknowns) ||
                solve_network_uncached(time, states, modes, unknowns);
  cache_valid_ = solved;
  if (solved) {
    cache_time_ = time;
    cache_states_.assign(states, states + states_);
    cache_modes_.assign(modes, modes + mode_total);
    cache_unknowns_.assign(unknowns, unknowns + unknowns_);
  }
  return solved;
}

void Equations::remember_factor(const int* modes) {
  inverse_valid_ = false;  // taken when a chord step first needs it: many factorisations never see one
  factor_valid_ = true;
  contraction_ = -1.0;
  factor_modes_.assign(modes, modes + circuit_.mode_count());
}

bool Equations::solve_network_chord(double time, const double* states, const int* modes, double* unknowns) {
  if (!factor_valid_ || !std::equal(modes, modes + circuit_.mode_count(), factor_modes_.begin())) return false;
  if (!inverse_valid_) {
    chord_inverse_ = factor_.inverse();
    inverse_valid_ = true;
  }
  Eigen::Map<Eigen::VectorXd> y(unknowns, unknowns_);
  guess_ = y;
  const int nodes = nodes_;
  double previous = std::numeric_limits<double>::infinity();
  for (int iteration = 0; iteration < 8; ++iteration) {
    assemble(point(time, states, modes, unknowns), false);
    if (!network_.allFinite()) break;
    step_.noalias() = chord_inverse_ * network_;
    if (!step_.allFinite()) break;
    ++newton_iterations_;
    y -= step_;  // the chord step is −(dG/dy)⁻¹·G
    double voltage_scale = 0.0, current_scale = 0.0;
    for (int i = 0; i < unknowns_; ++i) {
      double& scale = i < nodes ? voltage_scale : current_scale;
      scale = std::max(scale, std::fabs(y[i]));
    }
    // A chord iteration converges only linearly, so its stop is stricter than Newton's. The error left after
    // a step is at most rate/(1 - rate) times that step, with the contraction rate measured earlier on this
    // LU; a step of the size of the stop alone also ends it.
    double size = step_.norm();
    if (iteration > 0 && previous > 0.0) contraction_ = std::max(contraction_, size / previous);
    // The first step is judged as it is: a rate measured at other states says nothing of an LU that these states
    // have made stale (a contact's parting ramp moves its conductance by decades between calls).
    const double left = iteration > 0 && contraction_ >= 0.0 && contraction_ < 0.5
                            ? contraction_ / (1.0 - contraction_)
                            : 1.0;
    bool small = true;
    for (int i = 0; i < unknowns_; ++i) {
      double scale = i < nodes ? voltage_scale : current_scale;
      if (left * std::fabs(step_[i]) > 1e-14 * scale + 1e-16) small = false;
    }
    if (small) return true;
    if (size > 0.25 * previous) break;  // converging too slowly: refactorise
    previous = size;
  }
  y = guess_;
  return false;
}

bool Equations::solve_network_uncached(double time, const double* states, const int* modes, double* unknowns) {
  Eigen::Map<Eigen::VectorXd> y(unknowns, unknowns_);
  const bool linear = circuit_.linear_network();
  const int nodes = nodes_;
  // Damped Newton first. A line search on residuals of mixed units can stall: with a capacitor pinning a node
  // above a constant-power load's resistive floor, each damped step creeps towards the floor's kink and stops
  // short. Plain Newton from the same guess then lands on the pinned voltage at once.
  guess_ = y;
  for (int attempt = 0; attempt < 2; ++attempt) {
  const bool damped = attempt == 0;
  if (!damped) y = guess_;
  for (int iteration = 0; iteration < 60; ++iteration) {
    assemble(point(time, states, modes, unknowns), true);
    if (!network_.allFinite() || !network_by_unknown_.allFinite()) return false;
    factor_.compute(network_by_unknown_);
    remember_factor(modes);
    step_ = factor_.solve(-network_);
    if (!step_.allFinite()) return false;
    ++newton_iterations_;
    if (linear) {
      y += step_;
      return true;
    }
    // Voltages and currents are scaled apart because conductances in one circuit span more than ten decades.
    double voltage_scale = 0.0, current_scale = 0.0;
    for (int i = 0; i < unknowns_; ++i) {
      double& scale = i < nodes ? voltage_scale : current_scale;
      scale = std::max(scale, std::fabs(y[i]) + std::fabs(step_[i]));
    }
    bool small = true;
    bool large = false;
    for (int i = 0; i < unknowns_; ++i) {
      double size = i < nodes ? voltage_scale : current_scale;
      double magnitude = std::fabs(step_[i]);
      if (magnitude > 1e-8 * size + 1e-12) small = false;
      if (magnitude > 0.1 * size + 1.0) large = true;
    }
    if (large && damped) {
      // A long step (cold start, diode knee, constant power at low voltage): damp it until the residual falls.
      double before = network_.norm();
      start_ = y;
      double fraction = 1.0;
      for (int halving = 0; halving < 12; ++halving) {
        y = start_ + fraction * step_;
        assemble(point(time, states, modes, unknowns), false);
        if (network_.allFinite() && network_.norm() < before) break;
        fraction *= 0.5;
      }
      continue;
    }
    y += step_;
    // Newton converges quadratically: after a step this small the remaining error is far below it.
    if (small) return true;
  }
  }
  return false;
}

void Equations::rates(double time, const double* states, const int* modes, const double* unknowns, double* rates) {
  state_rates(time, states, modes, unknowns, rates);
  account_rates(time, states, modes, unknowns, rates + states_);
}

void Equations::state_rates(double time, const double* states, const int* modes, const double* unknowns,
                            double* rates) {
  assemble(point(time, states, modes, unknowns), false);
  for (int i = 0; i < states_; ++i) rates[i] = rate_[i];
}

void Equations::account_rates(double time, const double* states, const int* modes, const double* unknowns,
                              double* rates) {
  models::Point p = point(time, states, modes, unknowns);
  const auto& accounts = circuit_.energy_accounts();
  int last_part = -1;
  models::Powers powers;
  for (std::size_t a = 0; a < accounts.size(); ++a) {
    if (accounts[a].part != last_part) {
      last_part = accounts[a].part;
      powers = circuit_.part(last_part).powers(p, circuit_.layout(last_part));
    }
    rates[a] = powers.of(accounts[a].channel);
  }
  const auto& squared = circuit_.current_squared_parts();
  for (std::size_t k = 0; k < squared.size(); ++k) {
    const double current = circuit_.part(squared[k]).current(p, circuit_.layout(squared[k]));
    rates[accounts.size() + k] = current * current;
  }
}

void Equations::jacobian(double time, const double* states, const int* modes, const double* unknowns,
                         double* matrix) {
  if (states_ == 0) return;
  Eigen::Map<Eigen::MatrixXd> jacobian(matrix, states_, states_);
  assemble(point(time, states, modes, unknowns), true);
  factor_.compute(network_by_unknown_);
  remember_factor(modes);
  sensitivity_ = -factor_.solve(network_by_state_.leftCols(states_));
  sensitivity_valid_ = true;
  sensitivity_modes_.assign(modes, modes + circuit_.mode_count());
  jacobian = rate_by_state_ + rate_by_unknown_ * sensitivity_;
}

}  // namespace linkrise::solver
