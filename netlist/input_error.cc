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

static std::size_t edit_distance(const std::string& a, const std::string& b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      std::size_t above = row[j];
      std::size_t cost = (std::tolower(a[i - 1]) == std::tolower(b[j - 1])) ? 0 : 1;
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + cost});
      diagonal = above;
    }
  }
  return row[b.size()];
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
