#pragma once
// Fast states after a switching: a mode far faster than every other mode of the circuit (the rise of a cable
// current when a contactor closes onto a resistor: L/R of tens of nanoseconds against a link charge of tens of
// milliseconds) would make a BDF restart spend a hundred steps on a transient no result depends on. Such
// states start at their quasi-steady value instead (singular perturbation, zeroth order), and the slow states
// take the first-order correction for the transient they skip: Δx_S = −J_SF·J_FF⁻¹·δ, with δ the fast states'
// distance from quasi-steady (what the slow states would have received while the fast ones settled).
//
// Which states are fast: the largest set F (taken in order of their diagonal decay rate −J_ii) whose block J_FF
// has real negative eigenvalues only (a monotone, non-ringing transient: its extremes are its two ends, which
// the driver records as rows) and whose slowest time constant τ_F is at most `ratio` times the fastest time
// constant τ_S of the rest (the eigenvalues of the Schur complement J_SS − J_SF·J_FF⁻¹·J_FS, capped by the
// longest time the run resolves). The error left is of order (τ_F/τ_S)² in the slow states.
#include <Eigen/Dense>
#include <vector>

#include "solver/equations.h"

namespace linkrise::solver {

struct FastSplit {
  std::vector<int> fast;  // state indices, fastest first
  std::vector<int> slow;
  double fast_time = 0.0;  // s, slowest time constant among the fast states (τ_F)
  double slow_time = 0.0;  // s, fastest time constant among the rest (τ_S)
};

/// The fast states of a Jacobian (dense, square), or an empty `fast` when none qualifies.
FastSplit split_fast_states(const Eigen::MatrixXd& jacobian, double ratio, double longest_time);

struct FastSettling {
  double ratio = 1e-5;        // τ_F/τ_S at most this
  double longest_time = 1.0;  // s, the longest time the run resolves (its duration)
};

/// Moves the fast states of `states` to quasi-steady (Newton on their rates with the slow states held) and
/// applies the slow states' correction. `unknowns` is the network guess and receives the solution at the new
/// states. Returns the split (empty `fast`: nothing moved); false in `settled` when a network solve or the
/// Newton iteration failed (the states are then restored).
/// The skipped transient, linearised: the fast states' distance from the settled point decays as
/// e(t) = exp(J_FF·t)·δ; the slow states lag the settled ones by J_SF·J_FF⁻¹·e(t).
class SkippedTransient {
 public:
  SkippedTransient() = default;
  SkippedTransient(const Eigen::MatrixXd& jacobian, const FastSplit& split, const double* before, const double* settled);
  bool valid() const { return valid_; }
  double shortest_time() const { return shortest_; }
  double longest_time() const { return longest_; }
  /// The part states `elapsed` seconds into the transient.
  void states_at(double elapsed, double* out) const;

 private:
  bool valid_ = false;
  std::vector<int> fast_, slow_;
  std::vector<double> settled_;
  Eigen::MatrixXd vectors_, slow_share_;
  Eigen::VectorXd rates_, modal_;
  double shortest_ = 0.0, longest_ = 0.0;
};

struct SettleResult {
  SkippedTransient transient;
  FastSplit split;
  bool settled = false;
  // What each quadrature (the energy accounts, then the ∫i² dt) would have received during the skipped
  // transient beyond the settled run's own rates, J: integrated along the linearised fast transient
  // e(t) = exp(J_FF·t)·δ (the slow states following with their first-order share), so a contact that opens
  // on an inductive current still takes the ½·L·i² it dissipates.
  std::vector<double> skipped_accounts;
};
SettleResult settle_fast_states(Equations& equations, double time, double* states, const int* modes,
                                double* unknowns, const FastSettling& settings);

}  // namespace linkrise::solver
