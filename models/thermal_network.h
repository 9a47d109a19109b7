// Lumped thermal networks of a pre-charge resistor, as small linear ODE systems the solver embeds.
//
// Units: J/K (heat capacity), K/W (thermal resistance), s (time constant), W (power), K (temperature), J (heat).
// Each network has state_count() states. The solver owns the state vector; this class only evaluates
//   d(states)/dt = derivatives(states, power, ambient),
// which is linear in states, power and ambient, so its Jacobians are constants.
//
// Networks and their states:
//  (a) one node — states: { T } element temperature (absolute, K).
//        C_th·dT/dt = P − (T − Ta)/R_th.
//      R_th = +infinity is allowed and means adiabatic (no loss), e.g. for a short pulse.
//  (b) two node — element (C1) → R12 → body (C2) → R2a → ambient;
//      states: { T1, T2 } element and body temperatures (absolute, K).
//        C1·dT1/dt = P − (T1 − T2)/R12
//        C2·dT2/dt = (T1 − T2)/R12 − (T2 − Ta)/R2a
//      R2a = +infinity is allowed (adiabatic body).
//  (c) Foster list of terms (R_i, τ_i), fitted to a data sheet's Z_th(t) = Σ R_i·(1 − e^(−t/τ_i));
//      states: { θ_1 … θ_n } rise of each term above ambient (K, not absolute: a Foster term is not a node).
//        dθ_i/dt = (P·R_i − θ_i)/τ_i,   T_element = Ta + Σ θ_i.
//
// Energy audit: stored_heat (relative to ambient) and heat_to_ambient satisfy exactly
//   d(stored_heat)/dt = P − heat_to_ambient   (for constant ambient),
// so ∫P dt = stored_heat + ∫heat_to_ambient dt checks the integration. For (a) and (b) these are the physical
// quantities Σ C·(T − Ta) and the flow through the last resistance. A Foster network has no physical nodes
// and hence no unique stored heat; it is defined here as Σ τ_i·θ_i / R_total with heat_to_ambient =
// (T_element − Ta)/R_total, R_total = Σ R_i. That choice closes the balance, reduces to (a) for a single term,
// keeps the outflow non-negative while heating, stores all the heat in the adiabatic limit (t ≪ τ_i) and
// delivers P to ambient at steady state.
#pragma once

#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <utility>
#include <variant>
#include <vector>

namespace linkrise::models {

struct OneNodeParameters {
  double heat_capacity;       // C_th, J/K, > 0
  double thermal_resistance;  // R_th, K/W, > 0 or +infinity (adiabatic)
};

struct TwoNodeParameters {
  double element_heat_capacity;       // C1, J/K, > 0
  double element_to_body_resistance;  // R12, K/W, > 0, finite
  double body_heat_capacity;          // C2, J/K, > 0
  double body_to_ambient_resistance;  // R2a, K/W, > 0 or +infinity (adiabatic)
};

struct FosterTerm {
  double thermal_resistance;  // R_i, K/W, > 0, finite
  double time_constant;       // τ_i, s, > 0, finite
};

class ThermalNetwork {
 public:
  // The network, or an error naming the field, its value and the rule it breaks.
  static std::variant<ThermalNetwork, std::string> create(const OneNodeParameters& parameters);
  static std::variant<ThermalNetwork, std::string> create(const TwoNodeParameters& parameters);
  static std::variant<ThermalNetwork, std::string> create(std::vector<FosterTerm> terms);  // >= 1 term

  std::size_t state_count() const;

  // The network at rest at ambient (no stored heat).
  void initial_states(double ambient, std::span<double> states) const;
  // A hot start: every node at `temperature` (K). A Foster network has no nodes; its rise above ambient is
  // split over the terms in proportion to R_i, the shape of a steady state, so T_element = temperature.
  void warm_states(double ambient, double temperature, std::span<double> states) const;
  // Names of the states, e.g. {"temperature", "body_temperature"} or {"temperature_rise_1", ...}.
  std::vector<std::string> state_names() const;

  // out = d(states)/dt for dissipated power P (W) and ambient temperature Ta (K).
  void derivatives(std::span<const double> states, double power, double ambient,
                   std::span<double> out) const;

  // ∂(d states/dt)/∂states, row-major state_count() × state_count(): out[i·n + j] = ∂f_i/∂x_j.
  void state_jacobian(std::span<double> out) const;
  // ∂(d states/dt)/∂power and ∂(d states/dt)/∂ambient, state_count() entries each.
  void power_jacobian(std::span<double> out) const;
  void ambient_jacobian(std::span<double> out) const;

  // Temperature of the heated element (K): the one the resistance law is evaluated at.
  double element_temperature(std::span<const double> states, double ambient) const;
  // ∂T_element/∂states (state_count() entries), for chaining R(T_element) into the solver's Jacobian.
  void element_temperature_gradient(std::span<double> out) const;

  // Heat held relative to ambient (J) and heat flow leaving to ambient (W); see the energy audit note above.
  double stored_heat(std::span<const double> states, double ambient) const;
  double heat_to_ambient(std::span<const double> states, double ambient) const;

  // Element-to-ambient resistance at steady state (K/W); +infinity when adiabatic.
  double total_thermal_resistance() const;

  // The element's own heat capacity (J/K): C_th, C1, or for a Foster list 1/Σ(R_i/τ_i), the one that gives its
  // initial slope Z_th'(0).
  double element_heat_capacity() const;

  // The body (housing) node of a two-node network: true only for form (b).
  bool has_body() const;
  // Its temperature (K); the element temperature for networks without a body node.
  double body_temperature(std::span<const double> states, double ambient) const;

  // The element's thermal impedance Z_th(t) (K/W): its rise above ambient t seconds after a constant power step
  // of 1 W from rest, in closed form — (a) R·(1 − e^(−t/RC)) (t/C adiabatic); (b) the two eigenmodes of the
  // 2×2 system (Sylvester's formula); (c) Σ R_i·(1 − e^(−t/τ_i)). A data sheet's pulse curve states the same
  // quantity: Z_th(t) = (T_max − T_amb)/P_max(t) (models/pulse_curve.h).
  double thermal_impedance(double seconds) const;

 private:
  using Parameters = std::variant<OneNodeParameters, TwoNodeParameters, std::vector<FosterTerm>>;
  template <typename Specific>
  explicit ThermalNetwork(Specific parameters) : parameters_(std::move(parameters)) {}
  Parameters parameters_;
};

// The element heat capacity C1 for which a two-node network (its other three values from `rest`) has the thermal
// impedance `impedance` at `seconds` — a data-sheet pulse-curve row (models/pulse_curve.h). Z_th(t) falls as C1
// grows, from its C1 → 0 limit to 0, so the root is unique; std::nullopt when even C1 → 0 stays below
// `impedance` (the body alone, not the element, limits that row). Found by GSL's Brent solver on ln C1.
std::optional<double> element_capacity_meeting(TwoNodeParameters rest, double seconds, double impedance);

// Adiabatic temperature rise ΔT = E/(m·c): energy (J), mass (kg), specific heat (J/(kg·K)).
double adiabatic_temperature_rise(double energy, double mass, double specific_heat);

}  // namespace linkrise::models
