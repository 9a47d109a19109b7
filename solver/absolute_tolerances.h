#pragma once
// Absolute tolerances that mean something for the case at hand. CVODE holds each state x_i to
// rtol·|x_i| + atol_i; atol_i matters where a state passes near zero (a link capacitor at the start, a current
// at a closure), and a fixed number in every state's SI unit (1e-8 V, A, K...) is 1e-11 of an 800 V pack but
// a coarse step on a millivolt polarisation. The case's scales (the pack voltage: the largest node voltage of
// the initial operating point, at least 1 V; a current scale of the pack over 1 Ω, the order of a main-closure
// inrush peak; the ambient in kelvin) set:
//   kelvin    without an `atol` in the run block: rtol × the ambient in kelvin, at least atol × 1e3 (the
//             thermal models' tolerance scale)
//   the ∫i² dt quadratures, below
// Volts and amperes keep atol (1e-8 V, 1e-8 A by default). Measured, not adopted: volts at rtol/100 of the
// pack kept every golden metric but left the fast-states heat test 1.1e-6 off its closed form (target 1e-6);
// at rtol/1000 the main-closure peak current of cases/sequence_clean_close.yaml moved 2.4e-3 (at rtol of the
// pack: boat_104s_aux_converter's by 2.2e-3) — that peak is found from where the steps fall in a 15 µs inrush,
// and a looser volt tolerance lengthens them; amperes at rtol × the current scale moved peak powers at the
// main closure by up to 1.4e-4 and sequence_retry_short's opening energies by 1e-3. Step counts fell by at
// most 1 % (demo 418 → 415) with the volts scaled, so the relative term rtol·|x| rules the step size anyway.
// An `atol` in the run block (or --atol) holds every state to that number times its tolerance scale, as before
// (the tight reference runs use that).
//
// The ∫i² dt quadrature of a part that takes heat is held to the run's atol (in A²s), except where the current
// through the part cannot be known to rtol: it is a difference of node voltages over the part's resistance, and
// the network is solved to about 1e-14 of the pack voltage, so through a nano-ohm contact its rounding
// (1e-12 V over 1 nOhm is 1 mA) would be chased by the error test with microsecond steps. Where that rounding
// exceeds rtol of the case's current scale (below 0.1 µΩ at rtol 1e-7, 0.1 mΩ at 1e-10), its ∫i² dt is held
// to the accuracy of the heat it causes instead: the energy tolerance over the part's resistance (its heat
// over its current squared at each restart that finds a current through it).
#include <vector>

#include "solver/circuit.h"

namespace linkrise::solver {

struct ToleranceScales {
  double voltage = 1.0;      // V: the pack
  double current = 1.0;      // A
  double temperature = 1.0;  // K
};

/// The scales of a case from its initial operating point (`unknowns`: node voltages first) and ambient.
ToleranceScales case_scales(const Circuit& circuit, const double* unknowns);

/// The absolute tolerance of each part state. `scaled`: from the case's scales (above); otherwise `atol`
/// times each state's tolerance scale.
std::vector<double> state_tolerances(const Circuit& circuit, double rtol, double atol, bool scaled,
                                     const ToleranceScales& scales);

/// The relative rounding of a network solve: node voltages are known to about this fraction of the largest.
inline constexpr double kNetworkRounding = 1e-14;

/// The absolute tolerance (A²s) of the ∫i² dt quadrature of a part of `resistance` (Ω): `atol`, or atol/R
/// where the current's rounding kNetworkRounding·V_pack/R exceeds rtol times the current scale.
double current_squared_tolerance(double rtol, double atol, const ToleranceScales& scales, double resistance);

}  // namespace linkrise::solver
