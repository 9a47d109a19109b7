// Cable conductors from geometry: DC resistance with temperature, loop inductance of a go-and-return pair.
//
// SI units throughout: metre, square metre, ohm, henry, kelvin. "Length" is always the route length of the
// cable run, pack to inverter. The go-and-return loop carries the current through 2 × length of conductor;
// functions say in their name which of the two they mean (one_way_… or loop_…).
#pragma once

#include <numbers>
#include <string>
#include <variant>

namespace linkrise::models {

inline constexpr double kelvin_at_20_celsius = 293.15;

// µ0 = 4π·10⁻⁷ H/m: the pre-2019 defined value; the measured SI 2019 value differs by ~1e-10 relative,
// far below anything a cable model resolves.
inline constexpr double vacuum_permeability = 4e-7 * std::numbers::pi;

enum class ConductorMaterial { copper, aluminium };

struct ConductorProperties {
  double resistivity_at_20_celsius;  // ρ20, ohm·metre
  double temperature_coefficient;    // α20, 1/K, referred to 20 °C
};

// Copper: ρ20 = 1.68e-8 Ω·m, α20 = 0.00393 /K (CRC Handbook, from memory).
// Aluminium: ρ20 = 2.65e-8 Ω·m, α20 = 0.00429 /K (handbook tables, from memory; some cable tables use
// 0.00403 /K for conductor-grade aluminium).
// These are bulk values for the pure metal; stranded cable conductors come out a few percent higher
// (stranding lay, annealed-copper standard 1.7241e-8 Ω·m), so a data sheet's resistance wins when known.
ConductorProperties conductor_properties(ConductorMaterial material);

// ρ(T) = ρ20·(1 + α20·(T − 293.15 K)). Linear law, good over the usual −40…+150 °C cable range; it is not
// clamped and would reach zero near 40 K, far outside any pack's environment.
double resistivity(ConductorMaterial material, double kelvin);

// R = ρ(T)·length/cross_section for one conductor of the given length.
double one_way_resistance(double length, double cross_section, ConductorMaterial material, double kelvin);
// R = ρ(T)·2·length/cross_section: both conductors of the go-and-return loop, each `length` long.
double loop_resistance(double length, double cross_section, ConductorMaterial material, double kelvin);
// dR/dT of loop_resistance, ohm/K.
double loop_resistance_derivative(double length, double cross_section, ConductorMaterial material);

// Solid round conductor equivalent: A = π·r². For stranded conductors this is the radius of the metal, a
// little smaller than the outer strand bundle; inductance depends on it only logarithmically.
double radius_from_cross_section(double cross_section);
double cross_section_from_radius(double radius);

// Which inductance formula a cable uses.
//  direct_current: current spread uniformly over each wire's section, L′ = (µ0/π)·[ln(d/r) + ¼]; the ¼ is
//    the internal inductance µ0/(8π) of each wire.
//  high_frequency: current on the wire surfaces only (skin depth ≪ r), L′ = (µ0/π)·arcosh(d/(2r)).
// The default is direct_current: a pre-charge is an RC charge of milliseconds to seconds, whose frequency
// content (≲ 100 Hz) has a skin depth in copper (≈ 6.5 mm at 100 Hz) larger than the radius of usual HV
// cable conductors, so the current is close to uniform. Ringing at contactor closure (kHz) sits between the
// two; the two forms bound it.
enum class InductanceForm { direct_current, high_frequency };

// Empty when a pair of round wires with this radius and centre spacing is geometrically possible
// (radius > 0, centre_spacing > 2·radius, both finite); otherwise the reason, naming field and value.
std::string validate_wire_pair(double radius, double centre_spacing);

// Loop inductance per metre of route of two parallel round wires (H/m); preconditions as validate_wire_pair.
// Proximity effect is neglected, so both lose accuracy when the wires nearly touch (d ≲ 3r).
double pair_inductance_direct_current(double radius, double centre_spacing);
double pair_inductance_high_frequency(double radius, double centre_spacing);
double pair_inductance(double radius, double centre_spacing, InductanceForm form);

// A go-and-return cable run of two equal round conductors.
struct CableParameters {
  double length;         // route length, m, > 0 (each conductor is this long; the loop is twice)
  double cross_section;  // metal cross-section of one conductor, m², > 0
  double centre_spacing; // distance between the two conductor centres, m, > 2·radius
  ConductorMaterial material = ConductorMaterial::copper;
  InductanceForm inductance_form = InductanceForm::direct_current;
};

class Cable {
 public:
  // The cable, or an error naming the field, its value and the rule it breaks.
  static std::variant<Cable, std::string> create(const CableParameters& parameters);

  double loop_resistance(double kelvin) const;  // ohm, both conductors
  double loop_resistance_derivative() const;    // ohm/K (constant for the linear law)
  double loop_inductance() const;               // H, whole run
  double radius() const;                        // m, from the cross-section
  const CableParameters& parameters() const { return parameters_; }

 private:
  explicit Cable(const CableParameters& parameters) : parameters_(parameters) {}
  CableParameters parameters_;
};

}  // namespace linkrise::models
