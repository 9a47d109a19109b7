#include "app/output/output_files.h"

#include <fstream>
#include <stdexcept>
#include <system_error>

#include <fmt/format.h>
#include <unistd.h>

namespace linkrise::app {

OutputSet::OutputSet(std::filesystem::path directory) : directory_(std::move(directory)) {
  std::error_code error;
  std::filesystem::create_directories(directory_, error);
  if (error) throw std::runtime_error(fmt::format("cannot create output directory '{}': {}", directory_.string(), error.message()));
}

OutputSet::~OutputSet() {
  for (const auto& [temporary, final_path] : staged_) {
    std::error_code ignored;
    std::filesystem::remove(temporary, ignored);
  }
}

static void write_all(const std::filesystem::path& path, const std::function<void(std::ostream&)>& write) {
  std::ofstream stream(path, std::ios::binary | std::ios::trunc);
  if (!stream) throw std::runtime_error(fmt::format("cannot write '{}'", path.string()));
  write(stream);
  stream.close();
  if (!stream) throw std::runtime_error(fmt::format("writing '{}' failed (disk full?)", path.string()));
}

void OutputSet::add(const std::string& name, const std::string& content) {
  add(name, [&](std::ostream& out) { out.write(content.data(), static_cast<std::streamsize>(content.size())); });
}

void OutputSet::add(const std::string& name, const std::function<void(std::ostream&)>& write) {
  std::filesystem::path final_path = directory_ / name;
  std::filesystem::path temporary = directory_ / fmt::format(".{}.{}.partial", name, ::getpid());
  // Staged before writing, so the destructor removes a temporary that a failed write left behind.
  staged_.emplace_back(temporary, final_path);
  write_all(temporary, write);
}

void OutputSet::commit() {
  for (const auto& [temporary, final_path] : staged_) std::filesystem::rename(temporary, final_path);
  staged_.clear();
}

void write_file_atomically(const std::filesystem::path& path, const std::string& content) {
  std::filesystem::path directory = path.parent_path().empty() ? std::filesystem::path(".") : path.parent_path();
  OutputSet set(directory);
  set.add(path.filename().string(), content);
  set.commit();
}

}  // namespace linkrise::app
