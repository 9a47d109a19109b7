// Sweeps (app/studies/sweep.h) and the command-line parameter forms (app/studies/study_parameters.h): every sweep point
// equals an individual run of the case with that value, and follows the RC closed form.
#include "app/studies/sweep.h"

#include <cmath>

#include <gtest/gtest.h>

#include "app/evaluation/case_evaluation.h"
#include "netlist/input_error.h"
#include "netlist/overrides.h"
#include "study_fixture.h"

namespace linkrise::app {
namespace {
using study_test::rc_case_text;
using study_test::to_95_percent;
using study_test::write_case;

TEST(StudySweep, RangesAndListsExpandAsWritten) {
  netlist::SourceMark mark{"test", 1, 1};
  VariedParameter log = parse_variation("r_pre.resistance=10Ohm..1kOhm:log:3", mark);
  ASSERT_EQ(log.values.size(), 3u);
  std::string problem;
  EXPECT_NEAR(netlist::parse_quantity(log.values[1], problem)->value, 100.0, 1e-12);  // geometric middle
  EXPECT_EQ(log.values[2], "1000 Ohm");
  VariedParameter lin = parse_variation("ambient=-20degC..40degC:4", mark);
  ASSERT_EQ(lin.values.size(), 4u);
  EXPECT_NEAR(netlist::parse_quantity(lin.values[1], problem)->value, 273.15, 1e-9);  // 0 degC
  VariedParameter list = parse_variation("link.capacitance=1mF, 2 mF,3mF", mark);
  EXPECT_EQ(list.values, (std::vector<std::string>{"1mF", "2 mF", "3mF"}));
  EXPECT_THROW(parse_variation("r_pre.resistance=1Ohm..2V", mark), netlist::InputError);
  EXPECT_THROW(parse_variation("r_pre.resistance=-1Ohm..2Ohm:log", mark), netlist::InputError);
  EXPECT_THROW(parse_variation("r_pre.resistance", mark), netlist::InputError);
  EXPECT_THROW(parse_variation("r_pre.resistance=1Ohm..2Ohm:1", mark), netlist::InputError);
}

// Also shows that a worker's reused row store (solver::Options::step_store) changes no result: the sweep
// reuses one per worker, the individual runs record into fresh storage, and the metrics must agree bit for bit.
TEST(StudySweep, PointsEqualIndividualRunsAndTheClosedForm) {
  std::string file = write_case("study_rc_sweep.yaml", rc_case_text("  r_pre.resistance: {plus_minus: 1 %}\n"));
  netlist::SourceMark mark{"test", 1, 1};
  std::vector<VariedParameter> parameters{parse_variation("r_pre.resistance=60Ohm..120Ohm:3", mark),
                                          parse_variation("link.capacitance=0.8mF,1.2mF", mark)};
  Sweep sweep = run_sweep(file, {}, parameters, 2);
  ASSERT_EQ(sweep.points.size(), 6u);
  const netlist::CaseDocument base = netlist::CaseDocument::load(file);
  const double resistances[] = {60.0, 90.0, 120.0}, capacitances[] = {0.8e-3, 1.2e-3};
  for (std::size_t i = 0; i < 6; ++i) {
    // The points run at the study accuracy (app/studies/study_accuracy.h); so does the individual run.
    CaseEvaluation alone = evaluate_case_document(app::at_study_accuracy(base.with(sweep.overrides(i))));
    ASSERT_EQ(alone.metrics.size(), sweep.results.columns.size());
    for (std::size_t c = 0; c < alone.metrics.size(); ++c) {
      double a = alone.metrics[c].value, b = sweep.results.points[i].values[c];
      EXPECT_TRUE(a == b || (std::isnan(a) && std::isnan(b))) << alone.metrics[c].name << " at point " << i;
    }
    // First parameter varies slowest. RC closed form t = −R·C·ln(0.05) (docs/references.md [R-RC-charge]),
    // 1e-6 relative.
    double expected = resistances[i / 2] * capacitances[i % 2] * to_95_percent();
    EXPECT_NEAR(sweep.results.value(i, "sequence.time_to_threshold"), expected, 1e-6 * expected) << "point " << i;
  }
}

TEST(StudySweep, BadPathsAndValuesAreInputErrors) {
  std::string file = write_case("study_rc_sweep_bad.yaml", rc_case_text("  r_pre.resistance: {plus_minus: 1 %}\n"));
  netlist::SourceMark mark{"test", 1, 1};
  EXPECT_THROW(run_sweep(file, {}, {parse_variation("r_pree.resistance=1Ohm,2Ohm", mark)}, 1), netlist::InputError);
  // A value out of the parameter's range (a negative resistance) makes the sweep bad input, naming the point.
  try {
    run_sweep(file, {}, {parse_variation("r_pre.resistance=10Ohm,-5Ohm", mark)}, 1);
    ADD_FAILURE() << "no error";
  } catch (const netlist::InputError& error) {
    EXPECT_NE(std::string(error.what()).find("sweep point 2"), std::string::npos) << error.what();
  }
}

std::vector<std::string> csv_cells(const std::string& line) {
  std::vector<std::string> cells;
  std::size_t start = 0;
  for (std::size_t comma; (comma = line.find(',', start)) != std::string::npos; start = comma + 1) {
    cells.push_back(line.substr(start, comma - start));
  }
  cells.push_back(line.substr(start));
  return cells;
}

// Every parameter column of sweep.csv names its unit; a fraction is in %, and a bare number takes the unit of the
// other values (a percent is a hundredth, docs/references.md [R-SI]).
TEST(StudySweep, CsvParameterColumnsCarryTheirUnits) {
  std::string file = write_case("study_rc_sweep_units.yaml", rc_case_text(""));
  netlist::SourceMark mark{"test", 1, 1};
  Sweep sweep = run_sweep(file, {}, {parse_variation("sequence.close_when.ratio=0.9,95%", mark),
                                     parse_variation("r_pre.resistance=50,100Ohm", mark)}, 2);
  const std::string csv = sweep_csv(sweep);
  std::vector<std::string> lines;
  for (std::size_t start = 0, end; (end = csv.find('\n', start)) != std::string::npos; start = end + 1) {
    lines.push_back(csv.substr(start, end - start));
  }
  ASSERT_EQ(lines.size(), 5u);
  const auto header = csv_cells(lines[0]);
  EXPECT_EQ(header[1], "sequence.close_when.ratio [%]");
  EXPECT_EQ(header[2], "r_pre.resistance [Ohm]");
  for (const auto& name : header) {
    if (name == "point" || name == "status" || name == "outcome" || name == "verdict") continue;
    EXPECT_NE(name.find(" ["), std::string::npos) << name << " has no unit";
    EXPECT_EQ(name.find("[]"), std::string::npos) << name;
  }
  const auto last = csv_cells(lines[4]);
  EXPECT_NEAR(std::stod(last[1]), 95.0, 1e-9);
  EXPECT_NEAR(std::stod(last[2]), 100.0, 1e-9);
  EXPECT_EQ(sweep.columns[0].display(0), "90 %");
  // RC closed form at the last point: t = −R·C·ln(1 − 0.95) (docs/references.md [R-RC-charge]), 1e-6 relative.
  const double expected = 100.0 * 1e-3 * to_95_percent();
  EXPECT_NEAR(sweep.results.value(3, "sequence.time_to_threshold"), expected, 1e-6 * expected);
}

}  // namespace
}  // namespace linkrise::app
