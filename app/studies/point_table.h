#pragma once
// The points of a study, stored compactly: 100 000 Monte Carlo samples of 72 metrics would take 77.7 MB as one
// record with a vector and two strings each. Here a point is a record of 8 bytes (status, verdict, an index into
// the outcome words), a message only where there is one, and its metric values live in the table's columns. A
// column whose value is bitwise the same at every point stored so far (attempts, detection time, a duty's
// averages) keeps that one number; a column of at most 256 distinct values (times read at the BMS's sample
// instants) keeps them once with one byte per point; any other column is one double per point.
// Those dense doubles (60 MB for 75 columns at 100 000 samples) are kept by blocks of points: the block being
// filled in memory, row by row as the points arrive; a table of more than `memory_points` points writes each
// complete block to an unnamed temporary file, every column's values of the block contiguous (so a column reads
// a block at a time), and reads them back with pread through one block per column. File pages in the page cache
// are not the process's resident memory, as mapped pages would be.
// Reading a point gives back the PointResult it was stored as, numbers bit for bit: outputs do not change.
#include <cstddef>
#include <cstdint>
#include <iterator>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "analysis/verdict.h"
#include "app/evaluation/case_evaluation.h"
#include "app/studies/temporary_file.h"

namespace linkrise::app {

struct PointResult {
  CaseEvaluation::Status status = CaseEvaluation::Status::Evaluated;
  std::string message;
  std::string outcome;
  analysis::Verdict verdict = analysis::Verdict::Fail;
  std::vector<double> values;  // one per StudyResults::columns; NaN when not reached or absent
  bool evaluated() const { return status == CaseEvaluation::Status::Evaluated; }
  bool passed() const { return evaluated() && verdict == analysis::Verdict::Pass; }
  /// The outcome, or the status word ("input error", "solver failure") when the point was not evaluated.
  std::string outcome_word() const { return evaluated() ? outcome : status_word(status); }
  /// The verdict, or the status word when the point was not evaluated.
  std::string verdict_word() const { return evaluated() ? analysis::verdict_word(verdict) : status_word(status); }
};

class PointTable {
 public:
  static constexpr std::size_t kMemoryPoints = 1024;
  static constexpr std::size_t kBlockPoints = 1024;

  PointTable() = default;
  /// A table that keeps its dense columns in memory up to `memory_points` points, in a temporary file by blocks
  /// of `block_points` points beyond (0: always in the file).
  PointTable(std::size_t memory_points, std::size_t block_points);

  /// `count` points not stored yet (read back as evaluated, failing, without values) of `width` values each.
  void resize(std::size_t count, std::size_t width);
  /// Stores point i (i < size()). Its values are `width` numbers or none. Not thread-safe: callers that store
  /// from several threads hold one lock around it.
  void store(std::size_t i, const PointResult& point);
  /// Adds a point at the end; the first point of an empty table sets the width.
  void push_back(const PointResult& point);

  std::size_t size() const { return records_.size(); }
  bool empty() const { return records_.empty(); }
  std::size_t width() const { return width_; }
  /// Point i as it was stored.
  PointResult operator[](std::size_t i) const;
  PointResult at(std::size_t i) const;
  /// Value `column` of point i: NaN for a point stored without values. Reads (this, operator[]) share a cache of
  /// file blocks: they are not thread-safe either, and callers that read while others store hold the same lock.
  /// Read a column point after point, or points row by row: each column caches one block of the file.
  double value(std::size_t i, std::size_t column) const;
  CaseEvaluation::Status status(std::size_t i) const { return static_cast<CaseEvaluation::Status>(records_[i].status); }
  /// How many columns keep one number for every point, and how many a byte per point (memory measurements).
  std::size_t constant_columns() const;
  std::size_t coded_columns() const;
  /// How many blocks of points keep their dense values in the temporary file.
  std::size_t blocks_in_file() const;

  class Iterator {
   public:
    using iterator_category = std::input_iterator_tag;
    using value_type = PointResult;
    using difference_type = std::ptrdiff_t;
    using pointer = void;
    using reference = PointResult;
    Iterator(const PointTable* table, std::size_t i) : table_(table), i_(i) {}
    PointResult operator*() const { return (*table_)[i_]; }
    Iterator& operator++() {
      ++i_;
      return *this;
    }
    Iterator operator++(int) {
      Iterator before = *this;
      ++i_;
      return before;
    }
    bool operator==(const Iterator& other) const { return i_ == other.i_; }
    bool operator!=(const Iterator& other) const { return i_ != other.i_; }

   private:
    const PointTable* table_;
    std::size_t i_;
  };
  Iterator begin() const { return {this, 0}; }
  Iterator end() const { return {this, size()}; }

 private:
  struct Record {
    std::uint8_t status = 0;
    std::uint8_t verdict = 0;
    bool stored = false;
    bool has_values = false;
    std::uint32_t outcome = 0;  // index into outcomes_
  };
  // The dense values of points [b·block_points, (b+1)·block_points): in `rows` (point-major, width_ per point;
  // empty until a dense value needs it) or, once the block is complete in a table that spills, in the file.
  struct Block {
    std::vector<double> rows;
    std::size_t stored = 0;  // points of the block stored so far
    bool in_file = false;
  };
  // One block of one column as read from the file.
  struct Chunk {
    std::size_t block = static_cast<std::size_t>(-1);
    std::vector<double> values;
  };
  void check_width(const PointResult& point) const;
  std::uint32_t outcome_index(const std::string& outcome);
  void set_value(std::size_t i, std::size_t column, double value);
  void make_coded(std::size_t column);
  void make_dense(std::size_t column);
  double coded_value(std::size_t i, std::size_t column) const;
  double dense_value(std::size_t i, std::size_t column) const;
  void set_dense(std::size_t i, std::size_t column, double value);
  std::size_t points_in(std::size_t block) const;
  void ensure_rows(std::size_t block);
  void flush_if_complete(std::size_t block);
  void write_chunk(std::size_t block, std::size_t column);
  std::uint64_t file_offset(std::size_t block, std::size_t column) const;

  std::size_t width_ = 0;
  std::vector<Record> records_;
  std::vector<std::string> outcomes_;
  std::vector<std::pair<std::size_t, std::string>> messages_;  // sorted by point; only non-empty messages
  // Per column, one of three forms: constant: the bits every stored point has; coded: point i has the bits
  // dictionary_[c][codes_[c][i]]; dense: in the blocks.
  enum class Form : std::uint8_t { Constant, Coded, Dense };
  std::vector<Form> form_;
  std::size_t stored_end_ = 0;  // one past the highest point stored
  std::vector<std::uint64_t> constant_;
  std::vector<bool> constant_set_;
  std::vector<std::vector<std::uint64_t>> dictionary_;
  std::vector<std::vector<std::uint8_t>> codes_;
  std::size_t memory_points_ = kMemoryPoints;
  std::size_t block_points_ = kBlockPoints;
  std::vector<Block> blocks_;
  std::vector<std::vector<double>> spare_rows_;  // buffers of blocks written to the file, for the next blocks
  std::vector<double> chunk_;                    // one block of one column on its way to the file
  std::unique_ptr<TemporaryFile> file_;          // opened by the first block written
  mutable std::vector<Chunk> cached_;            // per column, the block of the file read last
};

}  // namespace linkrise::app
