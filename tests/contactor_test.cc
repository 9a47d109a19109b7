// Contactor parting model: the resistance rises as Rc·(Ro/Rc)^p over parting_time while p goes 0 -> 1.
#include <gtest/gtest.h>

#include <cmath>

#include "tests/circuit_fixture.h"

using linkrise::testing::Simulation;

namespace {
// Invented test circuit: 100 V source, 1 Ohm load resistor, a closed contactor that opens at 10 ms.
std::string circuit(const std::string& parting, const std::string& inductance) {
  std::string yaml =
      "title: parting test\n"
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [top, gnd], voltage: 100 V}\n"
      "  - {name: k1, kind: contactor, nodes: [top, mid], initial: closed, closed_resistance: 1 mOhm,\n"
      "     open_resistance: 1 MOhm" + parting + "}\n";
  if (inductance.empty()) {
    yaml += "  - {name: r1, kind: resistor, nodes: [mid, gnd], resistance: 1 Ohm}\n";
  } else {
    yaml += "  - {name: l1, kind: inductor, nodes: [mid, out], inductance: " + inductance + "}\n"
            "  - {name: r1, kind: resistor, nodes: [out, gnd], resistance: 1 Ohm}\n";
  }
  yaml += "events:\n  - {at: 10 ms, open: k1}\nrun: {duration: 12 ms}\n";
  return yaml;
}

}  // namespace

// Without inductance the current is algebraic: Ohm's law with the exponential parting resistance,
// i(t) = V / (R + Rc·exp(ln(Ro/Rc)·(t − t0)/T)).
TEST(ContactorParting, ResistiveCurrentFollowsTheExponentialRamp) {
  Simulation simulation(circuit(", parting_time: 100 us", ""));
  simulation.tight();
  simulation.options.sample = 5e-6;
  auto result = simulation.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  const double span = std::log(1e6 / 1e-3);
  int column = result.samples.column("r1.current");
  ASSERT_GE(column, 0);
  for (std::size_t r = 0; r < result.samples.row_count(); ++r) {
    double t = result.samples.time(r);
    if (t <= 10e-3 + 1e-9 || t >= 10.1e-3 - 1e-9) continue;
    double contact = 1e-3 * std::exp(span * (t - 10e-3) / 100e-6);
    double expected = 100.0 / (1.0 + contact);
    // The parting progress is a state at atol 1e-12 × its tolerance scale 1e4: its error of ~1e-8 times
    // ln(Ro/Rc) ≈ 21 moves R by ~2e-7 relative, hence 1e-6 of the current scale.
    EXPECT_NEAR(result.samples.value(r, column), expected, 1e-6 * 100.0) << "t = " << t;
  }
  // After the parting the gap holds off the full open resistance: i = V/(R + Ro).
  double after = result.samples.value(result.samples.row_count() - 1, column);
  EXPECT_NEAR(after, 100.0 / (1.0 + 1e6), 1e-9);
  bool opened = false;
  for (const auto& entry : result.timeline) opened = opened || entry.event == "state event k1";
  EXPECT_TRUE(opened);
}

// With 10 uH carrying 100 A, an instant 1 MOhm step would put about i·Ro = 100 MV across the gap. The parting
// ramp lets the current commutate once the gap resistance reaches about L·ln(Ro/Rc)/T = 2.1 Ohm, so the gap
// voltage stays in the hundreds of volts (bounded here by V + L·i·ln(Ro/Rc)/T·e, a generous margin).
TEST(ContactorParting, InductiveCurrentCommutatesWithoutAMegavoltSpike) {
  Simulation gradual(circuit(", parting_time: 100 us", "10 uH"));
  auto result = gradual.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  int voltage = result.steps.column("k1.voltage");
  double peak = 0.0;
  for (std::size_t r = 0; r < result.steps.row_count(); ++r) peak = std::max(peak, std::fabs(result.steps.value(r, voltage)));
  const double rate = 10e-6 * 100.0 * std::log(1e9) / 100e-6;
  EXPECT_LT(peak, 100.0 + rate * std::exp(1.0));
  EXPECT_GT(peak, 100.0);  // the inductance does push the gap above the supply voltage
  Simulation instant(circuit("", "10 uH"));
  auto sudden = instant.run();
  ASSERT_EQ(sudden.outcome, linkrise::solver::Outcome::Completed) << sudden.message;
  int sudden_voltage = sudden.steps.column("k1.voltage");
  double sudden_peak = 0.0;
  for (std::size_t r = 0; r < sudden.steps.row_count(); ++r)
    sudden_peak = std::max(sudden_peak, std::fabs(sudden.steps.value(r, sudden_voltage)));
  EXPECT_GT(sudden_peak, 100.0 * peak);
}
