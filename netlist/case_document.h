#pragma once
// A case file as written, before validation: the input side of the data flow. Overrides (`--set`, sweeps,
// tolerance corners and samples), variants and the fault scenarios' edits change the document; validate()
// turns it into the typed Case that every later layer reads. Nothing past netlist/ sees the tree inside.
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "netlist/case.h"
#include "netlist/catalogue_spec.h"
#include "netlist/overrides.h"
#include "netlist/tree.h"
#include "netlist/units.h"
#include "netlist/variant_spec.h"

namespace linkrise::netlist {

class CaseDocument {
 public:
  /// Reads a case file; throws InputError when it cannot be opened or parsed.
  static CaseDocument load(const std::string& path);
  /// Reads case text; `file` names it in messages.
  static CaseDocument parse(const std::string& text, const std::string& file);
  CaseDocument() = default;
  CaseDocument(Tree root, std::string file) : root_(std::move(root)), file_(std::move(file)) {}

  const std::string& file() const { return file_; }
  /// The validated case. Throws InputError naming the first problem.
  Case validate() const;

  /// Sets the value at an override's path (netlist/overrides.h for the paths).
  void apply(const Override& change);
  void apply(const std::vector<Override>& changes);
  CaseDocument with(const std::vector<Override>& changes) const;
  /// The document with a variant's replacements and overrides applied.
  CaseDocument with_variant(const VariantSpec& variant) const;
  /// The document with `part` replaced by a catalogue candidate (name and nodes kept) and the candidate's
  /// tolerances in place of the case's tolerances of that part.
  CaseDocument with_candidate(const std::string& part, const CandidateSpec& candidate) const;

  /// The quantity written at `path`; std::nullopt when nothing is written there (a default applies).
  /// Throws InputError (at `mark`) for a path through an unknown part, or a value that is no quantity.
  std::optional<Quantity> quantity_at(const std::string& path, const SourceMark& mark) const;

  // Structural edits of the fault scenarios.
  void scale(const std::string& path, double factor, const SourceMark& mark);
  void add_part(const std::string& name, const std::string& kind, const std::string& plus, const std::string& minus,
                const std::vector<std::pair<std::string, std::string>>& parameters, const SourceMark& mark);
  void replace_part(const std::string& name, const std::string& kind,
                    const std::vector<std::pair<std::string, std::string>>& parameters, const SourceMark& mark);
  void reverse_part(const std::string& name, const SourceMark& mark);
  /// A part name not used yet, `base` or `base_2`, `base_3`...
  std::string unused_part_name(const std::string& base) const;

 private:
  Tree root_;
  std::string file_;
};

}  // namespace linkrise::netlist
