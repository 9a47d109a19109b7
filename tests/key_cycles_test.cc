// Key cycles (sequence.key_cycles, solver/sequence_controller.h): a duty of repeated pre-charges heats the
// resistor cycle after cycle. Checked against the periodic response of a first-order thermal network
// ([R-thermal-network], docs/references.md): short pulses of energy E every P seconds into a heat capacity C
// cooling through R_th (τ = R_th·C) raise it, just after the n-th pulse, by (E/C)·(1 − aⁿ)/(1 − a), a = e^(−P/τ).
#include "solver/sequence_controller.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "tests/sequence_fixture.h"

namespace {

// 400 V, 100 Ohm pre-charge resistor with a one-node thermal model (20 J/K, 3 K/W: τ = 60 s), 1 mF link with a
// 5 kOhm bleed (discharge τ = 5 s, so a 40 s key-off leaves e^(−8) of the voltage), closing at 95 %.
std::string duty_case(int cycles) {
  return "ground: gnd\n"
         "ambient: 25 degC\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: k_pre, kind: contactor, nodes: [plus, mid], closed_resistance: 1 mOhm}\n"
         "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm,\n"
         "     thermal: {heat_capacity: 20 J/K, thermal_resistance: 3 K/W}, ratings: {continuous_power: 1 W}}\n"
         "  - {name: k_main, kind: contactor, nodes: [plus, link], closed_resistance: 1 mOhm, closing_delay: 10 ms}\n"
         "  - {name: c_link, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
         "  - {name: bleed, kind: resistor, nodes: [link, gnd], resistance: 5 kOhm}\n"
         "sequence:\n"
         "  start_closed: [k_pre]\n"
         "  precharge: k_pre\n"
         "  main: k_main\n"
         "  resistor: r_pre\n"
         "  overlap: 20 ms\n"
         "  pack: [plus, gnd]\n"
         "  link: [link, gnd]\n"
         "  close_when: {ratio: 95 %}\n"
         "  sample_period: 10 ms\n"
         "  timeout: 2 s\n"
         "  key_cycles: {count: " + std::to_string(cycles) + ", on_time: 5 s, off_time: 40 s}\n"
         "run: {duration: " + std::to_string(46 * cycles) + " s}\n";
}

// A run of the duty at rtol = atol = 1e-9.
struct Duty : linkrise::testing::SequenceRun {
  explicit Duty(int cycles) : SequenceRun(duty_case(cycles), 1e-9, 1e-9) {}
  // When each attempt started ("attempt N starts").
  std::vector<double> starts() const {
    std::vector<double> times;
    for (const auto& entry : result.timeline) {
      if (entry.event.rfind("attempt ", 0) == 0 && entry.event.find("starts") != std::string::npos) {
        times.push_back(entry.time);
      }
    }
    return times;
  }
};

TEST(KeyCycles, EachCycleClosesAndTheResistorHeatsTowardsThePeriodicState) {
  const int n = 4;
  Duty duty(n);
  ASSERT_EQ(duty.report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  EXPECT_EQ(duty.report.cycles, n);
  ASSERT_EQ(duty.report.attempts, n);  // one attempt per cycle, none failed
  for (int k = 0; k < n; ++k) EXPECT_EQ(duty.report.history[static_cast<std::size_t>(k)].cycle, k + 1);
  const auto starts = duty.starts();
  ASSERT_EQ(starts.size(), static_cast<std::size_t>(n));
  // Every cycle is the same (the link drains to e^(−8) between them), so the period is constant.
  const double period = starts[1] - starts[0];
  for (int k = 2; k < n; ++k) EXPECT_NEAR(starts[static_cast<std::size_t>(k)] - starts[static_cast<std::size_t>(k - 1)], period, 1e-9);
  // Key-off 5 s after the main contacts touch, then 40 s off; the starts fall on 10 ms samples.
  const auto& first = duty.report.history.front();
  EXPECT_NEAR(period, std::ceil((first.main_closed + 5.0 - starts[0]) / 10e-3 - 1e-9) * 10e-3 + 40.0, 1e-9);

  const double energy = duty.evaluation.metrics.value("r_pre.energy");  // the whole duty
  const double per_cycle = energy / n;
  // Each charge until the main contacts touch (T after the start): with the bleed the link follows
  // V_th·(1 − e^(−t/τ)), V_th = 400·5k/5.1k, τ = (100 ∥ 5k)·1 mF (Thevenin, [R-RC-charge]), and the resistor
  // carries (V − v)/R: E = ∫(V − v)²/R dt = [(V − V_th)²·T + 2(V − V_th)·V_th·τ·(1 − e^(−T/τ))
  // + V_th²·τ/2·(1 − e^(−2T/τ))]/R. The 1 mOhm contacts and the e^(−8) left on the link are below 0.1 %.
  const double source = 400.0, r = 100.0, thevenin = source * 5000.0 / 5100.0, tc = (r * 5000.0 / 5100.0) * 1e-3;
  const double t_close = first.main_closed - first.start;
  const double expected_energy =
      ((source - thevenin) * (source - thevenin) * t_close +
       2.0 * (source - thevenin) * thevenin * tc * (1.0 - std::exp(-t_close / tc)) +
       thevenin * thevenin * tc / 2.0 * (1.0 - std::exp(-2.0 * t_close / tc))) / r;
  EXPECT_NEAR(per_cycle, expected_energy, 2e-3 * expected_energy);
  const double heat_capacity = 20.0, tau = 3.0 * 20.0, a = std::exp(-period / tau);
  const double rise = per_cycle / heat_capacity * (1.0 - std::pow(a, n)) / (1.0 - a);
  const double peak = duty.evaluation.metrics.value("r_pre.peak_temperature") - 25.0;
  // The pulses last about 0.4 s against τ = 60 s: the network cools by under 1 % of the rise while one lasts.
  EXPECT_NEAR(peak, rise, 0.01 * rise);
  // The continuous rating is judged over the duty, not the run: the heat of all cycles over their length — the
  // last cycle's start plus its charge, on_time and off_time — here about E/P, whatever run.duration says.
  const auto& last = duty.report.history.back();
  const double duty_length = (starts.back() - starts.front()) + (last.main_closed - last.start) + 5.0 + 40.0;
  EXPECT_NEAR(duty.evaluation.metrics.value("r_pre.duty_average_power"), energy / duty_length, 1e-12 * energy);
  EXPECT_NEAR(duty_length, n * period, 10e-3);  // the key-off waits for a 10 ms sample
  bool judged = false;
  for (const auto& limit : duty.evaluation.limits) {
    if (limit.metric != "r_pre.duty_average_power") continue;
    judged = limit.judged;
    EXPECT_FALSE(limit.pass);  // about 1.8 W against the 1 W rating
  }
  EXPECT_TRUE(judged);
  // A single cycle heats it by E/C only: the duty is what the rating must take.
  EXPECT_GT(peak, 1.5 * per_cycle / heat_capacity);
}

// A 250 ms timeout is too short from 0 V (95 % takes 3.47·98 ms = 0.34 s) but enough from where the first
// attempt left the link (361.6 V, less 2 % in the 100 ms cool-down: 0.11 s to go). So every cycle times out once
// and closes on its retry: with retries counted per cycle, two cycles use four attempts and end closed.
TEST(KeyCycles, RetriesCountPerCycle) {
  std::string text = duty_case(2);
  text.replace(text.find("  timeout: 2 s\n"), 14, "  timeout: 250 ms\n  attempts: 2\n  cool_down: 100 ms\n");
  linkrise::testing::SequenceRun run(text, 1e-9, 1e-9);
  const auto& report = run.report;
  EXPECT_EQ(report.outcome, linkrise::netlist::SequenceOutcome::Closed);
  ASSERT_EQ(report.attempts, 4);
  EXPECT_EQ(report.cycles, 2);
  for (int k = 0; k < 4; ++k) {
    const auto& attempt = report.history[static_cast<std::size_t>(k)];
    EXPECT_EQ(attempt.cycle, 1 + k / 2);
    EXPECT_EQ(attempt.fault.has_value(), k % 2 == 0) << "attempt " << k + 1;
  }
}
}  // namespace
