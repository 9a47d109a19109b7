// linkrise against an independent reference: GSL's gsl_odeiv2 Runge–Kutta–Prince–Dormand 8(9) integrator (rk8pd,
// GNU Scientific Library reference manual, "Ordinary Differential Equations" [pub]; docs/references.md
// [R-GSL-rk8pd]) at tolerance 1e-12, run on the circuit's equations written out by hand below — nothing of
// linkrise's assembly is shared.
//
// Circuit: source Vs with series resistance Rs → cable (Rc + Lc) → DC-link capacitor C with ESR, and a
// constant-power load P across the link terminals, drawing from the start (the link starts at v0, above the
// load's resistive floor, and stays above it).
// States: cable current i, capacitor voltage vc. The link terminal voltage vl satisfies KCL at the link node,
//   i = (vl - vc)/ESR + P/vl  →  vl² - (vc + ESR·i)·vl + ESR·P = 0, upper root (the operating branch);
// then Lc·di/dt = Vs - (Rs + Rc)·i - vl and C·dvc/dt = (vl - vc)/ESR.
#include <gtest/gtest.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>

#include <cmath>
#include <string>

#include "tests/circuit_fixture.h"

namespace {
struct Parameters {
  double Vs = 400.0, Rs = 0.5, Rc = 20e-3, Lc = 20e-6, C = 500e-6, esr = 10e-3, P = 5e3, v0 = 300.0;
};

double link_voltage(const Parameters& p, double i, double vc) {
  double b = vc + p.esr * i;
  return 0.5 * (b + std::sqrt(b * b - 4 * p.esr * p.P));
}

int hand_written_rates(double, const double x[], double dxdt[], void* data) {
  const Parameters& p = *static_cast<const Parameters*>(data);
  double i = x[0], vc = x[1];
  double vl = link_voltage(p, i, vc);
  dxdt[0] = (p.Vs - (p.Rs + p.Rc) * i - vl) / p.Lc;
  dxdt[1] = (vl - vc) / (p.esr * p.C);
  return GSL_SUCCESS;
}
}  // namespace

TEST(ReferenceIntegrator, SourceCableLinkAndConstantPowerLoadAgreeWithGsl) {
  Parameters p;
  linkrise::testing::Simulation sim(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [supply, gnd], voltage: 400 V, series_resistance: 0.5 Ohm}\n"
      "  - {name: cable, kind: cable, nodes: [supply, link], resistance: 20 mOhm, inductance: 20 uH}\n"
      "  - {name: dc_link, kind: capacitor, nodes: [link, gnd], capacitance: 500 uF, esr: 10 mOhm, "
      "initial_voltage: 300 V}\n"
      "  - {name: inverter, kind: constant_power_load, nodes: [link, gnd], power: 5 kW}\n"
      "run: {duration: 20 ms}\n");
  // The case's default tolerances (rtol 1e-7): agreement within 1e-5 relative is what a user gets.
  linkrise::solver::Result result = sim.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  const auto& steps = result.steps;
  auto link = linkrise::testing::column(steps, "link");
  auto current = linkrise::testing::column(steps, "cable.current");
  auto drawing = linkrise::testing::column(steps, "inverter.drawing");
  auto load_power = linkrise::testing::column(steps, "inverter.power");
  ASSERT_GT(steps.row_count(), 100u);

  gsl_odeiv2_system system{hand_written_rates, nullptr, 2, &p};
  gsl_odeiv2_driver* driver = gsl_odeiv2_driver_alloc_y_new(&system, gsl_odeiv2_step_rk8pd, 1e-9, 1e-12, 1e-12);
  double t = 0.0, x[2] = {0.0, p.v0};
  // Scales: the link voltage against the source voltage; the current against its own peak.
  double peak_current = 0.0;
  for (double value : current) peak_current = std::max(peak_current, std::fabs(value));
  ASSERT_GT(peak_current, 100.0);  // a real inrush: the 100 V step across 0.53 Ohm rings through 20 uH
  double worst_voltage = 0.0, worst_current = 0.0;
  for (std::size_t r = 0; r < steps.row_count(); ++r) {
    double target = steps.time(r);
    if (target > t) {
      ASSERT_EQ(gsl_odeiv2_driver_apply(driver, &t, target, x), GSL_SUCCESS) << "t = " << target;
    }
    double vl = link_voltage(p, x[0], x[1]);
    worst_voltage = std::max(worst_voltage, std::fabs(link[r] - vl) / p.Vs);
    worst_current = std::max(worst_current, std::fabs(current[r] - x[0]) / peak_current);
    EXPECT_EQ(drawing[r], 1.0) << "the load draws throughout, t = " << target;
    EXPECT_NEAR(load_power[r], p.P, 1e-9 * p.P) << "constant power above the floor, t = " << target;
  }
  gsl_odeiv2_driver_free(driver);
  EXPECT_LT(worst_voltage, 1e-5);
  EXPECT_LT(worst_current, 1e-5);
  // The run ends at the operating point of the quadratic ([R-CPL-equilibrium]: Simpson-Porco, Dörfler & Bullo,
  // arXiv:1503.04769 [pub]): vl·(Vs - vl)/(Rs + Rc) = P, upper root.
  double R = p.Rs + p.Rc;
  double v_eq = 0.5 * (p.Vs + std::sqrt(p.Vs * p.Vs - 4 * p.P * R));
  EXPECT_NEAR(link.back(), v_eq, 1e-5 * v_eq);
}
