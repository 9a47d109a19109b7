#pragma once
// The one table that maps a `kind:` word to the part model that reads it.
// Adding a part kind: write models/<kind>.h/.cc with a make_<kind>() factory and add one line to the table.
#include <memory>
#include <string>
#include <vector>

#include "models/part.h"

namespace linkrise::models {

/// Builds the part a spec describes; throws netlist::InputError for an unknown kind or bad parameters.
std::unique_ptr<Part> create_part(const netlist::PartSpec& spec);
/// Every kind word, in table order.
std::vector<std::string> part_kinds();

}  // namespace linkrise::models
