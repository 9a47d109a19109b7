#pragma once
// A validated case: parts and their nodes, scheduled switching, run settings.
// Sections read by later layers (sequence, limits, scenarios, variants, tolerances) stay as trees here
// and are validated by their own readers.
#include <array>
#include <optional>
#include <string>
#include <vector>

#include "netlist/run_spec.h"
#include "netlist/tree.h"

namespace linkrise::netlist {

struct PartSpec {
  std::string name;
  std::string kind;
  std::array<std::string, 2> nodes;  // positive, negative
  SourceMark mark;                   // where the part's block starts
  Tree block;                        // the whole block, parameters included
};

/// Scheduled switching: at a known time a part receives an action ("close", "open", "enable", "disable").
struct EventSpec {
  double at = 0.0;  // s
  std::string action;
  std::string target;
  SourceMark mark;
};

struct Case {
  std::string file;
  std::string title;
  std::string ground;
  double ambient = 298.15;  // K
  std::vector<PartSpec> parts;
  std::vector<EventSpec> events;
  RunSpec run;
  Tree root;  // the whole file, for the sections other layers read

  const PartSpec* find_part(const std::string& name) const;
  /// A top-level section such as "sequence" or "limits"; nullptr when absent.
  const Tree* section(const std::string& name) const;
};

/// The top-level keys a case file may contain (validated here or by a later layer).
const std::vector<std::string>& case_sections();

/// Validates the structure of a case held as a tree. Throws InputError on the first problem.
Case read_case(const Tree& root, const std::string& file);
/// Loads and validates a case file.
Case load_case(const std::string& path);

/// True when `name` may be used for a part or node: letters, digits and '_' only, not starting with a digit
/// (for parts), so output columns "<part>.<quantity> [unit]" stay unambiguous.
bool valid_part_name(const std::string& name);
bool valid_node_name(const std::string& name);

}  // namespace linkrise::netlist
