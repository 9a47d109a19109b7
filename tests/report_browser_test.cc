// The run report rendered by a real browser: the built linkrise writes a report for the demo case, headless
// Chromium (Debian's package, installed by `make test`) dumps the DOM it built and takes a screenshot.
// Asserts that the browser saw every plot and table row, and that the screenshot shows the curves.
//
// Three Chromium invocations in all (a few seconds each): DOM and screenshot of the run report, DOM of the
// detection-matrix report. Chromium missing is a failure, not a skip: the test exists to prove the reports render.
#include <png.h>
#include <sys/wait.h>
#include <unistd.h>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

namespace {

namespace fs = std::filesystem;

std::string read_text(const fs::path& path) {
  std::ifstream stream(path, std::ios::binary);
  std::ostringstream text;
  text << stream.rdbuf();
  return text.str();
}

int count(const std::string& text, const std::string& needle) {
  int found = 0;
  for (std::size_t at = text.find(needle); at != std::string::npos; at = text.find(needle, at + 1)) ++found;
  return found;
}

// Rows of a table's body in the serialised DOM: <tr> between the table's start and its end, minus the head row.
int table_body_rows(const std::string& dom, const std::string& id) {
  const std::size_t start = dom.find("<table id=\"" + id + "\"");
  if (start == std::string::npos) return -1;
  const std::size_t end = dom.find("</table>", start);
  return count(dom.substr(start, end - start), "<tr") - 1;
}

std::string find_chromium() {
  for (const char* candidate : {"/usr/bin/chromium", "/usr/bin/chromium-browser"}) {
    if (::access(candidate, X_OK) == 0) return candidate;
  }
  return "";
}

std::string quoted(const fs::path& path) { return "'" + path.string() + "'"; }

// Headless Chromium with everything that could reach the network or a profile switched off; a fresh
// user-data directory per call. `timeout` keeps a hung browser from hanging the suite.
int run_chromium(const std::string& chromium, const fs::path& profile, const std::string& action,
                 const fs::path& page, const fs::path& output, const fs::path& log) {
  const std::string command = fmt::format(
      "timeout 120 {} --headless --no-sandbox --disable-gpu --disable-background-networking "
      "--disable-component-update --disable-sync --disable-quic --no-first-run --hide-scrollbars "
      "--user-data-dir={} {} 'file://{}' >{} 2>>{}",
      chromium, quoted(profile), action, page.string(), quoted(output), quoted(log));
  return std::system(command.c_str());
}

// The screenshot decoded by Debian's libpng (simplified API). Pixels as RGB, row-major.
struct Image {
  unsigned width = 0;
  unsigned height = 0;
  std::vector<unsigned char> rgb;
  std::string error;
};

Image decode_png(const fs::path& path) {
  Image image;
  auto begin = &png_image_begin_read_from_file;
  auto finish = &png_image_finish_read;
  auto release = &png_image_free;
  png_image png{};
  png.version = PNG_IMAGE_VERSION;
  if (begin(&png, path.c_str()) == 0) {
    image.error = std::string("libpng: ") + png.message;
    return image;
  }
  png.format = PNG_FORMAT_RGB;
  image.width = png.width;
  image.height = png.height;
  image.rgb.resize(PNG_IMAGE_SIZE(png));
  if (finish(&png, nullptr, image.rgb.data(), 0, nullptr) == 0) {
    image.error = std::string("libpng: ") + png.message;
    release(&png);
  }
  return image;
}

// Pixels within `tolerance` per channel of a colour given as 0xRRGGBB.
long pixels_near(const Image& image, unsigned colour, int tolerance) {
  const int r = static_cast<int>(colour >> 16), g = static_cast<int>((colour >> 8) & 0xFF),
            b = static_cast<int>(colour & 0xFF);
  long found = 0;
  for (std::size_t i = 0; i + 2 < image.rgb.size(); i += 3) {
    if (std::abs(image.rgb[i] - r) <= tolerance && std::abs(image.rgb[i + 1] - g) <= tolerance &&
        std::abs(image.rgb[i + 2] - b) <= tolerance) {
      ++found;
    }
  }
  return found;
}

// Width and height from the IHDR chunk, read directly (PNG spec, ISO/IEC 15948 section 11.2.2, docs/references.md
// [R-PNG]: the first chunk after the 8-byte signature, big-endian width then height).
std::array<unsigned, 2> png_header_size(const std::string& bytes) {
  if (bytes.size() < 24 || bytes.compare(0, 8, "\x89PNG\r\n\x1a\n") != 0 || bytes.compare(12, 4, "IHDR") != 0) {
    return {0, 0};
  }
  const auto word = [&](std::size_t at) {
    return static_cast<unsigned>(static_cast<unsigned char>(bytes[at])) << 24 |
           static_cast<unsigned>(static_cast<unsigned char>(bytes[at + 1])) << 16 |
           static_cast<unsigned>(static_cast<unsigned char>(bytes[at + 2])) << 8 |
           static_cast<unsigned>(static_cast<unsigned char>(bytes[at + 3]));
  };
  return {word(16), word(20)};
}

TEST(ReportBrowser, ChromiumRendersTheDemoReport) {
  const std::string chromium = find_chromium();
  ASSERT_FALSE(chromium.empty())
      << "Chromium is not installed (/usr/bin/chromium). `make test` installs it through scripts/install-deps.sh; "
         "as root: apt-get install chromium";

  const fs::path work = fs::temp_directory_path() / fmt::format("linkrise-report-browser-{}", ::getpid());
  fs::remove_all(work);
  fs::create_directories(work);
  const fs::path report = work / "report.html";
  const fs::path log = work / "chromium.log";

  const std::string run = fmt::format("'{}' run '{}/cases/demo_storage_rack.yaml' -o {} -q --report {}",
                                      LINKRISE_BINARY, LINKRISE_SOURCE_DIR, quoted(work / "out"), quoted(report));
  ASSERT_EQ(std::system(run.c_str()), 0) << run;
  const std::string html = read_text(report);
  ASSERT_FALSE(html.empty());
  const nlohmann::json summary = nlohmann::json::parse(read_text(work / "out" / "summary.json"));

  // 1. The DOM the browser built: every plot and every table row arrived.
  const fs::path dom_file = work / "dom.html";
  ASSERT_EQ(run_chromium(chromium, work / "profile-dom", "--dump-dom", report, dom_file, log), 0)
      << read_text(log);
  const std::string dom = read_text(dom_file);
  const int plots_written = count(html, "<svg ");
  EXPECT_GE(plots_written, 4);  // voltages, currents, closure close-up, resistor power (+ temperature if modelled)
  EXPECT_EQ(count(dom, "<svg "), plots_written);
  EXPECT_EQ(count(dom, "<figure class=\"plot\">"), plots_written);
  EXPECT_GE(count(dom, "<polyline "), plots_written);  // each plot draws at least one curve
  EXPECT_EQ(table_body_rows(dom, "timeline"), static_cast<int>(summary.at("timeline").size()));
  EXPECT_EQ(table_body_rows(dom, "parts"), static_cast<int>(summary.at("parts").size()));
  EXPECT_EQ(table_body_rows(dom, "energy"), static_cast<int>(summary.at("energy_audit").size()));  // one row per term
  EXPECT_NE(dom.find("High-voltage caution"), std::string::npos);

  // 2. The screenshot: the right size, and the curves are on it.
  const fs::path shot = work / "report.png";
  ASSERT_EQ(run_chromium(chromium, work / "profile-shot",
                         fmt::format("--screenshot={} --window-size=1200,3000", quoted(shot)), report,
                         work / "screenshot.out", log),
            0)
      << read_text(log);
  ASSERT_TRUE(fs::exists(shot)) << read_text(log);
  EXPECT_EQ(png_header_size(read_text(shot)), (std::array<unsigned, 2>{1200, 3000}));
  const Image image = decode_png(shot);
  ASSERT_TRUE(image.error.empty()) << image.error;
  ASSERT_EQ(image.rgb.size(), std::size_t{1200} * 3000 * 3);
  // A blank page is one or two background colours (#efece5 around, #fcfbf8 on the page; app/report/report_html.cc).
  // Pure white is only the plot areas (app/report/svg_plot.cc), each about 620 x 270 px: at least three of them must
  // be on the first 3000 px (the demo report measured about 740 000 white pixels).
  EXPECT_GT(pixels_near(image, 0xffffff, 0), 3 * 150000);
  // The second series colour, #c0562a, appears nowhere but in plotted curves and their legend samples
  // (measured about 1 700 pixels): the curves were drawn, not just the frames.
  EXPECT_GT(pixels_near(image, 0xc0562a, 24), 500);
  // Text: near-#262626 pixels of the body text spread over the page (measured about 22 000).
  EXPECT_GT(pixels_near(image, 0x262626, 40), 5000);

  std::error_code ignored;
  if (!::testing::Test::HasFailure()) fs::remove_all(work, ignored);
}

// The detection-matrix report (app/report/faults_report.h) of the deliberately failing design: the browser built one
// matrix row per scenario of faults.json, the failing rows with their class and word, and every plot.
TEST(ReportBrowser, ChromiumRendersTheFaultsReport) {
  const std::string chromium = find_chromium();
  ASSERT_FALSE(chromium.empty()) << "Chromium is not installed (/usr/bin/chromium); as root: apt-get install chromium";
  const fs::path work = fs::temp_directory_path() / fmt::format("linkrise-faults-browser-{}", ::getpid());
  fs::remove_all(work);
  fs::create_directories(work);
  const fs::path report = work / "faults.html";
  const fs::path log = work / "chromium.log";
  const std::string run =
      fmt::format("'{}' faults '{}/cases/sequence_bad_design.yaml' -o {} -q --report {}", LINKRISE_BINARY,
                  LINKRISE_SOURCE_DIR, quoted(work / "out"), quoted(report));
  const int status = std::system(run.c_str());
  ASSERT_TRUE(WIFEXITED(status)) << run;
  ASSERT_EQ(WEXITSTATUS(status), 1) << run;  // the matrix fails, and the report is still written
  const std::string html = read_text(report);
  const nlohmann::json matrix = nlohmann::json::parse(read_text(work / "out" / "faults.json"));
  int failing = 0;
  for (const auto& row : matrix.at("rows")) failing += row.at("pass").get<bool>() ? 0 : 1;
  ASSERT_GT(failing, 0);

  const fs::path dom_file = work / "dom.html";
  ASSERT_EQ(run_chromium(chromium, work / "profile-dom", "--dump-dom", report, dom_file, log), 0)
      << read_text(log);
  const std::string dom = read_text(dom_file);
  EXPECT_EQ(table_body_rows(dom, "matrix"), static_cast<int>(matrix.at("rows").size()));
  const std::size_t start = dom.find("<table id=\"matrix\"");
  ASSERT_NE(start, std::string::npos);
  const std::string table = dom.substr(start, dom.find("</table>", start) - start);
  EXPECT_EQ(count(table, "<tr class=\"fail\">"), failing);
  EXPECT_EQ(count(table, "<td>FAIL</td>"), failing);
  EXPECT_GE(count(html, "<svg "), 1);
  EXPECT_EQ(count(dom, "<svg "), count(html, "<svg "));
  EXPECT_NE(dom.find("High-voltage caution"), std::string::npos);

  std::error_code ignored;
  if (!::testing::Test::HasFailure()) fs::remove_all(work, ignored);
}

}  // namespace
