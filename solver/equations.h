#pragma once
// The circuit's equations at one point: the network solve y(x) (chord iterations on the last LU, then Newton
// with a fresh LU when needed), the state rates f(x, y(x)),
// the energy-account rates, and the analytic Jacobian of the reduced ODE
//   J = df/dx + df/dy · dy/dx,  with dy/dx = -(dG/dy)^-1 · dG/dx  (implicit function theorem).
// Energy accounts (pure quadratures) feed nothing back: the driver integrates them as CVODES quadratures,
// outside the Newton system, so the Jacobian covers the part states only.
#include <Eigen/Dense>
#include <vector>

#include "solver/circuit.h"

namespace linkrise::solver {

class Equations {
 public:
  explicit Equations(const Circuit& circuit);

  const Circuit& circuit() const { return circuit_; }
  int ode_size() const { return circuit_.ode_size(); }

  /// Solves G(y; t, x, modes) = 0. `y` holds the starting guess and receives the solution.
  /// Returns false when Newton does not converge (the caller treats it as a recoverable failure).
  bool solve_network(double time, const double* states, const int* modes, double* unknowns);
  /// dx/dt for all ODE states (circuit states, then energy accounts) at a solved point.
  void rates(double time, const double* states, const int* modes, const double* unknowns, double* rates);
  /// dx/dt of the part states only (part_state_count values) at a solved point.
  void state_rates(double time, const double* states, const int* modes, const double* unknowns, double* rates);
  /// Rates of the quadratures at a solved point: the energy accounts (W), then the squared currents of
  /// current_squared_parts() (A²); quadrature_count() values.
  void account_rates(double time, const double* states, const int* modes, const double* unknowns, double* rates);
  /// Dense column-major Jacobian d(state rates)/d(part states) (part_state_count²) at a solved point.
  void jacobian(double time, const double* states, const int* modes, const double* unknowns, double* matrix);
  /// Newton iterations spent so far (statistics).
  long newton_iterations() const { return newton_iterations_; }

  models::Point point(double time, const double* states, const int* modes, const double* unknowns) const;

 private:
  void assemble(const models::Point& point, bool derivatives);
  bool solve_network_uncached(double time, const double* states, const int* modes, double* unknowns);
  bool solve_network_chord(double time, const double* states, const int* modes, double* unknowns);
  void remember_factor(const int* modes);

  const Circuit& circuit_;
  int unknowns_;
  int states_;
  Eigen::VectorXd network_;
  Eigen::MatrixXd network_by_unknown_;
  Eigen::MatrixXd network_by_state_;
  Eigen::VectorXd rate_;
  Eigen::MatrixXd rate_by_state_;
  Eigen::MatrixXd rate_by_unknown_;
  Eigen::PartialPivLU<Eigen::MatrixXd> factor_;
  // The inverse of the factorised dG/dy for the chord steps: one matrix-vector product instead of two
  // triangular solves of a dozen unknowns (a tenth of a solve's time went to Eigen's panel-wise triangular
  // solves). A chord step needs only an approximation of dG/dy⁻¹ — the residual it corrects is exact — so the
  // inverse's rounding (its condition number times ε) slows the iteration at most, which the contraction check
  // watches.
  Eigen::MatrixXd chord_inverse_;
  bool inverse_valid_ = false;  // chord_inverse_ belongs to factor_
  Eigen::VectorXd step_;
  Eigen::VectorXd guess_;  // scratch: the starting guess of a network solve
  Eigen::VectorXd start_;  // scratch: the iterate before a damped step
  int nodes_;              // unknowns before this index are node voltages, the rest branch currents
  long newton_iterations_ = 0;
  // The last solved point: CVODE evaluates roots and the driver records rows at states it has just
  // solved for, so a repeated point returns the stored solution.
  // The last LU of dG/dy and the modes it was taken in: consecutive solves differ little, so a chord
  // iteration with that LU usually converges in two cheap steps before a new factorisation is needed.
  bool factor_valid_ = false;
  std::vector<int> factor_modes_;
  // dy/dx from the last Jacobian and the modes it holds for: predicts the next network solution from the
  // last one (exact for a network linear in y with a fixed matrix), so most chord solves need one iteration.
  Eigen::MatrixXd sensitivity_;
  bool sensitivity_valid_ = false;
  std::vector<int> sensitivity_modes_;
  Eigen::VectorXd state_change_;      // scratch
  Eigen::VectorXd predicted_change_;  // scratch: sensitivity_ · state_change_, without a temporary per solve
  // Chord contraction rate seen with the current LU (negative: not measured yet).
  double contraction_ = -1.0;
  bool cache_valid_ = false;
  double cache_time_ = 0.0;
  std::vector<double> cache_states_;
  std::vector<int> cache_modes_;
  std::vector<double> cache_unknowns_;
};

}  // namespace linkrise::solver
