// The fuse part: it melts open when its melting integral reaches 1 — at ∫i² dt = I²t for the adiabatic law, at the
// time-current curve's melting time for a steady current (pre-arcing I²t and time-current characteristic as defined
// in IEC 60269-1, docs/references.md [R-fuse-melting]).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "tests/circuit_fixture.h"

using linkrise::testing::Simulation;

namespace {
// `volts` through 1 Ohm and the fuse (10 mOhm cold) from t = 0: the run's rows.
linkrise::solver::Result through_fuse(const std::string& volts, const std::string& fuse_lines, const std::string& duration) {
  Simulation simulation(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: " + volts + "}\n"
      "  - {name: load, kind: resistor, nodes: [plus, mid], resistance: 1 Ohm}\n"
      "  - name: f1\n"
      "    kind: fuse\n"
      "    nodes: [mid, gnd]\n"
      "    resistance: 10 mOhm\n" + fuse_lines +
      "run: {duration: " + duration + "}\n");
  simulation.tight();
  auto result = simulation.run();
  EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  return result;
}

// The first row at which the fuse carries less than 1 A (it has melted open), NaN when it never does.
double melting_time(const linkrise::solver::Result& result) {
  const int current = result.steps.column("f1.current");
  for (std::size_t r = 0; r < result.steps.row_count(); ++r) {
    if (std::fabs(result.steps.value(r, current)) < 1.0) return result.steps.time(r);
  }
  return NAN;
}
}  // namespace

TEST(Fuse, AdiabaticLawMeltsWhenTheJouleIntegralReachesTheMeltingI2t) {
  // 100 V over 1.01 Ohm: i = 99.01 A, so ∫i² dt = 500 A²s after 500/i² = 51.0 ms.
  const double current = 100.0 / 1.01;
  auto result = through_fuse("100 V", "    melting_i2t: 500 A^2s\n", "100 ms");
  // The melt is a located state event: its time to the solver's tolerance (rtol 1e-10), the row after it at most
  // one step later.
  EXPECT_NEAR(melting_time(result), 500.0 / (current * current), 1e-6);
  const int melt = result.steps.column("f1.melt");
  ASSERT_GE(melt, 0);
  EXPECT_NEAR(result.steps.value(result.steps.row_count() - 1, melt), 1.0, 1e-6);
}

TEST(Fuse, TimeCurrentCurveGivesTheMeltingTimeOfASteadyCurrent) {
  // Between 10 A / 100 s and 100 A / 0.1 s the curve is t = 100 s·(i/10 A)^−3 (log-log line, slope −3).
  const std::string curve =
      "    melting_i2t: 1000 A^2s\n"
      "    time_current: [[10 A, 100 s], [100 A, 0.1 s], [1000 A, 1 ms]]\n";
  const double current = 50.0 / 1.01;
  const double melting = 100.0 * std::pow(current / 10.0, -3.0);
  EXPECT_NEAR(melting_time(through_fuse("50 V", curve, "2 s")), melting, 1e-6 * melting);
  // Short of it, the melt has used the fraction t/t_m (linear damage accumulation); the link stays intact.
  auto partial = through_fuse("50 V", curve, "400 ms");
  const int melt = partial.steps.column("f1.melt");
  EXPECT_NEAR(partial.steps.value(partial.steps.row_count() - 1, melt), 0.4 / melting, 1e-7);
  EXPECT_TRUE(std::isnan(melting_time(partial)));
  // Above the last row the adiabatic law of that row's I²t (1000² A² · 1 ms = 1000 A²s) holds: 2000 A melts in 0.25 ms.
  const double big = 2020.0 / 1.01;
  EXPECT_NEAR(melting_time(through_fuse("2020 V", curve, "1 ms")), 1000.0 / (big * big), 1e-8);
}

TEST(Fuse, ItsPulseDeratingIsARating) {
  Simulation simulation(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 10 V}\n"
      "  - {name: f1, kind: fuse, nodes: [plus, gnd], resistance: 1 Ohm, melting_i2t: 50 A^2s, pulse_derating: 40 %}\n"
      "run: {duration: 1 ms}\n");
  const auto& fuse = simulation.circuit.part(1);
  ASSERT_EQ(fuse.ratings().size(), 1u);
  EXPECT_EQ(fuse.ratings()[0].metric, "peak_melt");
  EXPECT_DOUBLE_EQ(fuse.ratings()[0].value, 0.4);
}

TEST(Fuse, ACurveThatRisesIsAnInputError) {
  auto error = linkrise::testing::input_error([] {
    Simulation simulation(
        "ground: gnd\n"
        "parts:\n"
        "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 10 V}\n"
        "  - {name: f1, kind: fuse, nodes: [plus, gnd], resistance: 1 Ohm, melting_i2t: 50 A^2s,\n"
        "     time_current: [[10 A, 1 s], [20 A, 2 s]]}\n"
        "run: {duration: 1 ms}\n");
  });
  EXPECT_TRUE(linkrise::testing::contains(error.what(), "melting time must fall")) << error.what();
}
