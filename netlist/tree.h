#pragma once
// The case file as a plain tree of scalars, lists and maps, each carrying its file position.
// Overrides (variants, sweeps, tolerance studies, fault scenarios) edit this tree before validation.
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "netlist/input_error.h"

namespace linkrise::netlist {

struct TreeEntry;

struct Tree {
  enum class Kind { Null, Scalar, List, Map };
  Kind kind = Kind::Null;
  std::string text;                                 // scalars only
  SourceMark mark;                                  // where the value starts
  std::vector<Tree> items;                          // lists
  std::vector<TreeEntry> entries;                   // maps, in file order
  std::vector<SourceMark> key_marks;                // maps: where each key starts

  bool is_map() const { return kind == Kind::Map; }
  bool is_list() const { return kind == Kind::List; }
  bool is_scalar() const { return kind == Kind::Scalar; }
  /// Map entry by key, or nullptr.
  const Tree* find(std::string_view key) const;
  Tree* find(std::string_view key);
  /// Mark of a key in a map (the key's own position), or the map's mark.
  SourceMark key_mark(std::string_view key) const;
  /// Sets or adds a map entry.
  void set(const std::string& key, Tree value);
  static Tree scalar(std::string text, SourceMark mark = {});
};

/// A map entry. A named struct, not std::pair<std::string, Tree>: a pair of the incomplete Tree inside Tree's
/// own definition does not compile with clang and libstdc++ (the fuzzing and sanitizer build uses clang).
struct TreeEntry {
  std::string first;  // the key
  Tree second;        // the value
};

/// Reads YAML text into a tree. Throws InputError with the position of a syntax error.
Tree parse_yaml(const std::string& text, const std::string& file_name);
/// Reads a YAML file. Throws InputError when it cannot be opened or parsed.
Tree load_yaml_file(const std::string& path);

}  // namespace linkrise::netlist
