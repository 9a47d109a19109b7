#pragma once
// Overrides: edits of a case held as a tree, before it is validated. One mechanism serves fault scenarios,
// sweeps and tolerance studies.
//
// A path names one value:
//   <part>.<parameter>[.<key>...]   a part's parameter, e.g. "r_pre.resistance", "r_pre.thermal.heat_capacity"
//   ambient, title                  a top-level scalar
//   <section>.<key>[.<key>...]      inside a top-level block, e.g. "sequence.timeout", "run.duration",
//                                   "sequence.close_when.ratio"
// The value is text as it would appear in the case file ("47 Ohm", "95 %"); a value starting with '[' or '{'
// is read as a YAML list or block. New keys may be added (a part parameter left at its default); the reader of
// the block rejects unknown ones afterwards with a did-you-mean, at the position of the override.
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::netlist {

struct Override {
  std::string path;
  std::string value;
  SourceMark mark;  // where the override was written (a scenario line, a command-line option)
};

/// Reads a `set:` block of '<path>: <value>' lines (a scenario's or a variant's) into overrides, each marked
/// with its key's position. `owner` names the block in messages ("a scenario's"), `example` is the fix's hint.
std::vector<Override> read_set_block(const Tree& set, const std::string& owner, const std::string& example);

/// Sets the value at `path`. Throws InputError (at `mark`) for an unknown part or section, or a path through a
/// value that is not a block.
void apply_override(Tree& root, const Override& change);
void apply_overrides(Tree& root, const std::vector<Override>& changes);

/// The value at `path`, or nullptr when it is not set (no throw for a missing key; throws for an unknown part).
const Tree* find_value(const Tree& root, const std::string& path, const SourceMark& mark);

/// The quantity written at `path`; std::nullopt when nothing is written there. Throws InputError at `mark`, with
/// `fix`, when the path holds a block or a list, and at the value when it is no quantity.
std::optional<Quantity> quantity_at(const Tree& root, const std::string& path, const SourceMark& mark,
                                    const std::string& fix);

/// Multiplies the quantity at `path` by `factor`, keeping its unit (the text is rewritten in SI units).
void scale_value(Tree& root, const std::string& path, double factor, const SourceMark& mark);

/// The block of part `name` in the parts list; throws InputError (at `mark`) with a did-you-mean when absent.
Tree& part_block(Tree& root, const std::string& name, const SourceMark& mark);
/// Adds a part: name, kind, nodes and scalar parameters. Throws when the name is taken.
void add_part(Tree& root, const std::string& name, const std::string& kind, const std::string& plus,
              const std::string& minus, const std::vector<std::pair<std::string, std::string>>& parameters,
              const SourceMark& mark);
/// Replaces part `name` by a part of `kind` with only `parameters`, on the same nodes.
void replace_part(Tree& root, const std::string& name, const std::string& kind,
                  const std::vector<std::pair<std::string, std::string>>& parameters, const SourceMark& mark);
/// Connects part `name` the other way round (its two nodes swapped).
void reverse_part(Tree& root, const std::string& name, const SourceMark& mark);
/// A part name not used yet, `base` or `base_2`, `base_3`...
std::string unused_part_name(const Tree& root, const std::string& base);

}  // namespace linkrise::netlist
