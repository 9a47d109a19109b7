#include "solver/failure_diagnosis.h"

#include <cmath>
#include <complex>
#include <numbers>

#include <fmt/format.h>

#include "netlist/units.h"

namespace linkrise::solver {

namespace {

// The state with the largest |local error| × weight: the one CVODE's error test judged worst.
void find_worst_state(const FailureEvidence& evidence, FailureDiagnosis& diagnosis) {
  const auto& errors = evidence.local_errors;
  if (errors.empty() || errors.size() != evidence.error_weights.size()) return;
  for (std::size_t i = 0; i < errors.size() && i < evidence.state_parts.size(); ++i) {
    double weighted = std::fabs(errors[i] * evidence.error_weights[i]);
    if (std::isfinite(weighted) && weighted > diagnosis.worst_weighted_error) {
      diagnosis.worst_weighted_error = weighted;
      diagnosis.worst_state = static_cast<int>(i);
    }
  }
}

// The eigenvalue of largest magnitude sets the fastest time constant; its eigenvector, scaled by the error
// weights (so volts, amperes and kelvin compare as fractions of their tolerances), names the state it lives in.
void find_fastest_mode(const FailureEvidence& evidence, FailureDiagnosis& diagnosis) {
  const Eigen::MatrixXd& jacobian = evidence.jacobian;
  if (jacobian.rows() == 0 || jacobian.rows() != jacobian.cols() || !jacobian.allFinite()) return;
  Eigen::EigenSolver<Eigen::MatrixXd> solver(jacobian);
  if (solver.info() != Eigen::Success) return;
  const auto& values = solver.eigenvalues();
  Eigen::Index fastest = 0;
  for (Eigen::Index k = 1; k < values.size(); ++k) {
    if (std::abs(values[k]) > std::abs(values[fastest])) fastest = k;
  }
  const std::complex<double> lambda = values[fastest];
  if (!(std::abs(lambda) > 0.0)) return;
  diagnosis.fastest_time_constant = 1.0 / std::abs(lambda);
  if (std::fabs(lambda.imag()) > std::fabs(lambda.real())) {
    diagnosis.ringing_frequency = std::fabs(lambda.imag()) / (2.0 * std::numbers::pi);
  }
  const Eigen::VectorXcd vector = solver.eigenvectors().col(fastest);  // a copy: eigenvectors() is a temporary
  bool weighted = evidence.error_weights.size() == static_cast<std::size_t>(vector.size());
  double largest = -1.0;
  for (Eigen::Index i = 0; i < vector.size(); ++i) {
    double size = std::abs(vector[i]) * (weighted ? evidence.error_weights[static_cast<std::size_t>(i)] : 1.0);
    if (size > largest) {
      largest = size;
      diagnosis.fastest_state = static_cast<int>(i);
    }
  }
}

std::string state_words(const FailureEvidence& evidence, int state) {
  auto i = static_cast<std::size_t>(state);
  if (i >= evidence.state_parts.size() || i >= evidence.state_quantities.size()) return "a state of the circuit";
  return fmt::format("part '{}' {}", evidence.state_parts[i], evidence.state_quantities[i]);
}

std::string seconds(double value) { return netlist::format_si(value, "s", 3); }

// The budget's own way out, after the advice on the circuit.
std::string budget_tail(GiveUp reason) {
  switch (reason) {
    case GiveUp::StepBudget: return " If the behaviour is real, raise run.max_steps or shorten run.duration.";
    case GiveUp::WallBudget: return " If the behaviour is real, raise run.max_wall_time or shorten run.duration.";
    case GiveUp::SolverTrouble: return "";
  }
  return "";
}

std::string suggest(const FailureEvidence& evidence, const FailureDiagnosis& diagnosis) {
  const std::string tail = budget_tail(evidence.reason);
  const std::string worst = diagnosis.worst_state ? state_words(evidence, *diagnosis.worst_state) : "";
  if (!diagnosis.fastest_time_constant) {
    return "Check the case for a constant-power load that has no operating point at the link voltage, and for a "
           "part connected across nothing else." + tail;
  }
  if (evidence.step && evidence.max_step > 0.0 && *evidence.step >= 0.99 * evidence.max_step) {
    return fmt::format("The step is held at run.max_step = {}, which the run's length of {} needs {:.2g} of: raise "
                       "run.max_step or leave it out (the solver then chooses its steps by the tolerances).{}",
                       seconds(evidence.max_step), seconds(evidence.duration), evidence.duration / evidence.max_step,
                       tail);
  }
  const double tau = *diagnosis.fastest_time_constant;
  const std::string fast = diagnosis.fastest_state ? state_words(evidence, *diagnosis.fastest_state) : "the circuit";
  if (evidence.step && *evidence.step < 1e-3 * tau) {
    return fmt::format("The step is more than a thousand times shorter than the circuit's fastest time constant, "
                       "so something non-smooth holds it back rather than the circuit's own speed{}: a threshold "
                       "crossed again and again (an under-voltage lockout, a bouncing contact), a constant-power "
                       "load at the edge of its operating point, or a table left at its end. Give the threshold "
                       "hysteresis or check the load's operating point.{}",
                       worst.empty() ? "" : " — look at " + worst, tail);
  }
  if (diagnosis.ringing_frequency) {
    return fmt::format("The circuit rings at {} through {}, and each period takes several steps over {} of run: add "
                       "damping (a series resistance, a capacitor's ESR) where it rings, or check the inductance "
                       "and capacitance that set the frequency.{}",
                       netlist::format_si(*diagnosis.ringing_frequency, "Hz", 3), fast, seconds(evidence.duration),
                       tail);
  }
  return fmt::format("The fastest time constant, {} in {}, holds the step near it over {} of run ({:.2g} time "
                     "constants): check the values that set it (a very small capacitance or inductance, a very "
                     "large or very small resistance, a node joined through nothing but a leakage path).{}",
                     seconds(tau), fast, seconds(evidence.duration), evidence.duration / tau, tail);
}

}  // namespace

FailureDiagnosis diagnose_failure(const FailureEvidence& evidence) {
  FailureDiagnosis diagnosis;
  find_worst_state(evidence, diagnosis);
  find_fastest_mode(evidence, diagnosis);
  diagnosis.suggestion = suggest(evidence, diagnosis);
  return diagnosis;
}

std::string failure_text(const FailureEvidence& evidence, const FailureDiagnosis& diagnosis) {
  std::string text = fmt::format("  simulated time reached: {} of {}", seconds(evidence.time), seconds(evidence.duration));
  if (evidence.step) text += fmt::format("; step size reached: {}", seconds(*evidence.step));
  if (diagnosis.worst_state) {
    text += fmt::format("\n  state furthest off its tolerance: {} (local error {:.3g} times its tolerance)",
                        state_words(evidence, *diagnosis.worst_state), diagnosis.worst_weighted_error);
  }
  if (diagnosis.fastest_time_constant) {
    text += fmt::format("\n  fastest time constant of the circuit: {}{}", seconds(*diagnosis.fastest_time_constant),
                        diagnosis.fastest_state ? ", mostly " + state_words(evidence, *diagnosis.fastest_state) : "");
    if (diagnosis.ringing_frequency) {
      text += fmt::format(" (it rings at {})", netlist::format_si(*diagnosis.ringing_frequency, "Hz", 3));
    }
  }
  text += "\n  suggestion: " + diagnosis.suggestion;
  return text;
}

}  // namespace linkrise::solver
