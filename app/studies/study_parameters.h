#pragma once
// Parameter paths for the studies, from the command line and the case file. Every variation is a
// netlist::Override (netlist/overrides.h) applied to the case tree: one mechanism for variants, sweeps,
// corners, Monte Carlo and the fault scenarios.
//
// Command-line forms (quote values with spaces):
//   --set r_pre.resistance=56Ohm              one override, applied before anything else
//   --vary r_pre.resistance=22Ohm,33Ohm,47Ohm  a list of values, written as in a case file
//   --vary "link.capacitance=0.5mF..2mF:log:7" a range: A..B[:lin|:log][:N]  (default lin, N = 5 points,
//                                             both ends included; log needs two positive ends)
#include <optional>
#include <string>
#include <vector>

#include "netlist/overrides.h"
#include "netlist/units.h"

namespace linkrise::app {

/// Where a command-line option is reported in messages: "command line, option N".
netlist::SourceMark option_mark(const std::string& option, int position);

/// "path=value" -> an override. Throws InputError (at `mark`) without '=' or with an empty side.
netlist::Override parse_assignment(const std::string& text, const netlist::SourceMark& mark);

/// Every --set option, in order, as overrides.
std::vector<netlist::Override> parse_settings(const std::vector<std::string>& settings);

/// A varied parameter: its path and the value texts of its points, in order.
struct VariedParameter {
  std::string path;
  std::vector<std::string> values;  // case-file text, e.g. "33 Ohm" or "0.000707106781 F"
  netlist::SourceMark mark;
};

/// Parses a --vary argument (list or range, see above). Throws InputError for a bad range.
VariedParameter parse_variation(const std::string& text, const netlist::SourceMark& mark);

/// A varied parameter's values as numbers in the unit people read them in (netlist::ShownUnit: degC, %, "1" or
/// the SI symbol), for CSV columns, tables and plot axes. A bare number takes the dimension of the other values,
/// or of the case's own value when every value is bare.
struct ParameterColumn {
  std::string path;
  netlist::ShownUnit unit;
  std::vector<double> values;      // SI, one per value; empty when the values are not quantities of one unit
  std::vector<std::string> texts;  // the values as given

  bool numeric() const { return !values.empty(); }
  /// "<path> [<unit>]" when numeric, else the path alone (the cells are then text as given).
  std::string header() const;
  /// Value k for people: SI prefix, degC or % when numeric, else the text as given.
  std::string display(std::size_t k) const;
};
/// `nominal`: the value the case writes at the path, if any.
ParameterColumn parameter_column(const VariedParameter& parameter, const std::optional<netlist::Quantity>& nominal);

}  // namespace linkrise::app
