#pragma once
// The one table that maps a `kind:` word to the part model that reads it.
// Adding a part kind: write models/<kind>.h/.cc with a make_<kind>() factory and add one line to the table.
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "models/part.h"

namespace linkrise::models {

/// Builds the part a spec describes; throws netlist::InputError for an unknown kind or bad parameters.
std::unique_ptr<Part> create_part(const netlist::PartSpec& spec);
/// Every kind word, in table order.
std::vector<std::string> part_kinds();

/// A part as a what-if edit writes it into a case (a fault scenario's short or open): its kind and its
/// parameters as case-file text.
struct PartRecipe {
  std::string kind;
  std::vector<std::pair<std::string, std::string>> parameters;
};
/// A plain resistance of `value` (case-file text, e.g. "1 mOhm"), no thermal model.
PartRecipe plain_resistance(const std::string& value);

}  // namespace linkrise::models
