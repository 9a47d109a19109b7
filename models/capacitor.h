#pragma once
// Kind `capacitor`: the DC-link capacitance, with ESR and optional leakage.
//
// Parameters: capacitance C (F, > 0), esr (Ohm, >= 0, default 0), initial_voltage v0 (V, default 0),
//             leakage_resistance Rl (Ohm, > 0, optional; absent = no leakage);
//             temperature_factors {capacitance, esr}: each rows [temperature, factor > 0] (temperature increasing,
//             linear between rows, held beyond them) multiplying C and esr at the case's ambient — e.g. an
//             electrolytic's ESR several times higher at −40 °C. The ambient is fixed for a run, so C stays constant
//             within it.
// States: voltage vc of the ideal capacitance (V).
// Unknowns: branch current j (A, entering the positive terminal).
// Equations: v+ - v- = vc + esr·j;  C·dvc/dt = j - vc/Rl.
// Heat: esr·j² + vc²/Rl.  Stored energy: ½·C·vc².
#include <memory>

#include "models/part.h"

namespace linkrise::models {
std::unique_ptr<Part> make_capacitor(const netlist::PartSpec& spec);
}
