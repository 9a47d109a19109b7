#pragma once
// For the tests that run the built programs (linkrise, mpirun): a folder of their own per test, a command line run
// in a folder with its exit code and its stdout and stderr kept apart, a file's bytes, terminal text to compare.
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

namespace linkrise::command_test {
namespace fs = std::filesystem;

struct Outcome {
  int exit_code = -1;
  std::string out, err;
};

/// A file's bytes ("" when it cannot be read).
inline std::string slurp(const fs::path& path) {
  std::ifstream stream(path, std::ios::binary);
  std::stringstream text;
  text << stream.rdbuf();
  return text.str();
}

/// A command's terminal text without the lines that name the files it wrote ("  wrote …", "  report …").
inline std::string without_file_lines(const std::string& text) {
  std::stringstream in(text);
  std::string kept;
  for (std::string line; std::getline(in, line);) {
    if (line.rfind("  wrote ", 0) == 0 || line.rfind("  report ", 0) == 0) continue;
    kept += line + "\n";
  }
  return kept;
}

/// An empty folder under the temporary directory, named after `prefix`, the process and the running test.
inline fs::path fresh_test_folder(const std::string& prefix) {
  const fs::path folder = fs::temp_directory_path() / (prefix + "_" + std::to_string(getpid()) + "_" +
                                                       ::testing::UnitTest::GetInstance()->current_test_info()->name());
  fs::remove_all(folder);
  fs::create_directories(folder);
  return folder;
}

/// Runs `command` (a shell line) in `directory` under a 10-minute `timeout`, so a process left waiting fails the
/// test instead of stalling the suite; its output goes through files in `scratch`.
inline Outcome run_in(const fs::path& directory, const std::string& command, const fs::path& scratch) {
  const fs::path out = scratch / "stdout.txt", err = scratch / "stderr.txt";
  const std::string line = "cd \"" + directory.string() + "\" && timeout 600 " + command + " >\"" + out.string() +
                           "\" 2>\"" + err.string() + "\"";
  const int status = std::system(line.c_str());
  Outcome outcome;
  outcome.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  outcome.out = slurp(out);
  outcome.err = slurp(err);
  fs::remove(out);
  fs::remove(err);
  return outcome;
}

}  // namespace linkrise::command_test
