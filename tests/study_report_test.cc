// The study reports (app/report/study_report.h): well-formed (XHTML-compatible) with unique ids, the expected plots and
// table rows, byte-identical at one and two threads, hostile text escaped, and the tables and curves carrying
// closed-form RC numbers. Small RC cases (tests/study_fixture.h) keep each study to a few fast simulations.
#include "app/report/study_report.h"

#include <gtest/gtest.h>
#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "app/studies/study_parameters.h"
#include "study_fixture.h"
#include "tests/xml_check.h"

namespace linkrise::app {
namespace {
using study_test::rc_case_text;
using study_test::to_95_percent;
using study_test::write_case;
using xml_check::count_inside;
using xml_check::Element;
using xml_check::find_all;
using xml_check::find_id;
using xml_check::parse_xml;
using xml_check::ParseResult;

const std::string kHostile = "<script>alert(1)</script> & 'quoted' \"<b>";
const std::string kEscaped = "&lt;script&gt;alert(1)&lt;/script&gt; &amp; &apos;quoted&apos; &quot;&lt;b&gt;";

// The RC fixture with a hostile title (YAML single-quoted: '' is one quote).
std::string hostile_rc_case(const std::string& tail) {
  std::string text = rc_case_text(tail);
  const std::string plain = "title: RC charge\n";
  text.replace(text.find(plain), plain.size(), "title: '" + std::string("<script>alert(1)</script> & ''quoted'' \"<b>") + "'\n");
  return text;
}

bool contains(const std::string& text, const std::string& needle) { return text.find(needle) != std::string::npos; }

// A report must parse, have unique ids, fetch nothing and carry no script.
void expect_well_formed(const std::string& html, const ParseResult& doc) {
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(doc.root, "html");
  std::set<std::string> ids;
  for (const Element& e : doc.elements) {
    auto id = e.attributes.find("id");
    if (id != e.attributes.end()) {
      EXPECT_TRUE(ids.insert(id->second).second) << "duplicate id " << id->second;
    }
  }
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_FALSE(contains(html, "<b>"));
  // Nothing external: the only "http" is the SVG namespace name and the CSP's http-equiv.
  for (auto at = html.find("http"); at != std::string::npos; at = html.find("http", at + 1)) {
    EXPECT_TRUE(html.compare(at, 26, "http://www.w3.org/2000/svg") == 0 || html.compare(at, 10, "http-equiv") == 0)
        << html.substr(at, 40);
  }
  EXPECT_FALSE(contains(html, "src="));
  EXPECT_TRUE(contains(html, "High-voltage caution"));
}


// The row of table `id` whose first cell is `first`.
std::vector<std::string> row_of(const ParseResult& doc, const std::string& id, const std::string& first) {
  for (int row : body_rows(doc, id)) {
    auto texts = cells(doc, row);
    if (!texts.empty() && texts[0] == first) return texts;
  }
  ADD_FAILURE() << "no row " << first << " in " << id;
  return {};
}

// Time to 95 % of an RC charge, as the report prints it (4 significant digits).
std::string rc_time(double resistance, double capacitance) {
  return analysis::format_metric(resistance * capacitance * to_95_percent(), "s");
}

const char* kVariants =
    "  r_pre.resistance: {plus_minus: 10 %}\n"
    "variants:\n"
    "  - {name: r_47, set: {r_pre.resistance: 47 Ohm}, note: \"smaller <i>resistor</i> & faster\"}\n"
    "  - {name: r_68, set: {r_pre.resistance: 68 Ohm}}\n";

TEST(StudyReport, CompareTableMarksTheBestAndShowsRcTimes) {
  const std::string file = write_case("study_report_compare.yaml", hostile_rc_case(kVariants));
  const VariantComparison comparison = compare_variants(file, {}, 2);
  const std::string html = compare_report_html(comparison);
  const ParseResult doc = parse_xml(html);
  expect_well_formed(html, doc);
  EXPECT_EQ(find_all(doc, "title")[0]->text, "Variant comparison: " + kEscaped);
  EXPECT_TRUE(contains(html, "smaller &lt;i&gt;resistor&lt;/i&gt; &amp; faster"));
  EXPECT_EQ(body_rows(doc, "variants").size(), 3u);
  // One row per metric, then the outcome and verdict rows.
  EXPECT_EQ(body_rows(doc, "comparison").size(), comparison.results.columns.size() + 2);

  // RC charging to 95 % takes R·C·ln 20 (docs/references.md [R-RC-charge]); the smallest
  // resistor is the fastest, so its cell carries the mark.
  const auto row = row_of(doc, "comparison", "sequence.time_to_threshold");
  ASSERT_EQ(row.size(), 6u);  // metric, better, nominal, r_47, r_68, best
  EXPECT_EQ(row[1], "smaller");
  EXPECT_EQ(row[2], rc_time(100.0, 1e-3));
  EXPECT_EQ(row[3], rc_time(47.0, 1e-3) + "\u00a0best");
  EXPECT_EQ(row[4], rc_time(68.0, 1e-3));
  EXPECT_EQ(row[5], "r_47");
  const auto verdict = row_of(doc, "comparison", "verdict");
  ASSERT_EQ(verdict.size(), 6u);
  for (int i = 2; i < 5; ++i) EXPECT_TRUE(verdict[i] == "PASS" || verdict[i].rfind("FAIL", 0) == 0) << verdict[i];

  // Byte-reproducible: another run at one thread gives the same page.
  EXPECT_EQ(compare_report_html(compare_variants(file, {}, 1)), html);
}

TEST(StudyReport, SpreadHistogramsAndStatisticsFollowTheRcCorners) {
  const std::string file = write_case("study_report_spread.yaml",
                                      hostile_rc_case("  r_pre.resistance: {plus_minus: 10 %}\n"
                                                      "  link.capacitance: {minus: 20 %, plus: 10 %}\n"));
  const Spread spread = run_spread(file, {}, spread_plan(true, 0, 1, ""), 2);
  const std::vector<std::string> plotted = spread_plot_metrics(spread, spread.headline);
  for (const char* name : {"sequence.precharge_time", "sequence.time_to_threshold", "r_pre.energy"}) {
    EXPECT_NE(std::find(plotted.begin(), plotted.end(), name), plotted.end()) << name;
  }
  const std::string html = spread_report_html(spread, spread.headline);
  const ParseResult doc = parse_xml(html);
  expect_well_formed(html, doc);
  EXPECT_EQ(find_all(doc, "title")[0]->text, "Tolerance spread: " + kEscaped);
  EXPECT_EQ(find_all(doc, "svg").size(), plotted.size());  // one histogram per plotted metric
  EXPECT_EQ(body_rows(doc, "statistics").size(), plotted.size());
  EXPECT_EQ(body_rows(doc, "tolerances").size(), 2u);
  // Corners of R ±10 % and C −20/+10 %: the extreme times are R_min·C_min·ln 20 and R_max·C_max·ln 20 (RC closed
  // form), and the nominal is 100 Ohm · 1 mF · ln 20.
  const auto row = row_of(doc, "statistics", "sequence.time_to_threshold");
  ASSERT_EQ(row.size(), 10u);
  EXPECT_EQ(row[1], rc_time(100.0, 1e-3));
  EXPECT_EQ(row[2], rc_time(90.0, 0.8e-3));
  EXPECT_EQ(row[8], rc_time(110.0, 1.1e-3));
  EXPECT_EQ(row[9], "4 of 4");
  EXPECT_TRUE(contains(html, ">nominal<"));  // the nominal marker's label
  EXPECT_EQ(spread_report_html(run_spread(file, {}, spread_plan(true, 0, 1, ""), 1), spread.headline), html);
}

TEST(StudyReport, WindowMarksTheRecommendedWindowAndListsTheVerification) {
  const std::string file = write_case("study_report_window.yaml",
                                      rc_case_text("  r_pre.resistance: {plus_minus: 10 %}\n"
                                                   "  link.capacitance: {minus: 20 %, plus: 10 %}\n"
                                                   "scenarios:\n  - {name: oversize_capacitance, expect: timeout}\n"));
  Spread spread;
  const FaultWindow window = fault_window(file, {}, spread_plan(true, 0, 1, ""), 0.2, 2, &spread);
  ASSERT_TRUE(window.verified()) << window_text(window, spread);
  const std::string html = window_report_html(window, spread, spread.headline);
  const ParseResult doc = parse_xml(html);
  expect_well_formed(html, doc);
  // Two time histograms with the window, then one per plotted metric of the spread.
  EXPECT_EQ(find_all(doc, "svg").size(), 2 + spread_plot_metrics(spread, spread.headline).size());
  EXPECT_EQ(body_rows(doc, "verification").size(), 2 + window.matrix.rows.size());
  const auto fastest = row_of(doc, "verification", fmt::format("fastest corner {}", spread.index(window.fastest_point)));
  ASSERT_EQ(fastest.size(), 5u);
  EXPECT_EQ(fastest[2], "closed");
  EXPECT_EQ(fastest[4], "PASS");
  // The band and both markers are drawn on the two time histograms.
  auto occurrences = [&](const std::string& needle) {
    int n = 0;
    for (auto at = html.find(needle); at != std::string::npos; at = html.find(needle, at + 1)) ++n;
    return n;
  };
  EXPECT_GE(occurrences(">recommended window<"), 2);
  EXPECT_GE(occurrences(">minimum time<"), 2);
  EXPECT_GE(occurrences(">timeout<"), 2);
  // The recommendation from the RC extremes (as in study_window_test): ⌊0.8·R_min·C_min·ln 20⌋ in whole 1 ms periods.
  const double minimum = std::floor(0.8 * 90.0 * 0.8e-3 * to_95_percent() / 1e-3) * 1e-3;
  EXPECT_TRUE(contains(html, analysis::format_metric(minimum, "s") + " (the case has 100 ms)"));
  EXPECT_EQ(window_report_html(window, spread, spread.headline), html);
}

TEST(StudyReport, SweepDrawsOneCurvePerSecondValue) {
  const std::string file = write_case("study_report_sweep.yaml", hostile_rc_case("  r_pre.resistance: {plus_minus: 5 %}\n"));
  const std::vector<VariedParameter> one{parse_variation("r_pre.resistance=47Ohm,68Ohm,100Ohm", option_mark("--vary", 1))};
  const Sweep sweep = run_sweep(file, {}, one, 2);
  const std::vector<std::string> metrics{"sequence.time_to_threshold", "r_pre.energy"};
  const std::string html = sweep_report_html(sweep, metrics);
  const ParseResult doc = parse_xml(html);
  expect_well_formed(html, doc);
  EXPECT_EQ(find_all(doc, "title")[0]->text, "Parameter sweep: " + kEscaped);
  EXPECT_EQ(find_all(doc, "svg").size(), metrics.size());
  EXPECT_EQ(find_all(doc, "polyline").size(), metrics.size());  // one curve each
  const auto rows = body_rows(doc, "points");
  ASSERT_EQ(rows.size(), 3u);
  // point, resistance, two metrics, outcome, verdict; the time is the RC closed form.
  const auto second = cells(doc, rows[1]);
  ASSERT_EQ(second.size(), 6u);
  EXPECT_EQ(second[2], rc_time(68.0, 1e-3));
  EXPECT_EQ(sweep_report_html(run_sweep(file, {}, one, 1), metrics), html);

  // Two parameters: one curve per value of the second, in every plot.
  const std::vector<VariedParameter> two{one[0], parse_variation("link.capacitance=0.8mF,1mF", option_mark("--vary", 2))};
  const Sweep grid = run_sweep(file, {}, two, 2);
  const std::string grid_html = sweep_report_html(grid, metrics);
  const ParseResult grid_doc = parse_xml(grid_html);
  expect_well_formed(grid_html, grid_doc);
  EXPECT_EQ(find_all(grid_doc, "svg").size(), metrics.size());
  EXPECT_EQ(find_all(grid_doc, "polyline").size(), 2 * metrics.size());
  EXPECT_EQ(body_rows(grid_doc, "points").size(), 6u);
  EXPECT_TRUE(contains(grid_html, "link.capacitance = 800 µF"));
}

// `--report` on the CLI: written with the other outputs for good input; nothing for bad input (exit 2).
TEST(StudyReport, CommandsWriteTheReportOnlyForGoodInput) {
  namespace fs = std::filesystem;
  const fs::path work = fs::path(::testing::TempDir()) / "study-report-cli";
  fs::remove_all(work);
  fs::create_directories(work);
  const std::string file = write_case("study_report_cli.yaml", rc_case_text(kVariants));
  auto run = [&](const std::string& arguments) {
    const int status = std::system(fmt::format("'{}' {} -q 2>/dev/null", LINKRISE_BINARY, arguments).c_str());
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  };
  auto read = [](const fs::path& path) {
    std::ifstream stream(path, std::ios::binary);
    std::ostringstream text;
    text << stream.rdbuf();
    return text.str();
  };
  const fs::path compare = work / "compare.html";
  EXPECT_EQ(run(fmt::format("compare '{}' -o '{}' --report '{}'", file, (work / "c").string(), compare.string())), 0);
  EXPECT_TRUE(fs::exists(work / "c" / "compare.csv"));
  EXPECT_EQ(read(compare), compare_report_html(compare_variants(file, {}, 1)));
  const fs::path spread = work / "spread.html";
  EXPECT_EQ(run(fmt::format("spread '{}' --corners -o '{}' --report '{}'", file, (work / "s").string(), spread.string())),
            0);
  EXPECT_TRUE(parse_xml(read(spread)).ok);
  const fs::path sweep = work / "sweep.html";
  EXPECT_EQ(run(fmt::format("sweep '{}' --vary r_pre.resistance=47Ohm,68Ohm -o '{}' --report '{}'", file,
                            (work / "w").string(), sweep.string())),
            0);
  EXPECT_TRUE(parse_xml(read(sweep)).ok);
  // A misspelt path is bad input: exit 2, no report.
  const fs::path none = work / "none.html";
  EXPECT_EQ(run(fmt::format("sweep '{}' --vary r_pre.resistanse=47Ohm -o '{}' --report '{}'", file,
                            (work / "x").string(), none.string())),
            2);
  EXPECT_FALSE(fs::exists(none));
}

}  // namespace
}  // namespace linkrise::app
