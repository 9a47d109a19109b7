// The stored-case regression suite (`linkrise check`): golden comparison, tolerance edges, JUnit XML,
// --update round trip, and a broken case among good ones.
#include <gtest/gtest.h>

#include <cmath>
#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "app/regression/check.h"
#include "app/regression/golden.h"
#include "tests/xml_check.h"

namespace fs = std::filesystem;
using namespace linkrise::app;

namespace {
std::string read_text(const fs::path& path) {
  std::ifstream stream(path);
  std::stringstream text;
  text << stream.rdbuf();
  return text.str();
}
void write_text(const fs::path& path, const std::string& text) { std::ofstream(path) << text; }

// The element checker takes the document after its XML declaration, which must come first.
linkrise::xml_check::ParseResult parse_junit(const std::string& xml) {
  const std::string declaration = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  EXPECT_EQ(xml.rfind(declaration, 0), 0u);
  return linkrise::xml_check::parse_xml(xml.substr(std::min(xml.size(), declaration.size())));
}

struct Command {
  int code;
  std::string output;
};
Command run_linkrise(const std::string& arguments, const fs::path& directory) {
  fs::path log = directory / "log.txt";
  std::string line = std::string(LINKRISE_BINARY) + " " + arguments + " > " + log.string() + " 2>&1";
  int status = std::system(line.c_str());
  return {WEXITSTATUS(status), read_text(log)};
}

// A small RC case of our own (invented values) that solves in milliseconds.
const char* kRcCase = R"(# invented test scenario
title: rc check case
ground: gnd
parts:
  - {name: supply, kind: dc_source, nodes: [top, gnd], voltage: 100 V}
  - {name: k1, kind: contactor, nodes: [top, mid]}
  - {name: r1, kind: resistor, nodes: [mid, out], resistance: 10 Ohm}
  - {name: c1, kind: capacitor, nodes: [out, gnd], capacitance: 1 mF}
events:
  - {at: 1 ms, close: k1}
run: {duration: 50 ms}
)";

fs::path fresh_directory(const std::string& name) {
  fs::path directory = fs::temp_directory_path() / ("linkrise_check_" + name + "_" + std::to_string(::getpid()));
  fs::remove_all(directory);
  fs::create_directories(directory);
  return directory;
}
}  // namespace

TEST(GoldenCompare, ToleranceEdges) {
  Golden golden;
  golden.relative = 1e-3;
  golden.absolute = 1e-6;
  golden.metrics = {{"a", 100.0, "V", {}, {}}, {"b", 0.0, "A", {}, {}}, {"c", 2.0, "s", 0.5, {}}};
  // a: band 0.1 V; b: band 1e-6 A (absolute floor at zero); c: band 1.0 s (its own relative tolerance).
  auto rows = compare_with_golden(golden, "", "", {{"a", 100.0999, "V"}, {"b", 9.9e-7, "A"}, {"c", 2.99, "s"}});
  ASSERT_EQ(rows.size(), 3u);
  EXPECT_TRUE(rows[0].pass);
  EXPECT_TRUE(rows[1].pass);
  EXPECT_TRUE(rows[2].pass);
  rows = compare_with_golden(golden, "", "", {{"a", 100.1001, "V"}, {"b", 1.01e-6, "A"}, {"c", 3.01, "s"}});
  EXPECT_FALSE(rows[0].pass);
  EXPECT_FALSE(rows[1].pass);
  EXPECT_FALSE(rows[2].pass);
  EXPECT_NEAR(rows[0].deviation, 0.1001, 1e-9);
  EXPECT_NEAR(rows[0].allowed, 0.1, 1e-12);
}

TEST(GoldenCompare, FloorScalesWithTheLargestValueOfTheSameOwnerAndUnit) {
  // The stored values of sequence_bad_design and sequence_stall: a 3.8e-7 V overshoot beside a 400 V pack voltage
  // (solver noise: rtol 1e-7 of 400 V is 4e-5 V) and the 5.7e-13 A²s leak of an open contact with no larger I²t of
  // its own part.
  Golden golden;  // the built-in defaults: relative 1e-4, absolute 0, floor 1e-6
  golden.metrics = {{"sequence.link_overshoot", 3.84448279e-07, "V", {}, {}},
                    {"sequence.minimum_pack_voltage", 399.8837008, "V", {}, {}},
                    {"k_main.current_squared_time", 5.667873069e-13, "A²s", {}, {}},
                    {"r_pre.current_squared_time", 5.568105423, "A²s", {}, {}}};
  auto rows = compare_with_golden(golden, "", "",
                                  {{"sequence.link_overshoot", 5e-5, "V"},
                                   {"sequence.minimum_pack_voltage", 399.8837008, "V"},
                                   {"k_main.current_squared_time", 5.6682e-13, "A²s"},
                                   {"r_pre.current_squared_time", 5.568105423, "A²s"}});
  ASSERT_EQ(rows.size(), 4u);
  EXPECT_NEAR(rows[0].allowed, 1e-6 * 399.8837008, 1e-15);
  EXPECT_TRUE(rows[0].pass) << "the overshoot may move within the voltage's noise";
  EXPECT_NEAR(rows[2].allowed, 1e-4 * 5.667873069e-13, 1e-25);  // its own relative band; r_pre's I²t is another owner
  EXPECT_TRUE(rows[2].pass);
  rows = compare_with_golden(golden, "", "", {{"sequence.link_overshoot", 5e-4, "V"},
                                              {"sequence.minimum_pack_voltage", 399.8837008, "V"},
                                              {"k_main.current_squared_time", 5.7e-13, "A²s"},
                                              {"r_pre.current_squared_time", 5.568105423, "A²s"}});
  EXPECT_FALSE(rows[0].pass) << "0.5 mV is more than the noise of a 400 V link";
  EXPECT_FALSE(rows[2].pass) << "a 0.6 % move of the leak is caught (a fixed 1e-9 floor let it take any value)";
}

TEST(GoldenCompare, OutcomeVerdictUnitAndMissingMetric) {
  Golden golden;
  golden.outcome = "closed";
  golden.verdict = "pass";
  golden.metrics = {{"x", 1.0, "V", {}, {}}, {"y", 1.0, "V", {}, {}}};
  auto rows = compare_with_golden(golden, "timeout", "fail", {{"x", 1.0, "A"}});
  ASSERT_EQ(rows.size(), 4u);
  EXPECT_FALSE(rows[0].pass);  // outcome
  EXPECT_FALSE(rows[1].pass);  // verdict
  EXPECT_FALSE(rows[2].pass);  // unit changed
  EXPECT_FALSE(rows[3].pass);  // missing
  EXPECT_EQ(rows[3].actual, "missing");
}

TEST(GoldenFile, TextRoundTripKeepsValuesAndNotReached) {
  Golden golden;
  golden.outcome = "closed";
  golden.verdict = "pass";
  golden.metrics = {{"t", 0.123456789012, "s", 1e-2, {}}, {"never", std::nan(""), "s", {}, {}}};
  fs::path directory = fresh_directory("golden");
  write_text(directory / "x.golden.yaml", golden_text(golden, "x.yaml"));
  Golden back = read_golden(directory / "x.golden.yaml");
  EXPECT_EQ(back.outcome, "closed");
  ASSERT_EQ(back.metrics.size(), 2u);
  EXPECT_NEAR(back.metrics[0].value, 0.123456789012, 1e-10);  // 10 significant digits are kept
  EXPECT_EQ(back.metrics[0].relative.value_or(0.0), 1e-2);
  EXPECT_TRUE(std::isnan(back.metrics[1].value));
  fs::remove_all(directory);
}

TEST(CheckCommand, DetectsAMovedMetricAndWritesWellFormedJunit) {
  fs::path directory = fresh_directory("moved");
  write_text(directory / "rc.yaml", kRcCase);
  auto created = run_linkrise("check " + directory.string() + " --update", directory);
  ASSERT_EQ(created.code, 0) << created.output;
  EXPECT_NE(created.output.find("creating"), std::string::npos);
  auto clean = run_linkrise("check " + directory.string(), directory);
  EXPECT_EQ(clean.code, 0) << clean.output;
  EXPECT_NE(clean.output.find("check: 1 passed, 0 failed"), std::string::npos) << clean.output;

  // Move one stored value by 1 %: far beyond the default relative tolerance of 1e-4.
  Golden golden = read_golden(directory / "rc.golden.yaml");
  bool moved = false;
  for (auto& metric : golden.metrics) {
    if (metric.name == "r1.energy") {
      metric.value *= 1.01;
      moved = true;
    }
  }
  ASSERT_TRUE(moved);
  write_text(directory / "rc.golden.yaml", golden_text(golden, "rc.yaml"));
  auto changed = run_linkrise("check " + directory.string() + " --junit " + (directory / "junit.xml").string(), directory);
  EXPECT_EQ(changed.code, 1);
  EXPECT_NE(changed.output.find("r1.energy"), std::string::npos) << changed.output;
  EXPECT_NE(changed.output.find("CHANGED"), std::string::npos);

  std::string xml = read_text(directory / "junit.xml");
  auto document = parse_junit(xml);
  EXPECT_TRUE(document.ok) << document.error;
  EXPECT_EQ(linkrise::xml_check::find_all(document, "testcase").size(), 1u);
  EXPECT_EQ(linkrise::xml_check::find_all(document, "failure").size(), 1u);

  // --update says which value changed, then the suite passes again.
  auto updated = run_linkrise("check " + directory.string() + " --update", directory);
  EXPECT_EQ(updated.code, 0);
  EXPECT_NE(updated.output.find("r1.energy"), std::string::npos) << updated.output;
  EXPECT_NE(updated.output.find("->"), std::string::npos);
  EXPECT_EQ(run_linkrise("check " + directory.string(), directory).code, 0);
  fs::remove_all(directory);
}

TEST(CheckCommand, ABrokenCaseIsAFailedRowAndTheOthersStillRun) {
  fs::path directory = fresh_directory("broken");
  write_text(directory / "a_good.yaml", kRcCase);
  std::string broken = kRcCase;
  broken.replace(broken.find("10 Ohm"), 6, "10 mF");  // wrong dimension
  write_text(directory / "b_broken.yaml", broken);
  write_text(directory / "c_good.yaml", kRcCase);
  ASSERT_EQ(run_linkrise("check " + (directory / "a_good.yaml").string() + " " + (directory / "c_good.yaml").string() +
                             " --update",
                         directory)
                .code,
            0);
  auto result = run_linkrise("check " + directory.string() + " --junit " + (directory / "junit.xml").string(), directory);
  EXPECT_EQ(result.code, 1);
  EXPECT_NE(result.output.find("check: 2 passed, 1 failed"), std::string::npos) << result.output;
  EXPECT_NE(result.output.find("ERROR"), std::string::npos);
  auto document = parse_junit(read_text(directory / "junit.xml"));
  ASSERT_TRUE(document.ok) << document.error;
  EXPECT_EQ(linkrise::xml_check::find_all(document, "testcase").size(), 3u);
  EXPECT_EQ(linkrise::xml_check::find_all(document, "error").size(), 1u);
  fs::remove_all(directory);
}

TEST(CheckCommand, FindsCasesButNotGoldenFiles) {
  fs::path directory = fresh_directory("find");
  fs::create_directories(directory / "sub");
  write_text(directory / "one.yaml", kRcCase);
  write_text(directory / "one.golden.yaml", "outcome: completed\n");
  write_text(directory / "sub" / "two.yaml", kRcCase);
  auto files = find_case_files({directory.string()});
  ASSERT_EQ(files.size(), 2u);
  EXPECT_TRUE(files[0].ends_with("one.yaml"));
  EXPECT_TRUE(files[1].ends_with("two.yaml"));
  fs::remove_all(directory);
}
