#include "models/conductor.h"

#include <cmath>
#include <cstdio>

#include "models/number_text.h"

namespace linkrise::models {
namespace {

std::string number(double value) { return number_text(value); }

bool positive(double value) { return finite_positive(value); }

}  // namespace

ConductorProperties conductor_properties(ConductorMaterial material) {
  switch (material) {
    case ConductorMaterial::copper:
      return {1.68e-8, 0.00393};
    case ConductorMaterial::aluminium:
      return {2.65e-8, 0.00429};
  }
  return {1.68e-8, 0.00393};  // unreachable; keeps -Wreturn-type quiet
}

double resistivity(ConductorMaterial material, double kelvin) {
  const auto properties = conductor_properties(material);
  return properties.resistivity_at_20_celsius *
         (1.0 + properties.temperature_coefficient * (kelvin - kelvin_at_20_celsius));
}

double one_way_resistance(double length, double cross_section, ConductorMaterial material, double kelvin) {
  return resistivity(material, kelvin) * length / cross_section;
}

double loop_resistance(double length, double cross_section, ConductorMaterial material, double kelvin) {
  return one_way_resistance(2.0 * length, cross_section, material, kelvin);
}

double loop_resistance_derivative(double length, double cross_section, ConductorMaterial material) {
  const auto properties = conductor_properties(material);
  return properties.resistivity_at_20_celsius * properties.temperature_coefficient * 2.0 * length /
         cross_section;
}

double radius_from_cross_section(double cross_section) {
  return std::sqrt(cross_section / std::numbers::pi);
}

double cross_section_from_radius(double radius) { return std::numbers::pi * radius * radius; }

std::string validate_wire_pair(double radius, double centre_spacing) {
  if (!positive(radius)) return "wire pair: radius = " + number(radius) + " m must be finite and > 0";
  if (!(std::isfinite(centre_spacing) && centre_spacing > 2.0 * radius))
    return "wire pair: centre_spacing = " + number(centre_spacing) + " m must be finite and > 2*radius = " +
           number(2.0 * radius) + " m (the conductors would overlap)";
  return {};
}

double pair_inductance_direct_current(double radius, double centre_spacing) {
  return vacuum_permeability / std::numbers::pi * (std::log(centre_spacing / radius) + 0.25);
}

double pair_inductance_high_frequency(double radius, double centre_spacing) {
  return vacuum_permeability / std::numbers::pi * std::acosh(centre_spacing / (2.0 * radius));
}

double pair_inductance(double radius, double centre_spacing, InductanceForm form) {
  return form == InductanceForm::direct_current ? pair_inductance_direct_current(radius, centre_spacing)
                                                : pair_inductance_high_frequency(radius, centre_spacing);
}

std::variant<Cable, std::string> Cable::create(const CableParameters& parameters) {
  if (!positive(parameters.length))
    return "Cable: length = " + number(parameters.length) + " m must be finite and > 0";
  if (!positive(parameters.cross_section))
    return "Cable: cross_section = " + number(parameters.cross_section) + " m^2 must be finite and > 0";
  const std::string pair_error =
      validate_wire_pair(radius_from_cross_section(parameters.cross_section), parameters.centre_spacing);
  if (!pair_error.empty()) return "Cable: " + pair_error;
  return Cable(parameters);
}

double Cable::radius() const { return radius_from_cross_section(parameters_.cross_section); }

double Cable::loop_resistance(double kelvin) const {
  return models::loop_resistance(parameters_.length, parameters_.cross_section, parameters_.material, kelvin);
}

double Cable::loop_resistance_derivative() const {
  return models::loop_resistance_derivative(parameters_.length, parameters_.cross_section,
                                            parameters_.material);
}

double Cable::loop_inductance() const {
  return pair_inductance(radius(), parameters_.centre_spacing, parameters_.inductance_form) *
         parameters_.length;
}

}  // namespace linkrise::models
