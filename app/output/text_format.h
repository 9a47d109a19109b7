#pragma once
// Text helpers shared by every writer: XML escaping (HTML reports, SVG plots, JUnit XML), CSV cells, and units as
// people read them.
#include <string>
#include <string_view>

namespace linkrise::app {

/// Escape & < > " ' for XML text and attributes; drops control characters
/// that XML 1.0 forbids so the SVG always parses.
std::string escape_xml(std::string_view text);

/// CSV helpers: a quoted text cell and a number cell (9 significant digits, empty for NaN).
std::string csv_text(const std::string& text);
std::string csv_number(double value);

/// Unit text as displayed: "degC" becomes "°C", others unchanged.
std::string display_unit(const std::string& unit);

}  // namespace linkrise::app
