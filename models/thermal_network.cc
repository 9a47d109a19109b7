#include "models/thermal_network.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "models/number_text.h"

namespace linkrise::models {
namespace {

std::string number(double value) { return number_text(value); }

std::string violation(const std::string& network, const std::string& field, double value,
                      const char* rule) {
  return network + ": " + field + " = " + number(value) + " " + rule;
}

bool positive(double value) { return finite_positive(value); }
// +infinity is the adiabatic limit; conductance 1/R is then exactly 0.
bool positive_or_infinite(double value) { return value > 0.0 && !std::isnan(value); }

template <typename... Handlers>
struct Overloaded : Handlers... {
  using Handlers::operator()...;
};
template <typename... Handlers>
Overloaded(Handlers...) -> Overloaded<Handlers...>;

double foster_total_resistance(const std::vector<FosterTerm>& terms) {
  double total = 0.0;
  for (const auto& term : terms) total += term.thermal_resistance;
  return total;
}

}  // namespace

std::variant<ThermalNetwork, std::string> ThermalNetwork::create(const OneNodeParameters& p) {
  const std::string network = "OneNode";
  if (!positive(p.heat_capacity))
    return violation(network, "heat_capacity", p.heat_capacity, "must be finite and > 0 J/K");
  if (!positive_or_infinite(p.thermal_resistance))
    return violation(network, "thermal_resistance", p.thermal_resistance,
                     "must be > 0 K/W (+infinity for adiabatic)");
  return ThermalNetwork(p);
}

std::variant<ThermalNetwork, std::string> ThermalNetwork::create(const TwoNodeParameters& p) {
  const std::string network = "TwoNode";
  if (!positive(p.element_heat_capacity))
    return violation(network, "element_heat_capacity", p.element_heat_capacity, "must be finite and > 0 J/K");
  if (!positive(p.element_to_body_resistance))
    return violation(network, "element_to_body_resistance", p.element_to_body_resistance,
                     "must be finite and > 0 K/W");
  if (!positive(p.body_heat_capacity))
    return violation(network, "body_heat_capacity", p.body_heat_capacity, "must be finite and > 0 J/K");
  if (!positive_or_infinite(p.body_to_ambient_resistance))
    return violation(network, "body_to_ambient_resistance", p.body_to_ambient_resistance,
                     "must be > 0 K/W (+infinity for adiabatic)");
  return ThermalNetwork(p);
}

std::variant<ThermalNetwork, std::string> ThermalNetwork::create(std::vector<FosterTerm> terms) {
  const std::string network = "Foster";
  if (terms.empty()) return violation(network, "terms.size()", 0.0, "must be >= 1");
  for (std::size_t i = 0; i < terms.size(); ++i) {
    const std::string prefix = "terms[" + std::to_string(i) + "].";
    if (!positive(terms[i].thermal_resistance))
      return violation(network, prefix + "thermal_resistance", terms[i].thermal_resistance,
                       "must be finite and > 0 K/W");
    if (!positive(terms[i].time_constant))
      return violation(network, prefix + "time_constant", terms[i].time_constant, "must be finite and > 0 s");
  }
  return ThermalNetwork(std::move(terms));
}

std::size_t ThermalNetwork::state_count() const {
  return std::visit(Overloaded{[](const OneNodeParameters&) -> std::size_t { return 1; },
                               [](const TwoNodeParameters&) -> std::size_t { return 2; },
                               [](const std::vector<FosterTerm>& terms) { return terms.size(); }},
                    parameters_);
}

void ThermalNetwork::initial_states(double ambient, std::span<double> states) const {
  if (std::holds_alternative<std::vector<FosterTerm>>(parameters_))
    std::fill(states.begin(), states.end(), 0.0);  // rises
  else
    std::fill(states.begin(), states.end(), ambient);  // absolute node temperatures
}

void ThermalNetwork::warm_states(double ambient, double temperature, std::span<double> states) const {
  if (const auto* terms = std::get_if<std::vector<FosterTerm>>(&parameters_)) {
    const double total = foster_total_resistance(*terms);
    for (std::size_t i = 0; i < terms->size(); ++i)
      states[i] = (temperature - ambient) * (*terms)[i].thermal_resistance / total;
  } else {
    std::fill(states.begin(), states.end(), temperature);
  }
}

std::vector<std::string> ThermalNetwork::state_names() const {
  return std::visit(Overloaded{[](const OneNodeParameters&) { return std::vector<std::string>{"temperature"}; },
                               [](const TwoNodeParameters&) {
                                 return std::vector<std::string>{"temperature", "body_temperature"};
                               },
                               [](const std::vector<FosterTerm>& terms) {
                                 std::vector<std::string> names;
                                 for (std::size_t i = 0; i < terms.size(); ++i)
                                   names.push_back("temperature_rise_" + std::to_string(i + 1));
                                 return names;
                               }},
                    parameters_);
}

void ThermalNetwork::derivatives(std::span<const double> x, double power, double ambient,
                                 std::span<double> out) const {
  std::visit(Overloaded{
                 [&](const OneNodeParameters& p) {
                   out[0] = (power - (x[0] - ambient) / p.thermal_resistance) / p.heat_capacity;
                 },
                 [&](const TwoNodeParameters& p) {
                   const double inner = (x[0] - x[1]) / p.element_to_body_resistance;
                   const double outer = (x[1] - ambient) / p.body_to_ambient_resistance;
                   out[0] = (power - inner) / p.element_heat_capacity;
                   out[1] = (inner - outer) / p.body_heat_capacity;
                 },
                 [&](const std::vector<FosterTerm>& terms) {
                   for (std::size_t i = 0; i < terms.size(); ++i)
                     out[i] = (power * terms[i].thermal_resistance - x[i]) / terms[i].time_constant;
                 }},
             parameters_);
}

void ThermalNetwork::state_jacobian(std::span<double> out) const {
  std::fill(out.begin(), out.end(), 0.0);
  std::visit(Overloaded{
                 [&](const OneNodeParameters& p) {
                   out[0] = -1.0 / (p.thermal_resistance * p.heat_capacity);
                 },
                 [&](const TwoNodeParameters& p) {
                   const double inner = 1.0 / p.element_to_body_resistance;
                   const double outer = 1.0 / p.body_to_ambient_resistance;
                   out[0] = -inner / p.element_heat_capacity;
                   out[1] = inner / p.element_heat_capacity;
                   out[2] = inner / p.body_heat_capacity;
                   out[3] = -(inner + outer) / p.body_heat_capacity;
                 },
                 [&](const std::vector<FosterTerm>& terms) {
                   const std::size_t n = terms.size();
                   for (std::size_t i = 0; i < n; ++i) out[i * n + i] = -1.0 / terms[i].time_constant;
                 }},
             parameters_);
}

void ThermalNetwork::power_jacobian(std::span<double> out) const {
  std::visit(Overloaded{[&](const OneNodeParameters& p) { out[0] = 1.0 / p.heat_capacity; },
                        [&](const TwoNodeParameters& p) {
                          out[0] = 1.0 / p.element_heat_capacity;
                          out[1] = 0.0;
                        },
                        [&](const std::vector<FosterTerm>& terms) {
                          for (std::size_t i = 0; i < terms.size(); ++i)
                            out[i] = terms[i].thermal_resistance / terms[i].time_constant;
                        }},
             parameters_);
}

void ThermalNetwork::ambient_jacobian(std::span<double> out) const {
  std::visit(Overloaded{[&](const OneNodeParameters& p) {
                          out[0] = 1.0 / (p.thermal_resistance * p.heat_capacity);
                        },
                        [&](const TwoNodeParameters& p) {
                          out[0] = 0.0;
                          out[1] = 1.0 / (p.body_to_ambient_resistance * p.body_heat_capacity);
                        },
                        // Foster states are rises, so ambient does not drive them.
                        [&](const std::vector<FosterTerm>&) { std::fill(out.begin(), out.end(), 0.0); }},
             parameters_);
}

double ThermalNetwork::element_temperature(std::span<const double> x, double ambient) const {
  if (std::holds_alternative<std::vector<FosterTerm>>(parameters_)) {
    double rise = 0.0;
    for (double term_rise : x) rise += term_rise;
    return ambient + rise;
  }
  return x[0];
}

void ThermalNetwork::element_temperature_gradient(std::span<double> out) const {
  if (std::holds_alternative<std::vector<FosterTerm>>(parameters_)) {
    std::fill(out.begin(), out.end(), 1.0);
    return;
  }
  std::fill(out.begin(), out.end(), 0.0);
  out[0] = 1.0;
}

double ThermalNetwork::stored_heat(std::span<const double> x, double ambient) const {
  return std::visit(Overloaded{[&](const OneNodeParameters& p) { return p.heat_capacity * (x[0] - ambient); },
                               [&](const TwoNodeParameters& p) {
                                 return p.element_heat_capacity * (x[0] - ambient) +
                                        p.body_heat_capacity * (x[1] - ambient);
                               },
                               [&](const std::vector<FosterTerm>& terms) {
                                 double weighted = 0.0;
                                 for (std::size_t i = 0; i < terms.size(); ++i)
                                   weighted += terms[i].time_constant * x[i];
                                 return weighted / foster_total_resistance(terms);
                               }},
                    parameters_);
}

double ThermalNetwork::heat_to_ambient(std::span<const double> x, double ambient) const {
  return std::visit(
      Overloaded{[&](const OneNodeParameters& p) { return (x[0] - ambient) / p.thermal_resistance; },
                 [&](const TwoNodeParameters& p) { return (x[1] - ambient) / p.body_to_ambient_resistance; },
                 [&](const std::vector<FosterTerm>& terms) {
                   return (element_temperature(x, ambient) - ambient) / foster_total_resistance(terms);
                 }},
      parameters_);
}

double ThermalNetwork::total_thermal_resistance() const {
  return std::visit(Overloaded{[](const OneNodeParameters& p) { return p.thermal_resistance; },
                               [](const TwoNodeParameters& p) {
                                 return p.element_to_body_resistance + p.body_to_ambient_resistance;
                               },
                               [](const std::vector<FosterTerm>& terms) {
                                 return foster_total_resistance(terms);
                               }},
                    parameters_);
}

double adiabatic_temperature_rise(double energy, double mass, double specific_heat) {
  return energy / (mass * specific_heat);
}

double ThermalNetwork::element_heat_capacity() const {
  return std::visit(Overloaded{[](const OneNodeParameters& p) { return p.heat_capacity; },
                               [](const TwoNodeParameters& p) { return p.element_heat_capacity; },
                               [](const std::vector<FosterTerm>& terms) {
                                 double slope = 0.0;
                                 for (const auto& term : terms) slope += term.thermal_resistance / term.time_constant;
                                 return 1.0 / slope;
                               }},
                    parameters_);
}

bool ThermalNetwork::has_body() const { return std::holds_alternative<TwoNodeParameters>(parameters_); }

double ThermalNetwork::body_temperature(std::span<const double> x, double ambient) const {
  return has_body() ? x[1] : element_temperature(x, ambient);
}

namespace {
// ∫₀ᵗ e^(λs) ds, continuous through λ = 0 (an adiabatic mode).
double mode_integral(double lambda, double t) {
  return std::fabs(lambda * t) < 1e-8 ? t * (1.0 + 0.5 * lambda * t) : std::expm1(lambda * t) / lambda;
}
}  // namespace

double ThermalNetwork::thermal_impedance(double t) const {
  return std::visit(
      Overloaded{[&](const OneNodeParameters& p) {
                   if (std::isinf(p.thermal_resistance)) return t / p.heat_capacity;
                   return -p.thermal_resistance * std::expm1(-t / (p.thermal_resistance * p.heat_capacity));
                 },
                 [&](const TwoNodeParameters& p) {
                   // θ' = A·θ + b·P with b = (1/C1, 0): θ1(t) = Σ_k e1ᵀ·P_k·b · ∫₀ᵗ e^(λ_k s) ds, where
                   // P_1 = (A − λ2·I)/(λ1 − λ2), P_2 = (A − λ1·I)/(λ2 − λ1) (Sylvester; the eigenvalues of this
                   // A are real and distinct: it is similar to a symmetric matrix with a non-zero off-diagonal).
                   const double inner = 1.0 / p.element_to_body_resistance, outer = 1.0 / p.body_to_ambient_resistance;
                   const double a11 = -inner / p.element_heat_capacity, a22 = -(inner + outer) / p.body_heat_capacity;
                   const double a12 = inner / p.element_heat_capacity, a21 = inner / p.body_heat_capacity;
                   const double half_trace = 0.5 * (a11 + a22);
                   const double root = std::sqrt(0.25 * (a11 - a22) * (a11 - a22) + a12 * a21);
                   const double l1 = half_trace + root, l2 = half_trace - root;
                   const double b1 = 1.0 / p.element_heat_capacity;
                   return (a11 - l2) * b1 / (l1 - l2) * mode_integral(l1, t) +
                          (a11 - l1) * b1 / (l2 - l1) * mode_integral(l2, t);
                 },
                 [&](const std::vector<FosterTerm>& terms) {
                   double z = 0.0;
                   for (const auto& term : terms) z -= term.thermal_resistance * std::expm1(-t / term.time_constant);
                   return z;
                 }},
      parameters_);
}

std::optional<double> element_capacity_meeting(TwoNodeParameters rest, double seconds, double impedance) {
  struct Target {
    TwoNodeParameters network;
    double seconds, impedance;
  } target{rest, seconds, impedance};
  auto gap = [](double log_capacity, void* data) {
    auto* t = static_cast<Target*>(data);
    t->network.element_heat_capacity = std::exp(log_capacity);
    auto network = ThermalNetwork::create(t->network);
    return std::get<ThermalNetwork>(network).thermal_impedance(t->seconds) - t->impedance;
  };
  // Bracket: at the adiabatic capacity t/Z the model runs cooler than the target (Z_th ≤ t/C1); a million times
  // smaller the element is nearly massless and Z_th is the body path's.
  const double upper = std::log(seconds / impedance), lower = upper - std::log(1e6);
  gsl_function function{gap, &target};
  if (gap(lower, &target) <= 0.0) return std::nullopt;
  if (gap(upper, &target) >= 0.0) return std::exp(upper);
  gsl_root_fsolver* solver = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
  gsl_root_fsolver_set(solver, &function, lower, upper);
  double root = upper;
  for (int iteration = 0; iteration < 200; ++iteration) {
    gsl_root_fsolver_iterate(solver);
    root = gsl_root_fsolver_root(solver);
    if (gsl_root_test_interval(gsl_root_fsolver_x_lower(solver), gsl_root_fsolver_x_upper(solver), 0.0, 1e-12) !=
        GSL_CONTINUE) {
      break;
    }
  }
  gsl_root_fsolver_free(solver);
  return std::exp(root);
}

}  // namespace linkrise::models
