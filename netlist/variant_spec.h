#pragma once
// The `variants:` block: design alternatives that `linkrise compare` runs beside the nominal case.
//
//   variants:
//     - name: ptc                        # letters, digits, '_' (not 'nominal')
//       note: "PTC thermistor instead of the wire-wound resistor"   # optional
//       replace:                         # optional: parts swapped for another kind (name and nodes kept)
//         r_pre: {kind: ptc_thermistor, minimum_resistance: 47 Ohm, ...}
//       set: {r_pre.thermal.heat_capacity: 5 J/K}   # optional overrides (netlist/overrides.h), after replace
//
// A variant is applied on the input side (CaseDocument::with_variant) and the result validated as a case.
#include <string>
#include <vector>

#include "netlist/overrides.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

class CaseDocument;

struct VariantSpec {
  std::string name;
  std::string note;
  std::vector<std::string> replaced_parts;  // parts swapped for another kind, in the order written
  std::vector<Override> overrides;          // applied after the replacements
  SourceMark mark;

 private:
  friend class CaseDocument;
  friend std::vector<VariantSpec> read_variants(const Tree& root);
  std::vector<Tree> replacement_blocks_;  // one per replaced part: the new kind and its parameters
};

/// Reads the `variants:` block of a case tree (empty when absent). Throws InputError for a malformed entry.
std::vector<VariantSpec> read_variants(const Tree& root);

}  // namespace linkrise::netlist
