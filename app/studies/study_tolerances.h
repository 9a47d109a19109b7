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
// - Each entry's position in the block is its "slot" in the random stream (app/studies/random_stream.h): adding an
//   entry at the end leaves the draws of the earlier ones unchanged.
#include <cstdint>
#include <string>
#include <vector>

#include "netlist/input_error.h"
#include "netlist/tree.h"
#include "netlist/units.h"

namespace linkrise::app {

struct Tolerance {
  enum class Shape { Uniform, Normal };
  std::string path;
  Shape shape = Shape::Uniform;
  double lower = 0.0, upper = 0.0;  // SI
  double centre = 0.0;              // the normal's mean
  double sigma = 0.0;               // the normal's standard deviation (normal only)
  netlist::Dimension dimension;
  bool absolute_temperature = false;
  std::string description;  // for reports, e.g. "33 Ohm −5 % … +5 %, uniform"
  netlist::SourceMark mark;

  /// The value for a uniform draw u in (0, 1).
  double draw(double u) const;
  /// Case-file text of a value of this parameter.
  std::string text(double value) const;
  /// The value for people (SI prefix, degC).
  std::string display(double value) const;
};

/// Reads the `tolerances:` block (empty when absent). Throws InputError with the entry's position.
std::vector<Tolerance> read_tolerances(const netlist::Tree& root);

}  // namespace linkrise::app
