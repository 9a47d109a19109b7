// The temporary file of the point table (app/studies/temporary_file.h): bytes read back as written at any
// offset, and a file system that refuses says which operation failed and why.
#include <gtest/gtest.h>

#include <cstdlib>
#include <stdexcept>
#include <string>
#include <vector>

#include "app/studies/temporary_file.h"

namespace linkrise::app {
namespace {

TEST(TemporaryFile, ReadsBackWhatWasWrittenAtAnyOffset) {
  TemporaryFile file;
  const std::vector<double> far{1.5, -0.0, 3e300};
  file.write(1 << 20, far.data(), far.size() * sizeof(double));  // past the end: the gap reads as zeros
  const double near = 2.25;
  file.write(8, &near, sizeof near);
  std::vector<double> back(3);
  file.read(1 << 20, back.data(), back.size() * sizeof(double));
  EXPECT_EQ(back, far);
  double pair[2] = {-1.0, -1.0};
  file.read(0, pair, sizeof pair);
  EXPECT_EQ(pair[0], 0.0);
  EXPECT_EQ(pair[1], near);
  TemporaryFile moved(std::move(file));
  moved.read(8, pair, sizeof(double));
  EXPECT_EQ(pair[0], near);
}

TEST(TemporaryFile, ReadingPastTheEndIsAnError) {
  TemporaryFile file;
  const double value = 1.0;
  file.write(0, &value, sizeof value);
  double two[2];
  try {
    file.read(0, two, sizeof two);
    FAIL() << "read past the end";
  } catch (const std::runtime_error& error) {
    EXPECT_NE(std::string(error.what()).find("past the end"), std::string::npos) << error.what();
  }
}

TEST(TemporaryFile, AMissingDirectoryNamesTheOperationAndTheReason) {
  const char* before = std::getenv("TMPDIR");
  const std::string saved = before ? before : "";
  setenv("TMPDIR", "/nonexistent-linkrise-directory", 1);
  std::string message;
  try {
    TemporaryFile file;
  } catch (const std::runtime_error& error) {
    message = error.what();
  }
  if (before) {
    setenv("TMPDIR", saved.c_str(), 1);
  } else {
    unsetenv("TMPDIR");
  }
  EXPECT_NE(message.find("mkstemp in '/nonexistent-linkrise-directory'"), std::string::npos) << message;
  EXPECT_NE(message.find("No such file or directory"), std::string::npos) << message;
}

}  // namespace
}  // namespace linkrise::app
