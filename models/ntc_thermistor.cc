#include "models/ntc_thermistor.h"

#include "models/resistance_law.h"
#include "models/thermal_resistor.h"

namespace linkrise::models {
namespace {
using netlist::Bound;
using netlist::Dimension;

const char* const ntc_fix =
    "describe the NTC either by resistance_at_25degC and b_value, by steinhart_hart: {a, b, c}, or by a table of "
    "[temperature, resistance] rows";

ResistanceLaw read_beta(netlist::ParameterReader& reader) {
  int base = choose_form(reader, {{"resistance_at_25degC"}, {"reference_resistance", "reference_temperature"}}, true,
                         "give resistance_at_25degC, or reference_resistance with its reference_temperature");
  NtcBetaParameters p{};
  if (base == 0) {
    p.reference_resistance = reader.required("resistance_at_25degC", Dimension::resistance(), Bound::Positive);
  } else {
    p.reference_resistance = reader.required("reference_resistance", Dimension::resistance(), Bound::Positive);
    p.reference_kelvin = reader.required("reference_temperature", Dimension::temperature(), Bound::Positive);
  }
  p.beta_kelvin = reader.required("b_value", Dimension::temperature(), Bound::Positive);
  return law_or_fail(make_resistance_law(p), reader, "b_value");
}

ResistanceLaw read_steinhart_hart(netlist::ParameterReader& reader) {
  auto block = reader.block("steinhart_hart");
  if (!block) reader.fail("steinhart_hart", "is missing", "add 'steinhart_hart: {a: ..., b: ..., c: ...}'");
  netlist::ParameterReader& coefficients = *block;
  NtcSteinhartHartParameters p{};
  p.a = coefficients.required("a", Dimension::per_kelvin(), Bound::Any);
  p.b = coefficients.required("b", Dimension::per_kelvin(), Bound::Positive);
  p.c = coefficients.required("c", Dimension::per_kelvin(), Bound::NonNegative);
  coefficients.finish();
  return law_or_fail(make_resistance_law(p), reader, "steinhart_hart");
}
}  // namespace

std::unique_ptr<Part> make_ntc_thermistor(const netlist::PartSpec& spec) {
  auto reader = open_parameters(spec);
  int form = choose_form(
      reader,
      {{"b_value", "resistance_at_25degC", "reference_resistance", "reference_temperature"}, {"steinhart_hart"},
       {"table"}},
      true, ntc_fix);
  std::optional<ResistanceLaw> law;
  std::optional<DefiningValue> defining;  // the resistance a data sheet names the part by; the curve shapes it too
  if (form == 0) {
    const bool at_25 = reader.has("resistance_at_25degC");
    defining = DefiningValue{at_25 ? "resistance_at_25degC" : "reference_resistance", "Ohm", false};
    law = read_beta(reader);
  } else if (form == 1) {
    law = read_steinhart_hart(reader);
  } else {
    law = read_resistance_table(reader, "table");
  }
  return finish_thermal_resistor(spec, reader, std::move(*law), std::move(defining));
}
}  // namespace linkrise::models
