#pragma once
// A catalogue of candidate parts for `linkrise size` (a YAML file of its own, named by the sizing block):
//
//   candidates:
//     - name: wirewound_39r_50w                 # letters, digits, '_'
//       note: "aluminium-housed wire-wound, 50 W"   # optional
//       part:                                  # the part block without name and nodes (they stay the case's)
//         kind: resistor
//         resistance: 39 Ohm
//         thermal: {heat_capacity: 30 J/K, thermal_resistance: 2.5 K/W}
//         ratings: {max_temperature: 200 degC, pulse_energy: 600 J}
//       tolerances:                            # optional: keyed by the part's parameter, as in `tolerances:`
//         resistance: {plus_minus: 5 %}
//
// A candidate replaces the sized part; its tolerances replace every tolerance the case gives that part (without
// any, the case's own stay). The part's parameters are checked when a candidate is applied to the case.
#include <string>
#include <utility>
#include <vector>

#include "netlist/tree.h"

namespace linkrise::netlist {

class CaseDocument;

struct CandidateSpec {
  std::string name;
  std::string note;
  std::string kind;
  SourceMark mark;

 private:
  friend class CaseDocument;
  friend std::vector<CandidateSpec> read_catalogue(const std::string& path);
  Tree part_;                                          // kind and parameters
  std::vector<std::pair<std::string, Tree>> tolerances_;  // parameter -> tolerance entry
};

/// Reads a catalogue file. Throws InputError at the offending value (an empty list, a duplicate name, a part
/// without kind or with name or nodes).
std::vector<CandidateSpec> read_catalogue(const std::string& path);

}  // namespace linkrise::netlist
