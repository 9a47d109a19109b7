// The fit report and the measured overlay of the run report: well-formed XHTML [R-XML-SVG], one plot of
// measured beside simulated and one of the residual per fitted signal, the parameter and correlation tables,
// the caution, and the same bytes on a second fit.
#include "app/report/fit_report.h"

#include <gtest/gtest.h>
#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "tests/xml_check.h"

namespace {
using linkrise::xml_check::count_inside;
using linkrise::xml_check::find_id;
using linkrise::xml_check::parse_xml;
using linkrise::xml_check::ParseResult;

const std::string kDemo = std::string(LINKRISE_SOURCE_DIR) + "/cases/fit_bench_inverter_link.yaml";

std::size_t rows_of(const ParseResult& doc, const std::string& table) {
  const int at = find_id(doc, table);
  return at < 0 ? 0 : static_cast<std::size_t>(count_inside(doc, at, "tr")) - 1;  // less the header row
}
}  // namespace

TEST(FitReport, ShowsTheEstimatesTheCorrelationAndEverySignalWithItsResidual) {
  linkrise::app::FitRequest request;
  request.case_file = kDemo;
  const linkrise::app::FitResult fit = linkrise::app::run_fit(request);
  const std::string html = linkrise::app::fit_report_html(fit);
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(rows_of(doc, "fit-parameters"), 3u);
  EXPECT_EQ(rows_of(doc, "fit-correlation"), 3u);
  const int signals = find_id(doc, "fit-signals");
  ASSERT_GE(signals, 0);
  EXPECT_EQ(count_inside(doc, signals, "svg"), 4);  // two signals, each overlaid and its residual
  EXPECT_NE(html.find("High-voltage caution"), std::string::npos);
  EXPECT_EQ(linkrise::app::fit_report_html(linkrise::app::run_fit(request)), html);
}

TEST(FitReport, RunWithAMeasuredCaptureOverlaysItOnTheRunReport) {
  const std::filesystem::path folder = std::filesystem::path(testing::TempDir()) / "measured_run";
  std::filesystem::remove_all(folder);
  const std::string report = (folder / "report.html").string();
  const std::string command = std::string(LINKRISE_BINARY) + " run " + kDemo + " --measured " +
                              std::string(LINKRISE_SOURCE_DIR) + "/cases/fit_bench_inverter_link.csv --report " +
                              report + " -o " + (folder / "out").string() + " -q";
  const int status = std::system(command.c_str());
  ASSERT_TRUE(WIFEXITED(status));
  ASSERT_EQ(WEXITSTATUS(status), 0);
  std::ifstream in(report);
  std::stringstream text;
  text << in.rdbuf();
  const ParseResult doc = parse_xml(text.str());
  ASSERT_TRUE(doc.ok) << doc.error;
  const int measured = find_id(doc, "measured");
  ASSERT_GE(measured, 0);
  EXPECT_EQ(count_inside(doc, measured, "svg"), 2);  // link voltage and current, no residuals without a fit
}
