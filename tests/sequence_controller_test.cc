// The BMS sequence controller against closed forms (sources: docs/references.md, cited by tag at each check).
// Solver tolerances are tight (rtol 1e-10); times the controller decides are exact by construction (samples
// at start + k·period, delays added), so they are compared to 1e-12 s; waveform-derived values to 1e-6 relative
// (10⁴ rtol, the global error of these runs) unless a check says otherwise.
#include "solver/sequence_controller.h"

#include <gtest/gtest.h>

#include <cmath>
#include <complex>
#include <string>

#include "analysis/energy_audit.h"
#include "analysis/stall.h"
#include "analysis/verdict.h"
#include "netlist/sequence_spec.h"
#include "tests/circuit_fixture.h"
#include "tests/sequence_fixture.h"

namespace {
using linkrise::analysis::Evaluation;
using linkrise::solver::Result;
using linkrise::solver::SequenceReport;
using linkrise::testing::SequenceRun;
using linkrise::testing::Simulation;

constexpr double kV = 400.0;
constexpr double kTime = 1e-12;  // s

// Ideal 400 V source, pre-charge contactor + resistor, main contactor straight to the link node, and a load
// part across the link (`load` is its YAML). k_main's open resistance is made huge so the only charging path
// before closure is the pre-charge branch (its finite value is still included where it matters). The contacts are
// ideal switches (no arc, no parting ramp), as the closed forms below assume; the arc has its own tests
// (contactor_test.cc).
std::string case_text(const std::string& load, const std::string& sequence_extra, const std::string& duration,
                      const std::string& resistor = "{name: r_pre, kind: resistor, nodes: [mid, link], "
                                                    "resistance: 100 Ohm}") {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: k_pre, kind: contactor, nodes: [plus, mid], closed_resistance: 10 mOhm, closing_delay: 7 ms,"
         " opening_delay: 2 ms, arc: off, parting_time: 0 s}\n"
         "  - " + resistor + "\n"
         "  - {name: k_main, kind: contactor, nodes: [plus, link], closed_resistance: 1 mOhm, open_resistance: "
         "1e15 Ohm, closing_delay: 11 ms, arc: off, parting_time: 0 s}\n"
         "  - " + load + "\n"
         "sequence:\n"
         "  start_closed: [k_pre]\n"
         "  precharge: k_pre\n"
         "  main: k_main\n"
         "  resistor: r_pre\n"
         "  pack: [plus, gnd]\n"
         "  link: [link, gnd]\n" +
         sequence_extra + "run: {duration: " + duration + "}\n";
}
}  // namespace

// Decision at the first BMS sample after the RC crossing, closure one actuation delay later.
// RC charging from v1: v(t) = V + (v1 − V)·e^(−t/RC) ([R-RC-charge]: Alexander & Sadiku ch. 7 [mem]).
TEST(SequenceController, DecisionIsQuantisedToTheSampleAndClosureDelayedByTheActuationDelay) {
  SequenceRun run(case_text("{name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}",
                            "  overlap: 5 ms\n  close_when: {ratio: 90 %}\n  sample_period: 3 ms\n  start: 2 ms\n"
                            "  timeout: 2 s\n",
                            "400 ms"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  EXPECT_EQ(run.report.attempts, 1);
  const double start = 2e-3, period = 3e-3, c = 1e-3;
  const double contacts = start + 7e-3;  // k_pre closing delay
  // Before k_pre touches, the link charges through the open contacts: (1e8 + 100 Ω) ∥ 1e15 Ω.
  const double r_open = 1.0 / (1.0 / (100e6 + 100.0) + 1.0 / 1e15);
  const double v1 = kV * (1.0 - std::exp(-contacts / (r_open * c)));
  const double r_closed = 1.0 / (1.0 / (100.0 + 0.01) + 1.0 / 1e15);
  const double crossing = contacts + r_closed * c * std::log((kV - v1) / (kV - 0.9 * kV));
  const double decision = start + std::ceil((crossing - start) / period) * period;
  ASSERT_GT(decision - crossing, 1e-4) << "the crossing must not sit on a sample for this check";

  EXPECT_NEAR(run.when("attempt 1 starts"), start, kTime);
  EXPECT_NEAR(run.when("close k_pre"), contacts, kTime);
  EXPECT_NEAR(run.when("decide to close k_main"), decision, kTime);
  EXPECT_NEAR(run.when("close k_main"), decision + 11e-3, kTime);
  EXPECT_NEAR(run.when("open k_pre"), decision + 11e-3 + 5e-3 + 2e-3, kTime);  // overlap, then opening delay
  EXPECT_NEAR(run.metric("sequence.decision_time"), decision, kTime);
  EXPECT_NEAR(run.metric("sequence.main_close_time"), decision + 11e-3, kTime);
  EXPECT_NEAR(run.metric("sequence.precharge_time"), decision + 11e-3 - start, kTime);
  // The watch puts a row at the crossing, so the analyser's time to threshold is the closed form's.
  EXPECT_NEAR(run.metric("sequence.time_to_threshold"), crossing - start, 1e-6 * (crossing - start));
  // ΔV left at closure: V − v(t_close) from the same closed form.
  double t_close = decision + 11e-3;
  double v_close = kV + (v1 - kV) * std::exp(-(t_close - contacts) / (r_closed * c));
  EXPECT_NEAR(run.metric("sequence.voltage_step_at_close"), kV - v_close, 1e-6 * kV);
  EXPECT_TRUE(run.evaluation.pass);
}

// A 50 W constant-power load that draws from 0 V on, behind 100 Ω + 10 mΩ from 400 V: its equilibria are
// [Vs ± √(Vs² − 4PR)]/2 = 387.1 V and 12.92 V ([R-CPL-equilibrium]). The upper one lies above the 95 % closing
// level, but below its 10 V resistive floor the load is the resistance (10 V)²/50 W = 2 Ohm, so the link holds
// at the divider 400 V · 2/(100.01 + 2) = 7.842 V [Ohm's law] — under the lower root, which it cannot pass.
// The diagnostic must say so, not that the link settles at 387 V.
TEST(SequenceController, StallDiagnosticNamesALatchAtTheBottom) {
  SequenceRun run(case_text("{name: cpl, kind: constant_power_load, nodes: [link, gnd], power: 50 W}",
                            "  close_when: {ratio: 95 %}\n  sample_period: 1 ms\n  timeout: 60 ms\n", "200 ms"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Timeout);
  ASSERT_TRUE(run.evaluation.stall.has_value());
  const auto& stall = *run.evaluation.stall;
  EXPECT_TRUE(stall.stalls);
  EXPECT_TRUE(stall.latched);
  const double divider = 400.0 * 2.0 / (100.01 + 2.0);
  EXPECT_NEAR(stall.link_voltage, divider, 1e-6 * divider);
  EXPECT_NEAR(stall.lower_root, 0.5 * (400.0 - std::sqrt(400.0 * 400.0 - 4.0 * 50.0 * 100.01)), 1e-6);
  EXPECT_GT(stall.equilibrium, stall.closing_level);
  EXPECT_NE(stall.explanation.find("stall at the bottom"), std::string::npos) << stall.explanation;
  EXPECT_NE(stall.explanation.find("7.842 V"), std::string::npos) << stall.explanation;
}

// A 10 kW constant-power load behind 1 Ω from 400 V settles at v = [Vs + √(Vs² − 4PR)]/2 = 373.2051 V
// ([R-CPL-equilibrium]: Simpson-Porco, Dörfler & Bullo, arXiv:1503.04769), below a 95 % closing level (380 V):
// the charge stalls and the timeout fires at the first sample 60 ms after the start.
TEST(SequenceController, TimeoutFiresAtTheConfiguredTimeOnAConstantPowerStall) {
  EXPECT_NEAR(linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 10e3), 373.2051, 5e-5);  // [R-CPL-equilibrium]
  // The load starts above 300 V (from 0 V a 10 kW load would pin the link in its resistive low-voltage region).
  SequenceRun run(case_text("{name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
                            "  - {name: cpl, kind: constant_power_load, nodes: [link, gnd], power: 10 kW, "
                            "enable_voltage: 300 V, disable_voltage: 250 V}",
                            "  close_when: {ratio: 95 %}\n  sample_period: 1 ms\n  timeout: 60 ms\n"
                            "  rise_check: {above: 50 %, by: 20 ms}\n",
                            "200 ms",
                            "{name: r_pre, kind: resistor, nodes: [mid, link], resistance: 0.99 Ohm}"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Timeout);
  EXPECT_EQ(run.report.attempts, 1);
  EXPECT_NEAR(run.report.first_fault_time, 60e-3, kTime);
  EXPECT_NEAR(run.metric("sequence.detection_time"), 60e-3, kTime);
  // Path resistance: 0.99 Ω + 10 mΩ contact = 1 Ω exactly, so the stall voltage is the check value.
  double settled = linkrise::testing::value_at(run.result.steps, "link", 60e-3);
  EXPECT_NEAR(settled, 373.2051, 5e-4);
  EXPECT_NEAR(settled, linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 10e3), 1e-6 * kV);
  ASSERT_TRUE(run.evaluation.stall.has_value());
  EXPECT_TRUE(run.evaluation.stall->stalls);
  EXPECT_NEAR(run.evaluation.stall->path_resistance, 1.0, 1e-6);
  EXPECT_NEAR(run.evaluation.stall->equilibrium, 373.2051, 5e-4);
  EXPECT_EQ(run.metric("sequence.stall"), 1.0);
  EXPECT_FALSE(run.evaluation.pass);  // an unexpected fault fails the verdict
  // After the last fault the contacts open (2 ms delay, at 62 ms) and the controller ends the run at its next
  // sample, 63 ms — exactly there, not at the end of the solver step that holds that sample (the end, and every
  // integral up to it, once moved with the step placement).
  EXPECT_EQ(run.result.outcome, linkrise::solver::Outcome::SupervisorFinished);
  EXPECT_NEAR(run.result.end_time, 63e-3, kTime);
  EXPECT_NEAR(run.result.steps.times().back(), 63e-3, kTime);
}

// Capacitance removed (1 µF stray instead of 1 mF): the link meets the rule within a sample, long before the
// minimum pre-charge time, so "too fast" fires at the first sample after the contacts touch.
TEST(SequenceController, TooFastFiresWithTheCapacitanceRemoved) {
  SequenceRun run(case_text("{name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 uF}",
                            "  close_when: {ratio: 95 %}\n  sample_period: 1 ms\n  minimum_time: 20 ms\n"
                            "  timeout: 200 ms\n",
                            "100 ms"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::TooFast);
  // k_pre touches at 7 ms; RC = 0.1 ms, so at the 8 ms sample the link is at 1 − e^(−10) of the pack.
  EXPECT_NEAR(run.report.first_fault_time, 8e-3, kTime);
  EXPECT_TRUE(std::isnan(run.metric("sequence.main_close_time")));
}

// A shorted link (10 mΩ instead of the capacitor): the link stays near 0 V and the rise check fires at the
// first sample at or after 15 ms. While the contacts are closed the resistor takes I²R with I = V/(R_total)
// (Ohm's and Joule's laws, [R-Ohm-Joule]); its heat is the audit's energy account.
TEST(SequenceController, NoRiseFiresIntoAShort) {
  SequenceRun run(case_text("{name: short, kind: resistor, nodes: [link, gnd], resistance: 10 mOhm}",
                            "  close_when: {ratio: 95 %}\n  sample_period: 1 ms\n  timeout: 200 ms\n"
                            "  rise_check: {above: 20 %, by: 15 ms}\n",
                            "100 ms"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::NoRise);
  EXPECT_NEAR(run.report.first_fault_time, 15e-3, kTime);
  // Contacts closed from 7 ms to 15 ms + 2 ms opening delay.
  const double r_total = 0.01 + 100.0 + 0.01;
  const double current = kV / r_total;
  int r_pre = run.sim.circuit.find_part("r_pre");
  double expected = current * current * 100.0 * (17e-3 - 7e-3);
  // Before the contacts touch and after they part the path is open (1e8 Ω): a leak of ~1e-6 of the pulse.
  EXPECT_NEAR(run.audit.parts[r_pre].dissipated, expected, 1e-5 * expected);
  EXPECT_NEAR(run.metric("r_pre.energy"), expected, 1e-5 * expected);
}

// Retries into a short: each attempt is one rectangular pulse of I²R for the time the contacts are closed; with
// an adiabatic lumped element (C_th·dT/dt = P) the temperature climbs by E/C_th per attempt and holds during the
// cool-down ([R-thermal-network]: adiabatic rise ΔT = E/(m·c)).
TEST(SequenceController, RetriesCarryTheResistorTemperatureAcrossAttempts) {
  SequenceRun run(case_text("{name: short, kind: resistor, nodes: [link, gnd], resistance: 10 mOhm}",
                            "  close_when: {ratio: 95 %}\n  sample_period: 1 ms\n  timeout: 200 ms\n"
                            "  rise_check: {above: 20 %, by: 15 ms}\n  attempts: 3\n  cool_down: 100 ms\n",
                            "500 ms",
                            "{name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm, "
                            "thermal: {heat_capacity: 10 J/K, thermal_resistance: adiabatic}}"));
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::NoRise);
  ASSERT_EQ(run.report.attempts, 3);
  // Attempts start at the first sample 100 ms after each fault: 0, 115 ms, 230 ms; faults 15 ms after each.
  EXPECT_NEAR(run.report.history[1].start, 115e-3, kTime);
  EXPECT_NEAR(run.report.history[2].start, 230e-3, kTime);
  EXPECT_NEAR(run.report.history[2].fault_time, 245e-3, kTime);
  const double current = kV / (0.01 + 100.0 + 0.01);
  const double pulse = current * current * 100.0 * 10e-3;  // closed from start + 7 ms to fault + 2 ms
  const double heat_capacity = 10.0;
  for (int attempt = 1; attempt <= 3; ++attempt) {
    // Temperature just before the next attempt (or at the end): ambient + n·E/C_th.
    double t = attempt < 3 ? run.report.history[attempt].start : run.result.end_time;
    double temperature = linkrise::testing::value_at(run.result.steps, "r_pre.temperature", t);
    EXPECT_NEAR(temperature, 25.0 + attempt * pulse / heat_capacity, 1e-5 * attempt * pulse / heat_capacity)
        << "after attempt " << attempt;
  }
  EXPECT_NEAR(run.metric("r_pre.peak_temperature"), 25.0 + 3.0 * pulse / heat_capacity, 1e-4);
  EXPECT_NEAR(run.metric("r_pre.energy"), 3.0 * pulse, 1e-5 * 3.0 * pulse);
}

// Closing inrush: after the decision the main contactor closes onto the link through a series L and R with
// the pre-charge branch opened at the same instant. From the state left at closure (ΔV = V − vC0, inductor
// current i0) the series RLC gives i(s) = e^(−αs)·[A cos ωd s + B sin ωd s] with A = i0,
// B = (di0 + α·i0)/ωd, di0 = (ΔV − R·i0)/L ([R-RLC-step]: Wikibooks "Electronics/RCL time domain" and
// Alexander & Sadiku ch. 8; the zero-state form there is the case i0 = 0). Its peak lies where the derivative
// vanishes: tan(ωd s) = (ωd·B − α·A)/(α·B + ωd·A). The capacitor's first maximum lies at the first zero of i.
// ∫ i² ds over the whole ring follows from energy conservation: [½·C·ΔV² + ½·L·i0²]/R.
TEST(SequenceController, ClosingInrushPeakMatchesTheSeriesRlcClosedForm) {
  const double l = 2e-6, c = 1e-3, r_main = 1e-3, r_coil = 5e-3;
  std::string yaml =
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: k_pre, kind: contactor, nodes: [plus, mid], closed_resistance: 10 mOhm}\n"
      "  - {name: r_pre, kind: resistor, nodes: [mid, bus], resistance: 20 Ohm}\n"
      "  - {name: k_main, kind: contactor, nodes: [plus, bus], closed_resistance: 1 mOhm, open_resistance: "
      "1e15 Ohm, closing_delay: 5 ms}\n"
      "  - {name: l1, kind: inductor, nodes: [bus, link], inductance: 2 uH, resistance: 5 mOhm}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "sequence:\n"
      "  start_closed: [k_pre]\n  precharge: k_pre\n  main: k_main\n  resistor: r_pre\n"
      "  pack: [plus, gnd]\n  link: [link, gnd]\n  overlap: 0 s\n"
      "  close_when: {ratio: 90 %}\n  sample_period: 1 ms\n  timeout: 1 s\n"
      "run: {duration: 120 ms}\n";
  SequenceRun run(yaml, 1e-10, 1e-12);
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  const double t_close = run.metric("sequence.main_close_time");
  ASSERT_FALSE(std::isnan(t_close));
  const double v0 = linkrise::testing::value_at(run.result.steps, "link", t_close);
  // The row before the switching holds the inductor current the pre-charge branch left.
  int column = run.result.steps.column("l1.current");
  double i0 = NAN;
  for (std::size_t row = 0; row < run.result.steps.row_count(); ++row) {
    if (run.result.steps.time(row) == t_close) {
      i0 = run.result.steps.value(row, column);
      break;
    }
  }
  ASSERT_FALSE(std::isnan(i0));
  const double r = r_main + r_coil, dv = kV - v0;
  EXPECT_NEAR(run.metric("sequence.voltage_step_at_close"), dv, 1e-9 * kV);
  const double alpha = r / (2.0 * l), w0 = 1.0 / std::sqrt(l * c), wd = std::sqrt(w0 * w0 - alpha * alpha);
  const double a = i0, di0 = (dv - r * i0) / l, b = (di0 + alpha * i0) / wd;
  auto current = [&](double s) { return std::exp(-alpha * s) * (a * std::cos(wd * s) + b * std::sin(wd * s)); };
  double s_peak = std::atan2(wd * b - alpha * a, alpha * b + wd * a) / wd;
  if (s_peak < 0.0) s_peak += M_PI / wd;
  const double peak = current(s_peak);
  EXPECT_GT(peak, 100.0);  // a real inrush, not the pre-charge current
  // Peak refined between solver rows by a parabola: error ~ (h/T)³, well below 1e-5 at these steps.
  EXPECT_NEAR(run.metric("sequence.peak_main_current"), peak, 1e-5 * peak);
  // Link overshoot: vC at the first zero of i, vC0 + (1/C)·∫ i ds = vC0 + Re[(A − iB)(e^(pS) − 1)/p]/C.
  double s_zero = std::atan2(-a, b) / wd;
  while (s_zero <= s_peak) s_zero += M_PI / wd;
  std::complex<double> p(-alpha, wd), coefficient(a, -b);
  double charge = std::real(coefficient * (std::exp(p * s_zero) - 1.0) / p);
  double overshoot = v0 + charge / c - kV;
  EXPECT_GT(overshoot, 1.0);
  EXPECT_NEAR(run.metric("sequence.link_overshoot"), overshoot, 1e-5 * dv);
  double i2t = (0.5 * c * dv * dv + 0.5 * l * i0 * i0) / r;
  EXPECT_NEAR(run.metric("sequence.main_current_squared_time"), i2t, 1e-6 * i2t);
}

// The contact bounce of the main contactor: the contact opens and closes again `bounce_count` times after its
// first touch, each gap and each touch lasting bounce_interval.
TEST(SequenceController, MainContactBouncesAsConfigured) {
  std::string load = "{name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}";
  std::string text = case_text(load, "  close_when: {ratio: 90 %}\n  sample_period: 1 ms\n  timeout: 1 s\n", "400 ms");
  std::string from = "closing_delay: 11 ms,";
  text.replace(text.find(from), from.size(), "closing_delay: 11 ms, bounce_count: 2, bounce_interval: 0.5 ms,");
  SequenceRun run(text);
  ASSERT_EQ(run.report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  double touch = run.metric("sequence.main_close_time");
  std::vector<std::pair<double, std::string>> moves;
  for (const auto& entry : run.result.timeline) {
    if (entry.event.ends_with("k_main") && entry.event.rfind("decide", 0) != 0) moves.emplace_back(entry.time, entry.event);
  }
  ASSERT_EQ(moves.size(), 5u);
  for (std::size_t k = 0; k < moves.size(); ++k) {
    EXPECT_NEAR(moves[k].first, touch + 0.5e-3 * static_cast<double>(k), kTime);
    EXPECT_EQ(moves[k].second, k % 2 == 0 ? "close k_main" : "bounce k_main");
  }
}
