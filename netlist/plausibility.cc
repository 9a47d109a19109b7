#include "netlist/plausibility.h"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "netlist/case.h"
#include "netlist/parameter_reader.h"

namespace linkrise::netlist {

const std::vector<PlausibilityRule>& plausibility_rules() {
  constexpr double none = -std::numeric_limits<double>::infinity();
  static const std::vector<PlausibilityRule> rules = {
      {"closing_delay", Dimension::time(), none, 1.0, "0 … 1 s",
       "contactor coils close in tens of milliseconds; more than a second is usually a bare number read as seconds"},
      {"opening_delay", Dimension::time(), none, 1.0, "0 … 1 s",
       "contacts part within tens of milliseconds of the coil's release"},
      {"bounce_interval", Dimension::time(), none, 0.1, "0 … 100 ms", "contact bounce lasts milliseconds"},
      {"capacitance", Dimension::capacitance(), none, 1.0, "0 … 1 F",
       "DC links hold microfarads to tens of millifarads; a farad or more is usually M written for m"},
      {"cell_voltage", Dimension::voltage(), 1.0, 5.0, "1 … 5 V",
       "battery cells of every chemistry in use sit between about 1 V and 4.5 V; more is a module or pack voltage"},
      {"cell_capacity", Dimension::charge(), none, 3600.0 * 2000.0, "0 … 2000 Ah",
       "single cells stay below a few hundred ampere-hours"},
      {"voltage", Dimension::voltage(), none, 2000.0, "0 … 2 kV",
       "battery packs and DC links of vehicles and storage stay below 1.5 kV DC"},
      {"ambient", Dimension::temperature(), kelvin_offset - 60.0, kelvin_offset + 150.0, "-60 … 150 degC",
       "outside this no battery system operates; usually a kelvin value written as degC or the reverse"},
      {"run.duration", Dimension::time(), none, 600.0, "0 … 10 min",
       "a pre-charge sequence with its retries lasts seconds; a longer run is usually a unit slip"},
  };
  return rules;
}

namespace {

std::string shown(double value, const PlausibilityRule& rule) {
  Quantity quantity;
  quantity.value = value;
  quantity.dimension = rule.dimension;
  quantity.absolute_temperature = rule.key == "ambient";
  return display_quantity(quantity);
}

void check(double value, const PlausibilityRule& rule, const std::string& what, const SourceMark& mark,
           std::vector<PlausibilityWarning>& warnings) {
  if (value >= rule.lowest && value <= rule.highest) return;
  warnings.push_back({mark, fmt::format("{} = {} lies outside the usual range {}", what, shown(value, rule), rule.range), rule.reason});
}

}  // namespace

std::vector<PlausibilityWarning> plausibility_warnings(const Case& spec) {
  std::vector<PlausibilityWarning> warnings;
  for (const auto& part : spec.parts) {
    ParameterReader reader = part.parameters();
    for (const auto& rule : plausibility_rules()) {
      if (!reader.has(rule.key)) continue;
      try {
        double value = reader.required(rule.key, rule.dimension, Bound::Any);
        check(value, rule, fmt::format("part '{}' {}", part.name, rule.key), reader.mark(rule.key), warnings);
      } catch (const InputError&) {
        // Not a quantity of that dimension: the part's model reports it as an error.
      }
    }
  }
  for (const auto& rule : plausibility_rules()) {
    if (rule.key == "ambient") check(spec.ambient, rule, "ambient", spec.ambient_mark, warnings);
    if (rule.key == "run.duration") {
      check(spec.run.duration, rule, spec.run.follows_sequence() ? "run max_duration" : "run duration",
            spec.run.marks.duration, warnings);
    }
  }
  return warnings;
}

}  // namespace linkrise::netlist
