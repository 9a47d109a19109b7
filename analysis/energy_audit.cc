#include "analysis/energy_audit.h"

#include <algorithm>
#include <cmath>

namespace linkrise::analysis {

EnergyAudit audit_energy(const solver::Circuit& circuit, const solver::Result& result) {
  EnergyAudit audit;
  audit.parts.resize(circuit.part_count());
  for (int p = 0; p < circuit.part_count(); ++p) {
    audit.parts[p].part = circuit.part(p).name();
    if (p < static_cast<int>(result.initial_stored.size())) audit.parts[p].stored_start = result.initial_stored[p];
    if (p < static_cast<int>(result.final_stored.size())) audit.parts[p].stored_end = result.final_stored[p];
  }
  const auto& accounts = circuit.energy_accounts();
  const int offset = circuit.part_state_count();
  if (result.final_states.size() < static_cast<std::size_t>(circuit.ode_size())) return audit;
  for (std::size_t a = 0; a < accounts.size(); ++a) {
    double energy = result.final_states[offset + a] - result.initial_states[offset + a];
    PartEnergy& part = audit.parts[accounts[a].part];
    switch (accounts[a].channel) {
      case models::EnergyChannel::Source: part.delivered += energy; break;
      case models::EnergyChannel::Heat: part.dissipated += energy; break;
      case models::EnergyChannel::Load: part.to_load += energy; break;
    }
  }
  for (const auto& part : audit.parts) {
    audit.delivered += part.delivered;
    audit.dissipated += part.dissipated;
    audit.to_loads += part.to_load;
    audit.stored_change += part.stored_end - part.stored_start;
  }
  audit.settled = result.settled_energy;
  audit.residual = audit.delivered - audit.dissipated - audit.to_loads - audit.stored_change + audit.settled;
  double scale = std::max({std::fabs(audit.delivered), std::fabs(audit.dissipated), std::fabs(audit.to_loads),
                           std::fabs(audit.stored_change), 1e-300});
  audit.relative_residual = std::fabs(audit.residual) / scale;
  return audit;
}

}  // namespace linkrise::analysis
