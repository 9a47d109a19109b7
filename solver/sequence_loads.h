#pragma once
// The loads the BMS sequence switches (`sequence.loads`, netlist/sequence_load_spec.h): the controller tells this
// plan when an attempt starts, when the main contacts close and when the pre-charge contacts open; each load is
// enabled its delay after its moment, exactly then (a firmware timer, not a sample of the BMS task). A fault
// drops every enable still to come and disables the loads at once, as releasing the contactors does.
#include <limits>
#include <string>
#include <vector>

#include "netlist/sequence_load_spec.h"
#include "solver/circuit.h"
#include "solver/transient.h"

namespace linkrise::solver {

class SequenceLoads {
 public:
  SequenceLoads() = default;
  /// Throws netlist::InputError when a named part is not a load of the circuit.
  SequenceLoads(const Circuit& circuit, const std::vector<netlist::SequenceLoadSpec>& loads);

  /// Commands for the initial modes (Options::initial_commands) that hold every load off which the case does not
  /// already start disabled.
  std::vector<Command> hold_off(const Circuit& circuit) const;
  /// A moment of the sequence happened (or is planned) at `time`: plans the enables that follow it.
  void moment(netlist::LoadMoment moment, double time, int attempt);
  /// The next planned enable; +infinity for none.
  double next_time() const;
  /// The latest planned enable; -infinity for none.
  double last_time() const;
  /// Issues the enables planned at or before `time` (at their own times, never before `time`).
  void issue_due(double time, std::vector<Command>& commands);
  /// A fault released the contactors at `time`: drops the planned enables and disables every load it enabled.
  void release(double time, const std::string& fault, std::vector<Command>& commands);
  bool empty() const { return parts_.empty(); }

 private:
  struct Planned {
    double time = 0.0;
    int load = 0;  // index into parts_
    std::string reason;
  };
  std::vector<netlist::SequenceLoadSpec> specs_;
  std::vector<int> parts_;
  std::vector<Planned> planned_;  // in time order
  std::vector<bool> enabled_;     // per load: enabled and not released since
};

}  // namespace linkrise::solver
