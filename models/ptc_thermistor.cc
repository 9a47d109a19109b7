#include "models/ptc_thermistor.h"

#include "models/resistance_law.h"
#include "models/thermal_resistor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

const char* const ptc_fix =
    "describe the PTC either by minimum_resistance (or resistance_at_25degC), reference_temperature, slope and "
    "maximum_resistance, or by a table of [temperature, resistance] rows";

ResistanceLaw read_parametric(netlist::ParameterReader& reader) {
  int base = choose_form(reader, {{"minimum_resistance"}, {"resistance_at_25degC"}}, true,
                         "give minimum_resistance, or resistance_at_25degC when the data sheet gives only R25");
  PtcParametricParameters p{};
  p.minimum_resistance = reader.required(base == 0 ? "minimum_resistance" : "resistance_at_25degC",
                                         Dimension::resistance(), Bound::Positive);
  p.reference_kelvin = reader.required("reference_temperature", Dimension::temperature(), Bound::Positive);
  p.slope = reader.required("slope", Dimension::per_kelvin(), Bound::Positive);
  p.maximum_resistance = reader.required("maximum_resistance", Dimension::resistance(), Bound::Positive);
  p.blend_width_kelvin = reader.quantity("corner_width", Dimension::temperature(), Bound::Positive, 2.0);
  if (!(p.maximum_resistance > 2.0 * p.minimum_resistance)) {
    reader.fail("maximum_resistance", "must exceed twice the minimum resistance (R = 2·R_min at the switch "
                                      "temperature)",
                "give the resistance the PTC levels off at when hot, e.g. ten times R_min or more");
  }
  return law_or_fail(make_resistance_law(p), reader, "corner_width");
}
}  // namespace

std::unique_ptr<Part> make_ptc_thermistor(const netlist::PartSpec& spec) {
  auto reader = open_parameters(spec);
  int form = choose_form(reader,
                         {{"minimum_resistance", "resistance_at_25degC", "reference_temperature", "slope",
                           "maximum_resistance", "corner_width"},
                          {"table"}},
                         true, ptc_fix);
  std::optional<ResistanceLaw> law;
  std::optional<DefiningValue> defining;  // the resistance a data sheet names the part by; the curve shapes it too
  if (form == 0) {
    const bool minimum = reader.has("minimum_resistance");
    defining = DefiningValue{minimum ? "minimum_resistance" : "resistance_at_25degC", "Ohm", false};
    law = read_parametric(reader);
  } else {
    law = read_resistance_table(reader, "table");
  }
  return finish_thermal_resistor(spec, reader, std::move(*law), std::move(defining));
}
}  // namespace linkrise::models
