#pragma once
// A validated case: every section of the case file as typed data. Later layers read these structs only,
// never the input tree; edits of the input (overrides, variants, fault scenarios) happen on the input side
// (netlist/case_document.h) and are validated into a new Case.
#include <array>
#include <optional>
#include <string>
#include <vector>

#include "netlist/fit_spec.h"
#include "netlist/limit_spec.h"
#include "netlist/measured_spec.h"
#include "netlist/parameter_reader.h"
#include "netlist/plausibility.h"
#include "netlist/run_spec.h"
#include "netlist/scenario_spec.h"
#include "netlist/sequence_spec.h"
#include "netlist/sizing_spec.h"
#include "netlist/tolerance_spec.h"
#include "netlist/tree.h"
#include "netlist/variant_spec.h"

namespace linkrise::netlist {

/// One part as written: name, kind and nodes checked; its parameters are read by the part model of its kind
/// through parameters(), which validates them (units, bounds, unknown keys).
struct PartSpec {
  std::string name;
  std::string kind;
  std::array<std::string, 2> nodes;  // positive, negative
  SourceMark mark;                   // where the part's block starts
  SourceMark kind_mark;              // where its kind is written

  /// A reader of the part's parameters that already knows the keys every part has (name, kind, nodes).
  ParameterReader parameters() const;

 private:
  friend PartSpec read_part(const Tree& block, std::size_t index);
  Tree block_;  // the part's block as written, read only through parameters()
};

/// What a switching command asks of a part: contactors close and open, loads are enabled and disabled. A bounce
/// parts a contactor's contacts for a bounce gap while they close (they touch again at the next close): the gap
/// is only micrometres wide, so an arc there holds a constant voltage (models/contactor.h).
enum class Action { Close, Open, Bounce, Enable, Disable };
/// The action as written in a case file and in the timeline ("close", "open", "bounce", "enable", "disable").
const char* action_word(Action action);
/// Every action, in the order above.
const std::vector<Action>& all_actions();

/// Scheduled switching: at a known time a part receives an action.
struct EventSpec {
  double at = 0.0;  // s
  Action action = Action::Close;
  std::string target;
  SourceMark mark;
};

/// What the solver and the analysis need of a case besides its parts' parameters.
struct CaseSettings {
  std::string file;
  std::string title;
  std::string ground;
  double ambient = 298.15;  // K
  SourceMark ambient_mark;  // where the ambient is written (the file's start when it is left at its default)
  std::vector<EventSpec> events;
  RunSpec run;
  std::optional<SequenceSpec> sequence;  // the BMS sequence, when the case has one
  std::vector<LimitSpec> limits;         // the case's limits block (part ratings are added by the analysis)
  std::vector<PlausibilityWarning> warnings;  // legal values the trade does not use (netlist/plausibility.h)
};

struct Case : CaseSettings {
  std::vector<PartSpec> parts;
  std::vector<ScenarioSpec> scenarios;    // fault and what-if scenarios (`linkrise faults`)
  std::vector<VariantSpec> variants;      // design alternatives (`linkrise compare`)
  std::vector<ToleranceSpec> tolerances;  // the tolerance spread (`linkrise spread`, `linkrise window`)
  std::optional<SizingSpec> sizing;       // what `linkrise size` searches
  std::optional<MeasuredSpec> measured;   // a capture to compare with (`linkrise fit`, `run --measured`)
  std::optional<FitSpec> fit;             // the parameters `linkrise fit` estimates

  const PartSpec* find_part(const std::string& name) const;
  /// Names of the parts, in file order.
  std::vector<std::string> part_names() const;
  /// Every node some part connects, sorted.
  std::vector<std::string> node_names() const;
};

/// The top-level keys a case file may contain.
const std::vector<std::string>& case_sections();

/// Validates a case held as a tree: every section. Throws InputError on the first problem.
Case read_case(const Tree& root, const std::string& file);
/// Loads and validates a case file.
Case load_case(const std::string& path);

/// True when `name` may be used for a part or node: letters, digits and '_' only, not starting with a digit
/// (for parts), so output columns "<part>.<quantity> [unit]" stay unambiguous.
bool valid_part_name(const std::string& name);
bool valid_node_name(const std::string& name);

}  // namespace linkrise::netlist
