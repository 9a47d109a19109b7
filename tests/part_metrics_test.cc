// Per-part metrics of resistive parts (analysis/part_metrics.h) against closed forms, and the three stored
// pre-charge comparison cases (invented scenarios) run end to end.
#include "analysis/part_metrics.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "analysis/energy_audit.h"
#include "netlist/case.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::analysis::resistive_metrics;
using linkrise::solver::Circuit;
using linkrise::solver::Waveform;
using linkrise::testing::case_from;
using linkrise::testing::column;

// i(t) = I0·e^(−t/τ) sampled at a uniform step h: ∫i² dt over [0, T] = I0²·τ/2·(1 − e^(−2T/τ)) [closed form].
// The trapezoid rule's relative error for e^(−2t/τ) is (2h/τ)²/12 to leading order (Euler–Maclaurin, from
// memory; docs/references.md [R-trapezoid-error]), so at h = τ/20 it is 8.3e-4: the test asserts the documented
// size, and that it is not exact.
TEST(PartMetrics, TrapezoidSquareIntegralHasItsDocumentedAccuracy) {
  const double tau = 0.1, current = 10.0, h = tau / 20, end = 1.0;
  Waveform waveform({"r.current [A]"});
  for (int k = 0; k * h <= end + 1e-12; ++k) waveform.add_row(k * h, {current * std::exp(-k * h / tau)});
  const double exact = current * current * tau / 2 * (1 - std::exp(-2 * end / tau));
  const double relative = linkrise::analysis::square_integral_trapezoid(waveform, 0) / exact - 1.0;
  const double predicted = (2 * h / tau) * (2 * h / tau) / 12;
  EXPECT_NEAR(relative, predicted, 0.05 * predicted);
  EXPECT_NEAR(linkrise::analysis::peak_absolute(waveform, 0), current, 1e-12);
}

// Two rows at one switching instant add nothing, so a current step is integrated exactly: i = 2 A for 1 s
// then 0 gives 4 A²s.
TEST(PartMetrics, TrapezoidIsExactAcrossASwitchingInstant) {
  Waveform waveform({"r.current [A]"});
  waveform.add_row(0.0, {2.0});
  waveform.add_row(1.0, {2.0});
  waveform.add_row(1.0, {0.0});
  waveform.add_row(2.0, {0.0});
  EXPECT_DOUBLE_EQ(linkrise::analysis::square_integral_trapezoid(waveform, 0), 4.0);
}

// Which parts count as resistive, and the metric names the ratings refer to.
TEST(PartMetrics, ResistivePartsAndMetricNames) {
  Circuit circuit(case_from(
      "ground: gnd\nparts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 100 V}\n"
      "  - {name: k1, kind: contactor, nodes: [plus, a], initial: closed}\n"
      "  - {name: r1, kind: resistor, nodes: [a, link], resistance: 10 Ohm}\n"
      "  - {name: p1, kind: ptc_thermistor, nodes: [a, link], minimum_resistance: 10 Ohm,"
      " reference_temperature: 120 degC, slope: 10 %/K, maximum_resistance: 10 kOhm,"
      " thermal: {heat_capacity: 5 J/K, thermal_resistance: 10 K/W}}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF, esr: 1 mOhm}\n"
      "run: {duration: 100 ms}\n"));
  EXPECT_FALSE(linkrise::analysis::is_resistive(circuit, circuit.find_part("source")));
  EXPECT_TRUE(linkrise::analysis::is_resistive(circuit, circuit.find_part("k1")));
  EXPECT_TRUE(linkrise::analysis::is_resistive(circuit, circuit.find_part("r1")));
  EXPECT_TRUE(linkrise::analysis::is_resistive(circuit, circuit.find_part("p1")));
  EXPECT_FALSE(linkrise::analysis::is_resistive(circuit, circuit.find_part("c1")));
  auto options = linkrise::solver::options_from(circuit);
  auto result = linkrise::solver::simulate(circuit, options);
  auto audit = linkrise::analysis::audit_energy(circuit, result);
  auto all = linkrise::analysis::all_resistive_metrics(circuit, result, audit);
  ASSERT_EQ(all.size(), 3u);
  auto plain = all[1].named();
  ASSERT_EQ(plain.size(), 9u);  // no temperature for a plain resistor
  EXPECT_EQ(plain[0].name, "peak_power");
  EXPECT_EQ(plain[1].name, "energy");
  EXPECT_EQ(plain[2].name, "current_squared_time");
  EXPECT_EQ(plain[3].name, "peak_voltage");
  EXPECT_EQ(plain[4].name, "average_power");
  EXPECT_EQ(plain[5].name, "duty_average_power");
  EXPECT_TRUE(std::isnan(plain[5].value));  // no key cycles: no duty stated, nothing to judge a continuous rating by
  EXPECT_EQ(plain[6].name, "peak_current");
  EXPECT_EQ(plain[7].name, "peak_pulse_energy");
  EXPECT_EQ(plain[8].name, "switched_capacitance");
  // Mean heat over the run: the integrated energy divided by the run's length.
  EXPECT_NEAR(plain[4].value, all[1].energy / result.end_time, 1e-12 * (1.0 + plain[4].value));
  // A plain resistor's ∫i² dt is a solver quadrature; the trapezoid over the rows agrees to its own error.
  EXPECT_TRUE(all[1].current_squared_integrated);
  const double trapezoid = linkrise::analysis::square_integral_trapezoid(
      result.steps, static_cast<int>(circuit.node_names().size()) + circuit.signal_first(circuit.find_part("r1")));
  EXPECT_NEAR(all[1].current_squared_time, trapezoid, 1e-3 * trapezoid);
  auto thermal = all[2].named();
  ASSERT_EQ(thermal.size(), 10u);
  EXPECT_EQ(thermal[0].name, "peak_temperature");
  EXPECT_EQ(thermal[0].unit, "degC");
  EXPECT_TRUE(all[2].current_squared_integrated);
  // Both branches start at 100 V across 10 Ohm [Ohm's law]: peak power V²/R = 1 kW, peak voltage 100 V.
  // The first instant's 100 V is shared with the 0.3 mOhm contactor and the 1 mOhm ESR: 1 W and 0.1 V cover
  // that 1.3e-4 drop; the test is about which row holds the peak, not the divider.
  EXPECT_NEAR(all[1].peak_power, 1000.0, 1.0);
  EXPECT_NEAR(all[1].peak_voltage, 100.0, 0.1);
}

// A cable's heat is its I²R alone; the power into its inductance (L·i·di/dt) is a signal and a metric of its own.
// Overdamped series RLC step ([R-RLC-step]): 100 V through 10 Ohm and a cable of 0.1 Ohm and 100 uH onto 1 mF,
// i(t) = V/(L·(s1 − s2))·(e^(s1·t) − e^(s2·t)); the heat peaks with the current (R·i², [R-Ohm-Joule]) and the
// inductance's power L·i·di/dt is largest in magnitude on the current's rise, both taken here from the closed
// form on a fine grid. At every row the terminal power v·i is the sum of the two (energy conservation).
TEST(PartMetrics, ACablesHeatAndThePowerIntoItsInductanceAreApart) {
  linkrise::testing::Simulation sim(
      "ground: gnd\nparts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 100 V}\n"
      "  - {name: r1, kind: resistor, nodes: [plus, a], resistance: 10 Ohm}\n"
      "  - {name: cable, kind: cable, nodes: [a, link], resistance: 0.1 Ohm, inductance: 100 uH}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "run: {duration: 20 ms}\n");
  sim.tight(1e-10, 1e-12);
  const auto result = sim.run();
  const auto audit = linkrise::analysis::audit_energy(sim.circuit, result);
  const auto metrics = resistive_metrics(sim.circuit, result, audit, sim.circuit.find_part("cable"));

  const double v = 100.0, r = 10.1, rc = 0.1, l = 100e-6, c = 1e-3;
  const double alpha = r / (2 * l), w0 = 1 / std::sqrt(l * c);
  const double s1 = -alpha + std::sqrt(alpha * alpha - w0 * w0), s2 = -alpha - std::sqrt(alpha * alpha - w0 * w0);
  auto current = [&](double t) { return v / (l * (s1 - s2)) * (std::exp(s1 * t) - std::exp(s2 * t)); };
  auto slope = [&](double t) { return v / (l * (s1 - s2)) * (s1 * std::exp(s1 * t) - s2 * std::exp(s2 * t)); };
  const double t_peak = std::log(s2 / s1) / (s1 - s2);
  double stored_peak = 0.0;
  for (double t = 0.0; t < 20e-3; t += 1e-9 + t * 1e-4) stored_peak = std::max(stored_peak, std::fabs(l * current(t) * slope(t)));

  EXPECT_NEAR(metrics.peak_power, rc * current(t_peak) * current(t_peak), 1e-5 * rc * current(t_peak) * current(t_peak));
  ASSERT_TRUE(metrics.peak_stored_power.has_value());
  EXPECT_NEAR(*metrics.peak_stored_power, stored_peak, 1e-4 * stored_peak);
  EXPECT_GT(*metrics.peak_stored_power, 10.0 * metrics.peak_power);  // the terminal power is mostly the inductance's
  const auto heat = column(result.steps, "cable.heat_power");
  const auto stored = column(result.steps, "cable.stored_power");
  const auto terminal = column(result.steps, "cable.power");
  for (std::size_t k = 0; k < terminal.size(); ++k) EXPECT_NEAR(heat[k] + stored[k], terminal[k], 1e-9 * stored_peak);
  // A plain resistor stores nothing and has no such signal; the capacitor without ESR takes no heat.
  EXPECT_LT(result.steps.column("r1.stored_power"), 0);
  EXPECT_LT(result.steps.column("c1.heat_power"), 0);
  EXPECT_GE(result.steps.column("c1.stored_power"), 0);
}

// The three invented comparison cases: each closes its energy audit to 1e-6, and the technologies differ the
// way docs/resistor-technologies.md describes — the NTC (falling R) charges fastest, the PTC (rising R when hot)
// slowest and runs hottest, and each absorbs a different energy.
TEST(PartMetrics, PrechargeComparisonCasesShowTheTechnologies) {
  struct Outcome {
    double peak_temperature, energy, charge_time;
  };
  auto run = [](const std::string& name) {
    Circuit circuit(linkrise::netlist::load_case(std::string(LINKRISE_SOURCE_DIR) + "/cases/" + name));
    auto result = linkrise::solver::simulate(circuit, linkrise::solver::options_from(circuit));
    EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
    auto audit = linkrise::analysis::audit_energy(circuit, result);
    EXPECT_LT(audit.relative_residual, 1e-6) << name;
    auto metrics = resistive_metrics(circuit, result, audit, circuit.find_part("r_pre"));
    auto link = column(result.steps, "link_plus");
    double charge_time = NAN;
    for (std::size_t r = 0; r < link.size(); ++r) {
      if (link[r] >= 0.90 * 176 * 3.7) {  // 90 % of the pack's open-circuit voltage at 50 % SOC
        charge_time = result.steps.time(r);
        break;
      }
    }
    return Outcome{metrics.peak_temperature.value_or(NAN), metrics.energy, charge_time};
  };
  Outcome fixed = run("precharge_fixed.yaml"), ptc = run("precharge_ptc.yaml"), ntc = run("precharge_ntc.yaml");
  EXPECT_LT(ntc.charge_time, fixed.charge_time);
  EXPECT_LT(fixed.charge_time, ptc.charge_time);
  // The wire-wound part's small element (its heat capacity from its pulse curve) runs hotter than the PTC, which
  // reaches its switch region (reference temperature 100 degC) and limits itself there.
  EXPECT_GT(fixed.peak_temperature, ptc.peak_temperature);
  EXPECT_GT(ptc.peak_temperature, 100.0);
  EXPECT_LT(ptc.peak_temperature, 100.0 + 20.0);
  EXPECT_GT(ptc.peak_temperature, ntc.peak_temperature);
  EXPECT_GT(std::fabs(fixed.energy - ntc.energy), 1.0);
  EXPECT_GT(std::fabs(fixed.energy - ptc.energy), 0.5);
}
}  // namespace
