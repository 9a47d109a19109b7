#include "netlist/input_error.h"

#include <algorithm>
#include <cctype>

#include <fmt/format.h>

namespace linkrise::netlist {

std::string SourceMark::to_string() const {
  if (line <= 0) return file.empty() ? std::string("<input>") : file;
  return fmt::format("{}:{}:{}", file.empty() ? "<input>" : file, line, column);
}

static std::string compose(const SourceMark& mark, const std::string& problem, const std::string& fix) {
  std::string text = fmt::format("{}: error: {}", mark.to_string(), problem);
  if (!fix.empty()) text += fmt::format("\n  fix: {}", fix);
  return text;
}

InputError::InputError(SourceMark mark, const std::string& problem, const std::string& fix)
    : std::runtime_error(compose(mark, problem, fix)), mark_(std::move(mark)), problem_(problem), fix_(fix) {}

// Edits between two words, case ignored; swapping two neighbouring letters ("stpes") counts as one edit, as
// typing slips do (the optimal-string-alignment distance).
static std::size_t edit_distance(const std::string& a, const std::string& b) {
  const auto same = [](char x, char y) { return std::tolower(x) == std::tolower(y); };
  std::vector<std::vector<std::size_t>> d(a.size() + 1, std::vector<std::size_t>(b.size() + 1));
  for (std::size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
  for (std::size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    for (std::size_t j = 1; j <= b.size(); ++j) {
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (same(a[i - 1], b[j - 1]) ? 0 : 1)});
      if (i > 1 && j > 1 && same(a[i - 1], b[j - 2]) && same(a[i - 2], b[j - 1])) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[a.size()][b.size()];
}

std::string closest_match(const std::string& word, const std::vector<std::string>& candidates) {
  std::string best;
  std::size_t best_distance = 0;
  for (const auto& candidate : candidates) {
    std::size_t distance = edit_distance(word, candidate);
    if (best.empty() || distance < best_distance) {
      best = candidate;
      best_distance = distance;
    }
  }
  // A typo changes a few characters; more than a third of the word is a different word.
  std::size_t allowed = std::max<std::size_t>(2, word.size() / 3);
  return (!best.empty() && best_distance <= allowed) ? best : std::string();
}

std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates,
                         const std::string& otherwise) {
  std::string suggestion = closest_match(word, candidates);
  return suggestion.empty() ? otherwise : fmt::format("did you mean '{}'?", suggestion);
}

}  // namespace linkrise::netlist
