#pragma once
// An unnamed temporary file read and written at byte offsets (pread/pwrite): storage that is not the process's
// resident memory. Created in $TMPDIR (or /tmp) and unlinked at once, so nothing is left behind however the
// process ends; closed by the destructor. File-system errors throw std::runtime_error naming the operation.
#include <cstddef>
#include <cstdint>

namespace linkrise::app {

class TemporaryFile {
 public:
  TemporaryFile();
  ~TemporaryFile();
  TemporaryFile(TemporaryFile&& other) noexcept;
  TemporaryFile& operator=(TemporaryFile&& other) noexcept;
  TemporaryFile(const TemporaryFile&) = delete;
  TemporaryFile& operator=(const TemporaryFile&) = delete;

  /// Writes `bytes` bytes at `offset`; the file grows as needed (unwritten gaps read as zeros).
  void write(std::uint64_t offset, const void* data, std::size_t bytes);
  /// Reads `bytes` bytes at `offset`; reading past the end of the file is an error.
  void read(std::uint64_t offset, void* data, std::size_t bytes) const;

 private:
  int descriptor_ = -1;
};

}  // namespace linkrise::app
