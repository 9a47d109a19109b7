#pragma once
// summary.json for one run, and the short terminal summary. Every number is {"value": x, "unit": "..."}.
#include <string>

#include <nlohmann/json.hpp>

#include "analysis/energy_audit.h"
#include "solver/circuit.h"
#include "solver/transient.h"

namespace linkrise::app {

nlohmann::json run_summary(const solver::Circuit& circuit, const solver::Result& result,
                           const analysis::EnergyAudit& audit);
std::string terminal_summary(const solver::Circuit& circuit, const solver::Result& result,
                             const analysis::EnergyAudit& audit);

}  // namespace linkrise::app
