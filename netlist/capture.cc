#include "netlist/capture.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <optional>
#include <string_view>

#include <fmt/format.h>

namespace linkrise::netlist {
namespace {

struct Cell {
  std::string_view text;  // trimmed, quotes removed
  int column = 1;         // 1-based character column of the cell's start
};

std::string_view trim(std::string_view text) {
  while (!text.empty() && (text.front() == ' ' || text.front() == '\t')) text.remove_prefix(1);
  while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.remove_suffix(1);
  if (text.size() >= 2 && text.front() == '"' && text.back() == '"') text = text.substr(1, text.size() - 2);
  return text;
}

// Commas unless the line has none: then semicolons, then tabs (exports from European locales and spreadsheets).
char delimiter_of(std::string_view line) {
  if (line.find(',') != std::string_view::npos) return ',';
  if (line.find(';') != std::string_view::npos) return ';';
  return '\t';
}

void split(std::string_view line, char delimiter, std::vector<Cell>& cells) {
  cells.clear();
  std::size_t start = 0;
  while (true) {
    std::size_t end = line.find(delimiter, start);
    std::string_view raw = line.substr(start, end == std::string_view::npos ? std::string_view::npos : end - start);
    std::size_t lead = 0;
    while (lead < raw.size() && (raw[lead] == ' ' || raw[lead] == '\t')) ++lead;
    cells.push_back(Cell{trim(raw), static_cast<int>(start + lead) + 1});
    if (end == std::string_view::npos) break;
    start = end + 1;
  }
}

std::optional<double> number(std::string_view text) {
  if (!text.empty() && text.front() == '+') text.remove_prefix(1);
  double value = 0.0;
  auto [end, error] = std::from_chars(text.data(), text.data() + text.size(), value);
  if (text.empty() || error != std::errc() || end != text.data() + text.size() || !std::isfinite(value)) {
    return std::nullopt;
  }
  return value;
}

// A row of numbers: at least two cells, the first a number (metadata lines start with a word; a later cell may
// hold words in a column nobody uses).
bool is_number_row(const std::vector<Cell>& cells) { return cells.size() >= 2 && number(cells.front().text); }

// How a column's values become SI: value·scale + offset (the offset for degC).
struct Conversion {
  Dimension dimension;
  double scale = 1.0;
  double offset = 0.0;
};

Conversion conversion_of(const std::string& header, const SourceMark& mark) {
  auto [name, unit] = split_header(header);
  if (unit.empty()) {
    throw InputError(mark, fmt::format("the header '{}' gives no unit", header),
                     fmt::format("write the unit in the header, e.g. '{} [V]' or '{} (A)'", name, name));
  }
  if (unit == "1") return Conversion{Dimension::none(), 1.0, 0.0};
  std::string problem;
  auto quantity = parse_quantity("1 " + unit, problem);
  if (!quantity) {
    throw InputError(mark, fmt::format("the unit '{}' of header '{}' is not a unit ({})", unit, header, problem),
                     "use SI units with prefixes, e.g. V, mA, us");
  }
  Conversion conversion{quantity->dimension, quantity->value, 0.0};
  if (quantity->absolute_temperature) {
    conversion.offset = quantity->value - 1.0;  // '1 degC' reads 274.15 K: scale 1, offset 273.15 K
    conversion.scale = 1.0;
  }
  return conversion;
}

// One used column of the file: where its cells sit and how they convert.
struct Slot {
  std::size_t cell = 0;
  Conversion conversion;
};

class CaptureReader {
 public:
  explicit CaptureReader(const CaptureRequest& request) : request_(request) { capture_.file = request.file; }

  Capture read() {
    std::ifstream in(request_.file, std::ios::binary);
    if (!in) {
      throw InputError(request_.mark, fmt::format("cannot open the capture file '{}'", request_.file),
                       "check the path (a case's 'measured: file' is relative to the case file's folder)");
    }
    std::string line, candidate;
    int number_of_line = 0, candidate_line = 0;
    bool data = false;
    while (std::getline(in, line)) {
      ++number_of_line;
      if (!line.empty() && line.back() == '\r') line.pop_back();
      if (number_of_line == 1 && line.rfind("\xEF\xBB\xBF", 0) == 0) line.erase(0, 3);  // a byte-order mark
      if (trim(line).empty()) continue;
      if (!data) {
        split(line, delimiter_of(line), cells_);
        if (!request_.time_header.empty() && cells_.front().text == request_.time_header) {
          header(line, number_of_line);
          reserve_rows(lines_left(in));
          data = true;
          continue;
        }
        if (request_.time_header.empty() && is_number_row(cells_)) {
          if (candidate_line == 0) {
            throw InputError(mark(number_of_line, 1), "the first row of numbers has no header row above it",
                             "add a header row such as 'time [s],link_plus [V]'");
          }
          header(candidate, candidate_line);
          reserve_rows(lines_left(in) + 1);
          data = true;
        } else {
          candidate = line;
          candidate_line = number_of_line;
          ++capture_.metadata_lines;
          continue;
        }
      }
      row(line, number_of_line);
    }
    finish(number_of_line, data);
    return std::move(capture_);
  }

 private:
  SourceMark mark(int line, int column) const { return SourceMark{request_.file, line, column}; }

  void finish(int last_line, bool data) {
    if (!data) {
      throw InputError(mark(last_line, 1),
                       request_.time_header.empty()
                           ? std::string("the capture has no row of numbers")
                           : fmt::format("no line starts with the time header '{}'", request_.time_header),
                       "a capture needs a header row and rows of numbers below it");
    }
    if (capture_.times.empty()) {
      throw InputError(mark(last_line, 1), "the capture has a header row but no row of numbers below it",
                       "export the samples with the header");
    }
    if (capture_.metadata_lines > 0 && request_.time_header.empty()) --capture_.metadata_lines;  // the header
    // Compact: exactly one double per row and column, nothing spare from the vectors' growth.
    capture_.times.shrink_to_fit();
    for (auto& column : capture_.columns) column.values.shrink_to_fit();
  }

  // Sets up the time column and the used columns from the header row.
  void header(const std::string& line, int line_number) {
    delimiter_ = delimiter_of(line);
    split(line, delimiter_, cells_);
    capture_.header_line = line_number;
    std::vector<std::string> headers;
    for (const auto& cell : cells_) headers.emplace_back(cell.text);
    time_header_ = headers.front();
    time_ = conversion_of(headers.front(), mark(line_number, cells_.front().column));
    if (!(time_.dimension == Dimension::time())) {
      throw InputError(mark(line_number, cells_.front().column),
                       fmt::format("the first column '{}' must be the time, but its unit is {}", headers.front(),
                                   time_.dimension.describe()),
                       "put the time in the first column, e.g. 'time [s]'");
    }
    if (request_.columns.empty()) {
      for (std::size_t c = 1; c < headers.size(); ++c) {
        if (split_header(headers[c]).second.empty()) continue;  // a column of words
        add_column(split_header(headers[c]).first, c, headers[c], line_number);
      }
      return;
    }
    for (const auto& mapping : request_.columns) {
      std::size_t found = 0;
      for (std::size_t c = 1; c < headers.size() && found == 0; ++c) {
        if (headers[c] == mapping.header) found = c;
      }
      if (found == 0) {
        throw InputError(mark(line_number, 1),
                         fmt::format("the capture has no column '{}' (mapped to '{}' at {})", mapping.header,
                                     mapping.name, mapping.mark.to_string()),
                         did_you_mean(mapping.header, headers, fmt::format("its headers are: {}",
                                                                           fmt::join(headers, ", "))));
      }
      add_column(mapping.name, found, headers[found], line_number);
    }
  }

  void add_column(const std::string& name, std::size_t cell, const std::string& header, int line_number) {
    SourceMark where = mark(line_number, cells_[cell].column);
    Slot slot{cell, conversion_of(header, where)};
    slots_.push_back(slot);
    capture_.columns.push_back(CaptureColumn{name, header, slot.conversion.dimension, where, {}});
  }

  // The lines after the stream's position (one more when the last has no line end), counted in a first pass over
  // the rest of the file: a column grown row by row would leave the copies it outgrew behind in the heap (a
  // million rows: about as much again as the columns themselves).
  static std::size_t lines_left(std::ifstream& in) {
    const std::streampos here = in.tellg();
    std::size_t lines = 1;
    std::vector<char> chunk(1 << 16);
    while (in.read(chunk.data(), static_cast<std::streamsize>(chunk.size())) || in.gcount() > 0) {
      lines += static_cast<std::size_t>(std::count(chunk.data(), chunk.data() + in.gcount(), '\n'));
    }
    in.clear();
    in.seekg(here);
    return lines;
  }
  void reserve_rows(std::size_t rows) {
    capture_.times.reserve(rows);
    for (auto& column : capture_.columns) column.values.reserve(rows);
  }

  void row(const std::string& line, int line_number) {
    if (capture_.first_data_line == 0) capture_.first_data_line = line_number;
    split(line, delimiter_, cells_);
    end_column_ = static_cast<int>(line.size()) + 1;
    double time = value(line_number, 0, time_, time_header_);
    if (!capture_.times.empty() && !(time > capture_.times.back())) {
      throw InputError(mark(line_number, cells_.front().column),
                       fmt::format("the time {} s does not increase (the row before is at {} s)", time,
                                   capture_.times.back()),
                       "a capture's rows must be in time order without repeats");
    }
    capture_.times.push_back(time);
    for (std::size_t s = 0; s < slots_.size(); ++s) {
      capture_.columns[s].values.push_back(value(line_number, slots_[s].cell, slots_[s].conversion,
                                                 capture_.columns[s].header));
    }
  }

  double value(int line_number, std::size_t cell, const Conversion& conversion, const std::string& header) const {
    if (cell >= cells_.size() || cells_[cell].text.empty()) {
      int column = cell < cells_.size() ? cells_[cell].column : end_column_;
      throw InputError(mark(line_number, column), fmt::format("the row has no value in column '{}'", header),
                       "every row needs a number in each column used");
    }
    auto parsed = number(cells_[cell].text);
    if (!parsed) {
      throw InputError(mark(line_number, cells_[cell].column),
                       fmt::format("'{}' in column '{}' is not a finite number", cells_[cell].text, header),
                       "write plain numbers with a decimal point, e.g. 1.25e-3");
    }
    return *parsed * conversion.scale + conversion.offset;
  }

  const CaptureRequest& request_;
  Capture capture_;
  std::vector<Cell> cells_;
  std::vector<Slot> slots_;
  Conversion time_;
  std::string time_header_;
  int end_column_ = 1;  // one past the current row's last character
  char delimiter_ = ',';
};

}  // namespace

const CaptureColumn* Capture::find(const std::string& name) const {
  for (const auto& column : columns) {
    if (column.name == name) return &column;
  }
  return nullptr;
}

std::pair<std::string, std::string> split_header(const std::string& header) {
  std::string_view text = trim(header);
  for (auto [open, close] : {std::pair{'[', ']'}, std::pair{'(', ')'}}) {
    if (text.empty() || text.back() != close) continue;
    std::size_t at = text.rfind(open);
    if (at == std::string_view::npos) continue;
    return {std::string(trim(text.substr(0, at))), std::string(trim(text.substr(at + 1, text.size() - at - 2)))};
  }
  return {std::string(text), ""};
}

Capture read_capture(const CaptureRequest& request) { return CaptureReader(request).read(); }

}  // namespace linkrise::netlist
