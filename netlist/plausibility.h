#pragma once
// Values a case may legally hold but the trade does not use: a 15 s contactor delay (a bare number read as
// seconds), a 1.1 MF link (M for m). They are warnings, printed before a run and listed in summary.json;
// `linkrise run --strict` treats them as input errors. The table lives here once; docs/plausibility.md shows it.
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/units.h"

namespace linkrise::netlist {

struct Case;

/// One rule: a part parameter (top-level key of a part block) or a case setting, its usual range and why.
struct PlausibilityRule {
  std::string key;        // part parameter key, or "ambient" / "run.duration" for the case settings
  Dimension dimension;
  double lowest = 0.0;    // SI; values below warn (-inf: no lower bound)
  double highest = 0.0;   // SI; values above warn
  std::string range;      // the usual range in words, e.g. "0 … 1 s"
  std::string reason;     // why values outside it are suspect
};

struct PlausibilityWarning {
  SourceMark mark;
  std::string message;  // e.g. "part 'k_main' closing_delay = 15 s lies outside the usual range 0 … 1 s"
  std::string reason;
};

/// The rules, in the order docs/plausibility.md lists them.
const std::vector<PlausibilityRule>& plausibility_rules();
/// Every value of a validated case that breaks a rule, in file order of the parts, then the settings.
std::vector<PlausibilityWarning> plausibility_warnings(const Case& spec);

}  // namespace linkrise::netlist
