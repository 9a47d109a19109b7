// Inline-SVG plotting for the self-contained HTML report: tick choice,
// SI-prefixed labels, peak-preserving decimation, line plots and histograms.
// All output is deterministic: same input gives byte-identical SVG text.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace linkrise::app {

/// Round tick values (step 1, 2 or 5 x 10^k) that enclose [low, high]: the
/// first tick is <= low and the last >= high. Roughly target_count ticks.
/// low > high is accepted (swapped); low == high is widened around the value;
/// non-finite input yields {0, 1}. Never returns NaN or an empty vector.
std::vector<double> nice_ticks(double low, double high, int target_count);

/// Engineering exponent (multiple of 3, clamped to -12..9) shared by every
/// label on an axis, chosen from the largest tick magnitude; 0 when all ticks
/// are zero or the list is empty.
int axis_exponent(const std::vector<double>& ticks);

/// Tick label such as "1.5 ms" using the given engineering exponent; step is
/// the tick spacing and sets how many decimals are needed to tell adjacent
/// ticks apart. Units "", "%" and "degC" (printed "°C") are never prefixed.
/// Never prints "-0".
std::string si_label(double value, double step, const std::string& unit,
                     int exponent);

/// Stand-alone label: as above with the exponent picked from value itself,
/// e.g. si_label(0.00025, 0.00005, "s") == "250 µs"; exact zero prints "0 s".
/// Axis labels should use the four-argument form with axis_exponent.
std::string si_label(double value, double step, const std::string& unit);

/// Linear data -> pixel mapping. For a y axis pass pixel_low = bottom edge
/// (larger pixel value) so larger data values go up.
struct AxisMap {
  double data_low = 0.0;
  double data_high = 1.0;
  double pixel_low = 0.0;
  double pixel_high = 1.0;
  /// Pixel position of value; the pixel midpoint when the data span is zero.
  double to_pixel(double value) const;
};

struct Range {
  double low = 0.0;
  double high = 1.0;
};

struct Series {
  std::string name;
  std::vector<double> x;
  std::vector<double> y;
  /// SVG stroke-dasharray, e.g. "6 3"; "none" forces solid; empty picks a
  /// pattern by series index so series differ in grey-scale print.
  std::string dash;
  /// Stroke width in px; 0 picks one by series index.
  double stroke_width = 0.0;
};

/// Horizontal line at a y value, e.g. a contactor closing threshold.
struct ReferenceLine {
  double value = 0.0;
  std::string label;
};

/// Vertical line at an x value, e.g. "decision" or "main closed".
struct Marker {
  double value = 0.0;
  std::string label;
};


/// Shaded x interval, e.g. a recommended resistor window.
struct Band {
  double low = 0.0;
  double high = 0.0;
  std::string label;
};
struct PlotSpec {
  /// Prefix for element ids (clip path, title); must be unique within one
  /// HTML page. Empty derives one from a hash of the title.
  std::string id;
  std::string title;
  std::string x_label;
  std::string x_unit;
  std::string y_label;
  std::string y_unit;
  int width = 720;
  int height = 360;
  std::vector<Series> series;
  std::vector<ReferenceLine> reference_lines;
  std::vector<Marker> markers;
  /// Shaded x intervals behind the series, e.g. a feasible window of values.
  std::vector<Band> bands;
  /// Zoom; absent means the data extent (x) or rounded data extent (y).
  std::optional<Range> x_range;
  std::optional<Range> y_range;
};

/// One <svg> element with title, gridlines, axes, tick labels, legend, series
/// clipped to the plot area, reference lines and markers.
std::string render_line_plot(const PlotSpec& spec);

struct HistogramSpec {
  std::string id;
  std::string title;
  std::string x_label;
  std::string x_unit;
  std::vector<double> values;  ///< non-finite values are ignored
  /// 0 = automatic (about sqrt(n), 5..40 bins on round edges); otherwise that
  /// many equal bins spanning [min, max].
  int bins = 0;
  int width = 720;
  int height = 300;
  std::vector<Marker> markers;
  std::vector<Band> bands;
};

/// Bin edges (size bins + 1) used by render_histogram, exposed for tests.
std::vector<double> histogram_edges(const std::vector<double>& values, int bins);

/// Counts per bin for the given edges; the top edge belongs to the last bin.
std::vector<int> histogram_counts(const std::vector<double>& values,
                                  const std::vector<double>& edges);

/// One <svg> element with the histogram bars (count axis), markers and bands.
std::string render_histogram(const HistogramSpec& spec);

}  // namespace linkrise::app
