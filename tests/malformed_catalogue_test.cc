// The malformed-input catalogue (tests/malformed_manifest.yaml): the built `linkrise` binary on every bad case
// file and every bad command line must exit with 2 within a minute, print the expected message fragment at the
// expected file:line:column, and leave nothing in its output folder.
#include <gtest/gtest.h>
#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <ostream>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <yaml-cpp/yaml.h>

extern char** environ;

namespace {
namespace fs = std::filesystem;

const fs::path catalogue_directory = fs::path(LINKRISE_SOURCE_DIR) / "tests" / "malformed";
const fs::path manifest_file = fs::path(LINKRISE_SOURCE_DIR) / "tests" / "malformed_manifest.yaml";

struct Entry {
  std::string name;                    // the test's name: the file's stem, or the option entry's name
  std::vector<std::string> arguments;  // {case} is the file (or a valid case), {out} the output folder
  std::string file;                    // the bad case file; empty for a bad command line
  std::string at;                      // "line:column", "" for a message about the file as a whole
  std::string message;                 // a fragment the message must contain
};

// Every entry of the manifest; an unreadable manifest is one failing entry rather than no tests at all.
std::vector<Entry> load_manifest() {
  std::vector<Entry> entries;
  try {
    YAML::Node manifest = YAML::LoadFile(manifest_file.string());
    for (const auto& item : manifest["files"]) {
      Entry entry;
      entry.name = fs::path(item["file"].as<std::string>()).stem().string();
      std::string command = item["command"] ? item["command"].as<std::string>() : "run";
      std::stringstream words(command);
      for (std::string word; words >> word;) entry.arguments.push_back(word);
      entry.file = (catalogue_directory / item["file"].as<std::string>()).string();
      entry.arguments.push_back(entry.file);
      entry.arguments.insert(entry.arguments.end(), {"-o", "{out}"});
      entry.at = item["at"].as<std::string>();
      entry.message = item["message"].as<std::string>();
      entries.push_back(entry);
    }
    for (const auto& item : manifest["options"]) {
      Entry entry;
      entry.name = "option_" + item["name"].as<std::string>();
      entry.arguments = item["arguments"].as<std::vector<std::string>>();
      entry.message = item["message"].as<std::string>();
      entries.push_back(entry);
    }
  } catch (const std::exception& error) {
    entries.push_back({"manifest_unreadable", {}, "", "", error.what()});
  }
  return entries;
}

struct Outcome {
  int exit_code = -1;
  bool killed = false;
  std::string err;
};

std::string slurp(const fs::path& path) {
  std::ifstream stream(path, std::ios::binary);
  std::stringstream text;
  text << stream.rdbuf();
  return text.str();
}

// Runs the binary without a shell (arguments with spaces stay whole); an alarm ends a run that hangs.
Outcome run_linkrise(const std::vector<std::string>& arguments, const fs::path& stderr_file) {
  std::vector<std::string> words{LINKRISE_BINARY};
  words.insert(words.end(), arguments.begin(), arguments.end());
  std::vector<char*> argv;
  for (auto& word : words) argv.push_back(word.data());
  argv.push_back(nullptr);
  pid_t child = fork();
  if (child == 0) {
    int err = open(stderr_file.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    int null = open("/dev/null", O_WRONLY);
    dup2(err, STDERR_FILENO);
    dup2(null, STDOUT_FILENO);
    alarm(60);  // bad input must be rejected in well under a second; a minute means it hangs
    execv(argv[0], argv.data());
    _exit(127);
  }
  int status = 0;
  waitpid(child, &status, 0);
  Outcome outcome;
  outcome.killed = WIFSIGNALED(status);
  outcome.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  outcome.err = slurp(stderr_file);
  return outcome;
}

// gtest prints a parameter by its name (not its bytes).
void PrintTo(const Entry& entry, std::ostream* out) { *out << entry.name; }

class MalformedInput : public ::testing::TestWithParam<Entry> {};

TEST_P(MalformedInput, ExitsWithTwoAtThePlaceAndWritesNothing) {
  const Entry& entry = GetParam();
  ASSERT_NE(entry.name, "manifest_unreadable") << entry.message;
  fs::path directory = fs::temp_directory_path() / ("linkrise_malformed_" + std::to_string(getpid()) + "_" + entry.name);
  fs::remove_all(directory);
  fs::create_directories(directory);
  fs::path out = directory / "out";
  std::vector<std::string> arguments;
  for (std::string argument : entry.arguments) {
    if (argument == "{out}") argument = out.string();
    if (argument == "{case}") argument = (fs::path(LINKRISE_SOURCE_DIR) / "cases" / "sequence_clean_close.yaml").string();
    if (argument == "{study}") argument = (fs::path(LINKRISE_SOURCE_DIR) / "cases" / "study_precharge_window.yaml").string();
    arguments.push_back(argument);
  }
  Outcome outcome = run_linkrise(arguments, directory / "stderr.txt");
  EXPECT_FALSE(outcome.killed) << "the run was killed (a hang or a crash)";
  EXPECT_EQ(outcome.exit_code, 2) << outcome.err;
  EXPECT_NE(outcome.err.find(entry.message), std::string::npos) << "expected '" << entry.message << "' in:\n" << outcome.err;
  if (!entry.file.empty()) {
    std::string place = entry.file + (entry.at.empty() ? "" : ":" + entry.at) + ": error:";
    EXPECT_NE(outcome.err.find(place), std::string::npos) << "expected '" << place << "' in:\n" << outcome.err;
  }
  EXPECT_TRUE(!fs::exists(out) || fs::is_empty(out)) << "output left in " << out;
  std::size_t left = 0;
  for (const auto& item : fs::directory_iterator(directory)) left += item.path().filename() != "stderr.txt" && item.path() != out;
  EXPECT_EQ(left, 0u) << "stray files in " << directory;
  fs::remove_all(directory);
}

INSTANTIATE_TEST_SUITE_P(Catalogue, MalformedInput, ::testing::ValuesIn(load_manifest()),
                         [](const ::testing::TestParamInfo<Entry>& info) { return info.param.name; });

}  // namespace
