// Reading measured captures: linkrise's own CSV and oscilloscope-style exports, with every bad file refused at
// its line and column. Unit prefixes follow the SI brochure [R-SI].
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include <fmt/format.h>

#include "netlist/capture.h"

namespace {
using linkrise::netlist::Capture;
using linkrise::netlist::CaptureRequest;
using linkrise::netlist::ColumnMapping;
using linkrise::netlist::InputError;
using linkrise::netlist::read_capture;

std::string write_file(const std::string& name, const std::string& text) {
  std::filesystem::path path = std::filesystem::path(testing::TempDir()) / name;
  std::ofstream(path, std::ios::binary) << text;
  return path.string();
}

CaptureRequest scope_request(const std::string& file) {
  CaptureRequest request;
  request.file = file;
  request.columns = {ColumnMapping{"link_plus", "CH2 [mV]", {"case.yaml", 12, 5}},
                     ColumnMapping{"r_pre.current", "CH3 (A)", {"case.yaml", 13, 5}}};
  return request;
}

// The error a bad file gives: its place and message.
InputError error_of(const CaptureRequest& request) {
  try {
    read_capture(request);
  } catch (const InputError& error) {
    return error;
  }
  ADD_FAILURE() << "no error for " << request.file;
  return InputError({}, "");
}

const char* kScopeHead =
    "Model,Invented Scope 4000\r\n"
    "Record Length,5\r\n"
    "\r\n"
    "Time (s),CH1 [V],CH2 [mV],CH3 (A),Note\r\n";

}  // namespace

TEST(Capture, ReadsAScopeExportWithMetadataPreTriggerTimesUnevenSpacingAndPrefixes) {
  const std::string file = write_file("scope.csv", std::string(kScopeHead) +
                                                       "-2.0e-3,0,0,0,armed\r\n"
                                                       "-0.5e-3,0,1.5,0.0,\r\n"
                                                       "0.0,1,1500,+2.5,trigger\r\n"
                                                       "1.25e-3,2,2500.25,2.25,\r\n");
  const Capture capture = read_capture(scope_request(file));
  ASSERT_EQ(capture.row_count(), 4u);
  EXPECT_EQ(capture.times.front(), -2.0e-3);
  EXPECT_EQ(capture.times.back(), 1.25e-3);
  EXPECT_EQ(capture.header_line, 4);
  EXPECT_EQ(capture.first_data_line, 5);
  EXPECT_EQ(capture.metadata_lines, 2u);
  ASSERT_EQ(capture.columns.size(), 2u);  // only the mapped columns are kept
  const auto* link = capture.find("link_plus");
  ASSERT_NE(link, nullptr);
  // 1500 mV is 1.5 V [R-SI]: milli is 1e-3.
  EXPECT_DOUBLE_EQ(link->values[2], 1.5);
  EXPECT_DOUBLE_EQ(link->values[3], 2.50025);
  EXPECT_EQ(capture.find("r_pre.current")->values[2], 2.5);
  EXPECT_EQ(link->dimension, linkrise::netlist::Dimension::voltage());
}

TEST(Capture, ReadsLinkrisesOwnCsvWithoutAMapping) {
  const std::string file = write_file("own.csv",
                                      "time [s],link [V],r1.current [A]\n"
                                      "0,0,4\n"
                                      "0.1,252.848,1.47152\n");
  CaptureRequest request;
  request.file = file;
  const Capture capture = read_capture(request);
  ASSERT_EQ(capture.columns.size(), 2u);
  EXPECT_EQ(capture.columns[0].name, "link");
  EXPECT_EQ(capture.columns[1].name, "r1.current");
  EXPECT_EQ(capture.columns[1].values[1], 1.47152);
  EXPECT_EQ(capture.metadata_lines, 0u);
}

TEST(Capture, SemicolonsAndANamedTimeHeaderFindTheHeaderRow) {
  const std::string file = write_file("semicolon.csv",
                                      "Saved by bench logger;2 channels\n"
                                      "t [ms];U [V]\n"
                                      "0;1\n"
                                      "0.5;2\n");
  CaptureRequest request;
  request.file = file;
  request.time_header = "t [ms]";
  request.columns = {ColumnMapping{"link", "U [V]", {}}};
  const Capture capture = read_capture(request);
  ASSERT_EQ(capture.row_count(), 2u);
  EXPECT_DOUBLE_EQ(capture.times[1], 0.5e-3);  // ms [R-SI]
}

// Every bad file names its line and column and says what is wrong.
struct BadCapture {
  const char* name;
  std::string text;
  int line, column;
  const char* fragment;
};

class CaptureErrors : public testing::TestWithParam<BadCapture> {};

TEST_P(CaptureErrors, AreReportedAtTheirLineAndColumn) {
  const BadCapture& bad = GetParam();
  const InputError error = error_of(scope_request(write_file(std::string(bad.name) + ".csv", bad.text)));
  EXPECT_EQ(error.mark().line, bad.line) << error.what();
  EXPECT_EQ(error.mark().column, bad.column) << error.what();
  EXPECT_NE(std::string(error.what()).find(bad.fragment), std::string::npos) << error.what();
}

INSTANTIATE_TEST_SUITE_P(
    Capture, CaptureErrors,
    testing::Values(
        BadCapture{"missing_column", "Time (s),CH1 [V],CH2 [V]\n0,1,2\n", 1, 1, "has no column 'CH2 [mV]'"},
        BadCapture{"non_numeric", std::string(kScopeHead) + "0,1,2,3,\n1e-3,1,2,x3,\n", 6, 10, "'x3' in column 'CH3 (A)'"},
        BadCapture{"not_finite", std::string(kScopeHead) + "0,1,nan,3,\n", 5, 5, "not a finite number"},
        BadCapture{"time_backwards", std::string(kScopeHead) + "0,1,2,3,\n1e-3,1,2,3,\n1e-3,1,2,3,\n", 7, 1,
                   "does not increase"},
        BadCapture{"missing_cell", std::string(kScopeHead) + "0,1,2\n", 5, 6, "no value in column 'CH3 (A)'"},
        BadCapture{"empty_cell", std::string(kScopeHead) + "0,1,,3\n", 5, 5, "no value in column 'CH2 [mV]'"},
        BadCapture{"no_unit", "Time,CH2 [mV],CH3 (A)\n0,1,2\n", 1, 1, "the header 'Time' gives no unit"},
        BadCapture{"bad_unit_time", "Time (furlong),CH2 [mV],CH3 (A)\n0,1,2\n", 1, 1, "is not a unit"},
        BadCapture{"time_not_time", "Volts [V],CH2 [mV],CH3 (A)\n0,1,2\n", 1, 1, "must be the time"},
        BadCapture{"no_header", "0,1,2\n1,2,3\n", 1, 1, "no header row above it"},
        BadCapture{"no_rows", "Time (s),CH2 [mV],CH3 (A)\n", 1, 1, "no row of numbers"}));

TEST(Capture, ASignalHeaderWithAnUnknownUnitIsRefusedAtItsCell) {
  CaptureRequest request;
  request.file = write_file("furlong.csv", "time [s],link [V],r1.current [furlong]\n0,1,2\n");
  const InputError error = error_of(request);
  EXPECT_EQ(error.mark().line, 1);
  EXPECT_EQ(error.mark().column, 19);
  EXPECT_NE(std::string(error.what()).find("'furlong'"), std::string::npos) << error.what();
}

TEST(Capture, AMissingFileIsReportedWhereItIsNamed) {
  CaptureRequest request = scope_request((std::filesystem::path(testing::TempDir()) / "absent.csv").string());
  request.mark = {"case.yaml", 9, 9};
  const InputError error = error_of(request);
  EXPECT_EQ(error.mark().file, "case.yaml");
  EXPECT_EQ(error.mark().line, 9);
  EXPECT_NE(std::string(error.what()).find("cannot open the capture file"), std::string::npos);
}

TEST(Capture, AMisspeltHeaderGetsADidYouMean) {
  CaptureRequest request = scope_request(write_file("typo.csv", "Time (s),CH2 [mV],CH3 [A]\n0,1,2\n"));
  const InputError error = error_of(request);  // the mapping asks for 'CH3 (A)'
  EXPECT_NE(std::string(error.what()).find("did you mean 'CH3 [A]'"), std::string::npos) << error.what();
  EXPECT_NE(std::string(error.what()).find("case.yaml:13:5"), std::string::npos) << error.what();
}

// A million rows with five columns, two of them mapped: the capture holds exactly the time and the two mapped
// columns, one double per row each (24 MB), however wide the file; the file itself is read line by line.
TEST(Capture, AMillionRowsAreHeldAsCompactColumnsOfTheMappedSignalsOnly) {
  constexpr std::size_t kRows = 1'000'000;
  const std::filesystem::path path = std::filesystem::path(testing::TempDir()) / "million.csv";
  {
    std::ofstream out(path, std::ios::binary);
    out << kScopeHead;
    fmt::memory_buffer buffer;
    for (std::size_t r = 0; r < kRows; ++r) {
      fmt::format_to(std::back_inserter(buffer), "{},{},{},{},\n", static_cast<double>(r) * 1e-6, r % 7,
                     static_cast<double>(r % 1000), 0.001 * static_cast<double>(r % 13));
      if (buffer.size() > (1 << 20)) {
        out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
        buffer.clear();
      }
    }
    out.write(buffer.data(), static_cast<std::streamsize>(buffer.size()));
  }
  const Capture capture = read_capture(scope_request(path.string()));
  ASSERT_EQ(capture.row_count(), kRows);
  ASSERT_EQ(capture.columns.size(), 2u);
  EXPECT_EQ(capture.times.capacity(), kRows);
  for (const auto& column : capture.columns) EXPECT_EQ(column.values.capacity(), kRows);
  EXPECT_DOUBLE_EQ(capture.columns[0].values[999'999], 0.999);  // 999 mV [R-SI]
  std::filesystem::remove(path);
}
