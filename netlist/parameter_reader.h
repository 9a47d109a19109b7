#pragma once
// Typed, validated access to one block of a case file (a part's parameters, the run block...).
// Every key a reader is asked about is remembered, so finish() can name unknown keys with a did-you-mean.
#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::netlist {

/// The range rule a numeric parameter must satisfy. Fraction: 0 … 1, a fraction of a whole; only the keys that
/// is_percent_key() names may be read so.
enum class Bound { Any, Positive, NonNegative, Fraction };

/// The keys whose values are fractions of a whole: a cell string's `initial_soc`, the closing rule's `ratio`,
/// the rise and closure checks' `above`, the weld check's `below`, a limit's `margin`, the sizing spread's
/// `quantile`, a fuse's `pulse_derating` and a voltage sensor's `gain`. The case may write them as '95 %' or
/// 0.95; every output
/// people read shows them in % (netlist::shown_unit), while the program holds them as fractions.
bool is_percent_key(std::string_view key);
/// The same for a parameter path ("pack.initial_soc", "sequence.close_when.ratio"): by its last key.
bool is_percent_path(std::string_view path);

class ParameterReader {
 public:
  /// `owner` names the block in messages, e.g. "part 'r_pre'".
  ParameterReader(const Tree& block, std::string owner);

  /// A required quantity of the given dimension.
  double required(const std::string& key, const Dimension& dimension, Bound bound = Bound::Any);
  /// An optional quantity with a default (the default is not checked against the bound).
  double quantity(const std::string& key, const Dimension& dimension, Bound bound, double fallback);
  /// An optional quantity without a default.
  std::optional<double> optional(const std::string& key, const Dimension& dimension, Bound bound = Bound::Any);
  /// A word from a fixed set.
  std::string word(const std::string& key, const std::vector<std::string>& allowed, const std::string& fallback);
  /// A non-negative whole number.
  int count(const std::string& key, int fallback, int minimum = 0);
  /// A plain string (names, titles).
  std::optional<std::string> text(const std::string& key);
  /// A table: a list of rows, each a list of quantities with the given column dimensions.
  std::vector<std::vector<double>> table(const std::string& key, const std::vector<Dimension>& columns);
  /// A nested block read by its own reader (owner "<this owner> block '<key>'"); std::nullopt when absent.
  std::optional<ParameterReader> block(const std::string& key);
  /// A list of at most `most` blocks, each read by its own reader (owner "<this owner> <item> <n>"); empty when
  /// absent. A value that is no list, or a longer one, fails with `problem` and `fix`.
  std::vector<ParameterReader> blocks(const std::string& key, const std::string& item, std::size_t most,
                                      const std::string& problem, const std::string& fix);
  /// True when the key holds exactly this word (e.g. `adiabatic` in place of a quantity).
  bool is_word(const std::string& key, const std::string& word) const;
  /// The raw node (map, list or scalar) for readers inside netlist/; nullptr when absent.
  const Tree* child(const std::string& key);
  bool has(const std::string& key) const;
  /// Marks a key as known without reading it (it is read elsewhere).
  void accept(const std::string& key);

  SourceMark mark(const std::string& key) const;
  const std::string& owner() const { return owner_; }
  /// Throws InputError at a key not asked about that looks like a misspelling of `key` (call when `key` is
  /// missing: the misspelt key is the likelier cause).
  void reject_misspelling(const std::string& key) const;
  [[noreturn]] void fail(const std::string& key, const std::string& problem, const std::string& fix = "") const;
  /// Throws InputError for the first key nobody asked about, suggesting the closest known key.
  void finish() const;

  /// Parses one scalar node as a quantity of `dimension` and checks `bound`; `what` names it in messages.
  static double read_value(const Tree& node, const Dimension& dimension, Bound bound, const std::string& what);
  /// The same for a value given as text (a command-line option), placed at `mark` in messages.
  static double read_text(const std::string& text, const SourceMark& mark, const Dimension& dimension, Bound bound,
                          const std::string& what);

 private:
  const Tree* block_;
  std::string owner_;
  std::vector<std::string> known_;
};

}  // namespace linkrise::netlist
