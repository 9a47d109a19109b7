#include "netlist/tree.h"

#include <filesystem>
#include <optional>
#include <regex>
#include <fstream>
#include <sstream>
#include <system_error>

#include <fmt/format.h>
#include <yaml-cpp/eventhandler.h>
#include <yaml-cpp/yaml.h>

namespace linkrise::netlist {

const Tree* Tree::find(std::string_view key) const {
  for (const auto& [name, value] : entries) {
    if (name == key) return &value;
  }
  return nullptr;
}

Tree* Tree::find(std::string_view key) {
  for (auto& [name, value] : entries) {
    if (name == key) return &value;
  }
  return nullptr;
}

SourceMark Tree::key_mark(std::string_view key) const {
  for (std::size_t i = 0; i < entries.size(); ++i) {
    if (entries[i].first == key && i < key_marks.size()) return key_marks[i];
  }
  return mark;
}

void Tree::set(const std::string& key, Tree value) {
  if (Tree* existing = find(key)) {
    SourceMark keep = existing->mark;
    *existing = std::move(value);
    if (existing->mark.line == 0) existing->mark = keep;
    return;
  }
  if (kind == Kind::Null) kind = Kind::Map;
  key_marks.push_back(value.mark);
  entries.push_back({key, std::move(value)});
}

Tree Tree::scalar(std::string text, SourceMark mark) {
  Tree tree;
  tree.kind = Kind::Scalar;
  tree.text = std::move(text);
  tree.mark = std::move(mark);
  return tree;
}

namespace {
SourceMark to_mark(const YAML::Mark& mark, const std::string& file) {
  return SourceMark{file, mark.line + 1, mark.column + 1};
}

// A quoted value left open swallows the rest of the file as text (YAML folds its line breaks into spaces), so
// the error would otherwise be a missing section far away. A quoted value (tag "!") whose quote is not closed
// on its own line and that holds "word: " is refused at its start.
void check_quoted(const YAML::Node& node, const Tree& tree, const std::vector<std::string>& lines) {
  if (node.Tag() != "!" || tree.mark.line < 1 || tree.mark.line > static_cast<int>(lines.size())) return;
  const std::string& line = lines[tree.mark.line - 1];
  std::size_t open = static_cast<std::size_t>(tree.mark.column - 1);
  if (open >= line.size() || (line[open] != '"' && line[open] != '\'')) return;
  if (line.find(line[open], open + 1) != std::string::npos) return;
  static const std::regex key_text(R"(([A-Za-z_][A-Za-z0-9_]*): )");
  std::smatch found;
  if (!std::regex_search(tree.text, found, key_text)) return;
  throw InputError(tree.mark,
                   fmt::format("a quoted value is not closed on its line and runs on, holding '{}:' as text",
                               found[1].str()),
                   "close the quote at the end of its line");
}

// The first tab in the indentation of lines 1 … `last_line`: YAML indents with spaces only, and yaml-cpp's own
// message for a tab ("end of map not found") does not say so.
std::optional<SourceMark> tab_in_indentation(const std::string& text, int last_line, const std::string& file) {
  std::istringstream lines(text);
  std::string line;
  for (int number = 1; number <= last_line && std::getline(lines, line); ++number) {
    for (std::size_t i = 0; i < line.size() && (line[i] == ' ' || line[i] == '\t'); ++i) {
      bool content_follows = line.find_first_not_of(" \t") != std::string::npos && line[line.find_first_not_of(" \t")] != '#';
      if (line[i] == '\t' && content_follows) return SourceMark{file, number, static_cast<int>(i) + 1};
    }
  }
  return std::nullopt;
}

// The innermost '[' or '{' still open before line `last_line` (quotes and comments skipped): where a flow list or
// block without its closing bracket starts, which yaml-cpp reports only where it gave up.
std::optional<SourceMark> open_bracket(const std::string& text, int last_line, const std::string& file) {
  std::vector<SourceMark> open;
  int line = 1, column = 0;
  char quote = 0;
  bool comment = false;
  for (char c : text) {
    if ((c & 0xC0) != 0x80) ++column;  // columns count characters
    if (c == '\n') {
      if (++line > last_line) break;
      column = 0;
      comment = false;
      continue;
    }
    if (comment) continue;
    if (quote != 0) {
      if (c == quote) quote = 0;
    } else if (c == '"' || c == '\'') {
      quote = c;
    } else if (c == '#') {
      comment = true;
    } else if (c == '[' || c == '{') {
      open.push_back(SourceMark{file, line, column});
    } else if ((c == ']' || c == '}') && !open.empty()) {
      open.pop_back();
    }
  }
  if (open.empty()) return std::nullopt;
  return open.back();
}

Tree convert(const YAML::Node& node, const std::string& file, const std::vector<std::string>& lines) {
  Tree tree;
  tree.mark = to_mark(node.Mark(), file);
  switch (node.Type()) {
    case YAML::NodeType::Null:
    case YAML::NodeType::Undefined:
      tree.kind = Tree::Kind::Null;
      break;
    case YAML::NodeType::Scalar:
      tree.kind = Tree::Kind::Scalar;
      tree.text = node.Scalar();
      check_quoted(node, tree, lines);
      break;
    case YAML::NodeType::Sequence:
      tree.kind = Tree::Kind::List;
      for (const auto& item : node) tree.items.push_back(convert(item, file, lines));
      break;
    case YAML::NodeType::Map:
      tree.kind = Tree::Kind::Map;
      for (const auto& entry : node) {
        std::string key = entry.first.as<std::string>();
        SourceMark key_mark = to_mark(entry.first.Mark(), file);
        if (tree.find(key) != nullptr) {
          throw InputError(key_mark, fmt::format("key '{}' appears twice in the same block", key),
                           "keep one of the two entries");
        }
        tree.key_marks.push_back(key_mark);
        tree.entries.push_back({key, convert(entry.second, file, lines)});
      }
      break;
  }
  return tree;
}

// Length of the UTF-8 sequence starting at text[i], or 0 when it is not valid UTF-8 (overlong forms,
// surrogates and values above U+10FFFF included).
std::size_t utf8_length(const std::string& text, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
  unsigned char lead = byte(i);
  if (lead < 0x80) return 1;
  std::size_t length = lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : lead >= 0xC2 ? 2 : 0;
  if (length == 0 || lead > 0xF4 || i + length > text.size()) return 0;
  for (std::size_t k = 1; k < length; ++k) {
    if ((byte(i + k) & 0xC0) != 0x80) return 0;
  }
  unsigned char second = byte(i + 1);
  if ((lead == 0xE0 && second < 0xA0) || (lead == 0xED && second > 0x9F) || (lead == 0xF0 && second < 0x90) ||
      (lead == 0xF4 && second > 0x8F)) {
    return 0;
  }
  return length;
}

// Where each YAML document of the text begins, read one document at a time. yaml-cpp 0.7's LoadAll never returns
// on a token that fits no node (a ',' in block context, as in "  - a" followed by " ,"): the parser reports the
// same empty document again and again without moving on, so a document that starts where the last one did is a
// syntax error at that place. Reading stops once a second document is known to exist.
class DocumentStarts : public YAML::EventHandler {
 public:
  std::vector<YAML::Mark> starts;
  void OnDocumentStart(const YAML::Mark& mark) override { starts.push_back(mark); }
  void OnDocumentEnd() override {}
  void OnNull(const YAML::Mark&, YAML::anchor_t) override {}
  void OnAlias(const YAML::Mark&, YAML::anchor_t) override {}
  void OnScalar(const YAML::Mark&, const std::string&, YAML::anchor_t, const std::string&) override {}
  void OnSequenceStart(const YAML::Mark&, const std::string&, YAML::anchor_t, YAML::EmitterStyle::value) override {}
  void OnSequenceEnd() override {}
  void OnMapStart(const YAML::Mark&, const std::string&, YAML::anchor_t, YAML::EmitterStyle::value) override {}
  void OnMapEnd() override {}
};

std::vector<YAML::Mark> document_starts(const std::string& text, const std::string& file) {
  std::istringstream stream(text);
  YAML::Parser parser(stream);
  DocumentStarts handler;
  auto& starts = handler.starts;
  while (starts.size() < 3 && parser.HandleNextDocument(handler)) {
    if (starts.size() >= 2 && starts[starts.size() - 1].pos == starts[starts.size() - 2].pos) {
      const YAML::Mark& stuck = starts.back();
      char found = stuck.pos >= 0 && static_cast<std::size_t>(stuck.pos) < text.size() ? text[stuck.pos] : ' ';
      throw InputError(to_mark(stuck, file), fmt::format("YAML syntax: '{}' cannot stand here", found),
                       "quote a value that holds it, or remove it (a list item starts with '- ')");
    }
  }
  return starts;
}

// The case file must be UTF-8 text: yaml-cpp would replace a stray byte silently, so a Latin-1 "é" in a name
// or a file saved as UTF-16 is refused here with its place (column counted in characters, as YAML's are).
void check_text(const std::string& text, const std::string& file) {
  if (text.size() >= 2 && ((text[0] == '\xFF' && text[1] == '\xFE') || (text[0] == '\xFE' && text[1] == '\xFF'))) {
    throw InputError(SourceMark{file, 1, 1}, "the file is UTF-16 text, not UTF-8",
                     "save it as UTF-8 (e.g. iconv -f UTF-16 -t UTF-8)");
  }
  int line = 1, column = 1;
  for (std::size_t i = 0; i < text.size();) {
    if (text[i] == '\0') {
      throw InputError(SourceMark{file, line, column}, "the file holds a NUL byte: it is binary or UTF-16 text",
                       "save the case as UTF-8 text");
    }
    std::size_t length = utf8_length(text, i);
    if (length == 0) {
      throw InputError(SourceMark{file, line, column},
                       fmt::format("byte 0x{:02X} is not UTF-8 text (a Latin-1 or Windows-1252 character?)",
                                   static_cast<unsigned char>(text[i])),
                       "save the file as UTF-8 (e.g. iconv -f LATIN1 -t UTF-8)");
    }
    if (text[i] == '\n') {
      ++line;
      column = 1;
    } else {
      ++column;
    }
    i += length;
  }
}
}  // namespace

Tree parse_yaml(const std::string& text, const std::string& file_name) {
  check_text(text, file_name);
  try {
    std::vector<YAML::Mark> starts = document_starts(text, file_name);
    if (starts.size() > 1) {
      // A second document (after ---) would be ignored without a word.
      throw InputError(to_mark(starts[1], file_name), "a second YAML document: a case file holds one",
                       "remove the '---' line and what follows, or put the second case in a file of its own");
    }
    std::vector<YAML::Node> documents;
    if (!starts.empty()) documents.push_back(YAML::Load(text));
    std::vector<std::string> lines;
    std::istringstream stream(text);
    for (std::string line; std::getline(stream, line);) lines.push_back(line);
    Tree tree = documents.empty() ? Tree{} : convert(documents.front(), file_name, lines);
    if (tree.kind == Tree::Kind::Null) {
      throw InputError(SourceMark{file_name, 1, 1}, "the file is empty (or holds only comments)",
                       "start from a stored case in cases/");
    }
    return tree;
  } catch (const YAML::Exception& error) {
    if (auto tab = tab_in_indentation(text, error.mark.line + 1, file_name)) {
      throw InputError(*tab, "YAML syntax: a tab in the indentation (YAML indents with spaces only)",
                       "replace the tab with spaces, aligned with the keys of the same block");
    }
    if (error.msg.find("flow not found") != std::string::npos) {
      if (auto bracket = open_bracket(text, error.mark.line + 1, file_name)) {
        throw InputError(*bracket, "YAML syntax: this bracket is never closed", "close the list with ']' or the block with '}'");
      }
    }
    throw InputError(to_mark(error.mark, file_name), fmt::format("YAML syntax: {}", error.msg),
                     "check indentation, colons and quotes near this position");
  }
}

Tree load_yaml_file(const std::string& path) {
  std::error_code ignored;
  if (std::filesystem::is_directory(path, ignored)) {
    throw InputError(SourceMark{path, 0, 0}, "this is a directory, not a case file",
                     "name a case file (e.g. cases/demo_storage_rack.yaml); only 'linkrise check' takes directories");
  }
  std::ifstream stream(path, std::ios::binary);
  if (!stream) {
    throw InputError(SourceMark{path, 0, 0}, "cannot open the case file", "check the path and permissions");
  }
  std::ostringstream content;
  content << stream.rdbuf();
  return parse_yaml(content.str(), path);
}

}  // namespace linkrise::netlist
