// The HTML report: well-formed (XHTML-compatible), self-contained, byte-reproducible, escaped, and showing
// the run's numbers. The in-browser rendering is checked by report_browser_test.cc.
#include "app/report/report_html.h"

#include <algorithm>
#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "analysis/energy_audit.h"
#include "analysis/verdict.h"
#include "netlist/sequence_spec.h"
#include "solver/sequence_controller.h"
#include "solver/timeline.h"
#include "tests/circuit_fixture.h"
#include "tests/xml_check.h"

namespace linkrise::app {
namespace {

using xml_check::count_inside;
using xml_check::find_all;
using xml_check::find_id;
using xml_check::parse_xml;
using xml_check::ParseResult;

// An RC pre-charge with a bypassing main contactor: 400 V, 10 Ohm, 1 mF, tau = 10 ms; main closes at 100 ms
// (10 tau). Invented for the test.
std::string rc_case(const std::string& title, const std::string& extra = "") {
  return "title: \"" + title + "\"\n" + R"(ground: n
parts:
  - {name: supply, kind: dc_source, nodes: [p, n], voltage: 400 V}
  - {name: k_pre, kind: contactor, nodes: [p, mid], closed_resistance: 1 mOhm}
  - {name: r_pre, kind: resistor, nodes: [mid, link], resistance: 10 Ohm}
  - {name: k_main, kind: contactor, nodes: [p, link], closed_resistance: 1 mOhm}
  - {name: c_link, kind: capacitor, nodes: [link, n], capacitance: 1 mF}
events:
  - {at: 1 ms, close: k_pre}
  - {at: 100 ms, close: k_main}
  - {at: 110 ms, open: k_pre}
run: {duration: 150 ms, rtol: 1e-9, atol: 1e-9}
)" + extra;
}

// A case simulated with its own run settings, with its energy audit.
struct ReportedRun {
  struct Setup {
    explicit Setup(const std::string& yaml) : circuit(testing::case_from(yaml)) {}
    solver::Circuit circuit;
  };
  explicit ReportedRun(const std::string& yaml) : simulation(yaml) {
    result = solver::simulate(simulation.circuit, solver::options_from(simulation.circuit));
    audit = analysis::audit_energy(simulation.circuit, result);
  }
  std::string html() const { return run_report_html(RunReportInput(simulation.circuit, result, audit)); }

  Setup simulation;
  solver::Result result;
  analysis::EnergyAudit audit;
};

std::string cell_text(const ParseResult& doc, int table, int row, int column) {
  // Rows of the table body in order; cells in order within a row.
  int seen_rows = -1;
  for (std::size_t e = 0; e < doc.elements.size(); ++e) {
    if (doc.elements[e].name != "tr" || !xml_check::is_inside(doc, static_cast<int>(e), table)) continue;
    if (doc.elements[doc.elements[e].parent].name != "tbody") continue;
    if (++seen_rows != row) continue;
    int seen_cells = -1;
    for (std::size_t c = e + 1; c < doc.elements.size(); ++c) {
      if (doc.elements[c].parent != static_cast<int>(e)) continue;
      if (++seen_cells == column) return doc.elements[c].text;
    }
  }
  return "<missing>";
}

int body_rows(const ParseResult& doc, int table) {
  int rows = 0;
  for (std::size_t e = 0; e < doc.elements.size(); ++e) {
    if (doc.elements[e].name == "tr" && xml_check::is_inside(doc, static_cast<int>(e), table) &&
        doc.elements[doc.elements[e].parent].name == "tbody") {
      ++rows;
    }
  }
  return rows;
}

TEST(XmlCheckerHtml, AcceptsDoctypeAndCommentsRejectsBadOnes) {
  EXPECT_TRUE(parse_xml("<!DOCTYPE html>\n<html><!-- note --><p>a</p></html>").ok);
  EXPECT_FALSE(parse_xml("<!DOCTYPE html><html><!-- a -- b --></html>").ok);
  EXPECT_FALSE(parse_xml("<!DOCTYPE html><html><!-- open </html>").ok);
  EXPECT_FALSE(parse_xml("<html><meta charset=\"utf-8\"></html>").ok);  // void element left open
}

TEST(RunReport, IsWellFormedAndHasTheExpectedParts) {
  const ReportedRun run(rc_case("RC pre-charge"));
  ASSERT_EQ(run.result.outcome, solver::Outcome::Completed);
  const std::string html = run.html();
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(doc.root, "html");
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);

  // Voltages, contactor currents, the closure close-up and resistor power (no thermal model in this case).
  EXPECT_EQ(find_all(doc, "svg").size(), 4u);
  EXPECT_EQ(find_all(doc, "figure").size(), 4u);
  for (const auto* svg : find_all(doc, "svg")) EXPECT_EQ(svg->attributes.at("xmlns"), "http://www.w3.org/2000/svg");

  // Every id is unique (clip paths are referenced by id; duplicates would clip the wrong plot).
  std::vector<std::string> ids;
  for (const auto& e : doc.elements) {
    if (auto it = e.attributes.find("id"); it != e.attributes.end()) ids.push_back(it->second);
  }
  std::sort(ids.begin(), ids.end());
  EXPECT_EQ(std::adjacent_find(ids.begin(), ids.end()), ids.end());

  // The timeline table lists every timeline entry, in order.
  const int timeline = find_id(doc, "timeline");
  ASSERT_GE(timeline, 0);
  ASSERT_EQ(body_rows(doc, timeline), static_cast<int>(run.result.timeline.size()));
  EXPECT_EQ(run.result.timeline.size(), 3u);  // the three scheduled events
  EXPECT_EQ(cell_text(doc, timeline, 1, 1), "100 ms");
  EXPECT_EQ(cell_text(doc, timeline, 1, 2), "close k_main");

  // One row per part in the per-part table; the safety caution is present.
  const int parts = find_id(doc, "parts");
  ASSERT_GE(parts, 0);
  EXPECT_EQ(body_rows(doc, parts), run.simulation.circuit.part_count());
  EXPECT_NE(html.find("High-voltage caution"), std::string::npos);
  EXPECT_NE(html.find("No metrics were judged"), std::string::npos);
}

TEST(RunReport, EnergyAndPeakNumbersMatchClosedForms) {
  const ReportedRun run(rc_case("RC pre-charge"));
  const ParseResult doc = parse_xml(run.html());
  ASSERT_TRUE(doc.ok) << doc.error;
  const int energy = find_id(doc, "energy");
  ASSERT_GE(energy, 0);
  // Heat of a full RC charge is C V^2 / 2 = 80 J for 1 mF at 400 V, independent of R (docs/references.md
  // [R-RC-energy]). After 9.9 tau the shortfall is e^-19.8 (negligible); the table prints 4 digits.
  EXPECT_EQ(cell_text(doc, energy, 1, 0), "dissipated as heat");
  EXPECT_EQ(cell_text(doc, energy, 1, 1), "80 J");
  EXPECT_EQ(cell_text(doc, energy, 3, 1), "80 J");  // stored: C V^2 / 2 as well
  // Initial pre-charge current V / R (Ohm's law, docs/references.md [R-Ohm-Joule]) with R = 10 Ohm + 1 mOhm:
  // 39.996 A -> "40 A".
  const int parts = find_id(doc, "parts");
  ASSERT_GE(parts, 0);
  EXPECT_EQ(cell_text(doc, parts, 2, 0), "r_pre");
  EXPECT_EQ(cell_text(doc, parts, 2, 2), "40 A");
  // Initial resistor power V^2 / R (Joule's law, [R-Ohm-Joule]): 16 kW.
  EXPECT_EQ(cell_text(doc, parts, 2, 3), "16 kW");
}

TEST(RunReport, ListsTheValuesACableDerivedFromItsGeometry) {
  // Without a geometry cable the table is left out.
  const ParseResult plain = parse_xml(ReportedRun(rc_case("RC pre-charge")).html());
  ASSERT_TRUE(plain.ok) << plain.error;
  EXPECT_LT(find_id(plain, "derived"), 0);
  // 2 × 1 m of 35 mm² copper at 20 °C: 2·ρ·L/A = 0.96 mOhm with ρ = 1.68e-8 Ohm·m
  // (docs/references.md [R-conductor-resistivity]); the report prints 4 significant digits.
  std::string yaml = rc_case("cable");  // the supply reaches the contactors through the cable
  yaml.replace(yaml.find("nodes: [p, n], voltage"), 13, "nodes: [s, n]");
  yaml.replace(yaml.find("  - {name: k_pre"), 0,
               "  - {name: lead, kind: cable, nodes: [s, p], length: 1 m, cross_section: 35 mm², spacing: 20 mm}\n");
  const ParseResult doc = parse_xml(ReportedRun(yaml).html());
  ASSERT_TRUE(doc.ok) << doc.error;
  const int derived = find_id(doc, "derived");
  ASSERT_GE(derived, 0);
  EXPECT_EQ(body_rows(doc, derived), 2);
  EXPECT_EQ(cell_text(doc, derived, 0, 0), "lead");
  EXPECT_EQ(cell_text(doc, derived, 0, 1), "loop resistance");
  EXPECT_EQ(cell_text(doc, derived, 0, 2), "960 µOhm");
}

TEST(RunReport, IsByteReproducible) {
  // Two independent simulations of the same case: identical files (no timestamp, no addresses, fixed formats).
  const ReportedRun first(rc_case("RC pre-charge"));
  const ReportedRun second(rc_case("RC pre-charge"));
  const std::string a = first.html();
  const std::string b = second.html();
  EXPECT_EQ(a.size(), b.size());
  EXPECT_TRUE(a == b);
}

TEST(RunReport, LoadsNothingFromOutside) {
  const ReportedRun run(rc_case("RC pre-charge"));
  const std::string html = run.html();
  EXPECT_EQ(html.find("<script"), std::string::npos);
  EXPECT_EQ(html.find(" src="), std::string::npos);
  EXPECT_EQ(html.find("<link"), std::string::npos);
  EXPECT_EQ(html.find("@import"), std::string::npos);
  EXPECT_EQ(html.find("@font-face"), std::string::npos);
  // The only URL-like text is the SVG namespace name (an identifier, never fetched) and in-page references.
  std::size_t at = 0;
  while ((at = html.find("http", at)) != std::string::npos) {
    EXPECT_TRUE(html.compare(at, 26, "http://www.w3.org/2000/svg") == 0 ||
                html.compare(at, 10, "http-equiv") == 0)
        << html.substr(at, 40);
    ++at;
  }
  at = 0;
  while ((at = html.find("url(", at)) != std::string::npos) {
    EXPECT_EQ(html.compare(at, 5, "url(#"), 0) << html.substr(at, 40);
    ++at;
  }
  EXPECT_NE(html.find("Content-Security-Policy\" content=\"default-src 'none'"), std::string::npos);
}

TEST(RunReport, EscapesHostileTitles) {
  const std::string hostile = "<script>alert(1)</script> & 'quoted' <b>";
  const ReportedRun run(rc_case("<script>alert(1)</script> & 'quoted' <b>"));
  ASSERT_EQ(run.simulation.circuit.spec().title, hostile);
  const std::string html = run.html();
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(html.find("<script"), std::string::npos);
  EXPECT_EQ(html.find("<b>"), std::string::npos);
  ASSERT_EQ(find_all(doc, "title").size(), 5u);  // the page's and one per plot
  EXPECT_EQ(find_all(doc, "title")[0]->text, "&lt;script&gt;alert(1)&lt;/script&gt; &amp; &apos;quoted&apos; &lt;b&gt;");
  EXPECT_EQ(find_all(doc, "h1")[0]->text, find_all(doc, "title")[0]->text);
}

TEST(RunReport, RolesAndSensedVoltagesFromTheCircuit) {
  const ReportedRun run(rc_case("RC pre-charge"));
  const auto& circuit = run.simulation.circuit;
  const ContactorRoles roles = contactor_roles(circuit, run.result.steps);
  EXPECT_EQ(roles.main, circuit.find_part("k_main"));
  EXPECT_EQ(roles.precharge, circuit.find_part("k_pre"));
  ASSERT_TRUE(roles.main_closed.has_value());
  EXPECT_DOUBLE_EQ(*roles.main_closed, 0.1);  // the scheduled event time (the driver stops exactly there)

  const SensedVoltages defaults = sensed_voltages(circuit);
  ASSERT_TRUE(defaults.pack && defaults.link);
  EXPECT_EQ(defaults.pack->plus, "p");
  EXPECT_EQ(defaults.pack->minus, "n");
  EXPECT_EQ(defaults.link->plus, "link");
  EXPECT_EQ(defaults.link->minus, "n");

  SequenceHints hints;
  hints.pack = NodePair{"p", "mid"};
  hints.main_contactor = "k_pre";  // named roles are taken as given
  EXPECT_EQ(sensed_voltages(circuit, hints).pack->minus, "mid");
  EXPECT_EQ(contactor_roles(circuit, run.result.steps, hints).main, circuit.find_part("k_pre"));
  EXPECT_DOUBLE_EQ(*contactor_roles(circuit, run.result.steps, hints).main_closed, 1e-3);
}

TEST(RunReport, PrechargeOnlyRunHasNoMainClosure) {
  // Without the main contactor closing, the largest current follows the pre-charge closing.
  std::string yaml = rc_case("no main");
  for (const std::string line : {"  - {at: 100 ms, close: k_main}\n", "  - {at: 110 ms, open: k_pre}\n"}) {
    yaml.erase(yaml.find(line), line.size());
  }
  const ReportedRun run(yaml);
  const ContactorRoles roles = contactor_roles(run.simulation.circuit, run.result.steps);
  EXPECT_EQ(roles.main, -1);
  EXPECT_EQ(roles.precharge, run.simulation.circuit.find_part("k_pre"));
  EXPECT_FALSE(roles.main_closed.has_value());
  const ParseResult doc = parse_xml(run.html());
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(find_all(doc, "svg").size(), 3u);  // no close-up
}

TEST(RunReport, LimitsTableAndVerdict) {
  const ReportedRun run(rc_case("RC pre-charge"));
  RunReportInput input(run.simulation.circuit, run.result, run.audit);
  Assessment assessment;
  assessment.verdict = "fail";
  assessment.rows.push_back({"precharge_time", 0.05, "s", "<= 80 ms", 0.03, "s", true, true, "limits block"});
  assessment.rows.push_back({"resistor_energy", 80.0, "J", "<= 60 J", -20.0, "J", false, true, "rating of r_pre"});
  assessment.rows.push_back(
      {"main_current", std::nan(""), "A", "<= 1 kA", std::nan(""), "A", true, false, "limits block"});
  assessment.failures.push_back("resistor_energy = 80 J is above its max 60 J");
  input.assessment = assessment;
  input.closing_threshold = 380.0;
  const std::string html = run_report_html(input);
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  const int limits = find_id(doc, "limits");
  ASSERT_GE(limits, 0);
  EXPECT_EQ(body_rows(doc, limits), 3);
  EXPECT_EQ(cell_text(doc, limits, 0, 1), "50 ms");
  EXPECT_EQ(cell_text(doc, limits, 1, 3), "-20 J");
  EXPECT_EQ(cell_text(doc, limits, 1, 4), "rating of r_pre");
  EXPECT_EQ(cell_text(doc, limits, 1, 5), "FAIL");
  EXPECT_EQ(cell_text(doc, limits, 2, 1), "-");
  EXPECT_EQ(cell_text(doc, limits, 2, 5), "not judged");
  EXPECT_NE(html.find("<p class=\"verdict fail\">FAIL \u2014 1 of 2 judged limits met</p>"),
            std::string::npos);
  EXPECT_NE(html.find("<li>resistor_energy = 80 J is above its max 60 J</li>"), std::string::npos);
  EXPECT_NE(html.find("closing threshold 380 V"), std::string::npos);  // the reference line's label
}

TEST(RunReport, SequenceCaseCarriesTheAnalysersVerdict) {
  // A stored sequence case run as `linkrise run` does: controller, simulation, analyser.
  const netlist::Case spec = netlist::load_case(LINKRISE_SOURCE_DIR "/cases/sequence_clean_close.yaml");
  const solver::Circuit circuit(spec);
  solver::Options options = solver::options_from(circuit);
  const std::optional<netlist::SequenceSpec> sequence = spec.sequence;
  ASSERT_TRUE(sequence.has_value());
  solver::SequenceController controller(circuit, *sequence);
  solver::attach(controller, options);
  const solver::Result result = solver::simulate(circuit, options);
  const analysis::EnergyAudit audit = analysis::audit_energy(circuit, result);
  const solver::SequenceReport report = controller.report(result.end_time);
  const analysis::Evaluation evaluation = analysis::evaluate(circuit, result, audit, &report);

  RunReportInput input(circuit, result, audit);
  add_evaluation(input, evaluation, &report);
  EXPECT_EQ(input.sequence.main_contactor, "k_main");
  EXPECT_EQ(input.sequence.precharge_resistor, "r_pre");
  ASSERT_TRUE(input.sequence.closing_ratio.has_value());
  EXPECT_DOUBLE_EQ(*input.sequence.closing_ratio, 0.95);

  const std::string html = run_report_html(input);
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(body_rows(doc, find_id(doc, "limits")), static_cast<int>(evaluation.limits.size()));
  EXPECT_EQ(body_rows(doc, find_id(doc, "metrics")), static_cast<int>(evaluation.metrics.list().size()));
  // One row per entry, a part's consecutive state events collapsed into one (solver::collapse_repeats): k_main's
  // first bounce parts on the inrush (about 100 A, above the 0.5 A minimum arc current), so a bounce-gap arc burns
  // until the current falls to 0.5 A (one state event) and its clearing ramp ends 10 us later (another), both
  // inside the 0.3 ms gap; the second bounce parts on under 0.5 A, a clean break with no state event
  // (models/contactor.h). The two share a row, so the table has one row fewer than the timeline has entries.
  const auto rows = solver::collapse_repeats(result.timeline);
  EXPECT_EQ(body_rows(doc, find_id(doc, "timeline")), static_cast<int>(rows.size()));
  std::vector<double> bounces, arc_events;
  for (const auto& entry : result.timeline) {
    if (entry.event == "bounce k_main") bounces.push_back(entry.time);
    if (entry.event == "state event k_main") arc_events.push_back(entry.time);
  }
  ASSERT_EQ(bounces.size(), 2u);  // bounce_count: 2
  ASSERT_EQ(arc_events.size(), 2u);
  for (double t : arc_events) {
    EXPECT_GT(t, bounces[0]);
    EXPECT_LT(t, bounces[0] + 0.3e-3);  // bounce_interval: the gap closes again 0.3 ms after it opened
  }
  EXPECT_EQ(rows.size() + 1, result.timeline.size());
  EXPECT_NE(html.find(evaluation.pass ? "<p class=\"verdict pass\">" : "<p class=\"verdict fail\">"),
            std::string::npos);
  EXPECT_NE(html.find("data-series=\"closing level (95 % of pack)\""), std::string::npos);
  // Close-up at main closure (named by the sequence) and the resistor's temperature are drawn.
  EXPECT_NE(html.find("Close-up at main closure"), std::string::npos);
  EXPECT_NE(html.find("Resistor temperature"), std::string::npos);
}

TEST(HtmlReport, BuildingBlocks) {
  HtmlReport report("Blocks", "sub");
  report.section("First");
  report.paragraph("a & b");
  ReportTable table;
  table.id = "t";
  table.columns = {"name", "value"};
  table.numeric_columns = {1};
  table.rows = {{"x", "1 V"}, {"y", "2 V"}};
  table.row_tones = {Tone::Plain, Tone::Fail};
  report.table(table);
  report.section("Second");
  PlotSpec plot;
  plot.title = "Same title";
  plot.series.push_back({"s", {0.0, 1.0}, {0.0, 1.0}, "", 0.0});
  report.line_plot(plot, "caption one");
  report.line_plot(plot);
  HistogramSpec histogram;
  histogram.title = "Spread";
  histogram.values = {1.0, 2.0, 2.5, 3.0};
  histogram.bands.push_back({1.5, 2.8, "window"});
  report.histogram(histogram);
  report.facts({{"k", "v"}});
  report.verdict(Tone::Pass, "all good");
  const std::string html = report.html();
  const ParseResult doc = parse_xml(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(find_all(doc, "section").size(), 2u);
  EXPECT_EQ(find_all(doc, "li").size(), 2u);  // contents: one entry per section
  EXPECT_GE(find_id(doc, "section-1"), 0);
  EXPECT_GE(find_id(doc, "section-2"), 0);
  // Two plots with the same title still get distinct ids.
  EXPECT_GE(find_id(doc, "figure-1-title"), 0);
  EXPECT_GE(find_id(doc, "figure-2-title"), 0);
  EXPECT_GE(find_id(doc, "figure-3-title"), 0);
  EXPECT_EQ(count_inside(doc, find_id(doc, "t"), "td"), 4);
  EXPECT_NE(html.find("<td class=\"number\">2 V</td>"), std::string::npos);
  EXPECT_NE(html.find("<tr class=\"fail\"><td>y</td>"), std::string::npos);
  EXPECT_NE(html.find("<p>a &amp; b</p>"), std::string::npos);
  EXPECT_NE(html.find("<figcaption>caption one</figcaption>"), std::string::npos);
  EXPECT_NE(html.find("PASS \u2014 all good"), std::string::npos);
}

}  // namespace
}  // namespace linkrise::app
