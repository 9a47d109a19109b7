// The layering rules of the design card (DEVELOPERS.md), checked on the source tree: the input tree is read in
// netlist/ only, and part kinds are compared in models/ only (later layers ask a part's role and facts).
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

namespace {
namespace fs = std::filesystem;

// Every line of the .h/.cc files under the given folders that matches `pattern`, as "file:line: text".
std::vector<std::string> matches(const std::vector<std::string>& folders, const std::regex& pattern) {
  std::vector<std::string> found;
  for (const auto& folder : folders) {
    for (const auto& entry : fs::recursive_directory_iterator(fs::path(LINKRISE_SOURCE_DIR) / folder)) {
      const auto extension = entry.path().extension();
      if (!entry.is_regular_file() || (extension != ".cc" && extension != ".h")) continue;
      std::ifstream in(entry.path());
      std::string line;
      for (int number = 1; std::getline(in, line); ++number) {
        if (std::regex_search(line, pattern)) {
          found.push_back(entry.path().string() + ":" + std::to_string(number) + ": " + line);
        }
      }
    }
  }
  return found;
}

std::string listed(const std::vector<std::string>& lines) {
  std::string text;
  for (const auto& line : lines) text += line + "\n";
  return text;
}
}  // namespace

TEST(Architecture, OnlyNetlistReadsTheInputTree) {
  const std::regex tree(R"(netlist/tree\.h|netlist::Tree\b|load_yaml_file|parse_yaml)");
  const auto found = matches({"models", "solver", "analysis", "app"}, tree);
  EXPECT_TRUE(found.empty()) << listed(found);
}

TEST(Architecture, OnlyModelsCompareKindWords) {
  // A comparison of a part's kind with a word, e.g. `part.kind() == "contactor"` or `spec.kind != "resistor"`.
  const std::regex comparison(R"(kind(\(\))?\s*[!=]=\s*")");
  const auto found = matches({"netlist", "solver", "analysis", "app"}, comparison);
  EXPECT_TRUE(found.empty()) << listed(found);
}

TEST(Architecture, TheCheckFindsWhatItLooksFor) {
  // The patterns above match the forms they must catch (so an empty result means something).
  EXPECT_TRUE(std::regex_search(std::string("if (part.kind() == \"contactor\")"), std::regex(R"(kind(\(\))?\s*[!=]=\s*")")));
  EXPECT_TRUE(std::regex_search(std::string("#include \"netlist/tree.h\""), std::regex(R"(netlist/tree\.h)")));
  // The scanner reads the tree: netlist/ itself includes its tree header.
  EXPECT_FALSE(matches({"netlist"}, std::regex(R"(netlist/tree\.h)")).empty());
}
