#include "netlist/overrides.h"

#include <algorithm>

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/units.h"

namespace linkrise::netlist {

std::vector<Override> read_set_block(const Tree& set, const std::string& owner, const std::string& example) {
  if (!set.is_map()) {
    throw InputError(set.mark, fmt::format("{} 'set' must be a block of '<path>: <value>' lines", owner), example);
  }
  std::vector<Override> overrides;
  for (std::size_t i = 0; i < set.entries.size(); ++i) {
    const auto& [path, value] = set.entries[i];
    SourceMark mark = i < set.key_marks.size() ? set.key_marks[i] : set.mark;
    if (!value.is_scalar()) {
      throw InputError(value.mark, fmt::format("override '{}' must be a single value", path),
                       "write e.g. '47 Ohm' or '95 %'");
    }
    overrides.push_back(Override{path, value.text, mark});
  }
  return overrides;
}
namespace {

std::vector<std::string> split_path(const std::string& path, const SourceMark& mark) {
  std::vector<std::string> parts;
  std::size_t start = 0;
  while (true) {
    std::size_t dot = path.find('.', start);
    std::string piece = path.substr(start, dot == std::string::npos ? std::string::npos : dot - start);
    if (piece.empty()) {
      throw InputError(mark, fmt::format("override path '{}' has an empty part", path),
                       "write e.g. 'r_pre.resistance', 'ambient' or 'sequence.timeout'");
    }
    parts.push_back(piece);
    if (dot == std::string::npos) break;
    start = dot + 1;
  }
  return parts;
}

// Every mark of a parsed override value points at the override itself.
void mark_all(Tree& tree, const SourceMark& mark) {
  tree.mark = mark;
  for (auto& key_mark : tree.key_marks) key_mark = mark;
  for (auto& item : tree.items) mark_all(item, mark);
  for (auto& [key, value] : tree.entries) mark_all(value, mark);
}

Tree value_tree(const std::string& text, const SourceMark& mark) {
  if (!text.empty() && (text.front() == '[' || text.front() == '{')) {
    Tree parsed;
    try {
      parsed = parse_yaml(text, mark.file);
    } catch (const InputError& error) {
      throw InputError(mark, fmt::format("override value '{}' is not a valid YAML list or block", text),
                       "write e.g. '[k_neg, k_pre]' or '{ratio: 95 %}'");
    }
    mark_all(parsed, mark);
    return parsed;
  }
  return Tree::scalar(text, mark);
}

std::vector<std::string> part_names(const Tree& root) {
  std::vector<std::string> names;
  if (const Tree* parts = root.find("parts"); parts != nullptr && parts->is_list()) {
    for (const Tree& part : parts->items) {
      if (const Tree* name = part.find("name"); name != nullptr && name->is_scalar()) names.push_back(name->text);
    }
  }
  return names;
}

bool is_section(const std::string& word) {
  const auto& sections = case_sections();
  return word != "parts" && std::find(sections.begin(), sections.end(), word) != sections.end();
}

// The block a path starts in, and the keys below it.
Tree* start_block(Tree& root, const std::vector<std::string>& pieces, const std::string& path, const SourceMark& mark,
                  std::size_t& first_key) {
  const std::string& head = pieces.front();
  if (is_section(head)) {
    if (pieces.size() == 1) {
      first_key = 0;
      return &root;  // a top-level scalar such as ambient
    }
    Tree* section = root.find(head);
    if (section == nullptr || section->kind == Tree::Kind::Null) {
      throw InputError(mark, fmt::format("override '{}': the case has no '{}' block", path, head),
                       fmt::format("add a '{}:' block to the case first", head));
    }
    first_key = 1;
    return section;
  }
  if (pieces.size() < 2) {
    std::vector<std::string> candidates = part_names(root);
    for (const auto& section : case_sections()) candidates.push_back(section);
    throw InputError(mark, fmt::format("override path '{}' names neither a part parameter nor a case setting", path),
                     did_you_mean(head, candidates, "write '<part>.<parameter>', 'ambient' or '<section>.<key>'"));
  }
  if (pieces[1] == "name" || pieces[1] == "nodes") {
    throw InputError(mark, fmt::format("override '{}': a part's {} cannot be overridden", path, pieces[1]),
                     "override its parameters; structural edits belong in a variant of the case");
  }
  first_key = 1;
  return &part_block(root, head, mark);
}

}  // namespace

Tree& part_block(Tree& root, const std::string& name, const SourceMark& mark) {
  Tree* parts = root.find("parts");
  if (parts != nullptr && parts->is_list()) {
    for (Tree& part : parts->items) {
      const Tree* part_name = part.find("name");
      if (part_name != nullptr && part_name->is_scalar() && part_name->text == name) return part;
    }
  }
  std::vector<std::string> candidates = part_names(root);
  for (const auto& section : case_sections()) candidates.push_back(section);
  throw InputError(mark, fmt::format("'{}' is neither a part of the case nor a case setting", name),
                   did_you_mean(name, candidates, "name a part from the parts list, 'ambient' or a block such as 'sequence'"));
}

void apply_override(Tree& root, const Override& change) {
  auto pieces = split_path(change.path, change.mark);
  std::size_t key = 0;
  Tree* block = start_block(root, pieces, change.path, change.mark, key);
  for (; key + 1 < pieces.size(); ++key) {
    Tree* next = block->find(pieces[key]);
    if (next == nullptr) {
      block->set(pieces[key], Tree{Tree::Kind::Map, "", change.mark, {}, {}, {}});
      next = block->find(pieces[key]);
    } else if (!next->is_map() && next->kind != Tree::Kind::Null) {
      throw InputError(change.mark,
                       fmt::format("override '{}': '{}' is a single value, not a block", change.path, pieces[key]),
                       fmt::format("override '{}' itself", pieces[key]));
    }
    if (next->kind == Tree::Kind::Null) next->kind = Tree::Kind::Map;
    block = next;
  }
  if (!block->is_map()) {
    throw InputError(change.mark, fmt::format("override '{}' does not lead into a block", change.path));
  }
  Tree value = value_tree(change.value, change.mark);
  // set() keeps the old position when the new value has none; an override always carries its own.
  Tree* existing = block->find(pieces.back());
  if (existing != nullptr) {
    *existing = std::move(value);
  } else {
    block->set(pieces.back(), std::move(value));
  }
}

void apply_overrides(Tree& root, const std::vector<Override>& changes) {
  for (const auto& change : changes) apply_override(root, change);
}

const Tree* find_value(const Tree& root, const std::string& path, const SourceMark& mark) {
  auto pieces = split_path(path, mark);
  std::size_t key = 0;
  const Tree* block = start_block(const_cast<Tree&>(root), pieces, path, mark, key);
  for (; key < pieces.size(); ++key) {
    if (block == nullptr || !block->is_map()) return nullptr;
    block = block->find(pieces[key]);
  }
  return block;
}

std::optional<Quantity> quantity_at(const Tree& root, const std::string& path, const SourceMark& mark,
                                    const std::string& fix) {
  const Tree* node = find_value(root, path, mark);
  if (node == nullptr) return std::nullopt;
  if (!node->is_scalar()) throw InputError(mark, fmt::format("'{}' has no single value in the case", path), fix);
  std::string problem;
  auto quantity = parse_quantity(node->text, problem);
  if (!quantity) {
    throw InputError(node->mark, fmt::format("the value of '{}' '{}' is not a quantity: {}", path, node->text, problem),
                     "write a number with a unit, e.g. '22 Ohm' or '1.5 mF'");
  }
  return quantity;
}

void scale_value(Tree& root, const std::string& path, double factor, const SourceMark& mark) {
  const Tree* node = find_value(root, path, mark);
  if (node == nullptr || !node->is_scalar()) {
    throw InputError(mark, fmt::format("cannot scale '{}': it is not set to a single value", path),
                     "give the value in the case file first");
  }
  std::string problem;
  auto quantity = parse_quantity(node->text, problem);
  if (!quantity || quantity->absolute_temperature) {
    throw InputError(mark, fmt::format("cannot scale '{}' = '{}': not a quantity that scales", path, node->text));
  }
  std::string unit = quantity->bare ? "" : quantity->dimension.symbol();
  std::string text = fmt::format("{:.15g}", quantity->value * factor);
  if (!unit.empty()) text += " " + unit;
  apply_override(root, Override{path, text, mark});
}

std::string unused_part_name(const Tree& root, const std::string& base) {
  auto names = part_names(root);
  std::string name = base;
  for (int n = 2; std::find(names.begin(), names.end(), name) != names.end(); ++n) name = fmt::format("{}_{}", base, n);
  return name;
}

void add_part(Tree& root, const std::string& name, const std::string& kind, const std::string& plus,
              const std::string& minus, const std::vector<std::pair<std::string, std::string>>& parameters,
              const SourceMark& mark) {
  auto names = part_names(root);
  if (std::find(names.begin(), names.end(), name) != names.end()) {
    throw InputError(mark, fmt::format("cannot add part '{}': the name is taken", name));
  }
  Tree* parts = root.find("parts");
  if (parts == nullptr || !parts->is_list()) throw InputError(mark, "the case has no parts list to add to");
  Tree part;
  part.kind = Tree::Kind::Map;
  part.mark = mark;
  part.set("name", Tree::scalar(name, mark));
  part.set("kind", Tree::scalar(kind, mark));
  Tree nodes;
  nodes.kind = Tree::Kind::List;
  nodes.mark = mark;
  nodes.items = {Tree::scalar(plus, mark), Tree::scalar(minus, mark)};
  part.set("nodes", nodes);
  for (const auto& [key, value] : parameters) part.set(key, value_tree(value, mark));
  parts->items.push_back(std::move(part));
}

void replace_part(Tree& root, const std::string& name, const std::string& kind,
                  const std::vector<std::pair<std::string, std::string>>& parameters, const SourceMark& mark) {
  Tree& block = part_block(root, name, mark);
  Tree replacement;
  replacement.kind = Tree::Kind::Map;
  replacement.mark = mark;
  replacement.set("name", *block.find("name"));
  replacement.set("kind", Tree::scalar(kind, mark));
  if (const Tree* nodes = block.find("nodes")) replacement.set("nodes", *nodes);
  for (const auto& [key, value] : parameters) replacement.set(key, value_tree(value, mark));
  block = std::move(replacement);
}

void reverse_part(Tree& root, const std::string& name, const SourceMark& mark) {
  Tree& block = part_block(root, name, mark);
  Tree* nodes = block.find("nodes");
  if (nodes == nullptr || !nodes->is_list() || nodes->items.size() != 2) {
    throw InputError(mark, fmt::format("part '{}' has no pair of nodes to swap", name));
  }
  std::swap(nodes->items[0], nodes->items[1]);
}

}  // namespace linkrise::netlist
