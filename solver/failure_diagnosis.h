#pragma once
// Why the solver gave up, in engineering words: the simulated time and the step size reached, the state with the
// largest weighted error (which part, which quantity), the circuit's fastest time constant from the eigenvalues
// of the Jacobian (and the part whose state that mode lives in), and what to change. The driver (transient.cc)
// collects the evidence from CVODE when it stops; the reasoning here works on plain numbers, so it is tested
// without a solver.
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Dense>

namespace linkrise::solver {

/// What made the run stop.
enum class GiveUp { SolverTrouble, StepBudget, WallBudget };

/// What the driver knows when the solver gives up. Vectors are empty when CVODE could not provide them (a
/// failure before the integration started).
struct FailureEvidence {
  GiveUp reason = GiveUp::SolverTrouble;
  std::string cause;          // the failing call or the budget, as the driver words it
  double time = 0.0;          // simulated time reached, s
  double duration = 0.0;      // the run's length, s
  std::optional<double> step; // step size CVODE had reached (or was about to try), s
  double max_step = 0.0;      // run.max_step, s (0: no bound)
  std::vector<std::string> state_parts;       // per part state: the part's name
  std::vector<std::string> state_quantities;  // per part state: "voltage", "current", "temperature"...
  std::vector<std::string> state_units;       // per part state: SI symbol
  std::vector<double> error_weights;          // CVODE's 1 / (rtol·|x| + atol) per state
  std::vector<double> local_errors;           // CVODE's estimated local error of the last step per state
  Eigen::MatrixXd jacobian;                   // d(rates)/d(states) at the last accepted state
};

struct FailureDiagnosis {
  std::optional<int> worst_state;           // the state with the largest |local error| × weight
  double worst_weighted_error = 0.0;        // that product (1 means at the tolerance)
  std::optional<double> fastest_time_constant;  // 1 / max |λ| of the Jacobian, s
  std::optional<int> fastest_state;         // the state the fastest mode is mostly made of (weighted eigenvector)
  std::optional<double> ringing_frequency;  // |Im λ| / 2π of the fastest mode when it oscillates, Hz
  std::string suggestion;
};

/// Reasons over the evidence: worst state, fastest mode, and the suggestion that fits them.
FailureDiagnosis diagnose_failure(const FailureEvidence& evidence);

/// The evidence and its diagnosis as the lines that follow the cause in the failure message.
std::string failure_text(const FailureEvidence& evidence, const FailureDiagnosis& diagnosis);

}  // namespace linkrise::solver
