#pragma once
// The `tolerances:` block of a case: how far each parameter may stray from its nominal value, and how the
// tolerance spread (`linkrise spread`) draws it.
//
//   tolerances:
//     r_pre.resistance: {plus_minus: 5 %}                      # nominal ±5 %, uniform
//     link.capacitance: {minus: 10 %, plus: 20 %}              # asymmetric: nominal −10 % … +20 %
//     pack.cell_resistance: {plus_minus: 30 %, distribution: normal, sigma: 10 %}
//     k_main.closing_delay: {plus_minus: 2 ms}                 # a quantity: absolute offsets
//     ambient: {range: [-20 degC, 45 degC]}                    # absolute bounds (nominal not needed)
//     pack.initial_soc: {range: [20 %, 90 %]}
//
// - A percentage is a fraction of the nominal value written in the case (which must then be given there); a
//   quantity with the parameter's unit is an absolute offset. `range: [low, high]` gives the bounds directly.
// - distribution: uniform (default) over [low, high]; or normal with the stated `sigma` (a percentage of the
//   nominal value, or a quantity), centred on the nominal value (the middle of a `range`) and truncated to
//   [low, high]. The bounds are also the corners of the corner study.
// - Each entry's position in the block is its "slot" in the random stream (the studies' random stream): adding an
//   entry at the end leaves the draws of the earlier ones unchanged.
#include <optional>
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::netlist {

struct ToleranceSpec {
  enum class Shape { Uniform, Normal };
  std::string path;
  Shape shape = Shape::Uniform;
  double lower = 0.0, upper = 0.0;  // SI
  double centre = 0.0;              // the normal's mean
  double sigma = 0.0;               // the normal's standard deviation (normal only)
  Dimension dimension;
  bool absolute_temperature = false;
  bool percent = false;     // a fraction of a whole (netlist::is_percent_path), shown in %
  std::string description;  // for reports, e.g. "33 Ohm (31.35 Ohm … 34.65 Ohm), uniform"
  SourceMark mark;
  /// Set when the tolerance is relative to a nominal value the case does not write (a variant may have replaced
  /// the part that carried it): the error a study that draws this tolerance reports. The bounds are then unset.
  std::optional<InputError> unresolved;

  /// Case-file text of a value of this parameter.
  std::string text(double value) const { return quantity_text(value, dimension, absolute_temperature); }
  /// The unit its values are shown in (degC, %, "1" or the SI symbol) and the conversion from SI.
  ShownUnit shown() const { return shown_unit(dimension, absolute_temperature, percent); }
  /// The value for people (SI prefix, degC, %).
  std::string display(double value) const { return shown().display(value); }
};

/// Reads the `tolerances:` block of a case tree (empty when absent), taking nominal values from the same tree.
/// Throws InputError with the entry's position.
std::vector<ToleranceSpec> read_tolerances(const Tree& root);

}  // namespace linkrise::netlist
