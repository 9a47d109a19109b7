// The sequence controller's checks for faults a real BMS must tell apart (solver/sequence_controller.h): a live
// bus (the closing rule from both sides), welded contactors (the weld check) and a main contactor that never
// closed (the closure check). Times come from RC closed forms ([R-RC-charge], docs/references.md) at rtol 1e-10,
// so each decision is compared exactly with the first BMS sample after the closed-form crossing.
#include "solver/sequence_controller.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "netlist/sequence_spec.h"
#include "tests/sequence_fixture.h"

namespace {
using linkrise::netlist::SequenceOutcome;

constexpr double kPeriod = 1e-3;  // s, the BMS sample period of every case here
constexpr double kTime = 1e-12;   // s: sample times are exact by construction

using Checked = linkrise::testing::SequenceRun;

// The timeline as text, for failure messages.
std::string timeline(const Checked& run) {
  std::string text;
  for (const auto& entry : run.result.timeline) text += entry.event + " @ " + std::to_string(entry.time) + "\n";
  return text;
}

// The first sample k·period at or after `time` (samples start at 0 s), refusing crossings too near a sample.
double first_sample_after(double time) {
  double sample = std::ceil(time / kPeriod) * kPeriod;
  EXPECT_GT(sample - time, 1e-6) << "the crossing sits on a sample: choose other values";
  return sample;
}

// 400 V pack, negative contactor, pre-charge contactor + 100 Ohm, main contactor, 1 mF link with a 2 kOhm load.
// `extra_parts` and `sequence_extra` add to the case; `stuck` edits go into the contactors' own fields.
std::string rack(const std::string& sequence_extra, const std::string& neg = "", const std::string& pre = "",
                 const std::string& main = "", const std::string& extra_parts = "",
                 const std::string& link_extra = "") {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: pack, kind: dc_source, nodes: [pack_plus, gnd], voltage: 400 V}\n"
         "  - {name: k_neg, kind: contactor, nodes: [bus_minus, gnd], closing_delay: 2.5 ms, opening_delay: 1.5 ms" +
         neg + "}\n"
         "  - {name: k_pre, kind: contactor, nodes: [pack_plus, mid], closing_delay: 2.5 ms, opening_delay: 1.5 ms" +
         pre + "}\n"
         "  - {name: r_pre, kind: resistor, nodes: [mid, link_plus], resistance: 100 Ohm}\n"
         "  - {name: k_main, kind: contactor, nodes: [pack_plus, link_plus], closed_resistance: 1 mOhm, "
         "open_resistance: 1e15 Ohm, closing_delay: 2.5 ms, opening_delay: 1.5 ms" + main + "}\n"
         "  - {name: link, kind: capacitor, nodes: [link_plus, bus_minus], capacitance: 1 mF" + link_extra + "}\n"
         "  - {name: load, kind: resistor, nodes: [link_plus, bus_minus], resistance: 2 kOhm}\n" +
         extra_parts +
         "sequence:\n"
         "  start_closed: [k_neg, k_pre]\n"
         "  precharge: k_pre\n"
         "  main: k_main\n"
         "  resistor: r_pre\n"
         "  overlap: 10 ms\n"
         "  pack: [pack_plus, gnd]\n"
         "  link: [link_plus, bus_minus]\n"
         "  sample_period: 1 ms\n"
         "  timeout: 1 s\n" +
         sequence_extra + "run: {duration: 1.5 s}\n";
}

const std::string kRatio = "  close_when: {ratio: 95 %}\n";
const std::string kWeldCheck =
    "  weld_check:\n"
    "    - {close: [k_neg], hold: 20 ms, below: 10 %}\n"
    "    - {close: [k_pre], hold: 20 ms, below: 10 %}\n";

// A link charged before the BMS wakes already meets the rule when the attempt begins: live_bus at the start,
// before any coil moves — not too_fast.
TEST(SequenceChecks, ALinkAlreadyChargedIsALiveBus) {
  Checked run(rack(kRatio + "  minimum_time: 50 ms\n", "", "", "", "", ", initial_voltage: 390 V"));
  EXPECT_EQ(run.report.outcome, SequenceOutcome::LiveBus) << timeline(run);
  EXPECT_NEAR(run.report.first_fault_time, 0.0, kTime);
  EXPECT_TRUE(std::isnan(run.when("close k_pre"))) << timeline(run);
}

// A 480 V source through 100 Ohm on the link beside the pre-charge path: once k_neg touches, the link heads for
// the Thevenin level (400/100 + 480/100)/(1/100 + 1/100 + 1/2000) = 429.3 V with τ = 1 mF over that conductance
// (the 2 kOhm load included). A rate condition keeps the rule from closing while the link still rises, so it
// crosses the rule's upper side pack/0.95 = 421.05 V: live_bus at the first sample after (Thevenin's theorem and
// [R-RC-charge]).
TEST(SequenceChecks, ALinkAboveThePackIsALiveBusNotAClosure) {
  Checked run(rack("  close_when: {ratio: 95 %, max_rate: 10 V/s}\n", "", "", "",
                   "  - {name: charger, kind: dc_source, nodes: [charger_plus, gnd], voltage: 480 V}\n"
                   "  - {name: r_charger, kind: resistor, nodes: [charger_plus, link_plus], resistance: 100 Ohm}\n"));
  ASSERT_EQ(run.report.outcome, SequenceOutcome::LiveBus) << timeline(run);
  // Before k_neg touches (2.5 ms) the link is open on its minus side; from then on three conductances feed it.
  const double g = 1.0 / 100.0 + 1.0 / 100.0 + 1.0 / 2000.0;
  const double level = (400.0 / 100.0 + 480.0 / 100.0) / g, tau = 1e-3 / g;
  const double crossing = 2.5e-3 - tau * std::log(1.0 - (400.0 / 0.95) / level);
  EXPECT_NEAR(run.report.first_fault_time, first_sample_after(crossing), kTime);
}

// The weld check passes on a sound circuit: each step holds 20 ms, its contacts part 1.5 ms after release, and
// the next step — then the pre-charge — begins at the first sample after they parted.
TEST(SequenceChecks, WeldCheckStepsThenPrechargeOnASoundCircuit) {
  Checked run(rack(kRatio + kWeldCheck));
  EXPECT_EQ(run.report.outcome, SequenceOutcome::Closed) << timeline(run);
  EXPECT_NEAR(run.when("weld check 1 of 2"), 0.0, kTime);
  EXPECT_NEAR(run.when("weld check 2 of 2"), 22e-3, kTime);  // 20 ms hold, parted at 21.5 ms
  EXPECT_NEAR(run.when("pre-charge 1 starts"), 44e-3, kTime);
  // The attempt's times run from the pre-charge: k_neg and k_pre touch 2.5 ms later, 95 % of 400 V on the
  // 1 mF link charged through 100 Ohm with the 2 kOhm load (Thevenin: 380.95 V, τ = 95.24 ms).
  const double thevenin = 400.0 * 2000.0 / 2100.0, tau = (100.0 * 2000.0 / 2100.0) * 1e-3;
  const double crossing = 44e-3 + 2.5e-3 - tau * std::log(1.0 - 380.0 / thevenin);
  EXPECT_NEAR(run.report.history.front().decision, first_sample_after(crossing), kTime);
}

// A welded main contactor: with k_neg closed alone the link jumps to the pack at once (1 mOhm · 1 mF = 1 µs):
// caught at the first sample after k_neg touches. A welded pre-charge contactor: the link rises through 100 Ohm,
// reaching 10 % of 400 V at t = −τ·ln(1 − 40/V_th) after k_neg touches. A welded k_neg: the second step (k_pre
// alone) charges it the same way.
TEST(SequenceChecks, WeldCheckCatchesEachWeldedContactor) {
  const double thevenin = 400.0 * 2000.0 / 2100.0, tau = (100.0 * 2000.0 / 2100.0) * 1e-3;
  const double through_resistor = -tau * std::log(1.0 - 40.0 / thevenin);
  {
    Checked run(rack(kRatio + kWeldCheck, "", "", ", stuck: closed"));
    EXPECT_EQ(run.report.outcome, SequenceOutcome::Welded) << timeline(run);
    EXPECT_NEAR(run.report.first_fault_time, first_sample_after(2.5e-3), kTime);
    EXPECT_NE(run.report.history.front().reason.find("k_pre or k_main"), std::string::npos)
        << run.report.history.front().reason;
  }
  {
    Checked run(rack(kRatio + kWeldCheck, "", ", stuck: closed"));
    EXPECT_EQ(run.report.outcome, SequenceOutcome::Welded) << timeline(run);
    EXPECT_NEAR(run.report.first_fault_time, first_sample_after(2.5e-3 + through_resistor), kTime);
  }
  {
    Checked run(rack(kRatio + kWeldCheck, ", stuck: closed"));
    EXPECT_EQ(run.report.outcome, SequenceOutcome::Welded) << timeline(run);
    EXPECT_NEAR(run.report.first_fault_time, first_sample_after(22e-3 + 2.5e-3 + through_resistor), kTime);
    EXPECT_NE(run.report.history.front().reason.find("weld check 2"), std::string::npos);
  }
}

// A main contactor that never touches: once the pre-charge contacts part, the 2 kOhm load drains the link,
// v = v_r·e^(−(t − t_r)/(2 kΩ · 1 mF)) ([R-RC-charge], a discharge), so 300 ms later it reads e^(−0.15) = 86 %
// of its value, under the check's 90 %: main_failed at that sample. A sound main holds the link at the pack.
TEST(SequenceChecks, ClosureCheckCatchesAMainContactorThatNeverClosed) {
  const std::string check = kRatio + "  closure_check: {after: 300 ms, above: 90 %}\n";
  {
    Checked sound(rack(check));
    EXPECT_EQ(sound.report.outcome, SequenceOutcome::Closed) << timeline(sound);
    // The release is a sample plus 2.5 ms + 10 ms + 1.5 ms: itself on a sample, and so is the check.
    EXPECT_NEAR(sound.when("closure verified"), sound.report.history.front().released + 0.3, 1e-9);
  }
  Checked failed(rack(check, "", "", ", stuck: open"));
  ASSERT_EQ(failed.report.outcome, SequenceOutcome::MainFailed) << timeline(failed);
  const auto& attempt = failed.report.history.front();
  EXPECT_NEAR(failed.report.first_fault_time, attempt.released + 0.3, 1e-9);
  EXPECT_NE(attempt.reason.find("k_main did not close"), std::string::npos) << attempt.reason;
}
}  // namespace
