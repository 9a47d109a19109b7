// Pulses judged against a resistor's data-sheet pulse curve (analysis/pulses.h, models/pulse_curve.h).
// Closed forms ([R-RC-energy], docs/references.md): an RC pre-charge heats its resistor with P0·e^(−2t/τ),
// P0 = V²/R, τ = R·C, so the pulse carries E = P0·τ/2 — ½·C·V² — and its equivalent rectangular length E/P0 is τ/2.
#include "analysis/pulses.h"

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "analysis/energy_audit.h"
#include "analysis/limits.h"
#include "analysis/metrics.h"
#include "analysis/part_metrics.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::analysis::judge_pulses;
using linkrise::analysis::split_pulses;
using linkrise::models::PulseCurve;

// P0·e^(−2(t − t0)/τ) from each start on a fine grid, zero before the first.
std::vector<double> exponential_pulses(const std::vector<double>& times, const std::vector<double>& starts,
                                       double p0, double tau) {
  std::vector<double> power(times.size(), 0.0);
  for (std::size_t r = 0; r < times.size(); ++r) {
    for (double start : starts) {
      if (times[r] >= start && times[r] < start + 20.0 * tau) power[r] = p0 * std::exp(-2.0 * (times[r] - start) / tau);
    }
  }
  return power;
}

TEST(Pulses, AnRcPulseIsHalfCvSquaredOverHalfATimeConstant) {
  const double p0 = 1600.0, tau = 0.1;
  std::vector<double> times;
  for (int k = 0; k <= 400000; ++k) times.push_back(k * 1e-5);  // 4 s in 10 µs rows
  auto pulses = split_pulses(times, exponential_pulses(times, {0.5, 2.5}, p0, tau));
  ASSERT_EQ(pulses.size(), 2u);
  for (const auto& pulse : pulses) {
    // The tail below 1e-4 of the peak is left out: 1e-4 of the energy at most.
    EXPECT_NEAR(pulse.energy, p0 * tau / 2.0, 2e-4 * p0 * tau / 2.0);
    EXPECT_NEAR(pulse.peak_power, p0, 1e-9);
    EXPECT_NEAR(pulse.length(), tau / 2.0, 2e-4 * tau / 2.0);
  }
  EXPECT_NEAR(pulses[0].start, 0.5, 1e-5);
  EXPECT_NEAR(pulses[1].start, 2.5, 1e-5);
}

TEST(Pulses, CurveIsReadLogLogAndTheRepetitiveOneAppliesToRepeatedPulses) {
  PulseCurve single{PulseCurve::Measure::Energy, false, {10e-3, 100e-3}, {40.0, 160.0}};
  PulseCurve repetitive{PulseCurve::Measure::Energy, true, {10e-3, 100e-3}, {10.0, 40.0}};
  // Log-log between rows: 40·(50/10)^(ln 4/ln 10) J at 50 ms; the first value below the table; the last
  // segment's slope beyond it.
  const double slope = std::log(4.0) / std::log(10.0);
  EXPECT_NEAR(single.permitted(50e-3), 40.0 * std::pow(5.0, slope), 1e-9);
  EXPECT_NEAR(single.permitted(1e-3), 40.0, 1e-12);
  EXPECT_NEAR(single.permitted(1.0), 160.0 * std::pow(10.0, slope), 1e-9);
  linkrise::analysis::Pulse one{0.0, 0.3, 80.0, 1600.0};  // 50 ms equivalent
  auto alone = judge_pulses({one}, {single, repetitive});
  ASSERT_TRUE(alone.has_value());
  EXPECT_EQ(alone->curve, "pulse_energy_curve");
  EXPECT_NEAR(alone->use, 80.0 / single.permitted(50e-3), 1e-12);
  linkrise::analysis::Pulse two{2.0, 2.3, 60.0, 1600.0};
  auto both = judge_pulses({one, two}, {single, repetitive});
  ASSERT_TRUE(both.has_value());
  EXPECT_EQ(both->curve, "repetitive_pulse_energy_curve");
  EXPECT_EQ(both->count, 2);
  EXPECT_NEAR(both->pulse.start, 0.0, 1e-12);  // the larger one
  EXPECT_NEAR(both->use, 80.0 / repetitive.permitted(50e-3), 1e-12);
}

// 400 V into 1 mF through 100 Ohm: 80 J in an equivalent 50 ms pulse, where the part's curve permits
// 40·5^(ln 4/ln 10) = 105 J: 76 % of the curve, while a plain 600 J pulse_energy rating hides how close it is.
TEST(Pulses, APrechargeIsJudgedAgainstThePartsCurveInTheCircuit) {
  linkrise::testing::Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: r_pre, kind: resistor, nodes: [plus, link], resistance: 100 Ohm,\n"
      "     ratings: {pulse_energy: 600 J, pulse_energy_curve: [[10 ms, 40 J], [100 ms, 160 J]]}}\n"
      "  - {name: link, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "run: {duration: 2 s}\n");
  sim.tight(1e-10, 1e-10);
  auto result = sim.run();
  auto audit = linkrise::analysis::audit_energy(sim.circuit, result);
  auto all = linkrise::analysis::all_resistive_metrics(sim.circuit, result, audit);
  ASSERT_EQ(all.size(), 1u);
  ASSERT_TRUE(all[0].pulse_curve_use.has_value());
  const double permitted = 40.0 * std::pow(5.0, std::log(4.0) / std::log(10.0));
  EXPECT_NEAR(*all[0].pulse_curve_use, 80.0 / permitted, 2e-3 * 80.0 / permitted);
  EXPECT_NEAR(*all[0].worst_pulse_length, 0.05, 2e-3 * 0.05);
  EXPECT_NEAR(*all[0].worst_pulse_start, 0.0, 1e-12);
  // One pulse: its energy is the RC charge's ½·C·V² = 80 J ([R-RC-energy]).
  EXPECT_NEAR(all[0].peak_pulse_energy, 80.0, 2e-3 * 80.0);
  auto ratings = sim.circuit.part(sim.circuit.find_part("r_pre")).ratings();
  ASSERT_EQ(ratings.back().metric, "pulse_curve_use");
  EXPECT_NEAR(ratings.back().value, 1.0, 1e-12);
}
}  // namespace

// A data-sheet curve states the element's thermal impedance: Z_th(t) = (T_max − T_amb)/P_max(t)
// ([R-pulse-curve], docs/references.md). An adiabatic element of 3 J/K limited to a 150 K rise may take
// E = 450 J at any length (Z_th = t/C), so every row gives back C = 3 J/K, and Z_th(10 ms) = 10 ms/3 J/K.
TEST(PulseCurve, TheCurveFixesTheElementHeatCapacity) {
  PulseCurve adiabatic{PulseCurve::Measure::Energy, false, {1e-3, 10e-3, 100e-3}, {450.0, 450.0, 450.0}};
  std::size_t row = 9;
  EXPECT_NEAR(linkrise::models::element_heat_capacity_from_curve(adiabatic, 150.0, &row), 3.0, 1e-12);
  EXPECT_NEAR(linkrise::models::curve_thermal_impedance(adiabatic, 1, 150.0), 10e-3 / 3.0, 1e-15);
  // A real curve rises with the length (the body takes heat): the shortest row decides, C = 20 J/150 K.
  PulseCurve wirewound{PulseCurve::Measure::Energy, false, {1e-3, 100e-3, 1.0}, {20.0, 120.0, 400.0}};
  EXPECT_NEAR(linkrise::models::element_heat_capacity_from_curve(wirewound, 150.0, &row), 20.0 / 150.0, 1e-12);
  EXPECT_EQ(row, 0u);
  // A power curve: P_max(t) directly, Z_th = rise/P, C = P·t/rise.
  PulseCurve film{PulseCurve::Measure::PeakPower, false, {1e-3, 1e-2}, {3000.0, 600.0}};
  EXPECT_NEAR(linkrise::models::curve_thermal_impedance(film, 1, 150.0), 0.25, 1e-15);
  EXPECT_NEAR(linkrise::models::element_heat_capacity_from_curve(film, 150.0, &row), 3000.0 * 1e-3 / 150.0, 1e-15);
}

TEST(PulseCurve, TheVerdictNamesTheRowsThatDecide) {
  PulseCurve curve{PulseCurve::Measure::Energy, false, {1e-3, 100e-3, 1.0}, {20.0, 120.0, 400.0}};
  EXPECT_EQ(curve.rows_at(30e-3), "rows 1–2 (1 ms 20 J … 100 ms 120 J)");
  EXPECT_EQ(curve.rows_at(0.5e-3), "row 1 (1 ms 20 J), held below it");
  EXPECT_EQ(curve.rows_at(3.0), "rows 2–3 (100 ms 120 J … 1 s 400 J), extended beyond the last row");
}

// A PTC's capacitance per switching: an RC charge from 0 to V puts C·V through the part while V stands across it
// at the start ([R-RC-charge]). The pulse ends where its heat falls to 1e-4 of the peak (i to 1 % of i0), so the
// charge it counts is 99 % of C·V: 400 V into 1 mF through 100 Ohm reads 0.99 mF, above a 0.9 mF rating.
TEST(Pulses, ThePulsesChargeOverItsVoltageIsTheCapacitanceSwitched) {
  linkrise::testing::Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: r1, kind: resistor, nodes: [plus, link], resistance: 100 Ohm,"
      " ratings: {max_switching_capacitance: 0.9 mF}}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "run: {duration: 1 s}\n");
  const auto result = sim.tight(1e-9, 1e-10).run();
  const auto audit = linkrise::analysis::audit_energy(sim.circuit, result);
  const auto metrics = linkrise::analysis::resistive_metrics(sim.circuit, result, audit, sim.circuit.find_part("r1"));
  EXPECT_NEAR(metrics.switched_capacitance, 0.99e-3, 2e-3 * 0.99e-3);
  auto limits = linkrise::analysis::judge_limits(linkrise::analysis::rating_limits(sim.circuit),
                                                  linkrise::analysis::part_metrics(sim.circuit, result, audit, std::nan("")));
  ASSERT_EQ(limits.size(), 1u);
  EXPECT_FALSE(limits[0].pass);
  EXPECT_EQ(limits[0].metric, "r1.switched_capacitance");
  EXPECT_NE(limits[0].origin.find("ratings.max_switching_capacitance at test.yaml:"), std::string::npos) << limits[0].origin;
}
