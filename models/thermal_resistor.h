#pragma once
// The electro-thermal resistive part shared by the kinds `resistor` (with tcr, thermal or ratings),
// `ptc_thermistor` and `ntc_thermistor`: a resistance law R(T) and an optional lumped thermal network.
//
// Equation: i = v / R(T), T the element temperature (R(T, v) with a voltage softening). Heat: P = v² / R (W),
// which is exactly the power fed into the thermal network, so the heat the energy audit integrates is the heat
// the element receives.
//
// Thermal block (optional; without it the part runs at the case's ambient temperature and has no thermal state):
//   thermal:
//     heat_capacity: 12 J/K            one node: C_th·dT/dt = P − (T − Ta)/R_th
//     thermal_resistance: 8 K/W        element to ambient; the word `adiabatic` means no cooling
//   or a two-node element → body → ambient network (the wire or film takes a pulse first, the body and housing
//   later; the element temperature is the one judged):
//     element_heat_capacity (J/K, or the word `from_pulse_curve`: the data-sheet curve and max_temperature fix
//       it, models/pulse_curve.h), element_to_body_resistance, body_heat_capacity,
//     body_to_ambient_resistance (K/W or `adiabatic`)
//   or a Foster list fitted to a data sheet's Z_th(t) = Σ R_i·(1 − exp(−t/τ_i)):
//     foster: [{thermal_resistance: 0.5 K/W, time_constant: 2 s}, ...]
//   and in any form initial_temperature (default: the case's ambient) for a hot start. A two-node network
//   starts with element and body at that temperature; a Foster network splits the rise over its terms in
//   proportion to R_i (the steady-state shape).
// States: one node {T} (K); two node {T_element, T_body} (K); Foster {θ_1 … θ_n} rises above ambient (K);
//   then one more state, the current-squared integral ∫i² dt (A²·s), a pure quadrature that feeds nothing
//   back, so the I²t of the part is as accurate as the solver. Tolerance: temperatures use 1e3·atol (atol is
//   set for volts; 1e-5 K is far below any rating), I²t 1e2·atol.
// Jacobian: dI/dT = −v·R′/R² through dT/dx (the network's element-temperature gradient); the thermal rates
//   depend on P(v, T): ∂P/∂v = 2v/R, ∂P/∂T = −v²·R′/R².
// Extra signals: temperature (degC, the element) and resistance (Ohm); body_temperature (degC) with a two-node
//   network.
// Derived values (reports): with a thermal network, a pulse curve and max_temperature, the element heat capacity
//   the curve implies and how hot the model runs at the curve's permitted pulses (below 100 %: the model lets the
//   element stay cooler than the data sheet says it gets — optimistic; models/pulse_curve.h).
//
// Ratings block (optional, all entries optional), reported by ratings() and judged by the analyser:
//   ratings:
//     max_temperature: 220 degC   -> metric "peak_temperature" (degC), the element
//     max_body_temperature: 150 degC -> metric "peak_body_temperature" (degC), a two-node network's body
//     pulse_energy: 150 J         -> metric "energy" (J); pulse_length (s) goes into the note
//     pulse_length: 100 ms
//     continuous_power: 10 W      -> metric "duty_average_power" (W): the mean heat over the key-cycle duty
//     max_voltage: 1000 V         -> metric "peak_voltage" (V)
//     max_current: 20 A           -> metric "peak_current" (A): e.g. an NTC's hot-restart inrush
//     max_switching_energy: 400 J -> metric "peak_pulse_energy" (J): a PTC's energy per switching
//     max_switching_voltage: 800 V -> metric "peak_voltage" (V): a PTC's voltage when it trips
//     max_switching_capacitance: 2 mF -> metric "switched_capacitance" (F): a PTC's capacitance per switching
//     pulse_energy_curve: [[1 ms, 20 J], [100 ms, 120 J], [1 s, 400 J]]   # or pulse_power_curve (W), and the
//     repetitive_pulse_energy_curve: [...]   # repetitive_ forms -> metric "pulse_curve_use" (1) <= 100 %: the
//                                            # worst pulse's share of what the curve permits (models/pulse_curve.h)
// Every rating names its entry ("ratings.max_temperature") and where it is written (analysis/limits.h).
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "models/part.h"
#include "models/resistance_law.h"
#include "models/thermal_network.h"

namespace linkrise::models {

/// A resistance that falls with the voltage across the part (a PTC's tripped state; models/ptc_thermistor.h):
/// R(T, V) = floor·(R(T)/floor)^(1/(1 + (V/voltage)²)).
struct VoltageSoftening {
  double voltage = 0.0;           // V_s, V: at this voltage the rise of ln R above the floor is halved
  double floor_resistance = 0.0;  // Ohm, the law's lowest resistance
};

/// The parts of a resistive part's block every resistive kind shares.
struct ThermalOptions {
  std::optional<ThermalNetwork> network;
  double initial_temperature = 0.0;  // K; used only when has_initial_temperature
  bool has_initial_temperature = false;
  std::vector<Rating> ratings;
  std::vector<PulseCurve> pulse_curves;
  std::optional<double> max_temperature;  // K, the element's rating when given
  std::string element_capacity_origin;    // set when element_heat_capacity was derived from a pulse curve
  std::optional<VoltageSoftening> softening;
};

/// Reads the `thermal` and `ratings` blocks of a part (both optional). Throws netlist::InputError.
ThermalOptions read_thermal_options(netlist::ParameterReader& reader);

/// The law, or an InputError at `key` of the part's block that explains the broken rule.
ResistanceLaw law_or_fail(Created<ResistanceLaw> created, const netlist::ParameterReader& reader,
                          const std::string& key);

/// Reads an R(T) table `key` (rows [temperature, resistance]); nullopt when absent.
std::optional<ResistanceLaw> read_resistance_table(netlist::ParameterReader& reader, const std::string& key);

/// Which of several alternative parameter forms a block uses. Each form is listed by the keys that belong to
/// it; returns the index of the form whose keys appear. Throws InputError when keys of two forms are mixed, or
/// when none appears and `required` (then returns -1 when not required). `fix` tells how to write one form.
int choose_form(const netlist::ParameterReader& reader, const std::vector<std::vector<std::string>>& forms,
                bool required, const std::string& fix);

/// Name of the I²t quadrature state in StateInfo (the analysis reads it by this name).
inline constexpr const char* current_squared_state = "current_squared_time";

/// `defining` names the parameter that sets the part's value, when one does (a fixed resistor's resistance).
std::unique_ptr<Part> make_thermal_resistor(const netlist::PartSpec& spec, ResistanceLaw law, ThermalOptions options,
                                            std::optional<DefiningValue> defining = std::nullopt);

/// The usual end of a resistive kind's factory: reads `thermal` and `ratings`, rejects unknown keys, builds the part.
std::unique_ptr<Part> finish_thermal_resistor(const netlist::PartSpec& spec, netlist::ParameterReader& reader,
                                              ResistanceLaw law, std::optional<DefiningValue> defining = std::nullopt,
                                              std::optional<VoltageSoftening> softening = std::nullopt);

}  // namespace linkrise::models
