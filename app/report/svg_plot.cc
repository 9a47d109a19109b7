#include "app/report/svg_plot.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <utility>

#include <fmt/format.h>

#include "app/output/decimation.h"
#include "app/output/text_format.h"
#include "netlist/units.h"

namespace linkrise::app {
namespace {

// Exactly representable powers of ten keep round ticks round: k*m / 10^n is
// the double nearest the decimal value, unlike k*m * 10^-n.
double scale_by_power_of_ten(double mantissa, int exponent) {
  if (exponent >= 0) return mantissa * std::pow(10.0, exponent);
  if (exponent >= -300) return mantissa / std::pow(10.0, -exponent);
  return mantissa * 1e-300 / std::pow(10.0, -exponent - 300);
}

// Floor/ceil that treat a quotient within rounding noise of an integer as
// that integer, so 0.3/0.1 counts as 3 and not 2.9999.
double floor_tolerant(double q) {
  const double r = std::round(q);
  if (std::abs(q - r) <= 1e-9 * std::max(1.0, std::abs(q))) return r;
  return std::floor(q);
}

double ceil_tolerant(double q) {
  const double r = std::round(q);
  if (std::abs(q - r) <= 1e-9 * std::max(1.0, std::abs(q))) return r;
  return std::ceil(q);
}

// Fewest decimals that print step (already scaled) without visible rounding.
int decimals_for(double scaled_step) {
  scaled_step = std::abs(scaled_step);
  for (int d = 0; d < 9; ++d) {
    const double r = scaled_step * std::pow(10.0, d);
    // Relative test: a step that would round to zero digits never passes.
    if (std::round(r) >= 1.0 && std::abs(r - std::round(r)) <= 1e-6 * r) {
      return d;
    }
  }
  return 9;
}

bool is_unprefixed_unit(const std::string& unit) {
  return unit.empty() || unit == "%" || unit == "degC" || unit == "\u00B0C";
}


// Zero-valued numbers print without a sign: "-0.00" reads as a bug.
std::string strip_negative_zero(std::string text) {
  if (!text.empty() && text.front() == '-' &&
      text.find_first_not_of("0.", 1) == std::string::npos) {
    text.erase(0, 1);
  }
  return text;
}

// Fixed two decimals for every coordinate keeps the SVG byte-reproducible;
// the clamp keeps far-off-scale points finite and short.
std::string coord(double value) {
  constexpr double limit = 1e6;
  if (!std::isfinite(value)) value = value > 0 ? limit : -limit;
  value = std::clamp(value, -limit, limit);
  return strip_negative_zero(fmt::format("{:.2f}", value));
}

// Approximate rendered width for layout; a fixed per-character estimate is
// deterministic, which font metrics would not be.
double text_width(std::string_view text, double font_size) {
  std::size_t code_points = 0;
  for (unsigned char c : text) {
    if ((c & 0xC0) != 0x80) ++code_points;
  }
  return static_cast<double>(code_points) * font_size * 0.6;
}

std::string sanitize_id(const std::string& wanted, const std::string& title,
                        const char* fallback_prefix) {
  std::string id;
  for (char c : wanted) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
                    (c >= '0' && c <= '9') || c == '-' || c == '_';
    id.push_back(ok ? c : '_');
  }
  if (!id.empty()) {
    // XML ids must not start with a digit or hyphen.
    if (!((id[0] >= 'a' && id[0] <= 'z') || (id[0] >= 'A' && id[0] <= 'Z'))) {
      id.insert(0, "p");
    }
    return id;
  }
  std::uint32_t hash = 2166136261u;  // FNV-1a: stable across runs/platforms
  for (unsigned char c : title) {
    hash ^= c;
    hash *= 16777619u;
  }
  return fmt::format("{}{:08x}", fallback_prefix, hash);
}

// Restrained palette on a warm light background; colours also differ in
// lightness, and dash + width carry the distinction in grey-scale print.
constexpr std::array<const char*, 6> series_colours = {
    "#1d4e89", "#c0562a", "#2f7d4f", "#7b3f8c", "#8c6d1f", "#3d3d3d"};
constexpr std::array<const char*, 6> series_dashes = {
    "none", "7 4", "2 3", "10 3 2 3", "4 2", "1 2"};
constexpr std::array<double, 6> series_widths = {2.2, 1.8, 1.8, 1.5, 1.5, 1.3};

constexpr const char* background_colour = "#fcfbf8";
constexpr const char* plot_area_colour = "#ffffff";
constexpr const char* grid_colour = "#e6e3dc";
constexpr const char* axis_colour = "#6f6f6f";
constexpr const char* text_colour = "#262626";
constexpr const char* muted_text_colour = "#555555";
constexpr const char* reference_colour = "#9a3b3b";
constexpr const char* marker_colour = "#4d4d4d";
constexpr const char* band_colour = "#ece3cf";
constexpr const char* bar_fill_colour = "#a9bfd4";
constexpr const char* bar_stroke_colour = "#4f6d8a";

constexpr double title_font = 14.0;
constexpr double label_font = 12.0;
constexpr double tick_font = 11.0;
constexpr double note_font = 10.0;
constexpr double tick_length = 4.0;

struct PlotArea {
  double left = 0.0;
  double top = 0.0;
  double right = 0.0;
  double bottom = 0.0;
  double width() const { return right - left; }
  double height() const { return bottom - top; }
};

struct TickChoice {
  std::vector<double> values;
  double step = 1.0;  // exact 1/2/5 x 10^k, not a difference of ticks
};

// Round ticks either enclosing [low, high] (first <= low, last >= high) or
// lying inside it; the step is scored on the count actually produced.
TickChoice round_ticks(double low, double high, int target_count,
                       bool enclose) {
  if (!std::isfinite(low) || !std::isfinite(high)) return {{0.0, 1.0}, 1.0};
  if (low > high) std::swap(low, high);
  // Beyond this, tick arithmetic would overflow.
  low = std::clamp(low, -1e300, 1e300);
  high = std::clamp(high, -1e300, 1e300);
  const int target = std::clamp(target_count, 2, 100);
  const double magnitude = std::max(std::abs(low), std::abs(high));
  // A span lost in rounding noise of the values counts as a single value.
  if (high - low <= magnitude * 1e-12) {
    const double middle = 0.5 * (low + high);
    const double half = magnitude > 0.0 ? magnitude * 0.1 : 1.0;
    low = middle - half;
    high = middle + half;
  }
  const double raw_step = (high - low) / (target - 1);
  const int base_exponent = static_cast<int>(std::floor(std::log10(raw_step)));

  int best_exponent = base_exponent;
  double best_mantissa = 1.0;
  long long best_score = std::numeric_limits<long long>::max();
  for (int exponent = base_exponent - 1; exponent <= base_exponent + 1;
       ++exponent) {
    for (double mantissa : {1.0, 2.0, 5.0}) {
      const double step = scale_by_power_of_ten(mantissa, exponent);
      const double count =
          enclose ? ceil_tolerant(high / step) - floor_tolerant(low / step) + 1.0
                  : floor_tolerant(high / step) - ceil_tolerant(low / step) + 1.0;
      long long score =
          static_cast<long long>(std::abs(count - static_cast<double>(target)));
      if (count < 2.0) score += 1000;  // an axis needs two ticks to read
      // Ascending steps with <=: ties go to the coarser, less crowded axis.
      if (score <= best_score) {
        best_score = score;
        best_exponent = exponent;
        best_mantissa = mantissa;
      }
    }
  }
  const double step = scale_by_power_of_ten(best_mantissa, best_exponent);
  const auto first = static_cast<long long>(
      enclose ? floor_tolerant(low / step) : ceil_tolerant(low / step));
  const auto last = static_cast<long long>(
      enclose ? ceil_tolerant(high / step) : floor_tolerant(high / step));
  TickChoice choice;
  choice.step = step;
  std::vector<double>& ticks = choice.values;
  ticks.reserve(static_cast<std::size_t>(std::max(last - first + 1, 0LL)));
  for (long long k = first; k <= last; ++k) {
    ticks.push_back(scale_by_power_of_ten(static_cast<double>(k) * best_mantissa,
                                          best_exponent));
  }
  return choice;
}

struct AxisTicks {
  std::vector<double> values;  // ticks drawn (within the axis extent)
  double step = 1.0;
  int exponent = 0;
  std::vector<std::string> labels;
};

// Labelled ticks inside an axis whose extent is already fixed.
AxisTicks inner_ticks(double low, double high, int target,
                      const std::string& unit) {
  AxisTicks axis;
  TickChoice choice = round_ticks(low, high, target, false);
  axis.step = choice.step;
  axis.values = std::move(choice.values);
  axis.exponent = axis_exponent(axis.values);
  for (double t : axis.values) {
    axis.labels.push_back(si_label(t, axis.step, unit, axis.exponent));
  }
  return axis;
}

double widest_label(const AxisTicks& axis) {
  double widest = 0.0;
  for (const std::string& label : axis.labels) {
    widest = std::max(widest, text_width(label, tick_font));
  }
  return widest;
}

void open_svg(std::string& out, const std::string& id, int width, int height,
              const std::string& title) {
  out += fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{1}\" "
      "viewBox=\"0 0 {0} {1}\" role=\"img\" aria-labelledby=\"{2}-title\" "
      "font-family=\"sans-serif\">\n",
      width, height, id);
  out += fmt::format("<title id=\"{}-title\">{}</title>\n", id,
                     escape_xml(title));
  out += fmt::format(
      "<rect x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" fill=\"{}\"/>\n",
      width, height, background_colour);
}

void clip_definition(std::string& out, const std::string& id,
                     const PlotArea& area) {
  out += fmt::format(
      "<defs><clipPath id=\"{}-clip\"><rect x=\"{}\" y=\"{}\" width=\"{}\" "
      "height=\"{}\"/></clipPath></defs>\n",
      id, coord(area.left), coord(area.top), coord(area.width()),
      coord(area.height()));
}

// Annotation text gets a background-coloured outline so it stays legible
// where it crosses a curve or gridline.
constexpr const char* halo =
    " stroke=\"#ffffff\" stroke-width=\"3\" stroke-linejoin=\"round\" "
    "paint-order=\"stroke\"";

void text_element(std::string& out, double x, double y, const char* anchor,
                  double font_size, const char* colour,
                  const std::string& text, const std::string& extra = "") {
  out += fmt::format(
      "<text x=\"{}\" y=\"{}\" text-anchor=\"{}\" font-size=\"{}\" "
      "fill=\"{}\"{}>{}</text>\n",
      coord(x), coord(y), anchor, font_size, colour, extra, escape_xml(text));
}

void plot_background(std::string& out, const PlotArea& area) {
  out += fmt::format(
      "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"{}\"/>\n",
      coord(area.left), coord(area.top), coord(area.width()),
      coord(area.height()), plot_area_colour);
}

void gridlines(std::string& out, const PlotArea& area, const AxisTicks& x_axis,
               const AxisMap& x_map, const AxisTicks& y_axis,
               const AxisMap& y_map, bool vertical_lines) {
  out += fmt::format("<g stroke=\"{}\" stroke-width=\"1\">\n", grid_colour);
  if (vertical_lines) {
    for (double t : x_axis.values) {
      const std::string px = coord(x_map.to_pixel(t));
      out += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n",
                         px, coord(area.top), coord(area.bottom));
    }
  }
  for (double t : y_axis.values) {
    const std::string py = coord(y_map.to_pixel(t));
    out += fmt::format("<line x1=\"{1}\" y1=\"{0}\" x2=\"{2}\" y2=\"{0}\"/>\n",
                       py, coord(area.left), coord(area.right));
  }
  out += "</g>\n";
}

// Frame, tick marks, tick labels and axis titles.
void axes(std::string& out, const PlotArea& area, const AxisTicks& x_axis,
          const AxisMap& x_map, const std::string& x_label,
          const AxisTicks& y_axis, const AxisMap& y_map,
          const std::string& y_label) {
  out += fmt::format(
      "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" "
      "stroke=\"{}\" stroke-width=\"1\"/>\n",
      coord(area.left), coord(area.top), coord(area.width()),
      coord(area.height()), axis_colour);
  out += fmt::format("<g stroke=\"{}\" stroke-width=\"1\">\n", axis_colour);
  for (double t : x_axis.values) {
    const std::string px = coord(x_map.to_pixel(t));
    out += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n",
                       px, coord(area.bottom), coord(area.bottom + tick_length));
  }
  for (double t : y_axis.values) {
    const std::string py = coord(y_map.to_pixel(t));
    out += fmt::format("<line x1=\"{1}\" y1=\"{0}\" x2=\"{2}\" y2=\"{0}\"/>\n",
                       py, coord(area.left - tick_length), coord(area.left));
  }
  out += "</g>\n";
  const double x_label_baseline = area.bottom + tick_length + tick_font + 4.0;
  for (std::size_t i = 0; i < x_axis.values.size(); ++i) {
    text_element(out, x_map.to_pixel(x_axis.values[i]), x_label_baseline,
                 "middle", tick_font, text_colour, x_axis.labels[i]);
  }
  for (std::size_t i = 0; i < y_axis.values.size(); ++i) {
    // +0.35em approximately centres the glyphs on the tick.
    text_element(out, area.left - tick_length - 4.0,
                 y_map.to_pixel(y_axis.values[i]) + tick_font * 0.35, "end",
                 tick_font, text_colour, y_axis.labels[i]);
  }
  if (!x_label.empty()) {
    text_element(out, 0.5 * (area.left + area.right),
                 x_label_baseline + label_font + 6.0, "middle", label_font,
                 text_colour, x_label);
  }
  if (!y_label.empty()) {
    const double x = 4.0 + label_font;
    const double y = 0.5 * (area.top + area.bottom);
    text_element(out, x, y, "middle", label_font, text_colour, y_label,
                 fmt::format(" transform=\"rotate(-90 {} {})\"", coord(x),
                             coord(y)));
  }
}

// Shortens text to fit an estimated width, ending it with an ellipsis.
std::string fit_text(const std::string& text, double font_size, double width) {
  if (text_width(text, font_size) <= width) return text;
  std::string out;
  for (std::size_t i = 0; i < text.size();) {
    std::size_t length = 1;
    const auto c = static_cast<unsigned char>(text[i]);
    if (c >= 0xF0) length = 4;
    else if (c >= 0xE0) length = 3;
    else if (c >= 0xC0) length = 2;
    const std::string next = out + text.substr(i, length);
    if (text_width(next + "\u2026", font_size) > width) break;
    out = next;
    i += length;
  }
  return out + "\u2026";
}

struct PlacedMarker {
  double pixel;
  std::string label;
};

void grouped_marker_labels(std::string& out, const PlotArea& area,
                           const std::vector<PlacedMarker>& placed) {
  // Markers closer than a label's height share one label (events 1 ms apart
  // on a 500 ms axis): the first one's text and how many more the group
  // holds, e.g. "close k_pre +2", placed at the group's first line.
  const double spacing = note_font + 3.0;
  for (std::size_t first = 0; first < placed.size();) {
    std::size_t last = first;
    std::string label;
    int more = 0;
    for (;;) {
      if (!placed[last].label.empty()) {
        if (label.empty()) label = placed[last].label;
        else ++more;
      }
      if (last + 1 >= placed.size() ||
          placed[last + 1].pixel - placed[last].pixel >= spacing) {
        break;
      }
      ++last;
    }
    const std::string suffix = more > 0 ? fmt::format(" +{}", more) : "";
    if (!label.empty()) {
      // Rotated along the line so neighbouring markers' labels do not collide;
      // left of the line, unless that would cross the y axis.
      const double left = placed[first].pixel - 4.0;
      const double x = left - note_font < area.left
                           ? placed[last].pixel + 4.0 + note_font * 0.8
                           : left;
      const double y = area.top + 6.0;
      text_element(out, x, y, "end", note_font, marker_colour,
                   fit_text(label, note_font,
                            area.height() - 12.0 - text_width(suffix, note_font)) +
                       suffix,
                   std::string(halo) + fmt::format(" transform=\"rotate(-90 {} {})\"",
                                      coord(x), coord(y)));
    }
    first = last + 1;
  }
}

void vertical_markers(std::string& out, const PlotArea& area,
                      const AxisMap& x_map, const std::vector<Marker>& markers) {
  const double low = std::min(x_map.data_low, x_map.data_high);
  const double high = std::max(x_map.data_low, x_map.data_high);
  std::vector<PlacedMarker> placed;
  for (const Marker& marker : markers) {
    if (!std::isfinite(marker.value) || marker.value < low ||
        marker.value > high) {
      continue;
    }
    placed.push_back({x_map.to_pixel(marker.value), marker.label});
  }
  std::stable_sort(placed.begin(), placed.end(),
                   [](const PlacedMarker& a, const PlacedMarker& b) { return a.pixel < b.pixel; });
  for (const PlacedMarker& marker : placed) {
    out += fmt::format(
        "<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"{3}\" "
        "stroke-width=\"1.2\" stroke-dasharray=\"3 3\"/>\n",
        coord(marker.pixel), coord(area.top), coord(area.bottom), marker_colour);
  }
  grouped_marker_labels(out, area, placed);
}

void shaded_bands(std::string& out, const PlotArea& area, const AxisMap& x_map,
                  const std::vector<Band>& bands) {
  for (const Band& band : bands) {
    if (!std::isfinite(band.low) || !std::isfinite(band.high)) continue;
    const double a = std::clamp(x_map.to_pixel(band.low), area.left, area.right);
    const double b =
        std::clamp(x_map.to_pixel(band.high), area.left, area.right);
    if (std::abs(b - a) <= 0.0) continue;
    out += fmt::format(
        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"{}\"/>\n",
        coord(std::min(a, b)), coord(area.top), coord(std::abs(b - a)),
        coord(area.height()), band_colour);
    if (!band.label.empty()) {
      text_element(out, 0.5 * (a + b), area.top + note_font + 3.0, "middle",
                   note_font, muted_text_colour, band.label);
    }
  }
}

struct LegendEntry {
  double x = 0.0;
  int row = 0;
};

// Flows legend entries left to right, wrapping within the plot width.
std::vector<LegendEntry> layout_legend(const std::vector<Series>& series,
                                       double available_width) {
  std::vector<LegendEntry> entries;
  double x = 0.0;
  int row = 0;
  for (const Series& s : series) {
    const double entry_width = 28.0 + 6.0 + text_width(s.name, tick_font) + 18.0;
    if (x > 0.0 && x + entry_width > available_width) {
      x = 0.0;
      ++row;
    }
    entries.push_back({x, row});
    x += entry_width;
  }
  return entries;
}

// The histogram, piece by piece (render_histogram composes them).

// Markers and bands widen the x extent so a window outside the data shows.
Range histogram_x_extent(const HistogramSpec& spec,
                         const std::vector<double>& edges) {
  double x_low = edges.front();
  double x_high = edges.back();
  for (const Marker& marker : spec.markers) {
    if (!std::isfinite(marker.value)) continue;
    x_low = std::min(x_low, marker.value);
    x_high = std::max(x_high, marker.value);
  }
  for (const Band& band : spec.bands) {
    if (!std::isfinite(band.low) || !std::isfinite(band.high)) continue;
    x_low = std::min({x_low, band.low, band.high});
    x_high = std::max({x_high, band.low, band.high});
  }
  return {x_low, x_high};
}

// Count axis: whole-number ticks only, up to `high`.
struct CountAxis {
  AxisTicks ticks;
  double high = 1.0;
};

CountAxis count_axis(int largest, int height) {
  const double estimated_plot_height = height - 34.0 - 44.0;
  const int y_target =
      std::max(3, static_cast<int>(estimated_plot_height / 45.0));
  std::vector<double> rounded =
      nice_ticks(0.0, std::max(largest, 1), y_target);
  if (rounded.size() >= 2 && rounded[1] - rounded[0] < 1.0) {
    rounded.clear();
    for (int k = 0; k <= std::max(largest, 1); ++k) rounded.push_back(k);
  }
  AxisTicks y_axis = inner_ticks(0.0, rounded.back(), y_target, "");
  if (y_axis.step < 1.0) {
    y_axis.values = rounded;
    y_axis.step = 1.0;
    y_axis.labels.clear();
    for (double t : rounded) y_axis.labels.push_back(si_label(t, 1.0, ""));
  }
  return {y_axis, rounded.back()};
}

void histogram_bars(std::string& out, const std::string& id,
                    const std::vector<int>& counts,
                    const std::vector<double>& edges, const PlotArea& area,
                    const AxisMap& x_map, const AxisMap& y_map) {
  out += fmt::format(
      "<g clip-path=\"url(#{}-clip)\" fill=\"{}\" stroke=\"{}\" "
      "stroke-width=\"0.8\">\n",
      id, bar_fill_colour, bar_stroke_colour);
  for (std::size_t bin = 0; bin < counts.size(); ++bin) {
    if (counts[bin] == 0) continue;
    const double left = x_map.to_pixel(edges[bin]);
    const double right = x_map.to_pixel(edges[bin + 1]);
    const double top = y_map.to_pixel(counts[bin]);
    out += fmt::format(
        "<rect data-count=\"{}\" x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"/>\n",
        counts[bin], coord(left), coord(top), coord(right - left),
        coord(area.bottom - top));
  }
  out += "</g>\n";
}

// The line plot, piece by piece (render_line_plot composes them).

// An extent to draw: [0, 1] when nothing was found, round ticks around a
// single value.
Range non_empty(double low, double high) {
  if (!(low <= high)) return {0.0, 1.0};
  if (low == high) {
    const std::vector<double> widened = nice_ticks(low, high, 3);
    return {widened.front(), widened.back()};
  }
  return {low, high};
}

// X extent: the zoom range if given, else the finite data extent; never empty.
Range line_plot_x_extent(const PlotSpec& spec) {
  double x_low = std::numeric_limits<double>::infinity();
  double x_high = -std::numeric_limits<double>::infinity();
  if (spec.x_range && std::isfinite(spec.x_range->low) &&
      std::isfinite(spec.x_range->high)) {
    x_low = std::min(spec.x_range->low, spec.x_range->high);
    x_high = std::max(spec.x_range->low, spec.x_range->high);
  } else {
    for (const Series& s : spec.series) {
      const std::size_t n = std::min(s.x.size(), s.y.size());
      for (std::size_t i = 0; i < n; ++i) {
        if (!std::isfinite(s.x[i]) || !std::isfinite(s.y[i])) continue;
        x_low = std::min(x_low, s.x[i]);
        x_high = std::max(x_high, s.x[i]);
      }
    }
  }
  return non_empty(x_low, x_high);
}

// Y extent: the zoom range if given, else the samples visible in `x` and the
// reference lines plus a margin.
Range line_plot_y_extent(const PlotSpec& spec, const Range& x) {
  if (spec.y_range && std::isfinite(spec.y_range->low) &&
      std::isfinite(spec.y_range->high) &&
      spec.y_range->low != spec.y_range->high) {
    return {std::min(spec.y_range->low, spec.y_range->high),
            std::max(spec.y_range->low, spec.y_range->high)};
  }
  double data_low = std::numeric_limits<double>::infinity();
  double data_high = -std::numeric_limits<double>::infinity();
  for (const Series& s : spec.series) {
    const std::size_t n = std::min(s.x.size(), s.y.size());
    for (std::size_t i = 0; i < n; ++i) {
      if (!std::isfinite(s.x[i]) || !std::isfinite(s.y[i])) continue;
      if (s.x[i] < x.low || s.x[i] > x.high) continue;
      data_low = std::min(data_low, s.y[i]);
      data_high = std::max(data_high, s.y[i]);
    }
  }
  for (const ReferenceLine& line : spec.reference_lines) {
    if (!std::isfinite(line.value)) continue;
    data_low = std::min(data_low, line.value);
    data_high = std::max(data_high, line.value);
  }
  const Range data = non_empty(data_low, data_high);
  // A small margin instead of rounding out to whole ticks: data just past
  // a tick (ringing to 402 V on a 400 V link) must not add a whole step.
  const double margin = 0.04 * (data.high - data.low);
  return {data.low - margin, data.high + margin};
}

// A series' stroke: its own dash and width, else those of its index.
struct SeriesStyle {
  const char* colour;
  std::string dash;
  double stroke;
};

SeriesStyle series_style(const Series& s, std::size_t index) {
  const std::size_t style = index % series_colours.size();
  return {series_colours[style],
          s.dash.empty() ? std::string(series_dashes[style]) : s.dash,
          s.stroke_width > 0.0 ? s.stroke_width : series_widths[style]};
}

// One series as a polyline (a dot when one point remains), decimated to the
// plot's pixel columns.
void series_path(std::string& out, const Series& s, std::size_t index,
                 const AxisMap& x_map, const AxisMap& y_map, int columns) {
  const SeriesStyle style = series_style(s, index);
  const std::vector<Point> points = decimate_min_max(
      s.x, s.y, x_map.data_low, x_map.data_high, columns);
  if (points.size() == 1) {
    out += fmt::format("<circle cx=\"{}\" cy=\"{}\" r=\"{}\" fill=\"{}\"/>\n",
                       coord(x_map.to_pixel(points[0].x)),
                       coord(y_map.to_pixel(points[0].y)),
                       coord(style.stroke * 1.5), style.colour);
    return;
  }
  if (points.empty()) return;
  std::string coordinates;
  coordinates.reserve(points.size() * 16);
  for (std::size_t i = 0; i < points.size(); ++i) {
    if (i > 0) coordinates += ' ';
    coordinates += coord(x_map.to_pixel(points[i].x));
    coordinates += ',';
    coordinates += coord(y_map.to_pixel(points[i].y));
  }
  out += fmt::format(
      "<polyline data-series=\"{}\" stroke=\"{}\" stroke-width=\"{}\" "
      "stroke-dasharray=\"{}\" stroke-linejoin=\"round\" points=\"{}\"/>\n",
      escape_xml(s.name), style.colour, coord(style.stroke),
      escape_xml(style.dash), coordinates);
}

// Reference lines and series, clipped to the plot area.
void clipped_content(std::string& out, const std::string& id,
                     const PlotSpec& spec, const PlotArea& area,
                     const AxisMap& x_map, const AxisMap& y_map) {
  const int columns = std::max(1, static_cast<int>(std::lround(area.width())));
  out += fmt::format("<g clip-path=\"url(#{}-clip)\" fill=\"none\">\n", id);
  for (const ReferenceLine& line : spec.reference_lines) {
    if (!std::isfinite(line.value)) continue;
    const std::string py = coord(y_map.to_pixel(line.value));
    out += fmt::format(
        "<line x1=\"{1}\" y1=\"{0}\" x2=\"{2}\" y2=\"{0}\" stroke=\"{3}\" "
        "stroke-width=\"1.2\" stroke-dasharray=\"8 3 1 3\"/>\n",
        py, coord(area.left), coord(area.right), reference_colour);
  }
  for (std::size_t index = 0; index < spec.series.size(); ++index) {
    series_path(out, spec.series[index], index, x_map, y_map, columns);
  }
  out += "</g>\n";
}

// Reference labels sit above their line at the right end, inside the area.
void reference_labels(std::string& out, const PlotSpec& spec,
                      const PlotArea& area, const AxisMap& y_map) {
  const double low = std::min(y_map.data_low, y_map.data_high);
  const double high = std::max(y_map.data_low, y_map.data_high);
  for (const ReferenceLine& line : spec.reference_lines) {
    if (!std::isfinite(line.value) || line.label.empty()) continue;
    if (line.value < low || line.value > high) continue;
    text_element(out, area.right - 4.0, y_map.to_pixel(line.value) - 4.0,
                 "end", note_font, reference_colour, line.label, halo);
  }
}

// Space below the plot area for the x tick labels and the axis title.
constexpr double below_axis = tick_length + tick_font + 4.0 + label_font + 10.0;

// Legend below the x axis title: a line sample in each series' style.
void legend(std::string& out, const std::vector<Series>& series,
            const std::vector<LegendEntry>& entries, const PlotArea& area) {
  const double legend_top = area.bottom + below_axis;
  for (std::size_t index = 0; index < entries.size(); ++index) {
    const Series& s = series[index];
    const SeriesStyle style = series_style(s, index);
    const double x = area.left + entries[index].x;
    const double y = legend_top + entries[index].row * 18.0 + 9.0;
    out += fmt::format(
        "<line x1=\"{0}\" y1=\"{2}\" x2=\"{1}\" y2=\"{2}\" stroke=\"{3}\" "
        "stroke-width=\"{4}\" stroke-dasharray=\"{5}\"/>\n",
        coord(x), coord(x + 28.0), coord(y), style.colour,
        coord(style.stroke), escape_xml(style.dash));
    text_element(out, x + 34.0, y + tick_font * 0.35, "start", tick_font,
                 text_colour, s.name);
  }
}

}  // namespace

std::vector<double> nice_ticks(double low, double high, int target_count) {
  return round_ticks(low, high, target_count, true).values;
}

int axis_exponent(const std::vector<double>& ticks) {
  double largest = 0.0;
  for (double t : ticks) {
    if (std::isfinite(t)) largest = std::max(largest, std::abs(t));
  }
  if (largest == 0.0) return 0;
  // The small bias keeps 1000 from landing at 999.999... and staying unprefixed.
  const int decade = static_cast<int>(std::floor(std::log10(largest) + 1e-9));
  const int exponent =
      static_cast<int>(std::floor(static_cast<double>(decade) / 3.0)) * 3;
  return std::clamp(exponent, -12, 9);
}

std::string si_label(double value, double step, const std::string& unit,
                     int exponent) {
  if (!std::isfinite(value)) return fmt::format("{}", value);
  const bool unprefixed = is_unprefixed_unit(unit);
  int used_exponent = unprefixed ? 0 : std::clamp(exponent, -12, 9);
  used_exponent -= used_exponent % 3;  // only engineering exponents have prefixes
  const double scaled = scale_by_power_of_ten(value, -used_exponent);
  int decimals = 0;
  if (std::isfinite(step) && step != 0.0) {
    decimals = decimals_for(scale_by_power_of_ten(step, -used_exponent));
  } else {
    decimals = std::min(decimals_for(scaled), 6);
  }
  std::string text =
      strip_negative_zero(fmt::format("{:.{}f}", scaled, decimals));
  const std::string shown_unit = display_unit(unit);
  const std::string prefix = unprefixed ? "" : netlist::si_prefix(used_exponent);
  if (!prefix.empty() || !shown_unit.empty()) {
    text += ' ';
    text += prefix;
    text += shown_unit;
  }
  return text;
}

std::string si_label(double value, double step, const std::string& unit) {
  // A lone zero has no magnitude to pick a prefix or precision from.
  if (value == 0.0) return si_label(0.0, 1.0, unit, 0);
  return si_label(value, step, unit, axis_exponent({value}));
}

double AxisMap::to_pixel(double value) const {
  if (data_high == data_low) return 0.5 * (pixel_low + pixel_high);
  // std::lerp is exact at both ends, so axis corners land on whole pixels.
  return std::lerp(pixel_low, pixel_high,
                   (value - data_low) / (data_high - data_low));
}

std::string render_line_plot(const PlotSpec& spec) {
  const std::string id = sanitize_id(spec.id, spec.title, "plot-");
  const int width = std::max(spec.width, 160);
  const int height = std::max(spec.height, 120);
  const Range x = line_plot_x_extent(spec);
  const Range y = line_plot_y_extent(spec, x);
  const double estimated_plot_height = height - 34.0 - 60.0;
  const int y_target =
      std::max(3, static_cast<int>(estimated_plot_height / 45.0));
  const AxisTicks y_axis = inner_ticks(y.low, y.high, y_target, spec.y_unit);

  // Layout: left margin fits the widest y label, bottom the legend rows.
  PlotArea area;
  area.left = 8.0 + label_font + 8.0 + widest_label(y_axis) + 4.0 + tick_length;
  area.right = width - 28.0;
  area.top = 34.0;
  const std::vector<LegendEntry> entries =
      layout_legend(spec.series, area.right - area.left);
  const int legend_rows = entries.empty() ? 0 : entries.back().row + 1;
  area.bottom = height - (below_axis + legend_rows * 18.0 + 8.0);
  if (area.bottom < area.top + 20.0) area.bottom = area.top + 20.0;

  const AxisMap x_map{x.low, x.high, area.left, area.right};
  const AxisMap y_map{y.low, y.high, area.bottom, area.top};
  const int x_target = std::max(3, static_cast<int>(area.width() / 100.0));
  const AxisTicks x_axis = inner_ticks(x.low, x.high, x_target, spec.x_unit);

  std::string out;
  open_svg(out, id, width, height, spec.title);
  clip_definition(out, id, area);
  plot_background(out, area);
  shaded_bands(out, area, x_map, spec.bands);
  gridlines(out, area, x_axis, x_map, y_axis, y_map, true);
  clipped_content(out, id, spec, area, x_map, y_map);
  reference_labels(out, spec, area, y_map);
  vertical_markers(out, area, x_map, spec.markers);
  axes(out, area, x_axis, x_map, spec.x_label, y_axis, y_map, spec.y_label);
  text_element(out, area.left, 22.0, "start", title_font, text_colour,
               spec.title, " font-weight=\"600\"");
  legend(out, spec.series, entries, area);
  out += "</svg>\n";
  return out;
}

std::vector<double> histogram_edges(const std::vector<double>& values,
                                    int bins) {
  double low = std::numeric_limits<double>::infinity();
  double high = -std::numeric_limits<double>::infinity();
  std::size_t count = 0;
  for (double v : values) {
    if (!std::isfinite(v)) continue;
    low = std::min(low, v);
    high = std::max(high, v);
    ++count;
  }
  if (count == 0) {
    low = 0.0;
    high = 1.0;
  }
  if (bins <= 0) {
    // About sqrt(n) bins on round edges keeps bin boundaries readable.
    const int wanted = std::clamp(
        static_cast<int>(std::lround(std::sqrt(static_cast<double>(count)))), 5,
        40);
    return nice_ticks(low, high, wanted + 1);
  }
  if (low == high) {
    const double half = low != 0.0 ? std::abs(low) * 0.05 : 0.5;
    low -= half;
    high += half;
  }
  std::vector<double> edges;
  edges.reserve(static_cast<std::size_t>(bins) + 1);
  for (int i = 0; i <= bins; ++i) {
    edges.push_back(std::lerp(low, high, static_cast<double>(i) / bins));
  }
  return edges;
}

std::vector<int> histogram_counts(const std::vector<double>& values,
                                  const std::vector<double>& edges) {
  if (edges.size() < 2) return {};
  std::vector<int> counts(edges.size() - 1, 0);
  for (double v : values) {
    if (!std::isfinite(v) || v < edges.front() || v > edges.back()) continue;
    auto bin = static_cast<std::size_t>(
        std::upper_bound(edges.begin(), edges.end(), v) - edges.begin());
    bin = std::min(bin, counts.size());  // the top edge joins the last bin
    ++counts[bin - 1];
  }
  return counts;
}

std::string render_histogram(const HistogramSpec& spec) {
  const std::string id = sanitize_id(spec.id, spec.title, "hist-");
  const int width = std::max(spec.width, 160);
  const int height = std::max(spec.height, 120);
  const std::vector<double> edges = histogram_edges(spec.values, spec.bins);
  const std::vector<int> counts = histogram_counts(spec.values, edges);
  int largest = 0;
  long long total = 0;
  for (int c : counts) {
    largest = std::max(largest, c);
    total += c;
  }

  const Range x = histogram_x_extent(spec, edges);
  const CountAxis count = count_axis(largest, height);
  const AxisTicks& y_axis = count.ticks;

  PlotArea area;
  area.left = 8.0 + label_font + 8.0 + widest_label(y_axis) + 4.0 + tick_length;
  area.right = width - 28.0;
  area.top = 34.0;
  area.bottom = height - (tick_length + tick_font + 4.0 + label_font + 14.0);

  const AxisMap x_map{x.low, x.high, area.left, area.right};
  const AxisMap y_map{0.0, count.high, area.bottom, area.top};
  const int x_target = std::max(3, static_cast<int>(area.width() / 100.0));
  const AxisTicks x_axis = inner_ticks(x.low, x.high, x_target, spec.x_unit);

  std::string out;
  open_svg(out, id, width, height, spec.title);
  clip_definition(out, id, area);
  plot_background(out, area);
  shaded_bands(out, area, x_map, spec.bands);
  gridlines(out, area, x_axis, x_map, y_axis, y_map, false);
  histogram_bars(out, id, counts, edges, area, x_map, y_map);
  vertical_markers(out, area, x_map, spec.markers);
  axes(out, area, x_axis, x_map, spec.x_label, y_axis, y_map, "count");
  text_element(out, area.left, 22.0, "start", title_font, text_colour,
               spec.title, " font-weight=\"600\"");
  text_element(out, area.right, 22.0, "end", note_font, muted_text_colour,
               fmt::format("n = {}", total));
  out += "</svg>\n";
  return out;
}

}  // namespace linkrise::app
