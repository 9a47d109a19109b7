// Pathological topologies are rejected before any solve, each with its own named error.
// The rules are those of modified nodal analysis (e.g. Ho, Ruehli & Brennan, "The modified nodal approach to
// network analysis", IEEE Trans. Circuits and Systems 22(6), 1975 [mem]; docs/references.md [R-MNA]): the network
// matrix is singular when a node floats, when voltage-defining branches close a loop, or when current-defining
// branches form a cut-set.
#include <gtest/gtest.h>

#include <string>

#include "tests/circuit_fixture.h"

namespace {
using linkrise::testing::case_error;
using linkrise::testing::case_from;
using linkrise::testing::contains;

// A source with series resistance feeding `plus`; `extra` adds parts (YAML list items).
std::string circuit_with(const std::string& extra, const std::string& source_resistance = "1 Ohm") {
  return "ground: gnd\n"
         "parts:\n"
         "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V, series_resistance: " +
         source_resistance + "}\n" + extra + "run: {duration: 1 s}\n";
}

void expect_builds(const std::string& yaml) {
  EXPECT_NO_THROW(linkrise::solver::Circuit circuit(case_from(yaml))) << yaml;
}
}  // namespace

TEST(Topology, HealthyCircuitsBuild) {
  // Controls for the checks below: each is one part away from a rejected topology.
  expect_builds(circuit_with("  - {name: link, kind: capacitor, nodes: [plus, gnd], capacitance: 1 mF}\n"));
  expect_builds(circuit_with(
      "  - {name: choke, kind: inductor, nodes: [plus, mid], inductance: 1 mH}\n"
      "  - {name: load, kind: constant_current_load, nodes: [mid, gnd], current: 1 A}\n"
      "  - {name: link, kind: capacitor, nodes: [mid, gnd], capacitance: 1 mF}\n"));
  // An ideal source across a capacitor is fine once the capacitor has an ESR.
  expect_builds(circuit_with("  - {name: link, kind: capacitor, nodes: [plus, gnd], capacitance: 1 mF, esr: 1 mOhm}\n",
                             "0 Ohm"));
}

TEST(Topology, NodeWithNoPathToGround) {
  auto error = case_error(circuit_with(
      "  - {name: r1, kind: resistor, nodes: [plus, gnd], resistance: 10 Ohm}\n"
      "  - {name: island_r, kind: resistor, nodes: [a, b], resistance: 10 Ohm}\n"
      "  - {name: island_c, kind: capacitor, nodes: [a, b], capacitance: 1 mF, esr: 1 mOhm}\n"));
  EXPECT_TRUE(contains(error.problem(), "node 'a' has no path to ground 'gnd'")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "separate circuit")) << error.what();
  EXPECT_TRUE(error.mark().line == 5 || error.mark().line == 6) << error.what();  // a part of the island
  EXPECT_FALSE(error.fix().empty());
}

TEST(Topology, LoopOfIdealVoltageSources) {
  auto error = case_error(
      circuit_with("  - {name: second, kind: dc_source, nodes: [plus, gnd], voltage: 390 V}\n", "0 Ohm"));
  EXPECT_TRUE(contains(error.problem(), "part 'second' closes a loop of voltage-defining parts")) << error.what();
  EXPECT_EQ(error.mark().line, 4) << error.what();
  EXPECT_TRUE(contains(error.fix(), "series resistance or an ESR")) << error.what();
}

TEST(Topology, LoopOfZeroEsrCapacitors) {
  // Three ideal capacitors in a ring a-b-c: their voltages must sum to zero, so one is not a free state.
  auto error = case_error(circuit_with(
      "  - {name: r1, kind: resistor, nodes: [plus, a], resistance: 10 Ohm}\n"
      "  - {name: c_ab, kind: capacitor, nodes: [a, b], capacitance: 1 mF}\n"
      "  - {name: c_bc, kind: capacitor, nodes: [b, gnd], capacitance: 1 mF}\n"
      "  - {name: c_ca, kind: capacitor, nodes: [gnd, a], capacitance: 1 mF}\n"));
  EXPECT_TRUE(contains(error.problem(), "part 'c_ca' closes a loop of voltage-defining parts")) << error.what();
  // An ESR on any one of them breaks the loop.
  expect_builds(circuit_with(
      "  - {name: r1, kind: resistor, nodes: [plus, a], resistance: 10 Ohm}\n"
      "  - {name: c_ab, kind: capacitor, nodes: [a, b], capacitance: 1 mF}\n"
      "  - {name: c_bc, kind: capacitor, nodes: [b, gnd], capacitance: 1 mF}\n"
      "  - {name: c_ca, kind: capacitor, nodes: [gnd, a], capacitance: 1 mF, esr: 1 mOhm}\n"));
}

TEST(Topology, IdealSourceAcrossZeroEsrCapacitor) {
  auto error = case_error(
      circuit_with("  - {name: link, kind: capacitor, nodes: [plus, gnd], capacitance: 1 mF}\n", "0 Ohm"));
  EXPECT_TRUE(contains(error.problem(), "part 'link' closes a loop")) << error.what();
}

TEST(Topology, InductorAndCurrentLoadCutSet) {
  // Node `mid` is reached only through an inductor and a constant-current load: both fix their currents,
  // so KCL at `mid` cannot hold in general.
  auto error = case_error(circuit_with(
      "  - {name: choke, kind: inductor, nodes: [plus, mid], inductance: 1 mH}\n"
      "  - {name: load, kind: constant_current_load, nodes: [mid, gnd], current: 1 A}\n"));
  EXPECT_TRUE(contains(error.problem(), "node(s) mid connect to the rest of the circuit only through inductors or "
                                        "current-drawing loads (choke, load)"))
      << error.what();
  EXPECT_TRUE(contains(error.fix(), "'mid'")) << error.what();
  EXPECT_EQ(error.mark().line, 4) << error.what();  // the first boundary part
}

TEST(Topology, CutSetOfSeveralNodes) {
  // A resistor between two floating nodes does not help: the group {a, b} still hangs on current-defined parts.
  auto error = case_error(circuit_with(
      "  - {name: cable, kind: cable, nodes: [plus, a], resistance: 1 mOhm, inductance: 2 uH}\n"
      "  - {name: r_ab, kind: resistor, nodes: [a, b], resistance: 10 Ohm}\n"
      "  - {name: dcdc, kind: constant_power_load, nodes: [b, gnd], power: 100 W}\n"));
  EXPECT_TRUE(contains(error.problem(), "node(s) a, b connect")) << error.what();
  EXPECT_TRUE(contains(error.problem(), "(cable, dcdc)")) << error.what();
}

TEST(Topology, PartConnectedToItself) {
  auto error = case_error(circuit_with(
      "  - {name: r1, kind: resistor, nodes: [plus, gnd], resistance: 10 Ohm}\n"
      "  - {name: shorted, kind: resistor, nodes: [plus, plus], resistance: 10 Ohm}\n"));
  EXPECT_TRUE(contains(error.problem(), "part 'shorted' is connected to itself: both nodes are 'plus'"))
      << error.what();
  EXPECT_EQ(error.mark().line, 5) << error.what();
  EXPECT_TRUE(contains(error.fix(), "different nodes")) << error.what();
}

TEST(Topology, ANodeThatJoinsOnePartIsAMisspeltName) {
  // A node touched by one part terminal carries no current and joins nothing (Kirchhoff's current law at a node
  // with one branch, docs/references.md [R-MNA]): the usual cause is a typing slip, so the reader names the
  // nearest node that does join parts.
  const std::string yaml = circuit_with(
      "  - {name: r_pre, kind: resistor, nodes: [plus, link_plus], resistance: 47 Ohm}\n"    // line 4
      "  - {name: link, kind: capacitor, nodes: [link_plus, gnd], capacitance: 1 mF}\n"     // line 5
      "  - {name: bleed, kind: resistor, nodes: [link_plu, gnd], resistance: 100 kOhm}\n");  // line 6
  const std::string message = case_error(yaml).what();
  EXPECT_TRUE(contains(message, "test.yaml:6:43")) << message;  // column of link_plu, counted
  EXPECT_TRUE(contains(message, "node 'link_plu' (part 'bleed') joins nothing")) << message;
  EXPECT_TRUE(contains(message, "did you mean 'link_plus'?")) << message;

  // Two lone nodes are listed together: often one node spelt two ways.
  const std::string two = case_error(circuit_with(
      "  - {name: r_pre, kind: resistor, nodes: [plus, link_a], resistance: 47 Ohm}\n"
      "  - {name: link, kind: capacitor, nodes: [link_b, gnd], capacitance: 1 mF}\n")).what();
  EXPECT_TRUE(contains(two, "'link_a' (part 'r_pre') at test.yaml:4:")) << two;
  EXPECT_TRUE(contains(two, "'link_b' (part 'link') at test.yaml:5:")) << two;
  EXPECT_TRUE(contains(two, "give the nodes that belong together one name")) << two;
}
