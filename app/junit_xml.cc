#include "app/junit_xml.h"

#include <fmt/format.h>

#include "app/svg_plot.h"

namespace linkrise::app {

std::string xml_escape(const std::string& text) { return escape_xml(text); }

std::string junit_xml(const std::string& suite, const std::vector<JunitCase>& cases) {
  int failures = 0, errors = 0;
  double total = 0.0;
  for (const auto& item : cases) {
    failures += item.failed && !item.error ? 1 : 0;
    errors += item.error ? 1 : 0;
    total += item.seconds;
  }
  std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  out += fmt::format("<testsuites name=\"{0}\" tests=\"{1}\" failures=\"{2}\" errors=\"{3}\" time=\"{4:.3f}\">\n",
                     xml_escape(suite), cases.size(), failures, errors, total);
  out += fmt::format("  <testsuite name=\"{0}\" tests=\"{1}\" failures=\"{2}\" errors=\"{3}\" time=\"{4:.3f}\">\n",
                     xml_escape(suite), cases.size(), failures, errors, total);
  for (const auto& item : cases) {
    out += fmt::format("    <testcase classname=\"{}\" name=\"{}\" time=\"{:.3f}\"", xml_escape(suite),
                       xml_escape(item.name), item.seconds);
    if (!item.failed && !item.error) {
      out += "/>\n";
      continue;
    }
    out += ">\n";
    const char* tag = item.error ? "error" : "failure";
    out += fmt::format("      <{0} message=\"{1}\">{2}</{0}>\n", tag, xml_escape(item.message), xml_escape(item.detail));
    out += "    </testcase>\n";
  }
  out += "  </testsuite>\n</testsuites>\n";
  return out;
}

}  // namespace linkrise::app
