// Each sequence metric on a synthetic waveform whose answer is known in closed form (sources: docs/references.md).
//   link before closure: RC charging v = V·(1 − e^(−(t − t0)/τ)) ([R-RC-charge]);
//   after closure: v = V − ΔV·e^(−αs)·cos(ωs), main current i = I·e^(−αs)·sin(ωs) (damped ringing, whose extrema
//   follow from setting the derivative to zero [R-ringing-integrals]); the pack dips by a Gaussian 10 V at 5 ms,
//   before the attempt starts.
// Rows every 10 µs: linear interpolation of a crossing is accurate to ~h²·v''/(8·v') ≈ 1e-10 s; the parabola through
// three rows misses a ringing peak by ~(ωh)³/10 ≈ 2e-6 relative (ω·h = 0.063).
#include "analysis/metrics.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "analysis/stall.h"
#include "solver/sequence_report.h"

namespace {
constexpr double kV = 400.0, kTau = 0.02, kR = 20.0, kAlpha = 500.0, kOmega = 2.0 * M_PI * 1000.0, kI = 300.0;
constexpr double kH = 1e-5;
const double kStart = 1000 * kH, kClose = 10000 * kH;
const double kStep = kV * std::exp(-(kClose - kStart) / kTau);  // ΔV left at closure

struct Values {
  double pack, link, main, pre;
};
Values before(double t) {
  double pack = kV - 10.0 * std::exp(-std::pow((t - 0.005) / 0.001, 2));
  double link = t < kStart ? 0.0 : kV * (1.0 - std::exp(-(t - kStart) / kTau));
  double pre = t < kStart ? 0.0 : (kV - link) / kR;
  return {pack, link, 0.0, pre};
}
Values after(double t) {
  double s = t - kClose;
  double pack = kV - 10.0 * std::exp(-std::pow((t - 0.005) / 0.001, 2));
  return {pack, kV - kStep * std::exp(-kAlpha * s) * std::cos(kOmega * s),
          kI * std::exp(-kAlpha * s) * std::sin(kOmega * s), 0.0};
}

linkrise::solver::Waveform waveform() {
  linkrise::solver::Waveform w({"pack [V]", "link [V]", "k_main.current [A]", "k_pre.current [A]"});
  auto add = [&](double t, const Values& v) { w.add_row(t, {v.pack, v.link, v.main, v.pre}); };
  for (int k = 0; k <= 20000; ++k) {
    double t = k * kH;
    if (k == 1000) add(t, {before(t).pack, 0.0, 0.0, 0.0});  // the row before the pre-charge contacts touch
    if (k == 10000) add(t, before(t));                         // the row before the main closure
    add(t, k < 10000 ? before(t) : after(t));
  }
  return w;
}

linkrise::solver::SequenceReport report() {
  linkrise::solver::SequenceReport r;
  r.spec.pack = {"pack", "gnd"};
  r.spec.link = {"link", "gnd"};
  r.spec.main = "k_main";
  r.spec.precharge = "k_pre";
  r.spec.rule = linkrise::netlist::ClosingRule::Ratio;
  r.spec.rule_value = 0.95;
  r.ground = "gnd";
  r.outcome = linkrise::netlist::SequenceOutcome::Closed;
  r.attempts = 1;
  linkrise::solver::AttemptRecord attempt;
  attempt.start = kStart;
  attempt.decision = kClose - 0.015;
  attempt.main_closed = kClose;
  r.history.push_back(attempt);
  return r;
}
}  // namespace

TEST(Metrics, EverySequenceMetricMatchesItsClosedForm) {
  auto w = waveform();
  auto r = report();
  linkrise::analysis::StallDiagnostic stall;  // not applicable: no constant-power load
  auto m = linkrise::analysis::sequence_metrics(w, r, stall);

  EXPECT_EQ(m.value("sequence.attempts"), 1.0);
  // 95 % of V: t − t0 = τ·ln 20.
  EXPECT_NEAR(m.value("sequence.time_to_threshold"), kTau * std::log(20.0), 1e-9);
  EXPECT_EQ(m.value("sequence.decision_time"), kClose - 0.015);
  EXPECT_EQ(m.value("sequence.main_close_time"), kClose);
  EXPECT_NEAR(m.value("sequence.precharge_time"), kClose - kStart, 1e-15);
  EXPECT_NEAR(m.value("sequence.voltage_step_at_close"), kStep, 1e-9);
  // i = I·e^(−αs)·sin(ωs) peaks at s = atan(ω/α)/ω.
  double s_peak = std::atan(kOmega / kAlpha) / kOmega;
  double peak = kI * std::exp(-kAlpha * s_peak) * std::sin(kOmega * s_peak);
  EXPECT_NEAR(m.value("sequence.peak_main_current"), peak, 1e-5 * peak);
  // ∫0^∞ I²·e^(−2αs)·sin²(ωs) ds = I²·ω² / (4α·(α² + ω²)) [R-ringing-integrals, from memory].
  double i2t = kI * kI * kOmega * kOmega / (4.0 * kAlpha * (kAlpha * kAlpha + kOmega * kOmega));
  EXPECT_NEAR(m.value("sequence.main_current_squared_time"), i2t, 1e-7 * i2t);
  // Pre-charge current is largest when the contacts touch: V/R.
  EXPECT_NEAR(m.value("sequence.peak_precharge_current"), kV / kR, 1e-12);
  // Link − pack after closure: −ΔV·e^(−αs)·cos(ωs), largest where tan(ωs) = −α/ω.
  double s_over = (M_PI - std::atan(kAlpha / kOmega)) / kOmega;
  double overshoot = -kStep * std::exp(-kAlpha * s_over) * std::cos(kOmega * s_over);
  EXPECT_NEAR(m.value("sequence.link_overshoot"), overshoot, 1e-5 * overshoot);
  EXPECT_NEAR(m.value("sequence.minimum_pack_voltage"), kV - 10.0, 1e-8);
  EXPECT_TRUE(std::isnan(m.value("sequence.detection_time")));
  EXPECT_EQ(m.value("sequence.stall"), 0.0);
  EXPECT_TRUE(std::isnan(m.value("sequence.stall_equilibrium")));
  for (const auto& metric : m.list()) {
    EXPECT_FALSE(metric.unit.empty()) << metric.name;
    EXPECT_FALSE(metric.definition.empty()) << metric.name;
    EXPECT_NO_THROW(linkrise::analysis::metric_dimension(metric.unit)) << metric.name;
  }
}

// The overshoot is measured against the pack at rest: an overdamped closure whose link rises monotonically toward
// the open-circuit voltage while the pack terminal sags under the inrush (link above the sagging terminal, as in a
// long-cable truck case) is no overshoot; a link that rings 2 V above the open-circuit voltage is 2 V.
TEST(Metrics, OvershootIsMeasuredAgainstThePackAtRest) {
  auto r = report();
  for (double ring : {0.0, 2.0}) {
    linkrise::solver::Waveform w({"pack [V]", "link [V]", "k_main.current [A]", "k_pre.current [A]"});
    for (int k = 0; k <= 20000; ++k) {
      const double t = k * kH, s = t - kClose;
      const double link = t < kStart ? 0.0 : t < kClose ? kV - 20.0 : kV - 20.0 * std::exp(-s / 1e-3);
      const double sag = t < kClose ? 0.0 : 8.0 * std::exp(-s / 2e-3);  // terminal below the link while it sags
      const double bump = t < kClose ? 0.0 : ring * std::exp(-std::pow((s - 0.05) / 0.005, 2));
      w.add_row(t, {kV - sag, link + bump, 0.0, 0.0});
    }
    auto m = linkrise::analysis::sequence_metrics(w, r, linkrise::analysis::StallDiagnostic{});
    // Exact to the rows' spacing: the bump's peak lies on a row; the monotone rise never reaches kV.
    EXPECT_NEAR(m.value("sequence.link_overshoot"), ring, 1e-6) << "ring " << ring;
  }
}

TEST(Metrics, AnAttemptThatNeverClosedLeavesTheClosureMetricsNotReached) {
  auto w = waveform();
  auto r = report();
  r.history[0].decision = r.history[0].main_closed = linkrise::solver::kNotReached;
  r.history[0].fault = linkrise::netlist::SequenceOutcome::Timeout;
  r.history[0].fault_time = 0.12;
  r.first_fault_time = 0.12;
  r.outcome = linkrise::netlist::SequenceOutcome::Timeout;
  auto m = linkrise::analysis::sequence_metrics(w, r, linkrise::analysis::StallDiagnostic{});
  for (const char* name : {"sequence.main_close_time", "sequence.voltage_step_at_close", "sequence.peak_main_current",
                           "sequence.main_current_squared_time", "sequence.link_overshoot",
                           "sequence.precharge_time"}) {
    EXPECT_TRUE(std::isnan(m.value(name))) << name;
  }
  EXPECT_EQ(m.value("sequence.detection_time"), 0.12);
}

// The quadratic equilibrium of a constant-power load behind a resistance ([R-CPL-equilibrium]: Simpson-Porco,
// Dörfler & Bullo, arXiv:1503.04769): 373.2051 V for 400 V, 1 Ω, 10 kW; maximum power Vs²/(4R) = 40 kW, where the
// two roots meet at Vs/2; none beyond.
TEST(Metrics, ConstantPowerEquilibriumQuadratic) {
  EXPECT_NEAR(linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 10e3), 373.2051, 5e-5);
  EXPECT_NEAR(linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 40e3), 200.0, 1e-12);
  EXPECT_TRUE(std::isnan(linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 40.001e3)));
  EXPECT_DOUBLE_EQ(linkrise::analysis::constant_power_equilibrium(400.0, 1.0, 0.0), 400.0);
}
