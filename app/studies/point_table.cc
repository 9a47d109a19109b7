#include "app/studies/point_table.h"

#include <algorithm>
#include <cstring>
#include <limits>
#include <stdexcept>

#include <fmt/format.h>

namespace linkrise::app {
namespace {

// Bits, not ==: -0.0 and 0.0 print differently and NaN never equals itself.
std::uint64_t bits_of(double value) {
  std::uint64_t bits = 0;
  std::memcpy(&bits, &value, sizeof bits);
  return bits;
}

double value_of(std::uint64_t bits) {
  double value = 0.0;
  std::memcpy(&value, &bits, sizeof value);
  return value;
}

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

}  // namespace

void PointTable::resize(std::size_t count, std::size_t width) {
  width_ = width;
  records_.assign(count, Record{});
  outcomes_.clear();
  messages_.clear();
  constant_.assign(width, 0);
  constant_set_.assign(width, false);
  dictionary_.assign(width, {});
  codes_.assign(width, {});
  dense_.assign(width, {});
  form_.assign(width, Form::Constant);
  stored_end_ = 0;
  // Every column's storage is reserved here, before a study's workers start: allocated inside the pool, a
  // column would sit between the freed temporaries of an evaluation and the heap would grow around it
  // (about 0.7 kB per sample before this table). Reserved pages that are never written (the constant
  // columns' doubles) are not resident: the capacity costs address space only.
  for (std::size_t c = 0; c < width; ++c) {
    dense_[c].reserve(count);
    codes_[c].reserve(count);
  }
}

std::uint32_t PointTable::outcome_index(const std::string& outcome) {
  auto it = std::find(outcomes_.begin(), outcomes_.end(), outcome);
  if (it != outcomes_.end()) return static_cast<std::uint32_t>(it - outcomes_.begin());
  outcomes_.push_back(outcome);
  return static_cast<std::uint32_t>(outcomes_.size() - 1);
}

// Every point stored so far has the constant: code 0 (points not stored yet get theirs when they are). The codes
// reach only as far as the points stored: most columns turn dense after a few hundred points, and codes written
// for every point first would leave 100 kB per column of resident, freed heap (measured +4.6 MB at 100 000).
void PointTable::make_coded(std::size_t column) {
  dictionary_[column] = {constant_[column]};
  codes_[column].assign(stored_end_, 0);
  form_[column] = Form::Coded;
}

void PointTable::make_dense(std::size_t column) {
  std::vector<double>& values = dense_[column];
  values.assign(records_.size(), kNaN);
  for (std::size_t i = 0; i < records_.size(); ++i) {
    // The point being stored has no code yet (it may lie past the codes); its value follows.
    if (i < codes_[column].size() && records_[i].stored && records_[i].has_values) {
      values[i] = value_of(dictionary_[column][codes_[column][i]]);
    }
  }
  codes_[column] = {};
  dictionary_[column] = {};
  form_[column] = Form::Dense;
}

void PointTable::set_value(std::size_t i, std::size_t column, double value) {
  if (form_[column] == Form::Dense) {
    dense_[column][i] = value;
    return;
  }
  const std::uint64_t bits = bits_of(value);
  if (form_[column] == Form::Constant) {
    if (!constant_set_[column]) {
      constant_[column] = bits;
      constant_set_[column] = true;
      return;
    }
    if (constant_[column] == bits) return;
    make_coded(column);
  }
  std::vector<std::uint64_t>& dictionary = dictionary_[column];
  auto known = std::find(dictionary.begin(), dictionary.end(), bits);
  if (known == dictionary.end() && dictionary.size() < 256) known = dictionary.insert(dictionary.end(), bits);
  if (known != dictionary.end()) {
    if (codes_[column].size() <= i) codes_[column].resize(i + 1, 0);
    codes_[column][i] = static_cast<std::uint8_t>(known - dictionary.begin());
    return;
  }
  make_dense(column);
  dense_[column][i] = value;
}

void PointTable::check_width(const PointResult& point) const {
  if (!point.values.empty() && point.values.size() != width_) {
    throw std::invalid_argument(fmt::format("a point has {} values for {} columns", point.values.size(), width_));
  }
}

void PointTable::store(std::size_t i, const PointResult& point) {
  check_width(point);
  Record& record = records_.at(i);
  record.status = static_cast<std::uint8_t>(point.status);
  record.verdict = static_cast<std::uint8_t>(point.verdict);
  record.outcome = outcome_index(point.outcome);
  record.has_values = !point.values.empty();
  record.stored = true;
  stored_end_ = std::max(stored_end_, i + 1);
  auto message = std::lower_bound(messages_.begin(), messages_.end(), i,
                                  [](const auto& entry, std::size_t index) { return entry.first < index; });
  const bool had = message != messages_.end() && message->first == i;
  if (!point.message.empty()) {
    if (had) {
      message->second = point.message;
    } else {
      messages_.insert(message, {i, point.message});
    }
  } else if (had) {
    messages_.erase(message);
  }
  for (std::size_t c = 0; record.has_values && c < width_; ++c) set_value(i, c, point.values[c]);
}

void PointTable::push_back(const PointResult& point) {
  if (records_.empty() && width_ == 0) resize(0, point.values.size());
  check_width(point);  // before the table grows: a rejected point leaves it as it was
  records_.emplace_back();
  for (auto& values : dense_) {
    if (!values.empty()) values.push_back(kNaN);
  }
  store(records_.size() - 1, point);
}

double PointTable::value(std::size_t i, std::size_t column) const {
  const Record& record = records_[i];
  if (!record.has_values) return kNaN;
  switch (form_[column]) {
    case Form::Dense: return dense_[column][i];
    case Form::Coded: return value_of(dictionary_[column][codes_[column][i]]);
    case Form::Constant: break;
  }
  return value_of(constant_[column]);
}

PointResult PointTable::operator[](std::size_t i) const {
  const Record& record = records_[i];
  PointResult point;
  if (!record.stored) return point;
  point.status = static_cast<CaseEvaluation::Status>(record.status);
  point.verdict = static_cast<analysis::Verdict>(record.verdict);
  point.outcome = outcomes_[record.outcome];
  auto message = std::lower_bound(messages_.begin(), messages_.end(), i,
                                  [](const auto& entry, std::size_t index) { return entry.first < index; });
  if (message != messages_.end() && message->first == i) point.message = message->second;
  if (record.has_values) {
    point.values.resize(width_);
    for (std::size_t c = 0; c < width_; ++c) point.values[c] = value(i, c);
  }
  return point;
}

PointResult PointTable::at(std::size_t i) const {
  if (i >= records_.size()) throw std::out_of_range(fmt::format("point {} of {}", i, records_.size()));
  return (*this)[i];
}

std::size_t PointTable::constant_columns() const {
  return static_cast<std::size_t>(std::count(form_.begin(), form_.end(), Form::Constant));
}

std::size_t PointTable::coded_columns() const {
  return static_cast<std::size_t>(std::count(form_.begin(), form_.end(), Form::Coded));
}

}  // namespace linkrise::app
