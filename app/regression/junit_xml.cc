#include "app/regression/junit_xml.h"

#include <fmt/format.h>

#include "app/output/text_format.h"

namespace linkrise::app {

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
                     escape_xml(suite), cases.size(), failures, errors, total);
  out += fmt::format("  <testsuite name=\"{0}\" tests=\"{1}\" failures=\"{2}\" errors=\"{3}\" time=\"{4:.3f}\">\n",
                     escape_xml(suite), cases.size(), failures, errors, total);
  for (const auto& item : cases) {
    out += fmt::format("    <testcase classname=\"{}\" name=\"{}\" time=\"{:.3f}\"", escape_xml(suite),
                       escape_xml(item.name), item.seconds);
    if (!item.failed && !item.error) {
      out += "/>\n";
      continue;
    }
    out += ">\n";
    const char* tag = item.error ? "error" : "failure";
    out += fmt::format("      <{0} message=\"{1}\">{2}</{0}>\n", tag, escape_xml(item.message), escape_xml(item.detail));
    out += "    </testcase>\n";
  }
  out += "  </testsuite>\n</testsuites>\n";
  return out;
}

}  // namespace linkrise::app
