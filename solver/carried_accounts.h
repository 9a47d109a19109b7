#pragma once
// The quadratures (energy accounts, ∫i² dt) along a carried transient (solver/carried_transient.h). With the
// states carried, CVODE's steps no longer follow the inrush, but an account integrand such as i²·R still does:
// integrated as it is, its error test would hold the steps as short as before. So the account integrand is
// split the same way as the states: CVODE integrates q(x(t)) − q(x_lin(t)), small and smooth while x stays near
// the linearised trajectory x_lin(t) = x0 + carried(t), and this class gives ∫ q(x_lin(s)) ds from the
// transient's start in closed intervals: 8-point Gauss–Legendre (GSL's fixed table, docs/references.md
// [R-GSL-glfixed]) on panels [t0 + a, t0 + 2a] doubling from a tenth of the shortest carried time constant up
// to 40 of the longest, where the transient has decayed to e⁻⁴⁰ of its start; past that, q(x_lin) is its final
// value q∞ and the integral grows by q∞·Δt.
#include <gsl/gsl_integration.h>

#include <memory>
#include <vector>

#include "solver/carried_transient.h"
#include "solver/equations.h"

namespace linkrise::solver {

class CarriedAccounts {
 public:
  explicit CarriedAccounts(const Circuit& circuit);
  /// Follows `transient` from the states `origin` (its start) in the given modes; `guess` is a network
  /// solution near the origin. False when the network has no solution on the trajectory's end.
  bool start(const CarriedTransient& transient, const double* origin, const int* modes, const double* guess);
  void stop() { active_ = false; }
  bool active() const { return active_; }
  /// q(x_lin(t)) into `out` (quadrature_count values); false when the network has no solution there.
  bool rates(double time, double* out);
  /// ∫ q(x_lin(s)) ds from the start to `time` into `out`; false when a network solve failed.
  bool integral(double time, double* out);

 private:
  bool rates_at_states(double time, const double* states, double* out);

  const Circuit& circuit_;
  Equations equations_;
  const CarriedTransient* transient_ = nullptr;
  std::vector<int> modes_;
  std::vector<double> origin_, states_, unknowns_, final_rates_, rate_;
  double end_ = 0.0;  // s, absolute time past which q(x_lin) is q∞
  bool add_panel(double a, double b, std::vector<double>& sum);
  bool tabulate();
  bool tabulated_ = false;
  std::vector<double> edges_;               // the panels' edges, absolute times from the start to `end_`
  std::vector<std::vector<double>> sums_;   // ∫ (q(x_lin) − q∞) ds from the start to each edge
  bool active_ = false;
  std::unique_ptr<gsl_integration_glfixed_table, void (*)(gsl_integration_glfixed_table*)> table_;
};

}  // namespace linkrise::solver
