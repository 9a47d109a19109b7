#pragma once
// Energy audit of one run: energy delivered by sources = heat dissipated + energy taken by loads
// + change of stored energy. Each term is integrated by the ODE solver itself (energy accounts are states),
// so the residual measures the solver's accuracy, not a post-processing quadrature.
#include <string>
#include <vector>

#include "solver/circuit.h"
#include "solver/transient.h"

namespace linkrise::analysis {

struct PartEnergy {
  std::string part;
  double delivered = 0.0;   // J, from sources (OCV, ideal source)
  double dissipated = 0.0;  // J, heat
  double to_load = 0.0;     // J, taken by loads
  double stored_start = 0.0;
  double stored_end = 0.0;
};

struct EnergyAudit {
  double delivered = 0.0;
  double dissipated = 0.0;
  double to_loads = 0.0;
  double stored_change = 0.0;
  // Stored energy that fast states received when they started at their quasi-steady value after a switching
  // (solver/fast_states.h): the skipped transients' net share, which no account integrates.
  double settled = 0.0;
  double residual = 0.0;           // delivered - dissipated - to_loads - stored_change + settled, J
  double relative_residual = 0.0;  // |residual| / largest term
  std::vector<PartEnergy> parts;
};

EnergyAudit audit_energy(const solver::Circuit& circuit, const solver::Result& result);

}  // namespace linkrise::analysis
