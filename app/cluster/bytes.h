#pragma once
// Plain bytes for carrying results between the ranks of an MPI job: numbers in the machine's own layout (every
// rank runs the same binary on the same kind of machine), so a double arrives bit for bit — NaN, infinities and
// −0 included — and a gathered result is the very number the rank computed. Strings carry their length first.
#include <cstddef>
#include <cstdint>
#include <string>
#include <utility>
#include <vector>

namespace linkrise::app {

class ByteWriter {
 public:
  void put(std::uint64_t value);
  void put(double value);
  void put(const std::string& text);
  void put(const std::vector<double>& values);
  /// The bytes written so far.
  const std::string& bytes() const { return bytes_; }
  std::string take() { return std::move(bytes_); }

 private:
  std::string bytes_;
};

/// Reads what a ByteWriter wrote, in the same order. Reading past the end throws std::out_of_range: a payload cut
/// short is a fault of the program, not of the input.
class ByteReader {
 public:
  explicit ByteReader(const std::string& bytes) : bytes_(bytes) {}
  std::uint64_t count();
  double number();
  std::string text();
  std::vector<double> numbers();
  bool at_end() const { return at_ == bytes_.size(); }

 private:
  void take(void* target, std::size_t size);
  const std::string& bytes_;
  std::size_t at_ = 0;
};

}  // namespace linkrise::app
