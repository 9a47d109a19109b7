#pragma once
// A case file rewritten with new values in place: the fitted case of `linkrise fit`. Only the values at the
// given paths change; comments, order and layout stay as the engineer wrote them, so the new file reads like
// the old one and `diff` shows exactly what the fit moved.
#include <string>
#include <vector>

#include "netlist/overrides.h"

namespace linkrise::netlist {

/// The text of case file `file` with each change's value written over the value at its path, and `heading`
/// (comment lines, each starting with '#') put first. Throws InputError at a change's mark when the file writes
/// no single value at its path (a default cannot be rewritten in place).
std::string rewrite_case_values(const std::string& file, const std::vector<Override>& changes,
                                const std::string& heading);

}  // namespace linkrise::netlist
