// The analytic Jacobian of the reduced ODE (Equations::jacobian) against central finite differences of
// Equations::rates, re-solving the network for every perturbed state, on every stored case in cases/ and on a few
// circuits written here for the part kinds no stored case uses yet, in several modes and at random states.
//
// Central differences (docs/references.md [R-central-differences]: Nocedal & Wright, "Numerical Optimization", 2nd ed.,
// §8.1 [mem]) have truncation error O(h²) and rounding error O(eps·M/h) for terms of size M. Each entry is compared
// with estimates at several steps; agreement within 1e-5 relative (with floors for entries that vanish analytically,
// see compare_at) checks the derivatives without flagging rounding noise.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <limits>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "app/regression/check.h"
#include "models/registry.h"
#include "solver/equations.h"
#include "tests/circuit_fixture.h"

namespace {
namespace fs = std::filesystem;
using linkrise::solver::Circuit;
using linkrise::solver::Equations;

// The natural spread of a state by its unit, for random points and finite-difference steps.
double state_scale(const linkrise::models::StateInfo& info) {
  if (info.unit == "V") return 100.0;
  if (info.unit == "A") return 10.0;
  if (info.unit == "K") return 30.0;
  if (info.unit == "1") return 0.2;  // state of charge
  return 1.0 + std::fabs(info.initial);
}

struct ModeSet {
  std::string name;
  std::vector<int> modes;
};

// Initial modes; everything switched on (contactors closed, loads enabled and their lockouts released);
// everything off (open, disabled). Commands a part does not take are ignored.
std::vector<ModeSet> mode_sets(const Circuit& circuit) {
  std::vector<ModeSet> sets = {{"initial", circuit.initial_modes()}};
  if (circuit.mode_count() == 0) return sets;
  ModeSet on{"all on", circuit.initial_modes()}, off{"all off", circuit.initial_modes()};
  for (int p = 0; p < circuit.part_count(); ++p) {
    const auto& part = circuit.part(p);
    const auto& layout = circuit.layout(p);
    part.command(linkrise::netlist::Action::Close, layout, on.modes.data());
    part.command(linkrise::netlist::Action::Enable, layout, on.modes.data());
    for (int r = 0; r < part.root_count(); ++r) part.on_root(r, +1, layout, on.modes.data());
    part.command(linkrise::netlist::Action::Open, layout, off.modes.data());
    part.command(linkrise::netlist::Action::Disable, layout, off.modes.data());
  }
  sets.push_back(on);
  sets.push_back(off);
  return sets;
}

struct Comparison {
  int points = 0;     // points where the network could be solved and the Jacobian compared
  int unsolved = 0;   // random points without a network solution (e.g. a constant-power load beyond its limit)
};

// Compares the Jacobian at one state vector; returns false when the network has no solution there.
bool compare_at(const Circuit& circuit, const std::vector<double>& x, const std::vector<int>& modes,
                const std::string& where) {
  Equations equations(circuit);
  const int n = circuit.ode_size(), m = circuit.part_state_count(), u = circuit.unknown_count();
  const double t = 0.0;
  std::vector<double> y(u, 0.0);
  if (!equations.solve_network(t, x.data(), modes.data(), y.data())) return false;
  std::vector<double> f(n), analytic(static_cast<std::size_t>(m) * m);
  equations.rates(t, x.data(), modes.data(), y.data(), f.data());
  equations.jacobian(t, x.data(), modes.data(), y.data(), analytic.data());

  std::vector<double> scale(m);
  for (int j = 0; j < m; ++j) scale[j] = state_scale(circuit.state_info()[j]);
  // Column j by central differences at step h, re-solving the network from the base point's solution.
  auto difference = [&](int j, double h, std::vector<double>& column) {
    std::vector<double> plus = x, minus = x, y_plus = y, y_minus = y, f_plus(n), f_minus(n);
    plus[j] += h;
    minus[j] -= h;
    EXPECT_TRUE(equations.solve_network(t, plus.data(), modes.data(), y_plus.data())) << where << " column " << j;
    EXPECT_TRUE(equations.solve_network(t, minus.data(), modes.data(), y_minus.data())) << where << " column " << j;
    equations.rates(t, plus.data(), modes.data(), y_plus.data(), f_plus.data());
    equations.rates(t, minus.data(), modes.data(), y_minus.data(), f_minus.data());
    column.resize(n);
    for (int i = 0; i < n; ++i) column[i] = (f_plus[i] - f_minus[i]) / (2 * h);
  };
  // Steps from 1e-2 of the scale down by factors of 8 to 4e-8 of it: long steps carry truncation error (and can
  // straddle a diode's knee), short ones rounding noise — large when states sit far from the operating range,
  // e.g. amperes forced through open contactors raise nodes to 1e8 V. No single step suits every entry, so each
  // entry passes when one estimate agrees with the analytic value within the tolerance widened by that
  // estimate's own uncertainty, its change from the previous (longer) step.
  constexpr int kSteps = 7;
  std::vector<std::vector<std::vector<double>>> estimates(m, std::vector<std::vector<double>>(kSteps));
  for (int j = 0; j < m; ++j) {
    double h = 1e-2 * std::max(std::fabs(x[j]), scale[j]);
    for (auto& estimate : estimates[j]) {
      difference(j, h, estimate);
      h /= 8;
    }
  }
  // Floors: (1) 1e-8 of the row's natural size, how much rate i moves when every state moves by its scale;
  // (2) entries too small to move state i by 1e-6 of its scale over the whole run when state j is off by its
  // scale — dominated by rounding in the network solve when conductances span twelve decades (a bypassed
  // resistor's millivolts from differences of 650 V nodes), and CVODE never feels them.
  const double duration = circuit.spec().run.duration;
  for (int i = 0; i < m; ++i) {
    double row = std::fabs(f[i]);
    for (int k = 0; k < m; ++k) row += std::fabs(estimates[k][1][i]) * scale[k];
    for (int j = 0; j < m; ++j) {
      const double a = analytic[i + j * m];
      const double floor = 1e-8 * row / scale[j] + 1e-6 * scale[i] / (scale[j] * duration);
      double closest = estimates[j][1][i], excess = std::numeric_limits<double>::infinity();
      for (int k = 1; k < kSteps; ++k) {
        double d = estimates[j][k][i], uncertainty = std::fabs(d - estimates[j][k - 1][i]);
        double over = std::fabs(a - d) - (1e-5 * std::max(std::fabs(a), std::fabs(d)) + floor + 2 * uncertainty);
        if (over < excess) {
          excess = over;
          closest = d;
        }
      }
      EXPECT_LE(excess, 0.0) << where << ": d rate(" << i << ") / d state(" << j << ") ["
                             << circuit.state_info()[i].name << " by " << circuit.state_info()[j].name
                             << "]: analytic " << a << ", closest difference " << closest;
    }
  }
  return true;
}

Comparison compare_circuit(const Circuit& circuit, const std::string& label) {
  Comparison result;
  std::mt19937 random(20240611);
  std::uniform_real_distribution<double> unit(-1.0, 1.0);
  // States: the initial ones, those at the end of a run, and random ones around the initial ones. The first two
  // are nudged by 1e-4 of each state's scale: an initial SOC often sits on a breakpoint of an OCV table (and a
  // short run barely leaves it), where the rates have a kink and no derivative to compare.
  auto nudged = [&](std::vector<double> x) {
    for (int j = 0; j < circuit.part_state_count(); ++j) x[j] += 1e-4 * state_scale(circuit.state_info()[j]);
    return x;
  };
  std::vector<std::vector<double>> points = {nudged(circuit.initial_states())};
  auto run = linkrise::solver::simulate(circuit, linkrise::solver::options_from(circuit));
  if (run.outcome != linkrise::solver::Outcome::SolverFailure) points.push_back(nudged(run.final_states));
  for (int k = 0; k < 6; ++k) {
    std::vector<double> x = circuit.initial_states();
    for (int j = 0; j < circuit.part_state_count(); ++j) {
      const auto& info = circuit.state_info()[j];
      double spread = state_scale(info) * unit(random);
      if (info.unit == "1") x[j] = std::clamp(x[j] + spread, 0.02, 0.98);
      else if (info.unit == "K") x[j] += std::fabs(spread);
      else x[j] += spread;
    }
    points.push_back(x);
  }
  for (const auto& set : mode_sets(circuit)) {
    for (std::size_t k = 0; k < points.size(); ++k) {
      std::string where = label + ", modes " + set.name + ", point " + std::to_string(k);
      if (compare_at(circuit, points[k], set.modes, where)) {
        ++result.points;
      } else {
        ++result.unsolved;
      }
    }
  }
  return result;
}

std::vector<fs::path> stored_cases() {
  std::vector<fs::path> files;
  // The stored-case check's own rule: golden results and catalogues beside the cases are not cases themselves.
  for (const auto& name : linkrise::app::find_case_files({(fs::path(LINKRISE_SOURCE_DIR) / "cases").string()})) {
    files.push_back(name);
  }
  std::sort(files.begin(), files.end());
  return files;
}

// Circuits for kinds and options the stored cases may not use.
const std::vector<std::string>& written_cases() {
  static const std::vector<std::string> cases = {
      // Ideal and Thevenin sources, inductor with winding resistance, leaky capacitor, diode, current load.
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 48 V, series_resistance: 50 mOhm}\n"
      "  - {name: choke, kind: inductor, nodes: [plus, a], inductance: 100 uH, resistance: 20 mOhm}\n"
      "  - {name: blocking, kind: diode, nodes: [a, b]}\n"
      "  - {name: link, kind: capacitor, nodes: [b, gnd], capacitance: 470 uF, esr: 5 mOhm, "
      "leakage_resistance: 1 MOhm, initial_voltage: 20 V}\n"
      "  - {name: aux, kind: constant_current_load, nodes: [b, gnd], current: 2 A, enable_voltage: 30 V}\n"
      "  - {name: ideal, kind: dc_source, nodes: [c, gnd], voltage: 12 V}\n"
      "  - {name: r_c, kind: resistor, nodes: [c, b], resistance: 10 Ohm}\n"
      "run: {duration: 5 ms}\n",
      // Cell string with constant OCV and two polarisation pairs into a constant-power load with a cable.
      "ground: gnd\n"
      "parts:\n"
      "  - {name: pack, kind: cell_string, nodes: [plus, gnd], cells_in_series: 96, cells_in_parallel: 3,\n"
      "     cell_voltage: 3.6 V, cell_resistance: 1.2 mOhm, cell_capacity: 50 Ah, initial_soc: 70 %,\n"
      "     polarisation: [{resistance: 0.8 mOhm, capacitance: 20 kF}, {resistance: 0.5 mOhm, capacitance: 200 kF}]}\n"
      "  - {name: k1, kind: contactor, nodes: [plus, a], initial: closed}\n"
      "  - {name: lead, kind: cable, nodes: [a, b], resistance: 3 mOhm, inductance: 1.5 uH}\n"
      "  - {name: link, kind: capacitor, nodes: [b, gnd], capacitance: 1 mF, esr: 1 mOhm, initial_voltage: 340 V}\n"
      "  - {name: inverter, kind: constant_power_load, nodes: [b, gnd], power: 20 kW}\n"
      "run: {duration: 2 ms}\n",
      // A fuse with a time-current curve in a resistor's path, and a filtered, loading BMS channel on the link.
      "ground: gnd\n"
      "parts:\n"
      "  - {name: supply, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: f_pre, kind: fuse, nodes: [plus, a], resistance: 20 mOhm, melting_i2t: 50 A^2s,\n"
      "     time_current: [[2 A, 100 s], [10 A, 1 s], [40 A, 20 ms]]}\n"
      "  - {name: r_pre, kind: resistor, nodes: [a, link], resistance: 40 Ohm}\n"
      "  - {name: c_link, kind: capacitor, nodes: [link, gnd], capacitance: 500 uF}\n"
      "  - {name: link_sense, kind: voltage_sensor, nodes: [link, gnd], divider_resistance: 2 MOhm,\n"
      "     filter_time_constant: 1 ms, gain: 101 %, offset: 1 V, resolution: 0.25 V}\n"
      "run: {duration: 50 ms}\n",
  };
  return cases;
}
}  // namespace

TEST(Jacobian, AgreesWithFiniteDifferencesOnEveryStoredCase) {
  auto files = stored_cases();
  ASSERT_FALSE(files.empty()) << "no cases in " << LINKRISE_SOURCE_DIR << "/cases";
  for (const auto& file : files) {
    SCOPED_TRACE(file.filename().string());
    Circuit circuit(linkrise::netlist::load_case(file.string()));
    Comparison result = compare_circuit(circuit, file.filename().string());
    // Most points must be solvable, or the test would check nothing.
    EXPECT_GE(result.points, 2 * result.unsolved + 2) << file;
  }
}

TEST(Jacobian, AgreesWithFiniteDifferencesOnWrittenCircuits) {
  for (std::size_t c = 0; c < written_cases().size(); ++c) {
    SCOPED_TRACE("written circuit " + std::to_string(c));
    Circuit circuit(linkrise::testing::case_from(written_cases()[c]));
    Comparison result = compare_circuit(circuit, "written circuit " + std::to_string(c));
    EXPECT_GE(result.points, 2 * result.unsolved + 2);
  }
}

TEST(Jacobian, EveryPartKindIsCovered) {
  // A new part kind must appear in a stored case (or in written_cases() above) so its Jacobian is checked.
  std::set<std::string> covered;
  for (const auto& file : stored_cases()) {
    for (const auto& part : linkrise::netlist::load_case(file.string()).parts) covered.insert(part.kind);
  }
  for (const auto& text : written_cases()) {
    for (const auto& part : linkrise::testing::case_from(text).parts) covered.insert(part.kind);
  }
  for (const auto& kind : linkrise::models::part_kinds()) {
    EXPECT_TRUE(covered.count(kind)) << "part kind '" << kind << "' is in no stored case: add one to cases/";
  }
}

TEST(Jacobian, RcEntryMatchesTheClosedForm) {
  Circuit circuit(linkrise::testing::case_from(
      "ground: gnd\n"
      "parts:\n"
      "  - {name: source, kind: dc_source, nodes: [plus, gnd], voltage: 400 V}\n"
      "  - {name: r1, kind: resistor, nodes: [plus, link], resistance: 100 Ohm}\n"
      "  - {name: c1, kind: capacitor, nodes: [link, gnd], capacitance: 1 mF}\n"
      "run: {duration: 1 s}\n"));
  Equations equations(circuit);
  std::vector<double> x = circuit.initial_states(), y(circuit.unknown_count(), 0.0);
  ASSERT_TRUE(equations.solve_network(0.0, x.data(), circuit.initial_modes().data(), y.data()));
  std::vector<double> matrix(circuit.part_state_count() * circuit.part_state_count());
  equations.jacobian(0.0, x.data(), circuit.initial_modes().data(), y.data(), matrix.data());
  // dvc/dt = (V - vc)/(RC) → d/dvc = -1/(RC) = -10 /s (docs/references.md [R-RC-charge]).
  EXPECT_NEAR(matrix[0], -10.0, 1e-12 * 10.0);
}
