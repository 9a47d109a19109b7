// The detection-matrix report: well-formed (XHTML-compatible), one table row per scenario, failing rows marked
// by word as well as by colour, byte-reproducible at any thread count, hostile text escaped, and the kept
// link-voltage traces true to the waveform.
#include "app/report/faults_report.h"

#include <gtest/gtest.h>
#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "app/studies/faults.h"
#include "tests/circuit_fixture.h"
#include "tests/xml_check.h"

namespace linkrise::app {
namespace {

using testing::contains;
using xml_check::count_inside;
using xml_check::Element;
using xml_check::find_all;
using xml_check::find_id;
using xml_check::parse_xml;
using xml_check::ParseResult;

std::string stored(const std::string& name) { return std::string(LINKRISE_SOURCE_DIR) + "/cases/" + name; }

// The bad design's matrix, simulated once for the suite.
const DetectionMatrix& bad_design() {
  static const DetectionMatrix matrix = detection_matrix(stored("sequence_bad_design.yaml"), 2);
  return matrix;
}

const DetectionRow& row(const DetectionMatrix& matrix, const std::string& scenario) {
  static const DetectionRow none;
  const DetectionRow* found = matrix.find(scenario);
  EXPECT_NE(found, nullptr) << "no row " << scenario;
  return found ? *found : none;
}


int count(const std::string& text, const std::string& needle) {
  int found = 0;
  for (auto at = text.find(needle); at != std::string::npos; at = text.find(needle, at + 1)) ++found;
  return found;
}

TEST(FaultsReport, BadDesignIsWellFormedWithOneMarkedRowPerScenario) {
  const DetectionMatrix& matrix = bad_design();
  ASSERT_FALSE(matrix.pass());
  const std::string html = faults_report_html(matrix);
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(doc.root, "html");

  std::set<std::string> ids;
  for (const Element& e : doc.elements) {
    if (e.attributes.count("id")) {
      EXPECT_TRUE(ids.insert(e.attributes.at("id")).second) << e.attributes.at("id");
    }
  }

  const std::vector<int> rows = body_rows(doc, "matrix");
  ASSERT_EQ(rows.size(), matrix.rows.size());
  int failing = 0;
  for (std::size_t r = 0; r < rows.size(); ++r) {
    const DetectionRow& expected = matrix.rows[r];
    const auto texts = cells(doc, rows[r]);
    ASSERT_EQ(texts.size(), 8u);
    EXPECT_EQ(texts[0], expected.scenario);
    const Element& tr = doc.elements[rows[r]];
    const std::string tone = tr.attributes.count("class") ? tr.attributes.at("class") : "";
    // The word in the result cell carries the outcome; the class only colours it.
    if (!expected.applicable) {
      EXPECT_EQ(texts[7], "not applicable");
      EXPECT_EQ(tone, "");
    } else if (expected.pass) {
      EXPECT_EQ(texts[7], "PASS");
      EXPECT_EQ(tone, "pass");
    } else {
      ++failing;
      EXPECT_EQ(texts[7], "FAIL");
      EXPECT_EQ(tone, "fail");
      // ... and its reasons are listed under the table.
      EXPECT_TRUE(contains(html, "<li>" + expected.scenario + " \u2014 FAIL: ")) << expected.scenario;
    }
  }
  EXPECT_GE(failing, 2);  // shorted link and oversize capacitance (tests/faults_test.cc)

  // The short is caught only by the timeout, after the resistor has exceeded its rating (named with its data-sheet
  // entry); the missing capacitance is not applicable (no minimum time, so no check could catch it).
  EXPECT_TRUE(contains(html, "<li>shorted_link \u2014 FAIL: ended &#39;timeout&#39;")
              || contains(html, "<li>shorted_link \u2014 FAIL: a part rating was broken: r_pre."));
  EXPECT_TRUE(contains(html, "a part rating was broken: r_pre."));
  EXPECT_FALSE(contains(html, "<li>missing_capacitance \u2014 FAIL"));
  EXPECT_EQ(count(html, "\u2014 FAIL: "), failing);

  // Resistor table: one row per simulated scenario, over-rated ones marked in words.
  const auto applicable = std::count_if(matrix.rows.begin(), matrix.rows.end(),
                                        [](const DetectionRow& r) { return r.applicable; });
  const std::vector<int> stress = body_rows(doc, "resistor-stress");
  ASSERT_EQ(static_cast<long>(stress.size()), applicable);
  for (int r : stress) {
    const auto texts = cells(doc, r);
    ASSERT_EQ(texts.size(), 6u);
    const bool survived = row(matrix, texts[0]).ratings_held;
    EXPECT_EQ(texts[5], survived ? "yes" : "NO") << texts[0];
  }
  // Into the short the resistor takes V²/R for the 2 s timeout (Joule's law, common practice: docs/references.md
  // [R-Ohm-Joule]): far over its 120 J rating, so the bar says so.
  EXPECT_TRUE(contains(cells(doc, stress[1])[4], "OVER RATING")) << cells(doc, stress[1])[4];
  EXPECT_TRUE(contains(cells(doc, stress[1])[2], "K over")) << cells(doc, stress[1])[2];
  // The nominal charge takes ½·C·V² ≈ 84 J of the 120 J rating (RC charge energy, docs/references.md
  // [R-RC-energy]): 70 %.
  EXPECT_TRUE(contains(cells(doc, stress[0])[4], "\u00a070\u00a0%")) << cells(doc, stress[0])[4];

  // One plot per simulated scenario, each drawing its curve; the verdict; the not-applicable reasons; the caution.
  EXPECT_EQ(static_cast<long>(find_all(doc, "svg").size()), applicable);
  EXPECT_GE(static_cast<long>(find_all(doc, "polyline").size()), applicable);
  EXPECT_EQ(count(html, "<p class=\"verdict fail\">FAIL"), 1);
  EXPECT_TRUE(contains(html, "reversed_connection: no diode across the sensed link nodes"));
  EXPECT_TRUE(contains(html, "High-voltage caution"));
  // Self-contained: nothing to run or fetch.
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_FALSE(contains(html, "src="));
  EXPECT_FALSE(contains(html, "href=\"http"));
}

TEST(FaultsReport, ByteReproducibleAtAnyThreadCount) {
  const std::string once = faults_report_html(bad_design());
  const std::string again = faults_report_html(detection_matrix(stored("sequence_bad_design.yaml"), 1));
  EXPECT_EQ(once, again);
  EXPECT_EQ(once, faults_report_html(bad_design()));
}

// The kept trace is the sensed link voltage itself. Two closed forms from the bad design (410 V pack, 80 mOhm
// internal resistance, 15 Ohm pre-charge resistor, 1 mF link): into a 1 mOhm short the link sits at the divider
// value V·Rs/(Rs + R) (Ohm's law); closed onto the link, it ends at the open-circuit pack voltage (no load).
TEST(FaultsReport, LinkTraceFollowsTheCircuit) {
  const DetectionMatrix& matrix = bad_design();
  for (const auto& r : matrix.rows) {
    if (!r.applicable) {
      EXPECT_TRUE(r.link_time.empty()) << r.scenario;
      continue;
    }
    ASSERT_FALSE(r.link_time.empty()) << r.scenario;
    EXPECT_EQ(r.link_time.size(), r.link_voltage.size());
    EXPECT_LE(r.link_time.size(), std::size_t{4} * (kLinkTraceColumns + 2)) << r.scenario;
    EXPECT_TRUE(std::is_sorted(r.link_time.begin(), r.link_time.end())) << r.scenario;
  }
  const auto& shorted = row(matrix, "shorted_link");
  // Read just before the timeout fires (the pre-charge contactor opens after it and the link decays to 0 V).
  const auto before = std::lower_bound(shorted.link_time.begin(), shorted.link_time.end(),
                                       shorted.detection_time - 0.05);
  ASSERT_NE(before, shorted.link_time.end());
  const double settled = shorted.link_voltage[before - shorted.link_time.begin()];
  const double divider = 410.0 * 1e-3 / (1e-3 + 15.0 + 0.08);
  EXPECT_NEAR(settled, divider, 1e-3 * divider);  // contactor resistances are a few mOhm in 15 Ohm (< 1e-3)
  const auto& nominal = row(matrix, "nominal");
  EXPECT_NEAR(nominal.link_voltage.back(), 410.0, 0.01);
}

// keep_link_trace on a hand-made waveform: the difference of the two node columns (ground has no column), and a
// one-sample spike survives the reduction.
TEST(FaultsReport, KeepLinkTraceReducesButKeepsSpikes) {
  solver::Result result;
  result.steps = solver::Waveform({"p [V]", "m [V]"});
  const int samples = 20000;
  for (int i = 0; i < samples; ++i) {
    const double t = i * 1e-5;
    result.steps.add_row(t, {100.0 * t + (i == 12345 ? 50.0 : 0.0), 2.0});
  }
  netlist::SequenceSpec sequence;
  sequence.link = {"p", "m"};
  DetectionRow traced;
  keep_link_trace(traced, result, sequence, "gnd");
  ASSERT_FALSE(traced.link_time.empty());
  EXPECT_LE(traced.link_time.size(), std::size_t{4} * (kLinkTraceColumns + 2));
  EXPECT_DOUBLE_EQ(traced.link_time.front(), 0.0);
  EXPECT_DOUBLE_EQ(traced.link_voltage.front(), -2.0);
  EXPECT_DOUBLE_EQ(traced.link_time.back(), (samples - 1) * 1e-5);
  EXPECT_NEAR(traced.link_voltage.back(), 100.0 * (samples - 1) * 1e-5 - 2.0, 1e-12);
  EXPECT_NEAR(*std::max_element(traced.link_voltage.begin(), traced.link_voltage.end()),
              100.0 * 12345 * 1e-5 + 50.0 - 2.0, 1e-12);

  sequence.link = {"p", "gnd"};  // the minus node is ground
  keep_link_trace(traced, result, sequence, "gnd");
  EXPECT_DOUBLE_EQ(traced.link_voltage.front(), 0.0);
  sequence.link = {"p", "nowhere"};  // no such column: no trace, no plot
  keep_link_trace(traced, result, sequence, "gnd");
  EXPECT_TRUE(traced.link_time.empty());
}

TEST(FaultsReport, EscapesHostileText) {
  const std::string hostile = "<script>alert(1)</script> & 'quoted' \"<b>";
  DetectionMatrix matrix;
  matrix.case_file = "cases/" + hostile + ".yaml";
  matrix.title = hostile;
  matrix.resistor = hostile;
  DetectionRow simulated;
  simulated.scenario = hostile;
  simulated.description = hostile;
  simulated.expected = linkrise::netlist::SequenceOutcome::Closed;
  simulated.actual = linkrise::netlist::SequenceOutcome::Timeout;
  simulated.note = hostile;
  simulated.pass = false;
  simulated.attempts = 1;
  simulated.detection_time = 2.0;
  simulated.link_time = {0.0, 1.0, 2.0};
  simulated.link_voltage = {0.0, 1.0, 1.0};
  DetectionRow skipped;
  skipped.scenario = "reversed_connection";
  skipped.applicable = false;
  skipped.note = hostile;
  matrix.rows = {simulated, skipped};

  const std::string html = faults_report_html(matrix);
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_FALSE(contains(html, "<b>"));
  const std::string escaped = "&lt;script&gt;alert(1)&lt;/script&gt; &amp; &apos;quoted&apos; &quot;&lt;b&gt;";
  EXPECT_EQ(find_all(doc, "title")[0]->text, "Detection matrix: " + escaped);
  const std::vector<int> rows = body_rows(doc, "matrix");
  ASSERT_EQ(rows.size(), 2u);
  EXPECT_EQ(cells(doc, rows[0])[0], escaped);
  EXPECT_EQ(find_all(doc, "svg").size(), 1u);  // the not-applicable row draws no plot
}

// `linkrise faults --report`: the report appears with the other outputs; bad input writes none (exit 2).
TEST(FaultsReport, CommandWritesTheReportOnlyForGoodInput) {
  namespace fs = std::filesystem;
  const fs::path work = fs::path(::testing::TempDir()) / "faults-report-cli";
  fs::remove_all(work);
  fs::create_directories(work);
  const fs::path report = work / "faults.html";
  const std::string command = fmt::format("'{}' faults '{}' -o '{}' -q -j 2 --report '{}'", LINKRISE_BINARY,
                                          stored("sequence_bad_design.yaml"), (work / "out").string(),
                                          report.string());
  const int status = std::system(command.c_str());
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 1);  // the bad design's matrix fails
  ASSERT_TRUE(fs::exists(report));
  EXPECT_TRUE(fs::exists(work / "out" / "faults.json"));
  std::ifstream stream(report, std::ios::binary);
  std::ostringstream text;
  text << stream.rdbuf();
  EXPECT_EQ(text.str(), faults_report_html(bad_design()));  // the CLI names the case file as given

  const fs::path bad = work / "no_sequence.yaml";
  std::ofstream(bad) << "# Invented test circuit.\ntitle: no sequence\nground: n\nparts:\n"
                        "  - {name: s, kind: dc_source, nodes: [p, n], voltage: 10 V}\n"
                        "  - {name: r, kind: resistor, nodes: [p, n], resistance: 1 Ohm}\n"
                        "run: {duration: 1 ms}\n";
  const fs::path none = work / "none.html";
  const int rejected = std::system(
      fmt::format("'{}' faults '{}' -o '{}' -q --report '{}' 2>/dev/null", LINKRISE_BINARY, bad.string(),
                  (work / "out2").string(), none.string())
          .c_str());
  ASSERT_TRUE(WIFEXITED(rejected));
  EXPECT_EQ(WEXITSTATUS(rejected), 2);
  EXPECT_FALSE(fs::exists(none));
}

}  // namespace
}  // namespace linkrise::app
