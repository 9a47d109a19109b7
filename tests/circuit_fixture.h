#pragma once
// Shared helpers for tests that build circuits from YAML text held in the test itself.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "netlist/case.h"
#include "netlist/input_error.h"
#include "netlist/tree.h"
#include "solver/circuit.h"
#include "solver/transient.h"

namespace linkrise::testing {

inline constexpr const char* kTestFile = "test.yaml";

/// A validated case from YAML text (positions refer to "test.yaml").
inline netlist::Case case_from(const std::string& yaml) {
  return netlist::read_case(netlist::parse_yaml(yaml, kTestFile), kTestFile);
}

/// A circuit from YAML text with its run options (from the case), ready to be adjusted and simulated.
struct Simulation {
  explicit Simulation(const std::string& yaml) : circuit(case_from(yaml)), options(solver::options_from(circuit)) {}
  /// Tight solver tolerances for comparisons with closed forms.
  Simulation& tight(double rtol = 1e-10, double atol = 1e-12) {
    options.relative_tolerance = rtol;
    options.absolute_tolerance = atol;
    options.scale_absolute_tolerance = false;  // an explicit atol, as `atol:` in a run block
    return *this;
  }
  solver::Result run() const { return solver::simulate(circuit, options); }

  solver::Circuit circuit;
  solver::Options options;
};

/// Runs `action`, which must throw netlist::InputError; returns the error (a failed expectation otherwise).
inline netlist::InputError input_error(const std::function<void()>& action) {
  try {
    action();
  } catch (const netlist::InputError& error) {
    return error;
  } catch (const std::exception& error) {
    ADD_FAILURE() << "expected an InputError, got: " << error.what();
    return netlist::InputError({}, "wrong exception");
  }
  ADD_FAILURE() << "expected an InputError, nothing was thrown";
  return netlist::InputError({}, "nothing thrown");
}

/// The error a case (YAML text) raises while being read and assembled into a circuit.
inline netlist::InputError case_error(const std::string& yaml) {
  return input_error([&] { solver::Circuit circuit(case_from(yaml)); });
}

inline bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

/// One recorded column by name (without the unit); fails the test when absent.
inline std::vector<double> column(const solver::Waveform& waveform, const std::string& name) {
  int index = waveform.column(name);
  EXPECT_GE(index, 0) << "no column " << name;
  if (index < 0) return std::vector<double>(waveform.row_count(), NAN);
  return waveform.series(index);
}

/// Value of column `name` at the last row whose time equals `time` (or the nearest row).
inline double value_at(const solver::Waveform& waveform, const std::string& name, double time) {
  int index = waveform.column(name);
  EXPECT_GE(index, 0) << "no column " << name;
  std::size_t best = 0;
  for (std::size_t r = 0; r < waveform.row_count(); ++r) {
    if (std::fabs(waveform.time(r) - time) <= std::fabs(waveform.time(best) - time)) best = r;
  }
  return index < 0 ? NAN : waveform.value(best, index);
}

/// A level watch on one node voltage against a fixed level: v(node) - level.
inline solver::Watch level_watch(const solver::Circuit& circuit, const std::string& node, double level) {
  solver::Watch watch;
  watch.name = node;
  watch.plus_a = circuit.node_index(node);
  watch.offset = level;
  return watch;
}

}  // namespace linkrise::testing
