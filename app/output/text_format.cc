#include "app/output/text_format.h"

#include <cmath>

#include <fmt/format.h>

#include "analysis/metrics.h"
#include "netlist/units.h"

namespace linkrise::app {

std::string escape_xml(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  std::size_t i = 0;
  while (i < text.size()) {
    const auto c = static_cast<unsigned char>(text[i]);
    if (c < 0x80) {
      switch (c) {
        case '&': out += "&amp;"; break;
        case '<': out += "&lt;"; break;
        case '>': out += "&gt;"; break;
        case '"': out += "&quot;"; break;
        case '\'': out += "&apos;"; break;
        default:
          // XML 1.0 forbids other C0 controls even as references.
          if (c >= 0x20 || c == '\t' || c == '\n' || c == '\r') out += text[i];
      }
      ++i;
      continue;
    }
    // Copy valid UTF-8 sequences; replace broken ones so parsers accept it.
    std::size_t length = 0;
    if ((c & 0xE0) == 0xC0 && c >= 0xC2) length = 2;
    else if ((c & 0xF0) == 0xE0) length = 3;
    else if ((c & 0xF8) == 0xF0 && c <= 0xF4) length = 4;
    bool valid = length > 0 && i + length <= text.size();
    for (std::size_t k = 1; valid && k < length; ++k) {
      valid = (static_cast<unsigned char>(text[i + k]) & 0xC0) == 0x80;
    }
    if (valid && length == 3) {
      const auto c1 = static_cast<unsigned char>(text[i + 1]);
      valid = !(c == 0xE0 && c1 < 0xA0) && !(c == 0xED && c1 >= 0xA0);
    } else if (valid && length == 4) {
      const auto c1 = static_cast<unsigned char>(text[i + 1]);
      valid = !(c == 0xF0 && c1 < 0x90) && !(c == 0xF4 && c1 >= 0x90);
    }
    if (valid) {
      out.append(text.substr(i, length));
      i += length;
    } else {
      out += "\uFFFD";
      ++i;
    }
  }
  return out;
}

std::string csv_quoted(const std::string& text) {
  std::string out = "\"";
  for (char c : text) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

std::string csv_text(const std::string& text) {
  bool plain = text.find_first_of(",\"\n") == std::string::npos;
  return plain ? text : csv_quoted(text);
}

std::string csv_number(double value) { return std::isnan(value) ? std::string() : fmt::format("{:.9g}", value); }

std::string display_unit(const std::string& unit) {
  if (unit == "degC") return "\u00B0C";
  return unit;
}

std::string display_si(double value, const std::string& unit) {
  if (!std::isfinite(value)) return "-";
  std::string text = netlist::format_si(value, unit);
  if (unit == "degC") text = text.substr(0, text.size() - unit.size()) + display_unit(unit);
  if (unit.empty() && !text.empty() && text.back() == ' ') text.pop_back();
  return text;
}

std::string display_metric(double value, const std::string& unit) {
  std::string text = analysis::format_metric(value, unit);
  const std::string suffix = " degC";
  if (text.size() > suffix.size() && text.compare(text.size() - suffix.size(), suffix.size(), suffix) == 0) {
    text.replace(text.size() - 4, 4, display_unit("degC"));
  }
  return text;
}

std::string display_seconds(double value) { return display_metric(value, "s"); }

}  // namespace linkrise::app
