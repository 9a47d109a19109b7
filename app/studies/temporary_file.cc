#include "app/studies/temporary_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstdlib>
#include <cstring>
#include <stdexcept>
#include <string>
#include <utility>

#include <fmt/format.h>

namespace linkrise::app {
namespace {

[[noreturn]] void fail(const std::string& operation, int error) {
  throw std::runtime_error(fmt::format("temporary file: {} failed: {}", operation, std::strerror(error)));
}

}  // namespace

TemporaryFile::TemporaryFile() {
  const char* directory = std::getenv("TMPDIR");
  std::string name = fmt::format("{}/linkrise-XXXXXX", directory && *directory ? directory : "/tmp");
  descriptor_ = mkstemp(name.data());
  if (descriptor_ < 0) fail(fmt::format("mkstemp in '{}'", name.substr(0, name.rfind('/'))), errno);
  if (unlink(name.c_str()) != 0) {
    const int error = errno;
    close(descriptor_);
    fail(fmt::format("unlink of '{}'", name), error);
  }
}

TemporaryFile::~TemporaryFile() {
  if (descriptor_ >= 0) close(descriptor_);
}

TemporaryFile::TemporaryFile(TemporaryFile&& other) noexcept : descriptor_(std::exchange(other.descriptor_, -1)) {}

TemporaryFile& TemporaryFile::operator=(TemporaryFile&& other) noexcept {
  if (this != &other) {
    if (descriptor_ >= 0) close(descriptor_);
    descriptor_ = std::exchange(other.descriptor_, -1);
  }
  return *this;
}

void TemporaryFile::write(std::uint64_t offset, const void* data, std::size_t bytes) {
  const auto* from = static_cast<const char*>(data);
  while (bytes > 0) {
    const ssize_t written = pwrite(descriptor_, from, bytes, static_cast<off_t>(offset));
    if (written < 0 && errno == EINTR) continue;
    if (written <= 0) fail(fmt::format("pwrite of {} bytes at {}", bytes, offset), written < 0 ? errno : ENOSPC);
    from += written;
    offset += static_cast<std::uint64_t>(written);
    bytes -= static_cast<std::size_t>(written);
  }
}

void TemporaryFile::read(std::uint64_t offset, void* data, std::size_t bytes) const {
  auto* to = static_cast<char*>(data);
  while (bytes > 0) {
    const ssize_t got = pread(descriptor_, to, bytes, static_cast<off_t>(offset));
    if (got < 0 && errno == EINTR) continue;
    if (got < 0) fail(fmt::format("pread of {} bytes at {}", bytes, offset), errno);
    if (got == 0) {
      throw std::runtime_error(fmt::format("temporary file: pread of {} bytes at {} failed: past the end of the file",
                                           bytes, offset));
    }
    to += got;
    offset += static_cast<std::uint64_t>(got);
    bytes -= static_cast<std::size_t>(got);
  }
}

}  // namespace linkrise::app
