#include "app/report/svg_plot.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "app/output/decimation.h"
#include "app/output/text_format.h"
#include "tests/xml_check.h"

namespace linkrise::app {
namespace {

using xml_check::Element;
using xml_check::find_all;
using xml_check::parse_xml;
using xml_check::ParseResult;

std::vector<Point> parse_points(const std::string& text) {
  std::vector<Point> points;
  std::istringstream stream(text);
  std::string pair;
  while (stream >> pair) {
    const std::size_t comma = pair.find(',');
    points.push_back({std::stod(pair.substr(0, comma)),
                      std::stod(pair.substr(comma + 1))});
  }
  return points;
}

TEST(XmlChecker, RejectsBrokenDocuments) {
  // The checker itself must be able to fail, or the SVG tests prove nothing.
  EXPECT_TRUE(parse_xml("<a><b x=\"1\"/>t &amp; u</a>").ok);
  EXPECT_FALSE(parse_xml("<a><b></a>").ok);
  EXPECT_FALSE(parse_xml("<a x=1/>").ok);
  EXPECT_FALSE(parse_xml("<a>&nbsp;</a>").ok);
  EXPECT_FALSE(parse_xml("<a x=\"<\"/>").ok);
  EXPECT_FALSE(parse_xml("<a></a><b/>").ok);
  EXPECT_FALSE(parse_xml("<a>").ok);
}

// ---------------------------------------------------------------------------
// nice_ticks

// True when step is 1, 2 or 5 times a power of ten (relative tolerance 1e-9).
bool is_round_step(double step) {
  if (!(step > 0.0) || !std::isfinite(step)) return false;
  const double decade = std::pow(10.0, std::floor(std::log10(step)));
  const double mantissa = step / decade;
  for (double m : {1.0, 2.0, 5.0, 10.0}) {
    if (std::abs(mantissa - m) <= 1e-9 * m) return true;
  }
  return false;
}

// The exact 1/2/5 x 10^k step nearest a measured tick difference.
double nominal_step(double measured) {
  const int exponent = static_cast<int>(std::floor(std::log10(measured)));
  const double mantissa =
      std::round(measured / std::pow(10.0, exponent));
  return exponent >= 0 ? mantissa * std::pow(10.0, exponent)
                       : mantissa / std::pow(10.0, -exponent);
}

void expect_round_cover(double low, double high, int target) {
  SCOPED_TRACE(testing::Message() << "range [" << low << ", " << high
                                  << "] target " << target);
  const std::vector<double> ticks = nice_ticks(low, high, target);
  ASSERT_GE(ticks.size(), 2u);
  // Never wildly more ticks than asked for (loose enclosure adds at most a few).
  EXPECT_LE(static_cast<int>(ticks.size()), 2 * std::max(target, 2) + 2);
  const double measured_step = ticks[1] - ticks[0];
  ASSERT_TRUE(is_round_step(measured_step)) << "step " << measured_step;
  // Differences of large ticks carry rounding error; test against the exact step.
  const double step = nominal_step(measured_step);
  for (std::size_t i = 0; i < ticks.size(); ++i) {
    ASSERT_TRUE(std::isfinite(ticks[i]));
    // Every tick an integer multiple of the step: no offset grid.
    const double multiple = ticks[i] / step;
    EXPECT_NEAR(multiple, std::round(multiple), 1e-6) << "tick " << ticks[i];
    if (i > 0) {
      EXPECT_NEAR(ticks[i] - ticks[i - 1], step, 1e-9 * step);
    }
  }
  const double lo = std::min(low, high);
  const double hi = std::max(low, high);
  const double slack = 1e-9 * step;
  EXPECT_LE(ticks.front(), lo + slack);
  EXPECT_GE(ticks.back(), hi - slack);
  // Enclosure is tight: no whole empty step beyond the range on either side.
  if (hi > lo) {
    EXPECT_GT(ticks.front(), lo - step - slack);
    EXPECT_LT(ticks.back(), hi + step + slack);
  }
}

TEST(NiceTicks, RoundAndCoveringForManyRanges) {
  const std::vector<std::pair<double, double>> ranges = {
      {0, 1},          {0, 10},          {0, 400},        {-3.7, 12.2},
      {-2000, -150},   {-1, 1},          {0.1, 0.3},      {0, 0.0123},
      {0, 2.5e-6},     {1e-12, 7e-12},   {3e9, 8.5e9},    {-7.3e15, 4e14},
      {399.2, 401.7},  {1e6, 1e6 + 3},   {0.9999, 1.0001}, {12, 3},
      {-1e-300, 5e-300}, {1e290, 1e300}, {813, 813.25},   {-0.004, 0.0}};
  for (const auto& [low, high] : ranges) {
    for (int target : {2, 3, 5, 7, 10, 15}) expect_round_cover(low, high, target);
  }
}

TEST(NiceTicks, KnownCases) {
  EXPECT_EQ(nice_ticks(0, 10, 6), (std::vector<double>{0, 2, 4, 6, 8, 10}));
  EXPECT_EQ(nice_ticks(0, 400, 5),
            (std::vector<double>{0, 100, 200, 300, 400}));
  // Decimal ticks are the doubles nearest the decimals, so they print exactly.
  const std::vector<double> tenths = nice_ticks(0.1, 0.5, 5);
  ASSERT_EQ(tenths.size(), 5u);
  EXPECT_EQ(tenths[2], 0.3);
  // Zero is a tick and is +0 when the range straddles it.
  const std::vector<double> straddle = nice_ticks(-3.7, 12.2, 5);
  EXPECT_EQ(straddle, (std::vector<double>{-5, 0, 5, 10, 15}));
  EXPECT_FALSE(std::signbit(straddle[1]));
}

TEST(NiceTicks, DegenerateInputs) {
  for (double value : {0.0, 5.0, -400.0, 1e-9, 3e12}) {
    SCOPED_TRACE(value);
    const std::vector<double> ticks = nice_ticks(value, value, 5);
    ASSERT_GE(ticks.size(), 2u);
    EXPECT_LT(ticks.front(), value);
    EXPECT_GT(ticks.back(), value);
    EXPECT_TRUE(is_round_step(ticks[1] - ticks[0]));
  }
  EXPECT_EQ(nice_ticks(std::nan(""), 1.0, 5), (std::vector<double>{0, 1}));
  EXPECT_EQ(nice_ticks(0.0, INFINITY, 5), (std::vector<double>{0, 1}));
  // Nonsense target counts still give a usable axis.
  EXPECT_GE(nice_ticks(0, 1, 0).size(), 2u);
  EXPECT_LE(nice_ticks(0, 1, 100000).size(), 102u);
}

// ---------------------------------------------------------------------------
// Labels

TEST(SiLabel, PrefixesAndUnits) {
  EXPECT_EQ(si_label(0.0015, 0.0005, "s"), "1.5 ms");
  EXPECT_EQ(si_label(400, 100, "V"), "400 V");
  EXPECT_EQ(si_label(-2000, 1000, "A"), "-2 kA");
  EXPECT_EQ(si_label(250e-6, 50e-6, "s"), "250 \u00B5s");
  EXPECT_EQ(si_label(0, 0.001, "s"), "0 s");
  EXPECT_EQ(si_label(3e-9, 1e-9, "F"), "3 nF");
  EXPECT_EQ(si_label(4.7e-12, 0.1e-12, "F"), "4.7 pF");
  EXPECT_EQ(si_label(2.5e6, 0.5e6, "W"), "2.5 MW");
  EXPECT_EQ(si_label(2e9, 1e9, "Hz"), "2 GHz");
  // Temperature and percent stay plain numbers, never "k°C".
  EXPECT_EQ(si_label(25, 5, "degC"), "25 \u00B0C");
  EXPECT_EQ(si_label(1500, 500, "degC"), "1500 \u00B0C");
  EXPECT_EQ(si_label(2500, 500, "%"), "2500 %");
  EXPECT_EQ(si_label(12.5, 2.5, ""), "12.5");
  EXPECT_EQ(display_unit("degC"), "\u00B0C");
}

TEST(SiLabel, NoNegativeZero) {
  EXPECT_EQ(si_label(-1e-20, 0.1, "V", 0), "0.0 V");
  EXPECT_EQ(si_label(-0.0, 1.0, "V", 0), "0 V");
  EXPECT_EQ(si_label(-4e-7, 0.5e-3, "s", -3), "0.0 ms");
}

TEST(SiLabel, SharedAxisPrefix) {
  const std::vector<double> ticks = {0, 0.0005, 0.001, 0.0015};
  const int exponent = axis_exponent(ticks);
  EXPECT_EQ(exponent, -3);
  std::vector<std::string> labels;
  for (double t : ticks) labels.push_back(si_label(t, 0.0005, "s", exponent));
  EXPECT_EQ(labels, (std::vector<std::string>{"0.0 ms", "0.5 ms", "1.0 ms",
                                              "1.5 ms"}));
  EXPECT_EQ(axis_exponent({0, 200, 400}), 0);
  EXPECT_EQ(axis_exponent({0, 500, 1000}), 3);
  EXPECT_EQ(axis_exponent({-2000, -1000, 0}), 3);
  EXPECT_EQ(axis_exponent({0, 2e-4, 8e-4}), -6);
  EXPECT_EQ(axis_exponent({0, 0}), 0);
  EXPECT_EQ(axis_exponent({}), 0);
  EXPECT_EQ(axis_exponent({0, 1e-20}), -12);  // clamped to the smallest prefix
  EXPECT_EQ(axis_exponent({0, 1e15}), 9);     // clamped to the largest prefix
}

TEST(SiLabel, AdjacentTicksAlwaysDistinct) {
  const std::vector<std::pair<double, double>> ranges = {
      {0, 0.0123}, {399.2, 401.7}, {-2.2e3, 1.1e3}, {0, 2.5e-6},
      {813, 813.25}, {0.9999, 1.0001}, {1e6, 1e6 + 3}, {-1, 1}};
  for (const auto& [low, high] : ranges) {
    for (int target : {3, 6, 11}) {
      const std::vector<double> ticks = nice_ticks(low, high, target);
      const int exponent = axis_exponent(ticks);
      std::set<std::string> seen;
      for (double t : ticks) {
        const std::string label = si_label(t, ticks[1] - ticks[0], "V", exponent);
        if (t == 0.0) {
          EXPECT_NE(label.front(), '-') << label;
        }
        EXPECT_TRUE(seen.insert(label).second)
            << "duplicate label " << label << " for [" << low << ", " << high
            << "]";
      }
    }
  }
}

// ---------------------------------------------------------------------------
// Decimation

TEST(Decimate, KeepsSingleSampleSpikesAndReduces) {
  const std::size_t n = 1000000;
  std::vector<double> x(n), y(n);
  for (std::size_t i = 0; i < n; ++i) {
    x[i] = static_cast<double>(i) * 1e-6;  // 1 s of 1 MHz samples
    y[i] = 1.0 + 0.01 * std::sin(static_cast<double>(i) * 1e-3);
  }
  y[500123] = 5.0;   // one-sample overshoot
  y[700001] = -3.0;  // one-sample dropout
  const int columns = 500;
  const std::vector<Point> points = decimate_min_max(x, y, 0.0, 1.0, columns);
  EXPECT_LE(points.size(), 4u * columns);
  EXPECT_GE(points.size(), 2u * columns);  // first and last at least per column
  double highest = -INFINITY, lowest = INFINITY;
  for (std::size_t i = 0; i < points.size(); ++i) {
    highest = std::max(highest, points[i].y);
    lowest = std::min(lowest, points[i].y);
    if (i > 0) {
      EXPECT_LT(points[i - 1].x, points[i].x) << "time order at " << i;
    }
  }
  EXPECT_EQ(highest, 5.0);
  EXPECT_EQ(lowest, -3.0);
  // The spike keeps its own time stamp, not a column's.
  bool spike_found = false;
  for (const Point& p : points) {
    if (p.y == 5.0) spike_found = std::abs(p.x - 0.500123) < 1e-12;
  }
  EXPECT_TRUE(spike_found);
  EXPECT_EQ(points.front().x, 0.0);
  EXPECT_EQ(points.back().x, x.back());
}

TEST(Decimate, ZoomKeepsOneNeighbourEachSide) {
  std::vector<double> x, y;
  for (int i = 0; i < 10; ++i) {
    x.push_back(i);
    y.push_back(i * i);
  }
  const std::vector<Point> points = decimate_min_max(x, y, 2.5, 6.5, 100);
  ASSERT_EQ(points.size(), 6u);
  for (std::size_t k = 0; k < points.size(); ++k) {
    EXPECT_EQ(points[k].x, 2.0 + k);
    EXPECT_EQ(points[k].y, (2.0 + k) * (2.0 + k));
  }
  // Short series fully inside come back unchanged.
  EXPECT_EQ(decimate_min_max(x, y, -1, 20, 100).size(), 10u);
}

TEST(Decimate, DropsNonFiniteAndHandlesMismatch) {
  const std::vector<double> x = {0, 1, 2, 3, 4};
  const std::vector<double> y = {1, std::nan(""), 3, INFINITY};  // shorter
  const std::vector<Point> points = decimate_min_max(x, y, 0, 4, 10);
  ASSERT_EQ(points.size(), 2u);
  EXPECT_EQ(points[0].x, 0.0);
  EXPECT_EQ(points[1].x, 2.0);
  EXPECT_TRUE(decimate_min_max({}, {}, 0, 1, 10).empty());
}

TEST(Decimate, ZoomedLargeSeriesStaysBounded) {
  const std::size_t n = 200000;
  std::vector<double> x(n), y(n);
  for (std::size_t i = 0; i < n; ++i) {
    x[i] = static_cast<double>(i);
    y[i] = static_cast<double>(i % 7);
  }
  const int columns = 100;
  const std::vector<Point> points =
      decimate_min_max(x, y, 50000.5, 150000.5, columns);
  EXPECT_LE(points.size(), 4u * columns);
  EXPECT_EQ(points.front().x, 50000.0);  // neighbour left of the zoom
  EXPECT_EQ(points.back().x, 150001.0);  // neighbour right of the zoom
}

// ---------------------------------------------------------------------------
// AxisMap

TEST(AxisMap, CornersMidpointAndInvertedY) {
  const AxisMap x_map{0.0, 10.0, 50.0, 650.0};
  EXPECT_EQ(x_map.to_pixel(0.0), 50.0);
  EXPECT_EQ(x_map.to_pixel(10.0), 650.0);
  EXPECT_EQ(x_map.to_pixel(5.0), 350.0);
  EXPECT_DOUBLE_EQ(x_map.to_pixel(2.5), 200.0);
  EXPECT_DOUBLE_EQ(x_map.to_pixel(-1.0), -10.0);  // linear beyond the range

  const AxisMap y_map{0.0, 400.0, 300.0, 20.0};  // bottom pixel first
  EXPECT_EQ(y_map.to_pixel(0.0), 300.0);
  EXPECT_EQ(y_map.to_pixel(400.0), 20.0);
  EXPECT_EQ(y_map.to_pixel(200.0), 160.0);
  EXPECT_LT(y_map.to_pixel(300.0), y_map.to_pixel(100.0));  // up is larger

  const AxisMap awkward{0.1, 0.7, 33.3, 612.9};
  EXPECT_EQ(awkward.to_pixel(0.1), 33.3);
  EXPECT_EQ(awkward.to_pixel(0.7), 612.9);

  const AxisMap flat{3.0, 3.0, 10.0, 30.0};
  EXPECT_EQ(flat.to_pixel(3.0), 20.0);
}

// ---------------------------------------------------------------------------
// Line plot

PlotSpec three_point_spec() {
  PlotSpec spec;
  spec.id = "three";
  spec.title = "Link voltage";
  spec.x_label = "time";
  spec.x_unit = "s";
  spec.y_label = "voltage";
  spec.y_unit = "V";
  spec.series.push_back({"DC link", {0.0, 0.001, 0.002}, {0.0, 200.0, 400.0}, "", 0.0});
  spec.x_range = Range{0.0, 0.002};
  spec.y_range = Range{0.0, 400.0};
  return spec;
}

TEST(LinePlot, WellFormedSvgWithRequiredParts) {
  PlotSpec spec = three_point_spec();
  spec.reference_lines.push_back({380.0, "closing threshold"});
  spec.markers.push_back({0.0015, "main closed"});
  spec.markers.push_back({0.5, "off-screen"});
  const std::string svg = render_line_plot(spec);
  const ParseResult doc = parse_xml(svg);
  ASSERT_TRUE(doc.ok) << doc.error;
  ASSERT_EQ(doc.root, "svg");
  const Element& root = doc.elements.front();
  EXPECT_EQ(root.attributes.at("xmlns"), "http://www.w3.org/2000/svg");
  EXPECT_EQ(root.attributes.at("viewBox"), "0 0 720 360");
  EXPECT_EQ(root.attributes.at("role"), "img");
  ASSERT_EQ(find_all(doc, "title").size(), 1u);
  EXPECT_EQ(find_all(doc, "title")[0]->text, "Link voltage");
  EXPECT_EQ(find_all(doc, "clipPath").size(), 1u);
  EXPECT_NE(svg.find("clip-path=\"url(#three-clip)\""), std::string::npos);

  std::set<std::string> texts;
  for (const Element* t : find_all(doc, "text")) texts.insert(t->text);
  for (const char* expected : {"0.0 ms", "1.0 ms", "2.0 ms", "0 V", "400 V",
                               "closing threshold", "main closed", "DC link",
                               "time", "voltage"}) {
    EXPECT_TRUE(texts.count(expected)) << "missing text " << expected;
  }
  EXPECT_FALSE(texts.count("off-screen"));  // marker outside the x range
  EXPECT_EQ(svg.find("nan"), std::string::npos);
  EXPECT_EQ(svg.find("-0.00"), std::string::npos);
}

TEST(LinePlot, CrowdedMarkersShareOneLabel) {
  // Plot area about 620 px for 2 ms: markers 5 us apart are under 2 px apart and must not overprint; the
  // group is labelled by its first marker and the count of the others. A marker far away keeps its own label.
  PlotSpec spec = three_point_spec();
  spec.markers = {{0.0, "close k_neg"}, {0.000005, "close k_pre"}, {0.00001, "attempt starts"},
                  {0.0015, "main closed"}};
  const std::string svg = render_line_plot(spec);
  const ParseResult doc = parse_xml(svg);
  ASSERT_TRUE(doc.ok) << doc.error;
  std::vector<std::string> rotated;
  for (const Element* t : find_all(doc, "text")) {
    if (t->attributes.count("transform")) rotated.push_back(t->text);
  }
  // The y-axis title is rotated too; marker labels are the others.
  EXPECT_EQ(rotated.size(), 3u);
  EXPECT_NE(std::find(rotated.begin(), rotated.end(), "close k_neg +2"), rotated.end());
  EXPECT_NE(std::find(rotated.begin(), rotated.end(), "main closed"), rotated.end());
  int dashed_lines = 0;
  for (const Element* line : find_all(doc, "line")) {
    if (line->attributes.count("stroke-dasharray") && line->attributes.at("stroke-dasharray") == "3 3") {
      ++dashed_lines;
    }
  }
  EXPECT_EQ(dashed_lines, 4);  // every marker still draws its line
}

TEST(LinePlot, PolylineCoordinatesMatchMapping) {
  const std::string svg = render_line_plot(three_point_spec());
  const ParseResult doc = parse_xml(svg);
  ASSERT_TRUE(doc.ok) << doc.error;
  // The clip rectangle is the plot area; derive the expected pixels from it.
  const Element* clip_rect = nullptr;
  for (std::size_t i = 0; i < doc.elements.size(); ++i) {
    if (doc.elements[i].name == "clipPath") clip_rect = &doc.elements[i + 1];
  }
  ASSERT_NE(clip_rect, nullptr);
  ASSERT_EQ(clip_rect->name, "rect");
  const double left = std::stod(clip_rect->attributes.at("x"));
  const double top = std::stod(clip_rect->attributes.at("y"));
  const double right = left + std::stod(clip_rect->attributes.at("width"));
  const double bottom = top + std::stod(clip_rect->attributes.at("height"));
  // Plausible layout: room for labels on the left and below, inside the svg.
  EXPECT_GT(left, 30.0);
  EXPECT_LT(right, 720.0);
  EXPECT_GT(top, 10.0);
  EXPECT_LT(bottom, 330.0);

  const std::vector<const Element*> lines = find_all(doc, "polyline");
  ASSERT_EQ(lines.size(), 1u);
  const std::vector<Point> points = parse_points(lines[0]->attributes.at("points"));
  ASSERT_EQ(points.size(), 3u);
  const double tolerance = 0.006;  // two printed decimals
  EXPECT_NEAR(points[0].x, left, tolerance);
  EXPECT_NEAR(points[0].y, bottom, tolerance);
  EXPECT_NEAR(points[1].x, 0.5 * (left + right), tolerance);
  EXPECT_NEAR(points[1].y, 0.5 * (top + bottom), tolerance);
  EXPECT_NEAR(points[2].x, right, tolerance);
  EXPECT_NEAR(points[2].y, top, tolerance);
  // Two decimals exactly, for byte reproducibility.
  const std::string& raw = lines[0]->attributes.at("points");
  const std::size_t comma = raw.find(',');
  EXPECT_EQ(raw.find('.'), comma - 3);
}

TEST(LinePlot, SeriesDifferBeyondColour) {
  PlotSpec spec;
  spec.title = "three currents";
  for (int k = 0; k < 3; ++k) {
    spec.series.push_back({"series " + std::to_string(k), {0, 1, 2},
                           {0.0 + k, 1.0 + k, 0.5 + k}, "", 0.0});
  }
  const ParseResult doc = parse_xml(render_line_plot(spec));
  ASSERT_TRUE(doc.ok) << doc.error;
  std::set<std::string> styles;
  for (const Element* line : find_all(doc, "polyline")) {
    styles.insert(line->attributes.at("stroke-dasharray") + "/" +
                  line->attributes.at("stroke-width"));
  }
  EXPECT_EQ(styles.size(), 3u);
  // Legend has one sample line per series with the same dash pattern.
  std::set<std::string> polyline_dashes, legend_dashes;
  for (const Element* line : find_all(doc, "polyline")) {
    polyline_dashes.insert(line->attributes.at("stroke-dasharray"));
  }
  for (const Element* line : find_all(doc, "line")) {
    const auto it = line->attributes.find("stroke-dasharray");
    if (it != line->attributes.end() && polyline_dashes.count(it->second)) {
      legend_dashes.insert(it->second);
    }
  }
  EXPECT_EQ(legend_dashes, polyline_dashes);
}

TEST(LinePlot, EscapesTextAndStaysWellFormed) {
  PlotSpec spec = three_point_spec();
  spec.id = "9 bad id<>";
  spec.title = "<script>alert(\"x\")</script> & 'more'";
  spec.series[0].name = "R < 10 \u03A9 & C > 1 mF";
  spec.markers.push_back({0.001, "a\"b"});
  spec.x_label = std::string("bad\x01 byte\xFF");
  const std::string svg = render_line_plot(spec);
  const ParseResult doc = parse_xml(svg);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(svg.find("<script"), std::string::npos);
  EXPECT_NE(svg.find("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; "
                     "&apos;more&apos;"),
            std::string::npos);
  EXPECT_NE(svg.find("R &lt; 10 \u03A9 &amp; C &gt; 1 mF"), std::string::npos);
  EXPECT_EQ(svg.find('\x01'), std::string::npos);
  const std::string id = doc.elements.front().attributes.at("aria-labelledby");
  EXPECT_EQ(id, "p9_bad_id__-title");
}

TEST(LinePlot, EscapeXmlDirect) {
  EXPECT_EQ(escape_xml("a<b & \"c\" 'd' >"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos; &gt;");
  EXPECT_EQ(escape_xml("250 \u00B5s"), "250 \u00B5s");  // UTF-8 passes through
  EXPECT_EQ(escape_xml("x\x01y\tz"), "xy\tz");
  EXPECT_EQ(escape_xml("a\xC3"), "a\uFFFD");  // truncated sequence replaced
  EXPECT_EQ(escape_xml("\xED\xA0\x80"), "\uFFFD\uFFFD\uFFFD");  // surrogate
}

TEST(LinePlot, DeterministicAndRobustToBadData) {
  PlotSpec spec;
  spec.title = "noisy";
  spec.series.push_back({"with gaps", {0, 1, 2, 3, 4},
                         {1, std::nan(""), 3, INFINITY, 2}, "", 0.0});
  spec.series.push_back({"empty", {}, {}, "", 0.0});
  spec.series.push_back({"single", {2}, {2.5}, "", 0.0});
  const std::string first = render_line_plot(spec);
  EXPECT_EQ(first, render_line_plot(spec));
  const ParseResult doc = parse_xml(first);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(first.find("nan"), std::string::npos);
  EXPECT_EQ(first.find("inf"), std::string::npos);
  EXPECT_EQ(find_all(doc, "polyline").size(), 1u);
  EXPECT_EQ(find_all(doc, "circle").size(), 1u);  // the single sample shows
  // An empty plot is still a valid image.
  PlotSpec nothing;
  EXPECT_TRUE(parse_xml(render_line_plot(nothing)).ok);
}

TEST(LinePlot, AutomaticYRangeIncludesReferenceLine) {
  PlotSpec spec;
  spec.id = "auto";
  spec.title = "auto range";
  spec.y_unit = "V";
  spec.series.push_back({"v", {0, 1, 2}, {12, 230, 351}, "", 0.0});
  spec.reference_lines.push_back({390.0, "threshold"});
  const ParseResult doc = parse_xml(render_line_plot(spec));
  ASSERT_TRUE(doc.ok) << doc.error;
  std::map<std::string, double> label_y;
  for (const Element* t : find_all(doc, "text")) {
    const auto y = t->attributes.find("y");
    label_y[t->text] = std::stod(y->second);
  }
  ASSERT_TRUE(label_y.count("0 V"));
  ASSERT_TRUE(label_y.count("400 V"));  // the 390 V threshold is on the axis
  EXPECT_TRUE(label_y.count("threshold"));
  EXPECT_FALSE(label_y.count("500 V"));  // but no empty step beyond it
  // Tick labels share one offset from their tick, so the 351 V sample sits
  // 351/400 of the way from the "0 V" label to the "400 V" label.
  const double label_offset = 11.0 * 0.35;
  const double zero = label_y["0 V"] - label_offset;
  const double full = label_y["400 V"] - label_offset;
  const auto points =
      parse_points(find_all(doc, "polyline")[0]->attributes.at("points"));
  ASSERT_EQ(points.size(), 3u);
  EXPECT_NEAR(points[2].y, zero + (full - zero) * 351.0 / 400.0, 0.02);
  EXPECT_NEAR(points[0].y, zero + (full - zero) * 12.0 / 400.0, 0.02);
}

// ---------------------------------------------------------------------------
// Histogram

TEST(Histogram, ExplicitBinsCountEveryValue) {
  std::vector<double> values;
  for (int i = 0; i < 100; ++i) values.push_back(i);
  const std::vector<double> edges = histogram_edges(values, 10);
  ASSERT_EQ(edges.size(), 11u);
  EXPECT_EQ(edges.front(), 0.0);
  EXPECT_EQ(edges.back(), 99.0);
  const std::vector<int> counts = histogram_counts(values, edges);
  EXPECT_EQ(counts, std::vector<int>(10, 10));  // top value 99 in the last bin
}

TEST(Histogram, AutomaticBinsAreRoundAndCover) {
  std::vector<double> values;
  for (int i = 0; i < 400; ++i) {
    values.push_back(12.3 + 0.077 * i + ((i * 37) % 11) * 0.01);
  }
  values.push_back(std::nan(""));
  const std::vector<double> edges = histogram_edges(values, 0);
  ASSERT_GE(edges.size(), 6u);
  EXPECT_LE(edges.size(), 60u);
  EXPECT_TRUE(is_round_step(edges[1] - edges[0]));
  const std::vector<int> counts = histogram_counts(values, edges);
  int total = 0;
  for (int c : counts) total += c;
  EXPECT_EQ(total, 400);  // NaN ignored, nothing lost at the edges
}

TEST(Histogram, RenderedBarsMatchCounts) {
  HistogramSpec spec;
  spec.id = "spread";
  spec.title = "Pre-charge time spread";
  spec.x_label = "time to threshold";
  spec.x_unit = "s";
  for (int i = 0; i < 250; ++i) spec.values.push_back(0.08 + 0.0001 * (i % 50));
  spec.markers.push_back({0.083, "p99"});
  spec.bands.push_back({0.081, 0.084, "recommended"});
  const std::string svg = render_histogram(spec);
  EXPECT_EQ(svg, render_histogram(spec));
  const ParseResult doc = parse_xml(svg);
  ASSERT_TRUE(doc.ok) << doc.error;
  int total = 0;
  for (const Element* rect : find_all(doc, "rect")) {
    const auto it = rect->attributes.find("data-count");
    if (it != rect->attributes.end()) total += std::stoi(it->second);
  }
  EXPECT_EQ(total, 250);
  std::set<std::string> texts;
  for (const Element* t : find_all(doc, "text")) texts.insert(t->text);
  EXPECT_TRUE(texts.count("p99"));
  EXPECT_TRUE(texts.count("recommended"));
  EXPECT_TRUE(texts.count("n = 250"));
  EXPECT_TRUE(texts.count("count"));
  // Count axis labels are whole numbers.
  for (const std::string& label : texts) {
    if (!label.empty() && std::isdigit(static_cast<unsigned char>(label[0])) &&
        label.find(' ') == std::string::npos) {
      EXPECT_EQ(label.find('.'), std::string::npos) << label;
    }
  }
}

TEST(Histogram, EmptyAndConstantInputs) {
  HistogramSpec empty;
  EXPECT_TRUE(parse_xml(render_histogram(empty)).ok);
  HistogramSpec constant;
  constant.values = std::vector<double>(30, 470.0);
  constant.x_unit = "\u2126";
  const std::string svg = render_histogram(constant);
  ASSERT_TRUE(parse_xml(svg).ok);
  const std::vector<double> edges = histogram_edges(constant.values, 0);
  const std::vector<int> counts = histogram_counts(constant.values, edges);
  int total = 0;
  for (int c : counts) total += c;
  EXPECT_EQ(total, 30);
  EXPECT_LT(edges.front(), 470.0);
  EXPECT_GT(edges.back(), 470.0);
}

}  // namespace
}  // namespace linkrise::app
