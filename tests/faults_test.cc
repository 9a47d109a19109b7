// The detection matrix on the stored sequence cases: a well-designed case catches every built-in fault, a badly
// designed one shows failing rows, and structure the case lacks is reported as not applicable.
#include "app/studies/faults.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <string>

#include "app/evaluation/case_run.h"
#include "netlist/case.h"
#include "netlist/case_document.h"
#include "netlist/input_error.h"
#include "tests/circuit_fixture.h"

namespace {
using linkrise::app::DetectionMatrix;
using linkrise::app::DetectionRow;
using linkrise::testing::contains;

std::string stored(const std::string& name) { return std::string(LINKRISE_SOURCE_DIR) + "/cases/" + name; }

const DetectionRow& row(const DetectionMatrix& matrix, const std::string& scenario) {
  for (const auto& r : matrix.rows) {
    if (r.scenario == scenario) return r;
  }
  ADD_FAILURE() << "no row " << scenario;
  static DetectionRow none;
  return none;
}
}  // namespace

TEST(Faults, WellDesignedCaseCatchesEveryBuiltInFault) {
  DetectionMatrix matrix = linkrise::app::detection_matrix(stored("sequence_clean_close.yaml"), 2);
  EXPECT_TRUE(matrix.pass()) << linkrise::app::matrix_text(matrix);
  EXPECT_EQ(row(matrix, "nominal").actual_word(), "closed");
  EXPECT_EQ(row(matrix, "shorted_link").actual_word(), "no_rise");
  EXPECT_EQ(row(matrix, "open_precharge_resistor").actual_word(), "no_rise");
  EXPECT_EQ(row(matrix, "missing_capacitance").actual_word(), "too_fast");
  EXPECT_EQ(row(matrix, "oversize_capacitance").actual_word(), "closed");
  EXPECT_EQ(row(matrix, "reversed_connection").actual_word(), "no_rise");
  EXPECT_EQ(row(matrix, "constant_power_from_start").expected_word(), "closed");
  EXPECT_EQ(row(matrix, "slow_main_contactor").actual_word(), "closed");  // a scenario the case defines
  // The weld check comes first: k_neg alone 0…40 ms, parted 4 ms later, so k_pre alone from the 45 ms sample to
  // 85 ms, parted at 88 ms: the pre-charge starts at the 90 ms sample. The rise check is due 25 ms after that,
  // so 115 ms is the detection time into a short.
  EXPECT_NEAR(row(matrix, "shorted_link").detection_time, 115e-3, 1e-12);
  // Welds (common practice: close one contactor alone and watch the link, docs/sequence-and-limits.md). A welded
  // k_pre or k_main with k_neg alone: k_neg touches at 12 ms; through k_main the link jumps at once (15 ms
  // sample); through 33 Ohm into 800 uF (τ = 26.4 ms) it rises by 10 % in τ·ln(1/0.9) = 2.8 ms ([R-RC-charge]):
  // also the 15 ms sample. A welded k_neg with k_pre alone: k_pre touches at 45 + 8 = 53 ms, +2.8 ms: 60 ms.
  for (const auto& [scenario, time] : {std::pair{"welded_k_pre", 15e-3}, std::pair{"welded_k_main", 15e-3},
                                       std::pair{"welded_k_neg", 60e-3}}) {
    EXPECT_EQ(row(matrix, scenario).actual_word(), "welded") << scenario;
    EXPECT_NEAR(row(matrix, scenario).detection_time, time, 1e-12) << scenario;
  }
  EXPECT_EQ(row(matrix, "failed_k_pre").actual_word(), "no_rise");
  EXPECT_EQ(row(matrix, "failed_k_neg").actual_word(), "no_rise");
  EXPECT_EQ(row(matrix, "failed_k_main").actual_word(), "main_failed");
  EXPECT_EQ(row(matrix, "failed_k_main").attempt, 1);
  EXPECT_EQ(row(matrix, "live_bus").actual_word(), "live_bus");  // never "too_fast"
  EXPECT_NEAR(row(matrix, "live_bus").detection_time, 0.0, 1e-12);
  // Twice the capacitance: the resistor takes ½·C·V² twice over (docs/references.md [R-RC-energy]).
  double nominal = row(matrix, "nominal").energy, doubled = row(matrix, "oversize_capacitance").energy;
  EXPECT_NEAR(doubled / nominal, 2.0, 0.05);  // the 100 W auxiliary load adds a few per cent
}

TEST(Faults, BadlyDesignedCaseShowsFailingRows) {
  DetectionMatrix matrix = linkrise::app::detection_matrix(stored("sequence_bad_design.yaml"), 2);
  EXPECT_FALSE(matrix.pass());
  EXPECT_TRUE(row(matrix, "nominal").pass);
  const auto& shorted = row(matrix, "shorted_link");
  EXPECT_EQ(shorted.expected_word(), "timeout");  // no rise check: only the timeout can catch it
  EXPECT_EQ(shorted.actual_word(), "timeout");
  EXPECT_FALSE(shorted.ratings_held);
  EXPECT_FALSE(shorted.pass);
  // The broken rating is named with the data-sheet entry it came from and where the case writes it.
  EXPECT_TRUE(contains(shorted.broken_rating, "r_pre.")) << shorted.broken_rating;
  EXPECT_TRUE(contains(shorted.broken_rating, "ratings.")) << shorted.broken_rating;
  EXPECT_TRUE(contains(shorted.broken_rating, "sequence_bad_design.yaml:")) << shorted.broken_rating;
  // Into the short the resistor takes I²·R from the second contact touching (k_neg, 10 ms) until the fault at
  // the 2 s timeout opens the path (no opening delay): I = 410 V over 15 Ohm + 80 mOhm source + 2 × 0.3 mOhm
  // contacts + 1 mOhm short (Ohm's and Joule's laws, docs/references.md [R-Ohm-Joule]) — 22.06 kJ. The link
  // capacitor holds under 0.1 J behind the short, so 1e-5 relative (0.22 J) covers it and still sees the arcs' 3 J
  // below (measured: 3.4e-5 J apart).
  const double total = 15.0 + 0.080 + 2 * 0.3e-3 + 1e-3;
  const double current = 410.0 / total;
  const double heat = current * current * 15.0 * (2.0 - 0.010);
  // Then k_pre and k_neg part together on 27 A, above the minimum arc current (0.5 A): two opening arcs in series,
  // each U(t) = U0 + k·t (the contactor defaults U0 = 15 V, k = 200 kV/s, models/contactor.h), so the current
  // falls linearly, i = (410 V − 2·U)/R, from i0 = (410 − 2·U0)/R to I_min, where the arcs go out, after
  // t_e = ((410 − I_min·R)/2 − U0)/k = 0.93 ms; the resistor takes R_pre·t_e·(i0² + i0·I_min + I_min²)/3 = 3.0 J
  // (Ohm's and Joule's laws over a linear ramp, [R-Ohm-Joule]; the arc law, [R-arc-break]). The clearing ramp after
  // (10 us at under I_min) adds at most I_min²·R_pre·10 us = 40 uJ.
  const double arc_start = 15.0, arc_rise = 200e3, minimum = 0.5;
  const double first = (410.0 - 2 * arc_start) / total;
  const double arc_time = ((410.0 - minimum * total) / 2 - arc_start) / arc_rise;
  const double arc_heat = 15.0 * arc_time * (first * first + first * minimum + minimum * minimum) / 3;
  EXPECT_NEAR(shorted.energy, heat + arc_heat, 1e-5 * heat);
  // No minimum time: nothing can catch a missing capacitance, so the row says so instead of failing.
  EXPECT_FALSE(row(matrix, "missing_capacitance").applicable);
  EXPECT_TRUE(contains(row(matrix, "missing_capacitance").note, "too-fast check is off"))
      << row(matrix, "missing_capacitance").note;
  EXPECT_FALSE(row(matrix, "oversize_capacitance").ratings_held);
  const auto& reversed = row(matrix, "reversed_connection");
  EXPECT_FALSE(reversed.applicable);
  EXPECT_TRUE(reversed.pass);
  EXPECT_TRUE(contains(reversed.note, "no diode")) << reversed.note;
  EXPECT_FALSE(row(matrix, "constant_power_from_start").applicable);
}

// Constant-power loads drawing from 0 V on (docs/references.md [R-CPL-equilibrium], the quadratic
// v·(Vs − v)/R = P): the link must climb past the unstable lower root [Vs − √(Vs² − 4PR)]/2. In the stall case
// (400 V, 47 Ω, 700 W) that root is ~116 V, far above the load's 10 V resistive floor, so the link stays near 0 V
// and the rise check fires; in the clean case (~409 V, 33 Ω, 100 W) it is ~8 V, below the floor, so the link
// escapes and closes.
TEST(Faults, ConstantPowerExpectationFollowsTheQuadratic) {
  // The expectation from the case's own data, not from the run: source voltage and resistance, the path's
  // contact and pre-charge resistances, the load's power and its resistive floor (10 V, the model's default).
  auto document = linkrise::netlist::CaseDocument::load(stored("sequence_stall.yaml"));
  const linkrise::netlist::SourceMark here{"faults_test", 0, 0};
  auto value = [&](const std::string& path) {
    auto quantity = document.quantity_at(path, here);
    EXPECT_TRUE(quantity.has_value()) << path;
    return quantity ? quantity->value : 0.0;
  };
  const double vs = value("pack.voltage");
  const double r = value("pack.series_resistance") + value("k_pre.closed_resistance") + value("r_pre.resistance");
  const double p = value("dcdc.power");
  const double floor = 10.0;
  ASSERT_LT(4.0 * p * r, vs * vs) << "the quadratic has real roots";
  const double lower_root = (vs - std::sqrt(vs * vs - 4.0 * p * r)) / 2.0;  // [R-CPL-equilibrium]
  EXPECT_NEAR(lower_root, 116.1, 0.1);  // 400 V, 47.09 Ohm, 700 W (k_neg's default 0.3 mOhm moves it by 1 mV)
  const std::string closed_form = lower_root > floor ? "no_rise" : "closed";
  DetectionMatrix stalled = linkrise::app::detection_matrix(stored("sequence_stall.yaml"), 1);
  const auto& bottom = row(stalled, "constant_power_from_start");
  EXPECT_EQ(bottom.expected_word(), closed_form);
  EXPECT_EQ(bottom.expected_word(), "no_rise");
  EXPECT_EQ(bottom.actual_word(), "no_rise");
  // The row's prediction uses the nominal run's path (the hand sum above, printed to 4 digits) and the loads' rated
  // power, and gives the same lower root; the note then states what the scenario's own run measured.
  EXPECT_TRUE(contains(bottom.note, "expected from the nominal run's charging path")) << bottom.note;
  EXPECT_TRUE(contains(bottom.note, "700 W drawn through 47.09 Ohm from 400 V")) << bottom.note;
  EXPECT_TRUE(contains(bottom.note, "the roots are 116.1 V (unstable)")) << bottom.note;
  EXPECT_TRUE(contains(bottom.note, "the run: stall at the bottom")) << bottom.note;
  EXPECT_TRUE(stalled.pass()) << linkrise::app::matrix_text(stalled);
  EXPECT_EQ(row(stalled, "light_converter_load").actual_word(), "closed");
  DetectionMatrix clean = linkrise::app::detection_matrix(stored("sequence_clean_close.yaml"), 1);
  EXPECT_EQ(row(clean, "constant_power_from_start").expected_word(), "closed");
  EXPECT_EQ(row(clean, "constant_power_from_start").actual_word(), "closed");
}

TEST(Faults, ResultsDoNotDependOnTheNumberOfThreads) {
  auto one = linkrise::app::detection_matrix(stored("sequence_retry_short.yaml"), 1);
  auto four = linkrise::app::detection_matrix(stored("sequence_retry_short.yaml"), 4);
  EXPECT_EQ(linkrise::app::matrix_csv(one), linkrise::app::matrix_csv(four));
  EXPECT_EQ(row(one, "hot_ambient").attempts, 3);
  // Every number column of faults.csv names its unit; the others hold words.
  const std::string csv = linkrise::app::matrix_csv(one);
  const std::string header = csv.substr(0, csv.find('\n'));
  const std::set<std::string> words{"scenario", "expected", "actual", "applicable",
                                    "ratings_held", "broken_rating", "pass", "note"};
  for (std::size_t start = 0, end = 0; end != std::string::npos; start = end + 1) {
    end = header.find(',', start);
    const std::string column = header.substr(start, end == std::string::npos ? end : end - start);
    if (words.count(column) == 0) {
      EXPECT_NE(column.find(" ["), std::string::npos) << column << " has no unit";
    }
  }
  EXPECT_NE(header.find(",attempts [1],"), std::string::npos) << header;
}

TEST(Faults, ABadScenarioIsAnInputErrorAtItsPosition) {
  std::filesystem::path directory = std::filesystem::temp_directory_path() / "linkrise_faults_test";
  std::filesystem::create_directories(directory);
  std::ifstream source(stored("sequence_bad_design.yaml"));
  std::string text((std::istreambuf_iterator<char>(source)), std::istreambuf_iterator<char>());
  text += "\nscenarios:\n  - name: typo\n    set: {r_pree.resistance: 10 Ohm}\n    expect: closed\n";
  std::filesystem::path file = directory / "bad_scenario.yaml";
  std::ofstream(file) << text;
  auto error = linkrise::testing::input_error([&] { linkrise::app::detection_matrix(file.string(), 1); });
  EXPECT_TRUE(contains(error.what(), "did you mean 'r_pre'?")) << error.what();
  EXPECT_TRUE(contains(error.what(), "bad_scenario.yaml:")) << error.what();
}

TEST(Faults, CommandExitCodesAndFiles) {
  std::filesystem::path out = std::filesystem::temp_directory_path() / "linkrise_faults_cli";
  std::filesystem::remove_all(out);
  std::string binary = LINKRISE_BINARY;
  int good = std::system((binary + " faults -q -o " + out.string() + " " + stored("sequence_clean_close.yaml")).c_str());
  EXPECT_EQ(WEXITSTATUS(good), 0);
  EXPECT_TRUE(std::filesystem::exists(out / "faults.json"));
  EXPECT_TRUE(std::filesystem::exists(out / "faults.csv"));
  int bad = std::system((binary + " faults -q -o " + out.string() + " " + stored("sequence_bad_design.yaml")).c_str());
  EXPECT_EQ(WEXITSTATUS(bad), 1);
  int run_bad = std::system((binary + " run -q -o " + out.string() + " " + stored("sequence_stall.yaml")).c_str());
  EXPECT_EQ(WEXITSTATUS(run_bad), 0);  // the stall is the expected outcome of that case
}

// A row's outcome, attempt and detection time belong to one attempt: under a tight timeout a doubled link times
// out on attempt 1 and closes on attempt 2 (the link kept its charge), so the row says closed on attempt 2 with no
// fault time, and names the earlier timeout; a short is caught by the rise check on attempt 1 at its sample
// (25 ms after the attempt's start, docs/sequence-and-limits.md).
TEST(Faults, ARowsOutcomeAttemptAndTimeBelongTogether) {
  auto document = linkrise::netlist::CaseDocument::load(stored("study_precharge_window.yaml"))
                      .with({{"sequence.timeout", "165 ms", {}}, {"sequence.minimum_time", "20 ms", {}}});
  DetectionMatrix matrix = linkrise::app::detection_matrix(document, 2);
  const auto& oversize = row(matrix, "oversize_capacitance");
  EXPECT_EQ(oversize.actual_word(), "closed");
  EXPECT_EQ(oversize.attempt, 2);
  EXPECT_EQ(oversize.attempts, 2);
  EXPECT_TRUE(std::isnan(oversize.detection_time));
  EXPECT_TRUE(contains(oversize.note, "attempt 1 ended timeout at 165 ms")) << oversize.note;
  const auto& shorted = row(matrix, "shorted_link");
  EXPECT_EQ(shorted.actual_word(), "no_rise");
  EXPECT_EQ(shorted.attempt, 1);
  EXPECT_NEAR(shorted.detection_time, 0.025, 1e-9);
  const std::string text = linkrise::app::matrix_text(matrix);
  EXPECT_TRUE(contains(text, "2/2")) << text;
}

// The stored boat case: a converter the sequence starts 100 ms after the main closure, a retry after a short
// timeout, and a run that ends 300 ms after the last sequence event. Every row ends decided (no 'unfinished', no
// solver failure) with its outcome, attempt and time from one attempt, and each run ends its settle after the
// sequence's last event. Times are the case's sample grid (5 ms) plus its contact delays (docs/sequence-and-limits.md).
TEST(Faults, TheStoredConverterCaseRunsEveryRetryToTheEndWithConsistentRows) {
  const std::string file = stored("boat_104s_aux_converter.yaml");
  DetectionMatrix matrix = linkrise::app::detection_matrix(file, 2);
  EXPECT_TRUE(matrix.pass()) << linkrise::app::matrix_text(matrix);
  for (const auto& r : matrix.rows) {
    if (!r.applicable) continue;
    EXPECT_FALSE(r.solver_failed) << r.scenario << ": " << r.note;
    EXPECT_NE(r.actual_word(), "unfinished") << r.scenario;
    EXPECT_GE(r.attempt, 1) << r.scenario;
    EXPECT_LE(r.attempt, r.attempts) << r.scenario;
    // A closed row has no fault time; a fault row's time is its attempt's fault, before the run's end.
    EXPECT_EQ(std::isnan(r.detection_time), r.actual_word() == "closed") << r.scenario;
    if (!std::isnan(r.detection_time)) {
      EXPECT_LT(r.detection_time, r.end_time) << r.scenario;
    }
  }
  // The rise check is due 40 ms after each attempt start; the retry starts at the first sample 1 s after the
  // fault; k_neg parts 4 ms after the second fault, and the run goes on for its 300 ms settle.
  const auto& shorted = row(matrix, "shorted_link");
  EXPECT_EQ(shorted.actual_word(), "no_rise");
  EXPECT_EQ(shorted.attempt, 1);
  EXPECT_EQ(shorted.attempts, 2);
  EXPECT_NEAR(shorted.detection_time, 0.040, 1e-9);
  EXPECT_NEAR(shorted.end_time, 1.080 + 0.004 + 0.3, 1e-9);
  // 0.1 % of the link (1.1 uF) charges in microseconds: too fast at the first sample whose rate is settled
  // (20 ms); the ringing link ends its run like the others, after the second attempt's fault and the settle.
  const auto& missing = row(matrix, "missing_capacitance");
  EXPECT_EQ(missing.actual_word(), "too_fast");
  EXPECT_NEAR(missing.detection_time, 0.020, 1e-9);
  EXPECT_NEAR(missing.end_time, 1.040 + 0.004 + 0.3, 1e-9);
  // The nominal row closes on its retry; its run ends 300 ms after the converter's start, 100 ms after the main
  // contacts touched (the case run's own report gives that touch).
  const auto& nominal = row(matrix, "nominal");
  EXPECT_EQ(nominal.actual_word(), "closed");
  EXPECT_EQ(nominal.attempt, 2);
  EXPECT_TRUE(contains(nominal.note, "attempt 1 ended timeout at 150 ms")) << nominal.note;
  linkrise::app::CaseRun run(linkrise::netlist::load_case(file));
  ASSERT_NE(run.report(), nullptr);
  const double main_closed = run.report()->history.back().main_closed;
  EXPECT_NEAR(nominal.end_time, main_closed + 0.1 + 0.3, 1e-9);
  EXPECT_NEAR(run.result().end_time, nominal.end_time, 1e-9);
  // The helm supply, started with each attempt, draws while the link charges: its row is applicable.
  EXPECT_EQ(row(matrix, "constant_power_from_start").actual_word(), "closed");
}

// With the too-fast check off nothing can catch a missing link capacitance: the row says so instead of expecting a
// fault that cannot come.
TEST(Faults, AScenarioWhoseCheckIsOffIsNotApplicableWithTheReason) {
  auto document = linkrise::netlist::CaseDocument::load(stored("boat_104s_aux_converter.yaml"))
                      .with({{"sequence.minimum_time", "0 s", {}}});
  DetectionMatrix matrix = linkrise::app::detection_matrix(document, 2);
  const auto& missing = row(matrix, "missing_capacitance");
  EXPECT_FALSE(missing.applicable);
  EXPECT_TRUE(contains(missing.note, "minimum_time")) << missing.note;
  EXPECT_TRUE(missing.pass);
}
