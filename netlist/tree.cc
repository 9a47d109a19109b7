#include "netlist/tree.h"

#include <fstream>
#include <sstream>

#include <fmt/format.h>
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
  entries.emplace_back(key, std::move(value));
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

Tree convert(const YAML::Node& node, const std::string& file) {
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
      break;
    case YAML::NodeType::Sequence:
      tree.kind = Tree::Kind::List;
      for (const auto& item : node) tree.items.push_back(convert(item, file));
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
        tree.entries.emplace_back(key, convert(entry.second, file));
      }
      break;
  }
  return tree;
}
}  // namespace

Tree parse_yaml(const std::string& text, const std::string& file_name) {
  try {
    YAML::Node root = YAML::Load(text);
    return convert(root, file_name);
  } catch (const YAML::Exception& error) {
    throw InputError(to_mark(error.mark, file_name), fmt::format("YAML syntax: {}", error.msg),
                     "check indentation, colons and quotes near this position");
  }
}

Tree load_yaml_file(const std::string& path) {
  std::ifstream stream(path, std::ios::binary);
  if (!stream) {
    throw InputError(SourceMark{path, 0, 0}, "cannot open the case file", "check the path and permissions");
  }
  std::ostringstream content;
  content << stream.rdbuf();
  return parse_yaml(content.str(), path);
}

}  // namespace linkrise::netlist
