#pragma once
// Output files appear complete or not at all: each is written to a temporary name in the same directory
// and renamed into place only after every file of the set has been written.
#include <filesystem>
#include <functional>
#include <iosfwd>
#include <string>
#include <utility>
#include <vector>

namespace linkrise::app {

class OutputSet {
 public:
  explicit OutputSet(std::filesystem::path directory);
  ~OutputSet();  // removes temporary files that were not committed
  /// Writes `content` under a temporary name; nothing is visible under `name` until commit().
  void add(const std::string& name, const std::string& content);
  /// The same, the content written to the temporary file by `write` (a large file never held as text).
  void add(const std::string& name, const std::function<void(std::ostream&)>& write);
  /// Renames every file into place.
  void commit();
  std::filesystem::path path(const std::string& name) const { return directory_ / name; }

 private:
  std::filesystem::path directory_;
  std::vector<std::pair<std::filesystem::path, std::filesystem::path>> staged_;  // temporary, final
};

/// Writes one file atomically (temporary name, then rename).
void write_file_atomically(const std::filesystem::path& path, const std::string& content);

}  // namespace linkrise::app
