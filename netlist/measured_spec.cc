#include "netlist/measured_spec.h"

#include <filesystem>

#include <fmt/format.h>

#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

std::optional<MeasuredSpec> read_measured(const Tree& root, const std::string& case_file) {
  const Tree* block = root.find("measured");
  if (block == nullptr || block->kind == Tree::Kind::Null) return std::nullopt;
  if (!block->is_map()) {
    throw InputError(block->mark, "'measured' must be a block with at least 'file'",
                     "write e.g. 'measured: {file: capture.csv}'");
  }
  ParameterReader reader(*block, "the measured block");
  MeasuredSpec spec;
  spec.mark = block->mark;
  auto file = reader.text("file");
  if (!file || file->empty()) {
    reader.reject_misspelling("file");
    throw InputError(block->mark, "the measured block names no capture 'file'", "add e.g. 'file: capture.csv'");
  }
  spec.file_mark = reader.mark("file");
  std::filesystem::path path(*file);
  if (path.is_relative()) path = std::filesystem::path(case_file).parent_path() / path;
  spec.file = path.lexically_normal().string();
  spec.time_header = reader.text("time").value_or("");
  spec.time_offset = reader.quantity("time_offset", Dimension::time(), Bound::Any, 0.0);
  if (const Tree* columns = reader.child("columns"); columns != nullptr && columns->kind != Tree::Kind::Null) {
    if (!columns->is_map()) {
      throw InputError(columns->mark, "'columns' must be a block of '<quantity>: <header>' lines",
                       "write e.g. 'columns: {link_plus: \"CH2 [V]\"}'");
    }
    for (std::size_t i = 0; i < columns->entries.size(); ++i) {
      const auto& [name, header] = columns->entries[i];
      SourceMark mark = i < columns->key_marks.size() ? columns->key_marks[i] : columns->mark;
      if (!header.is_scalar() || header.text.empty()) {
        throw InputError(header.mark, fmt::format("column '{}' must name one header of the capture", name),
                         "write e.g. 'link_plus: \"CH2 [V]\"'");
      }
      spec.columns.push_back(ColumnMapping{name, header.text, mark});
    }
  }
  reader.finish();
  return spec;
}

std::vector<ColumnMapping> read_column_options(const std::vector<std::string>& texts) {
  std::vector<ColumnMapping> mappings;
  for (std::size_t i = 0; i < texts.size(); ++i) {
    const std::string& text = texts[i];
    const SourceMark mark{fmt::format("command line (--column #{})", i + 1), 0, 0};
    auto equals = text.find('=');
    if (equals == std::string::npos || equals == 0 || equals + 1 == text.size()) {
      throw InputError(mark, fmt::format("'{}' is not NAME=HEADER", text),
                       "write e.g. --column \"link_plus=CH2 [V]\"");
    }
    mappings.push_back(ColumnMapping{text.substr(0, equals), text.substr(equals + 1), mark});
  }
  return mappings;
}

}  // namespace linkrise::netlist
