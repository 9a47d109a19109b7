#include "netlist/case_rewrite.h"

#include <algorithm>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "netlist/tree.h"

namespace linkrise::netlist {
namespace {

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) lines.push_back(line);
  return lines;
}

// Where the scalar `value` starts on its line: the occurrence nearest to the parser's column (which may count
// characters rather than bytes before it), quoted or plain. Returns {start, length} in bytes.
std::pair<std::size_t, std::size_t> locate(const std::string& line, const Tree& value) {
  const std::size_t column = value.mark.column > 0 ? static_cast<std::size_t>(value.mark.column - 1) : 0;
  std::size_t best = std::string::npos, best_length = 0, best_distance = std::string::npos;
  for (const std::string& form : {value.text, "\"" + value.text + "\"", "'" + value.text + "'"}) {
    for (std::size_t at = line.find(form); at != std::string::npos; at = line.find(form, at + 1)) {
      std::size_t distance = at > column ? at - column : column - at;
      if (distance < best_distance) {
        best = at;
        best_length = form.size();
        best_distance = distance;
      }
    }
  }
  return {best, best_length};
}

}  // namespace

std::string rewrite_case_values(const std::string& file, const std::vector<Override>& changes,
                                const std::string& heading) {
  std::ifstream in(file, std::ios::binary);
  std::stringstream buffer;
  buffer << in.rdbuf();
  std::vector<std::string> lines = lines_of(buffer.str());
  const Tree root = load_yaml_file(file);
  for (const auto& change : changes) {
    const Tree* value = find_value(root, change.path, change.mark);
    if (value == nullptr || !value->is_scalar() || value->mark.line < 1 ||
        value->mark.line > static_cast<int>(lines.size())) {
      throw InputError(change.mark, fmt::format("the case writes no value at '{}' to replace", change.path),
                       "write the parameter in the case (any value), so the fitted case can carry the fitted one");
    }
    std::string& line = lines[static_cast<std::size_t>(value->mark.line - 1)];
    auto [start, length] = locate(line, *value);
    if (start == std::string::npos) {
      throw InputError(value->mark, fmt::format("the value at '{}' spans several lines", change.path),
                       "write it on one line");
    }
    line.replace(start, length, change.value);
  }
  std::string text = heading;
  for (const auto& line : lines) text += line + "\n";
  return text;
}

}  // namespace linkrise::netlist
