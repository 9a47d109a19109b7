#pragma once
// Physical quantities written as text with SI units and prefixes: "47 Ohm", "1.2 mF", "25 degC".
#include <array>
#include <optional>
#include <string>
#include <string_view>

namespace linkrise::netlist {

/// Exponents of the SI base units kg, m, s, A, K. Dimensionless is all zeros.
struct Dimension {
  std::array<int, 5> exponent{0, 0, 0, 0, 0};

  friend bool operator==(const Dimension&, const Dimension&) = default;
  Dimension operator*(const Dimension& other) const;
  Dimension operator/(const Dimension& other) const;
  Dimension power(int n) const;
  /// A plain name and the unit a person would write, e.g. "resistance (Ohm)".
  std::string describe() const;
  /// The SI unit symbol of a value in base units, e.g. "Ohm", "J/K", "kg"; empty for a plain number (outputs
  /// for people take their unit from ShownUnit).
  std::string symbol() const;

  static Dimension none();
  static Dimension mass();
  static Dimension length();
  static Dimension time();
  static Dimension current();
  static Dimension temperature();
  static Dimension voltage();
  static Dimension resistance();
  static Dimension capacitance();
  static Dimension inductance();
  static Dimension power_();
  static Dimension energy();
  static Dimension charge();
  static Dimension area();
  static Dimension heat_capacity();       // J/K
  static Dimension thermal_resistance();  // K/W
  static Dimension per_kelvin();          // 1/K
  static Dimension frequency();
};

/// 0 degC in kelvin: the one offset between the two temperature scales.
inline constexpr double kelvin_offset = 273.15;

/// A parsed value in SI base units. `bare` is true when the text had no unit at all.
struct Quantity {
  double value = 0.0;
  Dimension dimension;
  bool bare = false;
  /// True when the unit was an absolute temperature scale with an offset (degC).
  bool absolute_temperature = false;
};

/// Parses "<number> [unit]". Returns std::nullopt and sets `problem` when the text is not a quantity.
/// Prefixes: p n u µ m k M G (m is milli, M is mega). Units: Ohm Ω F H V A W s J K degC °C % ppm Ah C g m Hz,
/// with products (*, ·), quotients (/) and powers (^2, ², ³) such as J/K, K/W, mm², %/K, 1/K.
std::optional<Quantity> parse_quantity(std::string_view text, std::string& problem);

/// The SI prefix of a power of ten that is a multiple of 3 from -12 to 12 ("p" … "T", "µ" for -6; "" otherwise).
const char* si_prefix(int exponent);
/// Formats a number with an SI prefix and unit, e.g. 0.0012 F -> "1.2 mF" (for messages and terminal output).
std::string format_si(double value, std::string_view unit, int significant = 4);

/// The unit a value is shown in to people, and its conversion from SI (shown = SI·scale − offset). The one rule
/// for every output: an absolute temperature in degC, a temperature difference in K, a fraction of a whole
/// (state of charge, a ratio, a margin) in %, another plain number in "1", everything else in its SI symbol.
struct ShownUnit {
  std::string symbol;  // "degC", "%", "1", "Ohm", ...
  double scale = 1.0;
  double offset = 0.0;

  double shown(double si) const { return si * scale - offset; }
  /// A difference of two values in this unit: no offset, and K in place of degC.
  ShownUnit difference() const;
  /// The value for people: SI prefix where the unit takes one (format_si); a plain number without "1".
  std::string display(double si) const;
};
/// The shown unit of a value of `dimension`; `percent` (only for a plain number) marks a fraction of a whole.
ShownUnit shown_unit(const Dimension& dimension, bool absolute_temperature, bool percent = false);

/// A quantity for people: SI prefix and unit, an absolute temperature in degC ("33 Ohm", "25 degC").
std::string display_quantity(const Quantity& quantity);
/// Case-file text that reads back as exactly `value`, with the fewest digits that do ("3.3e-05 F", "25 degC";
/// a plain number, fractions included, without a unit).
std::string quantity_text(double value, const Dimension& dimension, bool absolute_temperature);

}  // namespace linkrise::netlist
