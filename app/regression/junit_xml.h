#pragma once
// JUnit XML, the report format CI servers display: one <testcase> per stored case.
#include <string>
#include <vector>

namespace linkrise::app {

struct JunitCase {
  std::string name;
  double seconds = 0.0;
  bool failed = false;
  bool error = false;  // could not be evaluated (parse or solver error)
  std::string message;  // one line
  std::string detail;   // the comparison table or the error text
};

std::string junit_xml(const std::string& suite, const std::vector<JunitCase>& cases);

}  // namespace linkrise::app
