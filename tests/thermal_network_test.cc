// Thermal network checks against closed forms and published data (docs/references.md, cited by tag).
// A classical RK4 integrator lives in this test so the check does not depend on the project's solver.
#include "models/thermal_network.h"

#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <limits>
#include <string>
#include <vector>

namespace linkrise::models {
namespace {

ThermalNetwork made(const auto& parameters) {
  auto created = ThermalNetwork::create(parameters);
  if (auto* error = std::get_if<std::string>(&created)) ADD_FAILURE() << *error;
  return std::get<ThermalNetwork>(created);
}

std::string refused(const auto& parameters) {
  auto created = ThermalNetwork::create(parameters);
  if (std::holds_alternative<ThermalNetwork>(created)) {
    ADD_FAILURE() << "parameters were accepted";
    return {};
  }
  return std::get<std::string>(created);
}

// Result of integrating a network from rest with classical RK4 at a fixed step.
struct Run {
  std::vector<double> states;
  double heat_out = 0.0;  // ∫ heat_to_ambient dt, integrated as an extra state
};

Run integrate(const ThermalNetwork& network, const std::function<double(double)>& power, double ambient,
              double duration, int steps) {
  const std::size_t n = network.state_count();
  std::vector<double> y(n + 1, 0.0);
  network.initial_states(ambient, std::span<double>(y).first(n));
  auto rate = [&](double t, const std::vector<double>& state, std::vector<double>& out) {
    network.derivatives(std::span<const double>(state).first(n), power(t), ambient,
                        std::span<double>(out).first(n));
    out[n] = network.heat_to_ambient(std::span<const double>(state).first(n), ambient);
  };
  const double h = duration / steps;
  std::vector<double> k1(n + 1), k2(n + 1), k3(n + 1), k4(n + 1), trial(n + 1);
  for (int step = 0; step < steps; ++step) {
    const double t = step * h;
    rate(t, y, k1);
    for (std::size_t i = 0; i <= n; ++i) trial[i] = y[i] + 0.5 * h * k1[i];
    rate(t + 0.5 * h, trial, k2);
    for (std::size_t i = 0; i <= n; ++i) trial[i] = y[i] + 0.5 * h * k2[i];
    rate(t + 0.5 * h, trial, k3);
    for (std::size_t i = 0; i <= n; ++i) trial[i] = y[i] + h * k3[i];
    rate(t + h, trial, k4);
    for (std::size_t i = 0; i <= n; ++i) y[i] += h / 6.0 * (k1[i] + 2.0 * k2[i] + 2.0 * k3[i] + k4[i]);
  }
  Run run;
  run.heat_out = y[n];
  y.pop_back();
  run.states = y;
  return run;
}

constexpr double ambient = 298.15;
auto constant(double watts) {
  return [watts](double) { return watts; };
}

TEST(ThermalNetwork, OneNodeReaches63PercentAtOneTimeConstant) {
  // C_th·dT/dt = P − (T − Ta)/R_th: rise = P·R_th·(1 − e^(−t/τ)), τ = R_th·C_th; at t = τ the fraction is
  // 1 − e^−1 = 0.632121 ([R-thermal-network] [derived]; IEC 60539-1 thermal time constant, [R-NTC-thermal]).
  const auto network = made(OneNodeParameters{.heat_capacity = 15.5, .thermal_resistance = 2.0});
  const double power = 10.0, tau = 31.0;
  const auto run = integrate(network, constant(power), ambient, tau, 2000);
  const double fraction = (network.element_temperature(run.states, ambient) - ambient) / (power * 2.0);
  EXPECT_NEAR(fraction, 1.0 - std::exp(-1.0), 1e-10);  // RK4 error at τ/2000 is ~1e-14
  EXPECT_NEAR(fraction, 0.632121, 5e-7);                 // the quoted 6 digits
}

TEST(ThermalNetwork, AdiabaticRiseOfAluminaBody) {
  // ΔT = E/(m·c), α-alumina c = 0.775 J/(g·K) at 298 K (NBS SRM 720, Ditmars et al., J. Res. NBS 75A, 1971
  // [pub], [R-alumina-heat]): 80 J into 20 g → 5.16 K [derived]. 80 J is also ½·C·V² for 1 mF to 400 V
  // ([R-RC-energy]).
  EXPECT_NEAR(adiabatic_temperature_rise(80.0, 0.020, 775.0), 5.16, 5e-3);
  const auto network = made(OneNodeParameters{.heat_capacity = 0.020 * 775.0,
                                              .thermal_resistance = std::numeric_limits<double>::infinity()});
  // Deliver the 80 J as 800 W for 0.1 s.
  const auto run = integrate(network, constant(800.0), ambient, 0.1, 100);
  EXPECT_NEAR(network.element_temperature(run.states, ambient) - ambient, 80.0 / 15.5, 1e-12);
  EXPECT_NEAR(network.stored_heat(run.states, ambient), 80.0, 1e-10);
  EXPECT_DOUBLE_EQ(run.heat_out, 0.0);
}

// A three-term fit of illustrative shape (time constants spread over three decades).
const std::vector<FosterTerm> foster_terms{{0.5, 0.2}, {1.5, 5.0}, {3.0, 120.0}};

double foster_impedance(double t) {
  // Z_th(t) = Σ R_i·(1 − e^(−t/τ_i)) ([R-thermal-network]).
  double z = 0.0;
  for (const auto& term : foster_terms) z += term.thermal_resistance * (1.0 - std::exp(-t / term.time_constant));
  return z;
}

TEST(ThermalNetwork, FosterMatchesClosedFormImpedance) {
  const auto network = made(foster_terms);
  ASSERT_EQ(network.state_count(), 3u);
  const double power = 25.0;
  for (double t : {0.05, 0.2, 1.0, 10.0, 100.0, 600.0}) {
    // Step h ≤ 0.002 s = τ_min/100: RK4 relative error ~ (h/τ)^4/120, below 1e-9.
    const int steps = static_cast<int>(std::ceil(t / 0.002));
    const auto run = integrate(network, constant(power), ambient, t, steps);
    EXPECT_NEAR(network.element_temperature(run.states, ambient) - ambient, power * foster_impedance(t),
                1e-9 * power * 5.0)
        << "t = " << t;
  }
}

TEST(ThermalNetwork, FosterSingleTermEqualsOneNode) {
  // One Foster term (R, τ) is the one-node network with C = τ/R.
  const auto foster = made(std::vector<FosterTerm>{{2.0, 31.0}});
  const auto node = made(OneNodeParameters{.heat_capacity = 15.5, .thermal_resistance = 2.0});
  const auto a = integrate(foster, constant(10.0), ambient, 40.0, 4000);
  const auto b = integrate(node, constant(10.0), ambient, 40.0, 4000);
  EXPECT_NEAR(foster.element_temperature(a.states, ambient), node.element_temperature(b.states, ambient), 1e-10);
  EXPECT_NEAR(foster.stored_heat(a.states, ambient), node.stored_heat(b.states, ambient), 1e-9);
  EXPECT_NEAR(a.heat_out, b.heat_out, 1e-9);
}

const TwoNodeParameters two_node{.element_heat_capacity = 2.0,
                                 .element_to_body_resistance = 0.8,
                                 .body_heat_capacity = 60.0,
                                 .body_to_ambient_resistance = 2.5};

TEST(ThermalNetwork, TwoNodeSteadyStateIsPowerTimesSeriesResistance) {
  // At equilibrium all of P flows through R12 and R2a in series: T1 − Ta = P·(R12 + R2a) [derived].
  const auto network = made(two_node);
  const double power = 12.0;
  const std::vector<double> steady{ambient + power * (0.8 + 2.5), ambient + power * 2.5};
  std::vector<double> rates(2);
  network.derivatives(steady, power, ambient, rates);
  EXPECT_NEAR(rates[0], 0.0, 1e-12);
  EXPECT_NEAR(rates[1], 0.0, 1e-12);
  EXPECT_DOUBLE_EQ(network.total_thermal_resistance(), 3.3);
  // And the transient gets there: slowest time constant ≈ (C1 + C2)·R2a ≈ 155 s, run 30 of them.
  const auto run = integrate(network, constant(power), ambient, 4650.0, 200000);
  EXPECT_NEAR(network.element_temperature(run.states, ambient), ambient + power * 3.3, 1e-8);
}

TEST(ThermalNetwork, EnergyBalanceClosesForEveryNetwork) {
  // ∫P dt = stored heat + ∫heat_to_ambient dt, for the exponentially decaying resistor power of an RC
  // pre-charge, P = P0·e^(−t/τ_e) (τ_e = RC/2), here P0 = 40 W, τ_e = 1 s.
  auto pulse = [](double t) { return 40.0 * std::exp(-t); };
  const double delivered = 40.0 * (1.0 - std::exp(-6.0));  // ∫0^6 40·e^(−t) dt [derived]
  for (const auto& network : {made(OneNodeParameters{.heat_capacity = 15.5, .thermal_resistance = 2.0}),
                              made(two_node), made(foster_terms)}) {
    const auto run = integrate(network, pulse, ambient, 6.0, 6000);
    EXPECT_NEAR(network.stored_heat(run.states, ambient) + run.heat_out, delivered, 1e-9 * delivered)
        << network.state_count() << " states";
  }
}

TEST(ThermalNetwork, FosterStoresAllHeatAtShortTimes) {
  // For t ≪ every τ_i no heat can have reached ambient: stored heat ≈ P·t (adiabatic limit).
  const auto network = made(foster_terms);
  const auto run = integrate(network, constant(10.0), ambient, 1e-4, 100);
  EXPECT_NEAR(network.stored_heat(run.states, ambient), 10.0 * 1e-4, 1e-3 * 10.0 * 1e-4);
}

TEST(ThermalNetwork, JacobiansMatchFiniteDifferences) {
  for (const auto& network : {made(OneNodeParameters{.heat_capacity = 15.5, .thermal_resistance = 2.0}),
                              made(two_node), made(foster_terms)}) {
    const std::size_t n = network.state_count();
    std::vector<double> x(n), jacobian(n * n), by_power(n), by_ambient(n), gradient(n);
    for (std::size_t i = 0; i < n; ++i) x[i] = 1.0 + 7.0 * static_cast<double>(i);
    if (n <= 2)
      for (auto& value : x) value += ambient;  // node states are absolute
    network.state_jacobian(jacobian);
    network.power_jacobian(by_power);
    network.ambient_jacobian(by_ambient);
    network.element_temperature_gradient(gradient);
    const double power = 5.0, h = 1e-3;
    std::vector<double> up(n), down(n);
    // The system is linear, so central differences are exact up to round-off (~1e-13 here).
    for (std::size_t j = 0; j < n; ++j) {
      auto xp = x, xm = x;
      xp[j] += h;
      xm[j] -= h;
      network.derivatives(xp, power, ambient, up);
      network.derivatives(xm, power, ambient, down);
      for (std::size_t i = 0; i < n; ++i)
        EXPECT_NEAR(jacobian[i * n + j], (up[i] - down[i]) / (2 * h), 1e-9) << i << "," << j;
      EXPECT_NEAR(gradient[j],
                  (network.element_temperature(xp, ambient) - network.element_temperature(xm, ambient)) / (2 * h),
                  1e-9);
    }
    network.derivatives(x, power + h, ambient, up);
    network.derivatives(x, power - h, ambient, down);
    for (std::size_t i = 0; i < n; ++i) EXPECT_NEAR(by_power[i], (up[i] - down[i]) / (2 * h), 1e-9);
    network.derivatives(x, power, ambient + h, up);
    network.derivatives(x, power, ambient - h, down);
    for (std::size_t i = 0; i < n; ++i) EXPECT_NEAR(by_ambient[i], (up[i] - down[i]) / (2 * h), 1e-9);
  }
}

TEST(ThermalNetwork, RejectsBadParameters) {
  std::string error = refused(OneNodeParameters{.heat_capacity = 0.0, .thermal_resistance = 1.0});
  EXPECT_NE(error.find("heat_capacity = 0"), std::string::npos) << error;
  auto bad = two_node;
  bad.element_to_body_resistance = std::numeric_limits<double>::infinity();
  error = refused(bad);
  EXPECT_NE(error.find("element_to_body_resistance = inf"), std::string::npos) << error;
  error = refused(std::vector<FosterTerm>{{1.0, 1.0}, {2.0, -3.0}});
  EXPECT_NE(error.find("terms[1].time_constant = -3"), std::string::npos) << error;
  EXPECT_NE(refused(std::vector<FosterTerm>{}).find("terms.size()"), std::string::npos);
}

TEST(ThermalNetwork, ThermalImpedanceMatchesTheStepResponseOfEveryNetwork) {
  // Z_th(t) in closed form (the eigenmodes of the 2×2 system for the two-node network, [R-thermal-network])
  // against a 1 W step integrated by RK4 with h = τ_min/400 (relative error far below 1e-8).
  const auto two = made(two_node);
  const auto adiabatic_body = made(TwoNodeParameters{.element_heat_capacity = 0.4,
                                                     .element_to_body_resistance = 3.0,
                                                     .body_heat_capacity = 25.0,
                                                     .body_to_ambient_resistance =
                                                         std::numeric_limits<double>::infinity()});
  const auto one = made(OneNodeParameters{.heat_capacity = 15.5, .thermal_resistance = 2.0});
  for (const auto* network : {&two, &adiabatic_body, &one}) {
    for (double t : {0.01, 0.3, 2.0, 40.0}) {
      const int steps = static_cast<int>(std::ceil(t / 0.003)) + 10;
      const auto run = integrate(*network, constant(1.0), ambient, t, steps);
      const double rise = network->element_temperature(run.states, ambient) - ambient;
      EXPECT_NEAR(network->thermal_impedance(t), rise, 1e-8 * rise + 1e-12) << network->state_count() << " t = " << t;
    }
  }
  // The limits every network obeys: adiabatic at first, Z → t/C1; the series sum at steady state.
  EXPECT_NEAR(two.thermal_impedance(1e-6), 1e-6 / 2.0, 1e-6 * 1e-6);
  EXPECT_NEAR(two.thermal_impedance(1e5), 3.3, 1e-9);
  // An adiabatic body: after the element settles to the body, everything heats as one, Z → t/(C1 + C2) + R12·C2²/(C1+C2)².
  const double t = 2000.0, c1 = 0.4, c2 = 25.0;
  EXPECT_NEAR(adiabatic_body.thermal_impedance(t), t / (c1 + c2) + 3.0 * c2 * c2 / ((c1 + c2) * (c1 + c2)), 1e-9 * t);
  EXPECT_NEAR(made(foster_terms).thermal_impedance(5.0), foster_impedance(5.0), 1e-12);
}

TEST(ThermalNetwork, OnlyTheTwoNodeNetworkHasABody) {
  const auto two = made(two_node);
  EXPECT_TRUE(two.has_body());
  EXPECT_FALSE(made(foster_terms).has_body());
  const std::vector<double> states{ambient + 40.0, ambient + 10.0};
  EXPECT_DOUBLE_EQ(two.body_temperature(states, ambient), ambient + 10.0);
  EXPECT_DOUBLE_EQ(two.element_temperature(states, ambient), ambient + 40.0);
}

}  // namespace
}  // namespace linkrise::models
