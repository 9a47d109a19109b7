// The sizing report (app/report/sizing_report.h): well-formed (XHTML-compatible) with unique ids and no script,
// one margin plot per judged constraint with the feasible window shaded, the catalogue ranked as the study ranked
// it, the verification tables, hostile text escaped, and byte-identical at one and two threads. The RC fixture
// (tests/study_fixture.h) keeps the search to a few fast simulations.
#include "app/report/sizing_report.h"

#include <gtest/gtest.h>

#include <cmath>
#include <set>
#include <string>

#include "study_fixture.h"
#include "tests/xml_check.h"

namespace linkrise::app {
namespace {
using xml_check::body_rows;
using xml_check::cells;
using xml_check::find_all;
using xml_check::find_id;
using xml_check::parse_xml;

bool contains(const std::string& text, const std::string& needle) { return text.find(needle) != std::string::npos; }

// `name` keeps the files of tests that CTest runs side by side apart.
SizingRequest catalogue_request(const std::string& name, int jobs) {
  std::string text = study_test::rc_case_text("  link.capacitance: {plus_minus: 10 %}\n") +
                     "limits:\n  sequence.time_to_threshold: {max: 300 ms}\n  r_pre.peak_power: {max: 200 W}\n";
  const std::string plain = "title: RC charge\n";
  text.replace(text.find(plain), plain.size(), "title: '<script>x</script> & ''RC'''\n");
  study_test::write_case(name + "_parts.catalogue.yaml", R"(candidates:
  - {name: r40, part: {kind: resistor, resistance: 40 Ohm}}
  - {name: r60, part: {kind: resistor, resistance: 60 Ohm}, tolerances: {resistance: {plus_minus: 1 %}}}
)");
  text += "sizing: {part: r_pre, range: [10 Ohm, 300 Ohm], faults: none, catalogue: " + name + "_parts.catalogue.yaml}\n";
  SizingRequest request;
  request.case_file = study_test::write_case(name + ".yaml", text);
  request.settings = {{"sequence.minimum_time", "0 s", {}}, {"run.duration", "1.5 s", {}}, {"run.rtol", "1e-8", {}},
                      {"run.atol", "1e-10", {}}};
  request.jobs = jobs;
  return request;
}

TEST(SizingReport, WellFormedWithAPlotPerConstraintAndTheRankedCatalogue) {
  const Sizing sizing = size_part(catalogue_request("report_well_formed", 2));
  ASSERT_TRUE(sizing.feasible()) << sizing_text(sizing);
  const std::string html = sizing_report_html(sizing);
  const auto doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  std::set<std::string> ids;
  for (const auto& element : doc.elements) {
    auto id = element.attributes.find("id");
    if (id != element.attributes.end()) {
      EXPECT_TRUE(ids.insert(id->second).second) << id->second;
    }
  }
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_TRUE(contains(html, "&lt;script&gt;x&lt;/script&gt; &amp; &apos;RC&apos;"));
  EXPECT_TRUE(contains(html, "High-voltage caution"));
  // One plot per constraint judged at two values or more, each with the window shaded.
  std::size_t plotted = 0;
  for (std::size_t c = 0; c < sizing.constraints.size(); ++c) {
    std::size_t judged = 0;
    for (const auto& point : sizing.points) judged += std::isnan(margin_of(point, c)) ? 0 : 1;
    plotted += judged >= 2 ? 1 : 0;
  }
  EXPECT_EQ(find_all(doc, "svg").size(), plotted);
  EXPECT_GE(plotted, 3u);  // the time limit, the power limit and the sequence outcome
  std::size_t shaded = 0;
  for (auto at = html.find(">feasible<"); at != std::string::npos; at = html.find(">feasible<", at + 1)) ++shaded;
  EXPECT_EQ(shaded, plotted);
  // The catalogue as ranked: 60 Ohm passes, 40 Ohm (250 W into 40 Ohm) fails, in words.
  const auto rows = body_rows(doc, "candidates");
  ASSERT_EQ(rows.size(), 2u);
  EXPECT_EQ(cells(doc, rows[0])[1], "r60");
  EXPECT_EQ(cells(doc, rows[0]).back(), "pass");
  EXPECT_EQ(cells(doc, rows[1])[1], "r40");
  EXPECT_TRUE(contains(cells(doc, rows[1]).back(), "FAIL"));
  EXPECT_GE(find_id(doc, "faults-case-window"), 0);
  EXPECT_GE(find_id(doc, "faults-recommended-window"), 0);
}

TEST(SizingReport, ByteIdenticalAtAnyThreadCount) {
  EXPECT_EQ(sizing_report_html(size_part(catalogue_request("report_threads", 1))),
            sizing_report_html(size_part(catalogue_request("report_threads", 2))));
}

}  // namespace
}  // namespace linkrise::app
