#include "solver/break_circuit.h"

#include <Eigen/Dense>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace linkrise::solver {
namespace {
// A perturbed network that does not solve: the break's time constant is then unknown (NaN), not a failed run.
struct Unsolved {};

// The contact's current with the network solved at `states` (a copy the caller perturbs).
double contact_current(Equations& equations, double time, const std::vector<double>& states, const int* modes,
                       std::vector<double>& unknowns, int part) {
  const Circuit& circuit = equations.circuit();
  if (!equations.solve_network(time, states.data(), modes, unknowns.data())) throw Unsolved{};
  return circuit.part(part).current(equations.point(time, states.data(), modes, unknowns.data()),
                                    circuit.layout(part));
}

// ∂i/∂x_k by central differences: exact for a network linear in its unknowns, so the step is large against the
// solve's rounding (1e-14 of the node voltages); O(step²) for a nonlinear one.
double current_slope(Equations& equations, double time, std::vector<double>& states, const int* modes,
                     std::vector<double>& unknowns, int part, int k) {
  const double held = states[k];
  const double step = 1e-3 * std::max(1.0, std::fabs(held));
  states[k] = held + step;
  const double above = contact_current(equations, time, states, modes, unknowns, part);
  states[k] = held - step;
  const double below = contact_current(equations, time, states, modes, unknowns, part);
  states[k] = held;
  return (above - below) / (2.0 * step);
}

BreakCircuit time_constant_of(Equations& equations, double time, const double* states, const int* modes,
                              const double* unknowns, int part) {
  const Circuit& circuit = equations.circuit();
  const int series = circuit.part(part).breaking_state(circuit.layout(part), modes);
  if (series < 0) throw std::invalid_argument("break_circuit: the part is not breaking in these modes");
  const int n = circuit.part_state_count();
  BreakCircuit result;
  result.time = time;
  result.part = part;

  // The moving states: the inductances' currents (the only part states held in amperes).
  std::vector<int> moving;
  for (int k = 0; k < n; ++k) {
    if (circuit.state_info()[k].unit == "A") moving.push_back(k);
  }
  std::vector<double> x(states, states + n);
  std::vector<double> y(unknowns, unknowns + circuit.unknown_count());
  const int m = static_cast<int>(moving.size());
  Eigen::VectorXd c(m);
  for (int j = 0; j < m; ++j) c[j] = current_slope(equations, time, x, modes, y, part, moving[j]);
  const double d = current_slope(equations, time, x, modes, y, part, series);

  double conductance = d;
  double moment = 0.0;
  if (m > 0) {
    contact_current(equations, time, x, modes, y, part);  // the Jacobian wants the solved point itself
    Eigen::MatrixXd jacobian(n, n);
    equations.jacobian(time, x.data(), modes, y.data(), jacobian.data());
    const Eigen::MatrixXd a = jacobian(moving, moving);  // Eigen's indexed views
    const Eigen::VectorXd b = jacobian(moving, series);
    const Eigen::FullPivLU<Eigen::MatrixXd> lu(a);
    if (!lu.isInvertible()) {
      result.time_constant = result.inductance = std::numeric_limits<double>::infinity();
      result.resistance = 0.0;
      return result;
    }
    const Eigen::VectorXd once = lu.solve(b);
    moment = c.dot(lu.solve(once));
    conductance = d - c.dot(once);
  }
  // A loop the held capacitors leave without a resistive path: no finite time constant.
  if (!(std::fabs(conductance) > 0.0) || !std::isfinite(conductance)) {
    result.time_constant = result.inductance = result.resistance = std::numeric_limits<double>::infinity();
    return result;
  }
  result.time_constant = moment == 0.0 ? 0.0 : moment / conductance;  // no inductance: 0, not −0
  result.resistance = 1.0 / std::fabs(conductance);
  result.inductance = result.time_constant * result.resistance;
  return result;
}
}  // namespace


BreakCircuit break_circuit(Equations& equations, double time, const double* states, const int* modes,
                           const double* unknowns, int part) {
  try {
    return time_constant_of(equations, time, states, modes, unknowns, part);
  } catch (const Unsolved&) {
    const double unknown = std::numeric_limits<double>::quiet_NaN();
    return BreakCircuit{time, part, unknown, unknown, unknown};
  }
}

}  // namespace linkrise::solver
