#pragma once
// Text helpers shared by every writer: XML escaping (HTML reports, SVG plots, JUnit XML), CSV cells, and units as
// people read them.
#include <string>
#include <string_view>

namespace linkrise::app {

/// Escape & < > " ' for XML text and attributes; drops control characters
/// that XML 1.0 forbids so the SVG always parses.
std::string escape_xml(std::string_view text);

/// CSV cells: text quoted only where it needs to be (a comma, quote or line break), text always quoted, and a
/// number (9 significant digits, empty for NaN).
std::string csv_text(const std::string& text);
std::string csv_quoted(const std::string& text);
std::string csv_number(double value);

/// Unit text as displayed: "degC" becomes "°C", others unchanged.
std::string display_unit(const std::string& unit);

/// A metric value for the reports: as the analyser prints it (analysis::format_metric; "-" when not reached),
/// with "°C" for degC.
std::string display_metric(double value, const std::string& unit);

/// A time as display_metric prints it, e.g. "12.5 ms".
std::string display_seconds(double value);

/// A quantity for the reports: SI prefix and unit (netlist::format_si), "°C" for degC, "-" when not finite.
std::string display_si(double value, const std::string& unit);

}  // namespace linkrise::app
