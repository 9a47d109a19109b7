// The time constant L/R of the circuit a contact breaks (solver/break_circuit.h), against closed forms.
//
// The solver reads τ as the first moment of the contact current's response to a step of the arc voltage, with
// the capacitors held. For a driving-point impedance Z(s) seen by the gap that moment is Z'(0)/Z(0): the current
// answers a voltage step E with I(s) = E/(s·Z(s)), Y = 1/Z = Y₀ + Y₁·s + …, and ∫(i(∞) − i(t))dt = −Y₁·E, so
// τ = −Y₁/Y₀ = Z'(0)/Z(0) (the first moment of a linear network's step response, Elmore's delay: W. C. Elmore,
// J. Appl. Phys. 19 (1948) 55, from memory; docs/references.md [R-first-moment]). For a series R-L loop that is L/R.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "analysis/contact_events.h"
#include "models/breaking_capacity.h"
#include "tests/circuit_fixture.h"

using linkrise::testing::Simulation;

namespace {
// Invented circuits: a 100 V source with 0.5 Ohm, a contactor (closed, 0.3 mOhm) that opens at 1 ms, then `rest`.
std::string opening_circuit(const std::string& rest) {
  return "title: break circuit\nground: gnd\nparts:\n"
         "  - {name: supply, kind: dc_source, nodes: [top, gnd], voltage: 100 V, series_resistance: 0.5 Ohm}\n"
         "  - {name: k1, kind: contactor, nodes: [top, mid], initial: closed}\n" +
         rest + "events:\n  - {at: 1 ms, open: k1}\nrun: {duration: 3 ms}\n";
}
constexpr double kSource = 0.5, kContact = 0.3e-3;

linkrise::solver::BreakCircuit only_break(const std::string& rest) {
  Simulation simulation(opening_circuit(rest));
  simulation.tight(1e-9, 1e-10);
  const auto result = simulation.run();
  EXPECT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  EXPECT_EQ(result.breaks.size(), 1u);
  if (result.breaks.empty()) return {};
  EXPECT_DOUBLE_EQ(result.breaks[0].time, 1e-3);
  EXPECT_EQ(result.breaks[0].part, 1);
  return result.breaks[0];
}
// The moment comes from central differences of a linear network and two LU solves: rounding only.
constexpr double kRelative = 1e-7;
}  // namespace

// Series loop: source, contact, inductor L with its winding R_L, resistor R: τ = L/(R_s + R_c + R_L + R).
TEST(BreakCircuit, SeriesLoopGivesLOverR) {
  const auto found = only_break(
      "  - {name: l1, kind: inductor, nodes: [mid, m2], inductance: 100 uH, resistance: 0.2 Ohm}\n"
      "  - {name: r1, kind: resistor, nodes: [m2, gnd], resistance: 10 Ohm}\n");
  const double r = kSource + kContact + 0.2 + 10.0, l = 100e-6;
  EXPECT_NEAR(found.time_constant, l / r, kRelative * l / r);
  EXPECT_NEAR(found.resistance, r, kRelative * r);
  EXPECT_NEAR(found.inductance, l, kRelative * l);
}

// A resistor R2 across the inductive branch: Z(s) = R_s + R_c + R1 + R2·(R_L + sL)/(R2 + R_L + sL), so
// Z(0) = R_s + R_c + R1 + R2·R_L/(R2 + R_L) and Z'(0) = L·R2²/(R2 + R_L)².
TEST(BreakCircuit, ParallelPathGivesTheImpedanceMoment) {
  const auto found = only_break(
      "  - {name: r1, kind: resistor, nodes: [mid, m2], resistance: 2 Ohm}\n"
      "  - {name: l1, kind: inductor, nodes: [m2, gnd], inductance: 1 mH, resistance: 1 Ohm}\n"
      "  - {name: r2, kind: resistor, nodes: [m2, gnd], resistance: 4 Ohm}\n");
  const double r1 = 2.0, rl = 1.0, r2 = 4.0, l = 1e-3;
  const double z0 = kSource + kContact + r1 + r2 * rl / (r2 + rl);
  const double slope = l * r2 * r2 / ((r2 + rl) * (r2 + rl));
  EXPECT_NEAR(found.time_constant, slope / z0, kRelative * slope / z0);
  EXPECT_NEAR(found.resistance, z0, kRelative * z0);
}

// Through a DC link: the capacitor's voltage is held over the break, so its ESR closes the loop:
// τ = L/(R_s + R_c + R_cable + ESR), though the loop carries no DC current.
TEST(BreakCircuit, HeldCapacitorClosesTheLoopThroughItsEsr) {
  const auto found = only_break(
      "  - {name: cable, kind: cable, nodes: [mid, link], resistance: 20 mOhm, inductance: 5 uH}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF, esr: 30 mOhm, initial_voltage: 90 V}\n");
  const double r = kSource + kContact + 20e-3 + 30e-3, l = 5e-6;
  EXPECT_NEAR(found.time_constant, l / r, kRelative * l / r);
}

// No inductance in the loop: the break is resistive, τ = 0, and the loop's resistance is all that is left.
TEST(BreakCircuit, ResistiveLoopHasNoTimeConstant) {
  const auto found = only_break("  - {name: r1, kind: resistor, nodes: [mid, gnd], resistance: 10 Ohm}\n");
  EXPECT_EQ(found.time_constant, 0.0);
  EXPECT_NEAR(found.resistance, kSource + kContact + 10.0, kRelative * 10.0);
}

// The derived L/R picks the data-sheet row: the same 9.3 A break fails a table whose only row for it holds
// up to 5 µs, and passes one with a 1 ms row (invented rows, common practice in form).
TEST(BreakCircuit, TimeConstantJudgesTheBreakingCapacityRow) {
  Simulation simulation(opening_circuit(
      "  - {name: l1, kind: inductor, nodes: [mid, m2], inductance: 100 uH, resistance: 0.2 Ohm}\n"
      "  - {name: r1, kind: resistor, nodes: [m2, gnd], resistance: 10 Ohm}\n"));
  simulation.tight(1e-9, 1e-10);
  const auto result = simulation.run();
  ASSERT_EQ(result.outcome, linkrise::solver::Outcome::Completed) << result.message;
  const auto& rows = result.steps;
  const linkrise::analysis::ContactColumns columns{rows.column("k1.current"), rows.column("k1.voltage"),
                                                   rows.column("k1.closed"), rows.column("k1.arcing"),
                                                   rows.column("k1.arc_energy")};
  const auto events = linkrise::analysis::contact_events(rows, columns, 10e-6, result.breaks);
  ASSERT_EQ(events.arcs.size(), 1u);
  const double tau = 100e-6 / (kSource + kContact + 0.2 + 10.0);  // 9.35 µs
  EXPECT_NEAR(events.arcs[0].time_constant, tau, kRelative * tau);
  using linkrise::models::BreakingCapacity;
  using linkrise::models::CurrentDirection;
  const BreakingCapacity short_rows{{{450.0, 100.0, CurrentDirection::Both, 5e-6}}};
  const BreakingCapacity long_rows{{{450.0, 100.0, CurrentDirection::Both, 5e-6},
                                    {450.0, 20.0, CurrentDirection::Both, 1e-3}}};
  const auto failed = linkrise::analysis::contact_metrics(events, short_rows);
  EXPECT_EQ(failed.break_row.value_or(-1), 0);
  EXPECT_TRUE(std::isinf(failed.break_use.value_or(0.0)));
  const auto judged = linkrise::analysis::contact_metrics(events, long_rows);
  EXPECT_EQ(judged.break_row.value_or(-1), 2);
  const double current = 100.0 / (kSource + kContact + 0.2 + 10.0);
  EXPECT_NEAR(judged.break_use.value_or(0.0), current / 20.0, 1e-6);
  EXPECT_NEAR(judged.break_time_constant.value_or(0.0), tau, kRelative * tau);
}

// An L/R the solver could not read (NaN) is judged as unbounded: a row that states a time constant cannot cover
// it, one without does.
TEST(BreakCircuit, UnknownTimeConstantIsJudgedUnbounded) {
  linkrise::analysis::ContactEvents events;
  linkrise::analysis::ArcEvent arc;
  arc.opening = true;
  arc.current = 10.0;
  arc.voltage = 100.0;
  arc.time_constant = std::nan("");
  events.arcs.push_back(arc);
  using linkrise::models::CurrentDirection;
  const linkrise::models::BreakingCapacity stated{{{450.0, 100.0, CurrentDirection::Both, 1.0}}};
  EXPECT_EQ(linkrise::analysis::contact_metrics(events, stated).break_row.value_or(-1), 0);
  const linkrise::models::BreakingCapacity unstated{{{450.0, 100.0, CurrentDirection::Both, std::nullopt}}};
  const auto judged = linkrise::analysis::contact_metrics(events, unstated);
  EXPECT_EQ(judged.break_row.value_or(-1), 1);
  EXPECT_DOUBLE_EQ(judged.break_use.value_or(0.0), 0.1);
}
