#include "models/ptc_thermistor.h"

#include <algorithm>
#include <limits>

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
  const bool minimum = reader.has("minimum_resistance"), cold = reader.has("resistance_at_25degC");
  if (!minimum && !cold) {
    reader.fail("minimum_resistance", "is missing",
                "give minimum_resistance (and resistance_at_25degC with minimum_resistance_temperature for the cold "
                "region), or resistance_at_25degC alone when the data sheet gives only R25");
  }
  PtcParametricParameters p{};
  p.minimum_resistance = reader.required(minimum ? "minimum_resistance" : "resistance_at_25degC",
                                         Dimension::resistance(), Bound::Positive);
  if (minimum && cold) {
    // R25 and R_min apart (IEC 60738-1): the part is coldest-resistive at 25 degC and least resistive at T_Rmin.
    p.cold_resistance = reader.required("resistance_at_25degC", Dimension::resistance(), Bound::Positive);
    if (!reader.has("minimum_resistance_temperature")) {
      reader.fail("resistance_at_25degC", "is given with minimum_resistance, but minimum_resistance_temperature is missing",
                  "add the temperature of the minimum resistance from the data sheet, e.g. "
                  "'minimum_resistance_temperature: 60 degC'");
    }
    p.minimum_kelvin = reader.required("minimum_resistance_temperature", Dimension::temperature(), Bound::Positive);
    if (!(p.cold_resistance > p.minimum_resistance && p.cold_resistance < 2.0 * p.minimum_resistance)) {
      reader.fail("resistance_at_25degC", "must lie between minimum_resistance and twice it",
                  "R25 is above the minimum resistance and below the reference-temperature resistance 2·R_min");
    }
  } else if (reader.has("minimum_resistance_temperature")) {
    reader.fail("minimum_resistance_temperature", "needs both minimum_resistance and resistance_at_25degC",
                "give the cold resistance R25 and the minimum resistance R_min with its temperature, or leave it out");
  }
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
                           "maximum_resistance", "corner_width", "minimum_resistance_temperature"},
                          {"table"}},
                         true, ptc_fix);
  std::optional<ResistanceLaw> law;
  std::optional<DefiningValue> defining;  // the resistance a data sheet names the part by; the curve shapes it too
  double floor = 0.0;                     // the lowest resistance of the law: what a high voltage softens towards
  if (form == 0) {
    const bool minimum = reader.has("minimum_resistance");
    defining = DefiningValue{minimum ? "minimum_resistance" : "resistance_at_25degC", "Ohm", false};
    law = read_parametric(reader);
    floor = std::get<PtcParametric>(law->law()).parameters().minimum_resistance;
  } else {
    law = read_resistance_table(reader, "table");
    floor = std::numeric_limits<double>::infinity();
    for (const auto& point : std::get<TableLogLinear>(law->law()).points()) floor = std::min(floor, point.ohm);
  }
  std::optional<VoltageSoftening> softening;
  if (auto v = reader.optional("voltage_softening", Dimension::voltage(), Bound::Positive)) {
    softening = VoltageSoftening{*v, floor};
  }
  return finish_thermal_resistor(spec, reader, std::move(*law), std::move(defining), softening);
}
}  // namespace linkrise::models
