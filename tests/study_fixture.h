#pragma once
// An RC pre-charge circuit for the study tests: an ideal 100 V source charges C through R (contactor
// resistance 1 nOhm, no ESR, the open main contactor 1e15 Ohm in parallel), so the link meets 95 % of the source at t = −R·C·ln(1 − 0.95) after the
// pre-charge contactor closes (RC charging, any circuits textbook; docs/references.md [R-RC-charge]). The BMS
// samples every 1 ms; solver tolerances rtol 1e-10, atol 1e-12.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include <gtest/gtest.h>

namespace linkrise::study_test {

inline std::string rc_case_text(const std::string& tolerances) {
  return R"(# Invented test circuit (not a product): an RC charge under a BMS sequence.
title: RC charge
ground: gnd
ambient: 25 degC
parts:
  - {name: supply, kind: dc_source, nodes: [supply_plus, gnd], voltage: 100 V}
  - {name: k_pre, kind: contactor, nodes: [supply_plus, mid], closed_resistance: 1 nOhm}
  - {name: r_pre, kind: resistor, nodes: [mid, link_plus], resistance: 100 Ohm}
  - {name: k_main, kind: contactor, nodes: [supply_plus, link_plus], closed_resistance: 1 mOhm, open_resistance: 1e15 Ohm}
  - {name: link, kind: capacitor, nodes: [link_plus, gnd], capacitance: 1 mF}
sequence:
  start_closed: [k_pre]
  precharge: k_pre
  main: k_main
  resistor: r_pre
  pack: [supply_plus, gnd]
  link: [link_plus, gnd]
  close_when: {ratio: 95 %}
  sample_period: 1 ms
  minimum_time: 100 ms
  timeout: 2 s
run: {duration: 0.45 s, rtol: 1e-10, atol: 1e-12}
tolerances:
)" + tolerances;
}

/// Writes a case file under the test temp directory and returns its path.
inline std::string write_case(const std::string& name, const std::string& text) {
  std::filesystem::path path = std::filesystem::path(testing::TempDir()) / name;
  std::ofstream(path) << text;
  return path.string();
}

/// −ln(1 − 0.95): time constants to 95 %.
inline double to_95_percent() { return -std::log(1.0 - 0.95); }

}  // namespace linkrise::study_test
