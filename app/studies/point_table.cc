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

PointTable::PointTable(std::size_t memory_points, std::size_t block_points)
    : memory_points_(memory_points), block_points_(std::max<std::size_t>(block_points, 1)) {}

void PointTable::resize(std::size_t count, std::size_t width) {
  width_ = width;
  records_.assign(count, Record{});
  outcomes_.clear();
  messages_.clear();
  constant_.assign(width, 0);
  constant_set_.assign(width, false);
  dictionary_.assign(width, {});
  codes_.assign(width, {});
  form_.assign(width, Form::Constant);
  stored_end_ = 0;
  blocks_.assign((count + block_points_ - 1) / block_points_, Block{});
  spare_rows_.clear();
  chunk_.assign(block_points_, kNaN);
  cached_.assign(width, Chunk{});
  // Storage is reserved here, before a study's workers start: allocated inside the pool, it would sit between
  // the freed temporaries of an evaluation and the heap would grow around it (about 0.7 kB per sample before
  // this table). Reserved pages that are never written are not resident: the capacity costs address space only.
  // A table that spills needs buffers for the blocks open at once (two while the workers straddle a block's
  // end); they pass from block to block.
  for (std::size_t c = 0; c < width; ++c) codes_[c].reserve(count);
  if (count <= memory_points_) {
    for (std::size_t b = 0; b < blocks_.size(); ++b) blocks_[b].rows.reserve(points_in(b) * width);
  } else {
    spare_rows_.resize(2);
    for (auto& rows : spare_rows_) rows.reserve(block_points_ * width);
  }
}

std::size_t PointTable::points_in(std::size_t block) const {
  return std::min(block_points_, records_.size() - block * block_points_);
}

void PointTable::ensure_rows(std::size_t block) {
  std::vector<double>& rows = blocks_[block].rows;
  if (!rows.empty() || width_ == 0) return;
  if (rows.capacity() == 0 && !spare_rows_.empty()) {
    rows = std::move(spare_rows_.back());
    spare_rows_.pop_back();
  }
  rows.assign(points_in(block) * width_, kNaN);
}

// Column after column, the block's values in point order: a column is read back a block at a time.
std::uint64_t PointTable::file_offset(std::size_t block, std::size_t column) const {
  return (static_cast<std::uint64_t>(block) * width_ + column) * block_points_ * sizeof(double);
}

void PointTable::write_chunk(std::size_t block, std::size_t column) {
  if (!file_) file_ = std::make_unique<TemporaryFile>();
  file_->write(file_offset(block, column), chunk_.data(), block_points_ * sizeof(double));
  if (cached_[column].block == block) cached_[column].block = Chunk{}.block;
}

// A complete block of a table that spills goes to the file, and its buffer to the next block.
void PointTable::flush_if_complete(std::size_t block) {
  Block& entry = blocks_[block];
  if (records_.size() <= memory_points_ || entry.in_file || points_in(block) != block_points_ ||
      entry.stored != block_points_) {
    return;
  }
  ensure_rows(block);
  for (std::size_t c = 0; c < width_; ++c) {
    if (form_[c] != Form::Dense) continue;
    for (std::size_t k = 0; k < block_points_; ++k) chunk_[k] = entry.rows[k * width_ + c];
    write_chunk(block, c);
  }
  entry.rows.clear();
  spare_rows_.push_back(std::exchange(entry.rows, {}));
  entry.in_file = true;
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

double PointTable::coded_value(std::size_t i, std::size_t column) const {
  // The point being stored has no code yet (it may lie past the codes); its value follows.
  const bool coded = i < codes_[column].size() && records_[i].stored && records_[i].has_values;
  return coded ? value_of(dictionary_[column][codes_[column][i]]) : kNaN;
}

// The values coded so far take their places in the blocks, in memory or in the file.
void PointTable::make_dense(std::size_t column) {
  for (std::size_t b = 0; b < blocks_.size(); ++b) {
    if (blocks_[b].stored == 0) continue;
    const std::size_t first = b * block_points_;
    if (blocks_[b].in_file) {
      for (std::size_t k = 0; k < block_points_; ++k) chunk_[k] = coded_value(first + k, column);
      write_chunk(b, column);
      continue;
    }
    ensure_rows(b);
    for (std::size_t k = 0; k < points_in(b); ++k) blocks_[b].rows[k * width_ + column] = coded_value(first + k, column);
  }
  codes_[column] = {};
  dictionary_[column] = {};
  form_[column] = Form::Dense;
}

void PointTable::set_dense(std::size_t i, std::size_t column, double value) {
  const std::size_t block = i / block_points_;
  const std::size_t k = i - block * block_points_;
  if (!blocks_[block].in_file) {
    ensure_rows(block);
    blocks_[block].rows[k * width_ + column] = value;
    return;
  }
  // A point stored again after its block went to the file.
  if (!file_) file_ = std::make_unique<TemporaryFile>();
  file_->write(file_offset(block, column) + k * sizeof(double), &value, sizeof value);
  if (cached_[column].block == block) cached_[column].values[k] = value;
}

double PointTable::dense_value(std::size_t i, std::size_t column) const {
  const std::size_t block = i / block_points_;
  const std::size_t k = i - block * block_points_;
  if (!blocks_[block].in_file) return blocks_[block].rows[k * width_ + column];
  Chunk& chunk = cached_[column];
  if (chunk.block != block) {
    chunk.values.resize(block_points_);
    chunk.block = Chunk{}.block;  // not valid until read whole
    file_->read(file_offset(block, column), chunk.values.data(), block_points_ * sizeof(double));
    chunk.block = block;
  }
  return chunk.values[k];
}

void PointTable::set_value(std::size_t i, std::size_t column, double value) {
  if (form_[column] == Form::Dense) {
    set_dense(i, column, value);
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
  set_dense(i, column, value);
}

void PointTable::check_width(const PointResult& point) const {
  if (!point.values.empty() && point.values.size() != width_) {
    throw std::invalid_argument(fmt::format("a point has {} values for {} columns", point.values.size(), width_));
  }
}

void PointTable::store(std::size_t i, const PointResult& point) {
  check_width(point);
  Record& record = records_.at(i);
  if (!record.stored) ++blocks_[i / block_points_].stored;
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
  flush_if_complete(i / block_points_);
}

void PointTable::push_back(const PointResult& point) {
  if (records_.empty() && width_ == 0) resize(0, point.values.size());
  check_width(point);  // before the table grows: a rejected point leaves it as it was
  records_.emplace_back();
  const std::size_t block = (records_.size() - 1) / block_points_;
  if (block == blocks_.size()) {
    blocks_.emplace_back();
  } else if (!blocks_[block].rows.empty()) {
    blocks_[block].rows.resize(blocks_[block].rows.size() + width_, kNaN);
  }
  // The point that makes the table spill: the blocks complete before it go to the file too.
  if (records_.size() == memory_points_ + 1) {
    for (std::size_t b = 0; b < block; ++b) flush_if_complete(b);
  }
  store(records_.size() - 1, point);
}

double PointTable::value(std::size_t i, std::size_t column) const {
  const Record& record = records_[i];
  if (!record.has_values) return kNaN;
  switch (form_[column]) {
    case Form::Dense: return dense_value(i, column);
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

std::size_t PointTable::blocks_in_file() const {
  return static_cast<std::size_t>(
      std::count_if(blocks_.begin(), blocks_.end(), [](const Block& block) { return block.in_file; }));
}

}  // namespace linkrise::app
