#pragma once
// Bad input is reported with its place in the case file, what is wrong and how to fix it.
#include <stdexcept>
#include <string>
#include <vector>

namespace linkrise::netlist {

/// A position in a case file (1-based line and column); line 0 means "no position known".
struct SourceMark {
  std::string file;
  int line = 0;
  int column = 0;
  std::string to_string() const;
};

/// Thrown while reading and validating a case. The CLI prints what() and exits with code 2.
class InputError : public std::runtime_error {
 public:
  InputError(SourceMark mark, const std::string& problem, const std::string& fix = "");
  const SourceMark& mark() const { return mark_; }
  const std::string& problem() const { return problem_; }
  const std::string& fix() const { return fix_; }

 private:
  SourceMark mark_;
  std::string problem_;
  std::string fix_;
};

/// The closest candidate by edit distance, or "" when none is close enough to be a likely typo.
std::string closest_match(const std::string& word, const std::vector<std::string>& candidates);
/// A fix hint: "did you mean '<closest>'?" when a candidate is close, otherwise `otherwise`.
std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates,
                         const std::string& otherwise);

}  // namespace linkrise::netlist
