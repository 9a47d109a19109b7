#include "netlist/parameter_reader.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <stdexcept>

#include <fmt/format.h>

namespace linkrise::netlist {

namespace {
std::string example_for(const Dimension& dimension) {
  if (dimension == Dimension::resistance()) return "'47 Ohm' or '4.7 kOhm'";
  if (dimension == Dimension::capacitance()) return "'1.2 mF' or '470 uF'";
  if (dimension == Dimension::inductance()) return "'2 uH'";
  if (dimension == Dimension::voltage()) return "'800 V'";
  if (dimension == Dimension::current()) return "'12 A'";
  if (dimension == Dimension::power_()) return "'3 kW'";
  if (dimension == Dimension::time()) return "'10 ms'";
  if (dimension == Dimension::temperature()) return "'25 degC' or '298.15 K'";
  if (dimension == Dimension::energy()) return "'80 J'";
  if (dimension == Dimension::charge()) return "'50 Ah'";
  if (dimension == Dimension::heat_capacity()) return "'12 J/K'";
  if (dimension == Dimension::thermal_resistance()) return "'4 K/W'";
  if (dimension == Dimension::per_kelvin()) return "'200 ppm/K' or '15 %/K'";
  if (dimension == Dimension::none()) return "'95 %' or '0.95'";
  if (dimension == Dimension::length()) return "'2.5 m' or '20 mm'";
  if (dimension == Dimension::area()) return "'35 mm²' or '35 mm^2'";
  return "a number with a unit of " + dimension.describe();
}
// The first example alone, without its quotes ("800 V"), for a line to add.
std::string first_example(const Dimension& dimension) {
  std::string examples = example_for(dimension);
  std::size_t open = examples.find('\'');
  std::size_t close = open == std::string::npos ? open : examples.find('\'', open + 1);
  return close == std::string::npos ? "<value>" : examples.substr(open + 1, close - open - 1);
}
}  // namespace

bool is_percent_key(std::string_view key) {
  return key == "initial_soc" || key == "ratio" || key == "above" || key == "margin" || key == "quantile" ||
         key == "pulse_derating" || key == "gain" || key == "below";
}

bool is_percent_path(std::string_view path) {
  const std::size_t dot = path.rfind('.');
  return is_percent_key(dot == std::string_view::npos ? path : path.substr(dot + 1));
}

namespace {
// A fraction read under a key the percent rule does not know would be shown as a plain number.
void check_fraction_key(const std::string& key, Bound bound) {
  if (bound == Bound::Fraction && !is_percent_key(key)) {
    throw std::logic_error(fmt::format("'{}' is read as a fraction but is_percent_key() does not name it", key));
  }
}
}  // namespace

ParameterReader::ParameterReader(const Tree& block, std::string owner) : block_(&block), owner_(std::move(owner)) {
  if (!block_->is_map() && block_->kind != Tree::Kind::Null) {
    throw InputError(block_->mark, fmt::format("{} must be a block of 'key: value' lines", owner_),
                     "indent the parameters under the name of the block");
  }
}

double ParameterReader::read_value(const Tree& node, const Dimension& dimension, Bound bound,
                                   const std::string& what) {
  if (!node.is_scalar()) {
    throw InputError(node.mark, fmt::format("{} must be a single value", what),
                     fmt::format("write a value such as {}", example_for(dimension)));
  }
  std::string problem;
  auto quantity = parse_quantity(node.text, problem);
  if (!quantity) {
    throw InputError(node.mark, fmt::format("{}: '{}' is not a valid quantity ({})", what, node.text, problem),
                     fmt::format("write a value such as {}", example_for(dimension)));
  }
  if (!quantity->bare && !(quantity->dimension == dimension)) {
    throw InputError(node.mark,
                     fmt::format("{}: '{}' is {}, but {} is needed", what, node.text,
                                 quantity->dimension.describe(), dimension.describe()),
                     fmt::format("write a value such as {}", example_for(dimension)));
  }
  double value = quantity->value;
  if (dimension == Dimension::temperature() && quantity->bare && value < 150.0) {
    throw InputError(node.mark,
                     fmt::format("{}: a bare number is read as kelvin, and {} K is implausibly cold", what, value),
                     fmt::format("write '{} degC' or give kelvin explicitly", node.text));
  }
  switch (bound) {
    case Bound::Any:
      break;
    case Bound::Positive:
      if (!(value > 0.0)) {
        throw InputError(node.mark, fmt::format("{}: '{}' must be greater than zero", what, node.text),
                         dimension.symbol().empty() ? std::string("write a value greater than zero")
                                                    : fmt::format("write a value greater than zero, in {}", dimension.symbol()));
      }
      break;
    case Bound::NonNegative:
      if (!(value >= 0.0)) {
        throw InputError(node.mark, fmt::format("{}: '{}' must not be negative", what, node.text),
                         "write zero or a positive value");
      }
      break;
    case Bound::Fraction:
      if (!(value >= 0.0 && value <= 1.0)) {
        throw InputError(node.mark, fmt::format("{}: '{}' must lie between 0 % and 100 %", what, node.text),
                         "write a percentage such as '95 %' or a fraction such as 0.95");
      }
      break;
  }
  return value;
}

double ParameterReader::required(const std::string& key, const Dimension& dimension, Bound bound) {
  check_fraction_key(key, bound);
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) {
    reject_misspelling(key);
    throw InputError(block_->mark, fmt::format("{} needs the parameter '{}' ({})", owner_, key, dimension.describe()),
                     fmt::format("add a line such as '{}: {}'", key, first_example(dimension)));
  }
  return read_value(*node, dimension, bound, fmt::format("{} parameter '{}'", owner_, key));
}

void ParameterReader::reject_misspelling(const std::string& key) const {
  // A misspelt key ("resistence") is the likelier cause of a missing one: name it, with the did-you-mean, at
  // its own place.
  for (std::size_t i = 0; i < block_->entries.size(); ++i) {
    const std::string& given = block_->entries[i].first;
    if (std::find(known_.begin(), known_.end(), given) != known_.end()) continue;
    if (closest_match(given, {key}) != key) continue;
    throw InputError(i < block_->key_marks.size() ? block_->key_marks[i] : block_->mark,
                     fmt::format("{} has no parameter '{}'", owner_, given), fmt::format("did you mean '{}'?", key));
  }
}

double ParameterReader::quantity(const std::string& key, const Dimension& dimension, Bound bound, double fallback) {
  auto value = optional(key, dimension, bound);
  return value ? *value : fallback;
}

std::optional<double> ParameterReader::optional(const std::string& key, const Dimension& dimension, Bound bound) {
  check_fraction_key(key, bound);
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return std::nullopt;
  return read_value(*node, dimension, bound, fmt::format("{} parameter '{}'", owner_, key));
}

std::string ParameterReader::word(const std::string& key, const std::vector<std::string>& allowed,
                                  const std::string& fallback) {
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return fallback;
  std::string list;
  for (const auto& option : allowed) list += (list.empty() ? "" : ", ") + option;
  if (!node->is_scalar() || std::find(allowed.begin(), allowed.end(), node->text) == allowed.end()) {
    std::string suggestion = node->is_scalar() ? closest_match(node->text, allowed) : "";
    throw InputError(node->mark,
                     fmt::format("{} parameter '{}': '{}' is not one of: {}", owner_, key, node->text, list),
                     suggestion.empty() ? fmt::format("write one of: {}", list)
                                        : fmt::format("did you mean '{}'?", suggestion));
  }
  return node->text;
}

int ParameterReader::count(const std::string& key, int fallback, int minimum) {
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return fallback;
  int value = 0;
  const std::string& text = node->text;
  auto result = std::from_chars(text.data(), text.data() + text.size(), value);
  if (result.ec == std::errc::result_out_of_range) {
    throw InputError(node->mark,
                     fmt::format("{} parameter '{}': '{}' is too large for a count (at most {})", owner_, key, text,
                                 std::numeric_limits<int>::max()),
                     "write a smaller whole number");
  }
  if (!node->is_scalar() || result.ec != std::errc() || result.ptr != text.data() + text.size() || value < minimum) {
    char* end = nullptr;
    double number = node->is_scalar() ? std::strtod(text.c_str(), &end) : 0.0;
    if (node->is_scalar() && end == text.c_str() + text.size() && number > std::numeric_limits<int>::max()) {
      throw InputError(node->mark,
                       fmt::format("{} parameter '{}': '{}' is too large for a count (at most {})", owner_, key,
                                   text, std::numeric_limits<int>::max()),
                       "write a smaller whole number");
    }
    throw InputError(node->mark,
                     fmt::format("{} parameter '{}': '{}' must be a whole number of at least {}", owner_, key,
                                 text, minimum),
                     fmt::format("write a whole number such as {}", std::max(minimum, 1)));
  }
  return value;
}

std::optional<std::string> ParameterReader::text(const std::string& key) {
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return std::nullopt;
  if (!node->is_scalar()) {
    throw InputError(node->mark, fmt::format("{} parameter '{}' must be a single text value", owner_, key),
                     fmt::format("write it on one line, e.g. '{}: <text>'", key));
  }
  return node->text;
}

std::vector<std::vector<double>> ParameterReader::table(const std::string& key,
                                                        const std::vector<Dimension>& columns) {
  known_.push_back(key);
  std::vector<std::vector<double>> rows;
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return rows;
  if (!node->is_list() || node->items.empty()) {
    throw InputError(node->mark, fmt::format("{} parameter '{}' must be a list of rows", owner_, key),
                     fmt::format("write rows such as '- [{}]'", columns.size() == 2 ? "0.5, 3.7 V" : "..."));
  }
  for (std::size_t r = 0; r < node->items.size(); ++r) {
    const Tree& row = node->items[r];
    if (!row.is_list() || row.items.size() != columns.size()) {
      throw InputError(row.mark,
                       fmt::format("{} parameter '{}' row {} must have {} values", owner_, key, r + 1, columns.size()),
                       "write each row as a bracketed list, e.g. '- [20 %, 3.6 V]'");
    }
    std::vector<double> values;
    for (std::size_t c = 0; c < columns.size(); ++c) {
      values.push_back(read_value(row.items[c], columns[c], Bound::Any,
                                  fmt::format("{} parameter '{}' row {} column {}", owner_, key, r + 1, c + 1)));
    }
    rows.push_back(std::move(values));
  }
  return rows;
}

double ParameterReader::read_text(const std::string& text, const SourceMark& mark, const Dimension& dimension,
                                  Bound bound, const std::string& what) {
  return read_value(Tree::scalar(text, mark), dimension, bound, what);
}

std::optional<ParameterReader> ParameterReader::block(const std::string& key) {
  const Tree* node = child(key);
  if (node == nullptr) return std::nullopt;
  return ParameterReader(*node, fmt::format("{} block '{}'", owner_, key));
}

std::vector<ParameterReader> ParameterReader::blocks(const std::string& key, const std::string& item, std::size_t most,
                                                     const std::string& problem, const std::string& fix) {
  std::vector<ParameterReader> items;
  const Tree* node = child(key);
  if (node == nullptr) return items;
  if (!node->is_list() || node->items.size() > most) fail(key, problem, fix);
  for (std::size_t i = 0; i < node->items.size(); ++i) {
    items.emplace_back(node->items[i], fmt::format("{} {} {}", owner_, item, i + 1));
  }
  return items;
}

bool ParameterReader::is_word(const std::string& key, const std::string& word) const {
  const Tree* node = block_->find(key);
  return node != nullptr && node->is_scalar() && node->text == word;
}

const Tree* ParameterReader::child(const std::string& key) {
  known_.push_back(key);
  const Tree* node = block_->find(key);
  if (node == nullptr || node->kind == Tree::Kind::Null) return nullptr;
  return node;
}

bool ParameterReader::has(const std::string& key) const {
  const Tree* node = block_->find(key);
  return node != nullptr && node->kind != Tree::Kind::Null;
}

void ParameterReader::accept(const std::string& key) { known_.push_back(key); }

SourceMark ParameterReader::mark(const std::string& key) const {
  const Tree* node = block_->find(key);
  return node != nullptr ? node->mark : block_->mark;
}

void ParameterReader::fail(const std::string& key, const std::string& problem, const std::string& fix) const {
  throw InputError(mark(key), fmt::format("{} parameter '{}': {}", owner_, key, problem), fix);
}

void ParameterReader::finish() const {
  for (std::size_t i = 0; i < block_->entries.size(); ++i) {
    const std::string& key = block_->entries[i].first;
    if (std::find(known_.begin(), known_.end(), key) != known_.end()) continue;
    SourceMark where = i < block_->key_marks.size() ? block_->key_marks[i] : block_->mark;
    std::vector<std::string> sorted = known_;
    std::sort(sorted.begin(), sorted.end());
    sorted.erase(std::unique(sorted.begin(), sorted.end()), sorted.end());
    std::string list;
    for (const auto& name : sorted) list += (list.empty() ? "" : ", ") + name;
    throw InputError(where, fmt::format("{} has no parameter '{}'", owner_, key),
                     did_you_mean(key, known_, fmt::format("known parameters: {}", list)));
  }
}

}  // namespace linkrise::netlist
