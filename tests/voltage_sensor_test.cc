// The BMS voltage channel (models/voltage_sensor.h) against closed forms: the RC charge seen through a gain and
// offset error, a first-order filter, a sampling skew, divider loading and the converter's resolution.
// Sources (docs/references.md): [R-RC-charge] for v(t) = V(1 − e^(−t/T)); [R-first-order-filter] for a first-order
// lag driven by that exponential; Ohm's law for the divider. Runs at rtol 1e-10, so waveform values are compared
// to 1e-7 relative and controller decisions (whole BMS samples) exactly.
#include "models/voltage_sensor.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "tests/sequence_fixture.h"

namespace {
using linkrise::testing::Simulation;

constexpr double kV = 400.0;
constexpr double kR = 100.0, kC = 1e-3, kT = kR * kC;  // Ohm, F, s
constexpr double kPeriod = 1e-3;                         // BMS sample period, s

// An ideal 400 V source charging 1 mF through 100 Ohm from t = 0 (the pre-charge contactor starts closed and
// touches at once), the link read by `sensor` (its YAML fields after the nodes), closing at 95 % of the pack.
std::string sensed_case(const std::string& sensor, const std::string& duration = "0.6 s") {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
         "  - {name: k_pre, kind: contactor, nodes: [plus, mid], closed_resistance: 1 nOhm, initial: closed}\n"
         "  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 100 Ohm}\n"
         "  - {name: k_main, kind: contactor, nodes: [plus, link], closed_resistance: 1 mOhm, open_resistance: "
         "1e15 Ohm}\n"
         "  - {name: c_link, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
         "  - {name: link_sense, kind: voltage_sensor, nodes: [link, gnd]" + sensor + "}\n"
         "sequence:\n"
         "  start_closed: [k_pre]\n"
         "  precharge: k_pre\n"
         "  main: k_main\n"
         "  resistor: r_pre\n"
         "  pack: [plus, gnd]\n"
         "  link: link_sense\n"
         "  close_when: {ratio: 95 %}\n"
         "  sample_period: 1 ms\n"
         "  timeout: 2 s\n"
         "run: {duration: " + duration + "}\n";
}

// The time of the BMS decision to close the main contactor in a run of `yaml`.
double decision_time(const std::string& yaml) {
  linkrise::testing::SequenceRun run(yaml, 1e-10, 1e-12);
  const double decided = run.when("decide to close k_main");
  EXPECT_FALSE(std::isnan(decided)) << "no decision to close";
  return decided;
}

// The first BMS sample (at k·period) at or after `time`.
double next_sample(double time) { return std::ceil(time / kPeriod - 1e-9) * kPeriod; }

// The sampled decision for a crossing at `crossing`; refuses crossings too close to a sample to decide by.
double expected_decision(double crossing) {
  double sample = next_sample(crossing);
  EXPECT_GT(sample - crossing, 1e-5) << "the crossing sits on a sample: choose other values";
  return sample;
}

// v(t) = V(1 − e^(−t/T)) read as g·v + offset: the BMS decides at the first sample with g·v + offset ≥ 0.95·V,
// i.e. after t = −T·ln(1 − (0.95·V − offset)/(g·V)) ([R-RC-charge]).
TEST(VoltageSensor, GainAndOffsetErrorMoveTheDecisionAsTheRcClosedFormSays) {
  struct Channel {
    double gain, offset;
    std::string yaml;
  };
  for (const Channel& channel : {Channel{1.0, 0.0, ""}, Channel{1.015, 0.0, ", gain: 101.5 %"},
                                 Channel{0.985, 0.0, ", gain: 98.5 %"}, Channel{1.0, -6.0, ", offset: -6 V"}}) {
    SCOPED_TRACE(channel.yaml);
    double crossing = -kT * std::log(1.0 - (0.95 * kV - channel.offset) / (channel.gain * kV));
    EXPECT_NEAR(decision_time(sensed_case(channel.yaml)), expected_decision(crossing), 1e-12);
  }
}

// A first-order filter τ on v(t) = V(1 − e^(−t/T)) from 0 V: v_f(t) = V·[1 − (T·e^(−t/T) − τ·e^(−t/τ))/(T − τ)]
// ([R-first-order-filter]); with a skew s the reading is v_f + s·(v − v_f)/τ.
TEST(VoltageSensor, FilteredAndSkewedReadingFollowsTheFirstOrderLag) {
  const double tau = 20e-3, skew = 5e-3;
  Simulation sim(sensed_case(", filter_time_constant: 20 ms, sample_skew: 5 ms", "0.25 s"));
  sim.tight();
  sim.options.output_times = {0.01, 0.05, 0.1, 0.2};
  auto result = sim.run();
  ASSERT_NE(result.outcome, linkrise::solver::Outcome::SolverFailure) << result.message;
  int column = result.samples.column("link_sense.reading");
  ASSERT_GE(column, 0);
  for (std::size_t r = 0; r < result.samples.row_count(); ++r) {
    double t = result.samples.time(r);
    double v = kV * (1.0 - std::exp(-t / kT));
    double filtered = kV * (1.0 - (kT * std::exp(-t / kT) - tau * std::exp(-t / tau)) / (kT - tau));
    double expected = filtered + skew * (v - filtered) / tau;
    EXPECT_NEAR(result.samples.value(r, column), expected, 1e-7 * kV) << "t = " << t;
  }
}

// The filter delays the decision to the first sample after v_f crosses 95 % (found by bisection of the closed
// form above): the lag a real channel adds to every closure.
TEST(VoltageSensor, FilterLagDelaysTheDecision) {
  const double tau = 20e-3;
  auto filtered = [&](double t) {
    return kV * (1.0 - (kT * std::exp(-t / kT) - tau * std::exp(-t / tau)) / (kT - tau));
  };
  double low = 0.0, high = 1.0;
  for (int i = 0; i < 80; ++i) {
    double mid = 0.5 * (low + high);
    (filtered(mid) < 0.95 * kV ? low : high) = mid;
  }
  double decision = decision_time(sensed_case(", filter_time_constant: 20 ms"));
  EXPECT_NEAR(decision, expected_decision(high), 1e-12);
  // Later than the unfiltered decision by about τ (a lag of τ on an exponential with T ≫ τ).
  EXPECT_NEAR(high + kT * std::log(0.05), tau, 0.2 * tau);
}

// A divider Rd across the link: the link settles at V·Rd/(R + Rd) with the time constant (R ∥ Rd)·C (Ohm's law
// and Thevenin's theorem), so a heavy divider can keep the link below the closing ratio.
TEST(VoltageSensor, DividerLoadsTheLinkAsOhmsLawSays) {
  const double rd = 2e3;
  Simulation sim(sensed_case(", divider_resistance: 2 kOhm", "0.3 s"));
  sim.tight();
  sim.options.output_times = {0.05, 0.3};
  auto result = sim.run();
  ASSERT_NE(result.outcome, linkrise::solver::Outcome::SolverFailure) << result.message;
  double level = kV * rd / (kR + rd);
  double t_eq = (kR * rd / (kR + rd)) * kC;
  int column = result.samples.column("link_sense.voltage");
  ASSERT_GE(column, 0);
  for (std::size_t r = 0; r < result.samples.row_count(); ++r) {
    double t = result.samples.time(r);
    EXPECT_NEAR(result.samples.value(r, column), level * (1.0 - std::exp(-t / t_eq)), 1e-7 * kV) << t;
  }
  // The divider's heat is v²/Rd.
  int heat = result.samples.column("link_sense.power");
  ASSERT_GE(heat, 0);
  double v_end = level * (1.0 - std::exp(-0.3 / t_eq));
  EXPECT_NEAR(result.samples.value(result.samples.row_count() - 1, heat), v_end * v_end / rd, 1e-6 * v_end * v_end / rd);
}

// The converter rounds to whole counts of its resolution (after gain and offset).
TEST(VoltageSensor, ReadingIsRoundedToWholeCounts) {
  using linkrise::models::quantised_reading;
  EXPECT_DOUBLE_EQ(quantised_reading(381.3, 1.0, 0.0, 0.5), 381.5);
  EXPECT_DOUBLE_EQ(quantised_reading(381.2, 1.0, 0.0, 0.5), 381.0);
  EXPECT_DOUBLE_EQ(quantised_reading(100.0, 1.01, -2.0, 0.0), 99.0);
  EXPECT_DOUBLE_EQ(quantised_reading(100.0, 1.0, 0.0, 4.0), 100.0);
  // A coarse 4 V count (a 12-bit converter on a 16 kV span, or 1 kV over 8 bits) delays the 95 % decision to the
  // first sample whose link voltage rounds to 380 V or more: v ≥ 378 V.
  double crossing = -kT * std::log(1.0 - 378.0 / kV);
  EXPECT_NEAR(decision_time(sensed_case(", resolution: 4 V")), expected_decision(crossing), 1e-12);
}

TEST(VoltageSensor, TheSequenceRefusesAPartThatMeasuresNothing) {
  std::string yaml = sensed_case("");
  yaml.replace(yaml.find("link: link_sense"), 16, "link: r_pre");
  auto error = linkrise::testing::case_error(yaml);
  EXPECT_TRUE(linkrise::testing::contains(error.what(), "measures nothing")) << error.what();
  auto skew = linkrise::testing::case_error(sensed_case(", sample_skew: 1 ms"));
  EXPECT_TRUE(linkrise::testing::contains(skew.what(), "needs a filter")) << skew.what();
}
}  // namespace
