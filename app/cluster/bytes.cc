#include "app/cluster/bytes.h"

#include <cstring>
#include <stdexcept>

namespace linkrise::app {

void ByteWriter::put(std::uint64_t value) { bytes_.append(reinterpret_cast<const char*>(&value), sizeof value); }

void ByteWriter::put(double value) { bytes_.append(reinterpret_cast<const char*>(&value), sizeof value); }

void ByteWriter::put(const std::string& text) {
  put(static_cast<std::uint64_t>(text.size()));
  bytes_.append(text);
}

void ByteWriter::put(const std::vector<double>& values) {
  put(static_cast<std::uint64_t>(values.size()));
  bytes_.append(reinterpret_cast<const char*>(values.data()), values.size() * sizeof(double));
}

void ByteReader::take(void* target, std::size_t size) {
  if (size == 0) return;  // memcpy into an empty vector's null data() would be undefined
  if (size > bytes_.size() - at_) throw std::out_of_range("a rank's payload ended early");
  std::memcpy(target, bytes_.data() + at_, size);
  at_ += size;
}

std::uint64_t ByteReader::count() {
  std::uint64_t value = 0;
  take(&value, sizeof value);
  return value;
}

double ByteReader::number() {
  double value = 0.0;
  take(&value, sizeof value);
  return value;
}

std::string ByteReader::text() {
  const std::uint64_t size = count();
  if (size > bytes_.size() - at_) throw std::out_of_range("a rank's payload ended early");
  std::string value = bytes_.substr(at_, size);
  at_ += size;
  return value;
}

std::vector<double> ByteReader::numbers() {
  const std::uint64_t size = count();
  if (size > (bytes_.size() - at_) / sizeof(double)) throw std::out_of_range("a rank's payload ended early");
  std::vector<double> values(size);
  take(values.data(), size * sizeof(double));
  return values;
}

}  // namespace linkrise::app
