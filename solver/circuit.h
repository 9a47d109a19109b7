#pragma once
// A circuit assembled from a validated case: parts built by the registry, nodes numbered, every part's
// place in the state, unknown and mode vectors fixed, topology checked. Immutable once built, so many
// simulations (threads) may share one circuit.
#include <memory>
#include <string>
#include <vector>

#include "models/part.h"
#include "netlist/case.h"

namespace linkrise::solver {

/// One integrated energy account: the energy of one part through one channel.
struct EnergyAccount {
  int part = 0;
  models::EnergyChannel channel = models::EnergyChannel::Source;
};

struct SignalColumn {
  int part = 0;  // owning part
  std::string header;  // "<part>.<quantity> [unit]"
};

class Circuit {
 public:
  /// Builds and checks the circuit; throws netlist::InputError naming the offending part or node.
  explicit Circuit(const netlist::Case& spec);

  /// The case's settings (file, title, ground, ambient, events, run, sequence, limits); no input tree.
  const netlist::CaseSettings& spec() const { return spec_; }
  int part_count() const { return static_cast<int>(parts_.size()); }
  const models::Part& part(int index) const { return *parts_[index]; }
  const models::Layout& layout(int index) const { return layouts_[index]; }
  /// Index of a part by name, or -1.
  int find_part(const std::string& name) const;

  /// Non-ground nodes in order of first appearance; node i is unknown i.
  const std::vector<std::string>& node_names() const { return node_names_; }
  /// Unknown index of a node, -1 for ground; throws std::out_of_range for an unknown name.
  int node_index(const std::string& name) const;
  bool has_node(const std::string& name) const;

  int unknown_count() const { return unknown_count_; }
  /// Dynamic states of the parts (electrical, thermal, SOC); the energy accounts follow them in the ODE.
  int part_state_count() const { return static_cast<int>(state_info_.size()); }
  const std::vector<models::StateInfo>& state_info() const { return state_info_; }
  const std::vector<EnergyAccount>& energy_accounts() const { return accounts_; }
  /// Parts whose ∫i² dt (A²s) the solver integrates as a quadrature after the energy accounts: every part
  /// that takes heat and has no ∫i² dt state of its own, so I²t is as accurate as the solver, not a trapezoid
  /// over the recorded rows.
  const std::vector<int>& current_squared_parts() const { return current_squared_parts_; }
  /// The ODE index of a part's ∫i² dt quadrature, or -1.
  int current_squared_index(int part) const;
  /// Quadratures: the energy accounts, then the ∫i² dt of current_squared_parts().
  int quadrature_count() const { return static_cast<int>(accounts_.size() + current_squared_parts_.size()); }
  int ode_size() const { return part_state_count() + quadrature_count(); }
  int mode_count() const { return static_cast<int>(initial_modes_.size()); }
  const std::vector<int>& initial_modes() const { return initial_modes_; }
  std::vector<double> initial_states() const;
  /// Total part roots (state events), and which part owns each.
  int root_count() const { return static_cast<int>(root_owner_.size()); }
  int root_owner(int root) const { return root_owner_[root]; }
  int root_first(int part) const { return root_first_[part]; }
  bool linear_network() const { return linear_; }
  const std::vector<SignalColumn>& signal_columns() const { return signal_columns_; }
  /// First signal column of a part (columns are grouped per part in part order).
  int signal_first(int part) const { return signal_first_[part]; }

 private:
  void check_topology() const;
  void check_sequence_parts() const;

  netlist::CaseSettings spec_;
  std::vector<std::unique_ptr<models::Part>> parts_;
  std::vector<models::Layout> layouts_;
  std::vector<std::string> node_names_;
  int unknown_count_ = 0;
  std::vector<models::StateInfo> state_info_;
  std::vector<EnergyAccount> accounts_;
  std::vector<int> current_squared_parts_;
  std::vector<int> initial_modes_;
  std::vector<int> root_owner_;
  std::vector<int> root_first_;
  std::vector<SignalColumn> signal_columns_;
  std::vector<int> signal_first_;
  bool linear_ = true;
};

}  // namespace linkrise::solver
